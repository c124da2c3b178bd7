import type { Route } from "./+types/api.v1.connectors.$slug";
import { apiError, cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { toApiConnector } from "~/services/api-mappers.server";
import { cardCsv, getConnectorCard } from "~/services/library.server";
import { connectorQuery, searchParams } from "~/validation/library";

/** A published connector card as JSON, or its pin map as CSV (?format=csv). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const q = connectorQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const found = await getConnectorCard(params.slug);
  if (!found) return apiError(404, "not_found", `There is no connector card "${params.slug}" in the library.`);
  const connector = toApiConnector(found.connector);
  if (q.data.format === "csv") {
    return new Response(cardCsv(found.connector), {
      headers: {
        "Content-Type": "text/csv; charset=utf-8",
        "Content-Disposition": `attachment; filename="${connector.slug}-r${connector.revision.number}.csv"`,
        "Cache-Control": "public, max-age=60",
      },
    });
  }
  return cachedJson(request, { connector }, `${connector.slug}-r${connector.revision.number}`);
}

export const action = () => methodNotAllowed();
