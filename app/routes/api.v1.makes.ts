import type { Route } from "./+types/api.v1.makes";
import { cachedJson, methodNotAllowed } from "~/services/http.server";
import { listMakes } from "~/services/library.server";

/** Every make with its colour notation and family count. */
export async function loader({ request }: Route.LoaderArgs) {
  const makes = await listMakes();
  return cachedJson(request, {
    makes: makes.map(({ slug, name, colourSystem, houseStyle, familyCount }) => ({ slug, name, colourSystem, houseStyle, familyCount })),
  });
}

export const action = () => methodNotAllowed();
