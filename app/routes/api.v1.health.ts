import { databaseHealthy } from "~/services/database.server";
import { eventLoopReport } from "~/infra/event-loop.server";
import { methodNotAllowed } from "~/services/http.server";
import { mailHealthy } from "~/services/mail.server";
import { searchBreaker, searchHealthy } from "~/services/search.server";

/** Liveness and the state of each backing service; 200 even when degraded, 503 only when the database is down. */
export async function loader() {
  const [db, mail, search] = await Promise.all([databaseHealthy(), mailHealthy().catch(() => false), searchHealthy()]);
  const checks = { database: db ? "ok" : "down", search: search ? "ok" : "down", mail: mail ? "ok" : "down" };
  const status = Object.values(checks).every((c) => c === "ok") ? "ok" : "degraded";
  // While the search service is away, /api/v1/search answers from the database (its breaker says how it is doing).
  // eventLoop: how long the loop was held since the previous health check (maxMs stays near the 10 ms sampling step).
  return Response.json(
    { status, checks, searchBreaker: searchBreaker(), eventLoop: eventLoopReport() },
    { status: db ? 200 : 503, headers: { "Cache-Control": "no-store" } },
  );
}

export const action = () => methodNotAllowed();
