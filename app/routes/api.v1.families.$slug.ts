import type { Route } from "./+types/api.v1.families.$slug";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";
import { toApiFamily } from "~/services/api-mappers.server";
import { getFamily } from "~/services/library.server";

/** One family with its systems and their connectors. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const found = await getFamily(params.slug);
  if (!found) return apiError(404, "not_found", `There is no family "${params.slug}" in the library.`);
  return cachedJson(request, { family: toApiFamily(found.family) });
}

export const action = () => methodNotAllowed();
