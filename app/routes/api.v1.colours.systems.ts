import type { Route } from "./+types/api.v1.colours.systems";
import { colourSystems, houseStyles } from "~/domain/colours";
import { cachedJson, methodNotAllowed } from "~/services/http.server";

/** Each colour notation's code table, with the house styles makers write it in (for jis, several). */
export function loader({ request }: Route.LoaderArgs) {
  const systems = colourSystems().map((s) => ({ ...s, houseStyles: houseStyles(s.id).map(({ id, name, source, codes }) => ({ id, name, source, codes })) }));
  return cachedJson(request, { systems }, "colour-systems-2");
}

export const action = () => methodNotAllowed();
