import type { Route } from "./+types/api.v1.colours.systems";
import { colourSystems } from "~/domain/colours";
import { cachedJson, methodNotAllowed } from "~/services/http.server";

/** Each colour notation's code table. */
export function loader({ request }: Route.LoaderArgs) {
  return cachedJson(request, { systems: colourSystems() }, "colour-systems-1");
}

export const action = () => methodNotAllowed();
