import type { Route } from "./+types/api.v1.families.$slug.circuits";
import { listCircuits } from "~/services/circuits.server";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";

/** A family's circuits, and how its ignition pairs cylinders for a wasted spark. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const found = await listCircuits(params.slug);
  if (!found) return apiError(404, "not_found", `There is no family "${params.slug}" in the library.`);
  return cachedJson(request, found);
}

export const action = () => methodNotAllowed();
