import type { Route } from "./+types/api.v1.search";
import { methodNotAllowed, validationError } from "~/services/http.server";
import { searchLibrary } from "~/services/search.server";
import { searchParams, searchQuery } from "~/validation/library";
import { toApiSearchHit } from "~/services/api-mappers.server";

/**
 * One box for the library: families, connector cards and pins, with facets. `source` says who answered: "index" (the
 * search service) or "database" (the fallback while the service is down or slow; results are reduced: no typo
 * tolerance, prefix matching only).
 */
export async function loader({ request }: Route.LoaderArgs) {
  const q = searchQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const r = await searchLibrary(q.data);
  return Response.json(
    {
      hits: r.hits.map(toApiSearchHit),
      facets: r.facets,
      total: r.total,
      limit: q.data.limit,
      offset: q.data.offset,
      source: r.source,
      reduced: r.source === "database",
      tookMs: r.tookMs,
    },
    { headers: { "Cache-Control": "no-store" } },
  );
}

export const action = () => methodNotAllowed();
