import { sequelize } from "~db/index.server.ts";

let ready = false;

/** Called by app/startup.server.ts once the schema is migrated (and the demo seeded, when asked). */
export function markDatabaseReady(): void {
  ready = true;
}

/** Whether the database answers (for the health route): started, and a trivial query goes through. */
export async function databaseHealthy(): Promise<boolean> {
  if (!ready) return false;
  try {
    await sequelize.query("SELECT 1");
    return true;
  } catch {
    return false;
  }
}
