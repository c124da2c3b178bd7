import { databaseHealthy } from "~/services/database.server";
import { methodNotAllowed } from "~/services/http.server";
import { mailHealthy } from "~/services/mail.server";

/** Liveness and the state of each backing service; 200 even when degraded, 503 only when the database is down. */
export async function loader() {
  const [db, mail] = await Promise.all([databaseHealthy(), mailHealthy().catch(() => false)]);
  // The search stand-in arrives with its own issue; until then search is reported as down.
  const checks = { database: db ? "ok" : "down", search: "down", mail: mail ? "ok" : "down" };
  const status = Object.values(checks).every((c) => c === "ok") ? "ok" : "degraded";
  return Response.json({ status, checks }, { status: db ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}

export const action = () => methodNotAllowed();
