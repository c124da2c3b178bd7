import type { Route } from "./+types/planner.cut-list[.]csv";
import { apiError, methodNotAllowed } from "~/services/http.server";
import { cutListCsv, parsePlanQuery, planFor } from "~/services/planner.server";

/** The planner's cut list as CSV, for the same query as the page. */
export async function loader({ request }: Route.LoaderArgs) {
  const { query, errors } = parsePlanQuery(new URL(request.url));
  const firstError = Object.entries(errors)[0];
  if (firstError) return apiError(400, "bad_request", firstError[1], firstError[0]);
  const planned = query.family ? await planFor(query) : null;
  if (!planned) return apiError(404, "not_found", `There is no family "${query.family}" in the library.`, "family");
  if (!planned.result) return apiError(400, "bad_request", "Keep at least one circuit.", "keep");
  if (!planned.result.ok) return apiError(400, "bad_request", planned.result.error.message, planned.result.error.field);
  return new Response(cutListCsv(planned.result.plan), {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${planned.family.slug}-cut-list.csv"` },
  });
}

export const action = () => methodNotAllowed();
