import type { Route } from "./+types/api.v1.families";
import { cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { listFamilies } from "~/services/library.server";
import { familiesQuery, searchParams } from "~/validation/library";

/** Families, filtered by make and/or a model year they cover; paged. */
export async function loader({ request }: Route.LoaderArgs) {
  const q = familiesQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  return cachedJson(request, await listFamilies(q.data));
}

export const action = () => methodNotAllowed();
