import { sequelize } from "~db/index.server.ts";
import { setupDatabase } from "~db/setup.ts";
import { env } from "~/env.server";

let ready = false;
let setup: Promise<void> | null = null;

/** Called by app/startup.server.ts once the schema is migrated (and the demo seeded, when asked). */
export function markDatabaseReady(): void {
  ready = true;
}

/** Migrate (and seed when the settings ask) if nothing has yet: for code run outside the server's start-up. */
export function ensureDatabase(): Promise<void> {
  if (ready) return Promise.resolve();
  setup ??= setupDatabase({ seed: env.SEED_DEMO }).then(markDatabaseReady, (e) => {
    setup = null;
    throw e;
  });
  return setup;
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
