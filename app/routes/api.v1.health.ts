import { databaseHealthy } from "~/services/database.server";
import { methodNotAllowed } from "~/services/http.server";

/** Liveness and the state of each backing service; 503 only when the database is down. */
export async function loader() {
  const database = (await databaseHealthy()) ? "ok" : "down";
  // Search and mail stand-ins arrive with their own issues; until then they are reported as not configured.
  const checks = { database, search: "down", mail: "down" };
  const status = Object.values(checks).every((c) => c === "ok") ? "ok" : "degraded";
  return Response.json({ status, checks }, { status: database === "ok" ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}

export const action = () => methodNotAllowed();
