import type { Route } from "./+types/api.v1.families.$slug";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";
import { getFamily } from "~/services/library.server";

/** One family with its systems and their connectors. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const found = await getFamily(params.slug);
  if (!found) return apiError(404, "not_found", `There is no family "${params.slug}" in the library.`);
  const { family } = found;
  return cachedJson(request, {
    family: {
      ...family,
      systems: family.systems.map((s) => ({
        kind: s.kind, name: s.name,
        connectors: s.connectors.map(({ slug, name, pinCount, location, gender, housing }) => ({ slug, name, pinCount, location, gender, housing })),
      })),
    },
  });
}

export const action = () => methodNotAllowed();
