import type { Route } from "./+types/api.v1.families";
import { cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { toApiFamilySummary } from "~/services/api-mappers.server";
import { listFamilies } from "~/services/library.server";
import { familiesQuery, searchParams } from "~/validation/library";

/** Families, filtered by make and/or a model year they cover; paged. */
export async function loader({ request }: Route.LoaderArgs) {
  const q = familiesQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const page = await listFamilies(q.data);
  return cachedJson(request, { ...page, families: page.families.map(toApiFamilySummary) });
}

export const action = () => methodNotAllowed();
