import { sequelize } from "~db/index.server.ts";
import { setupDatabase } from "~db/setup.ts";
import { startMailWorker } from "./mail.server";
import { startPhotoSweeper } from "./photos.server";
import { startSearchWorker } from "./search.server";

let ready: Promise<void> | null = null;

/** Make sure the schema is migrated (and, on an empty database, the demo seeded) before the first query. */
export function ensureDatabase(): Promise<void> {
  ready ??= (async () => {
    await setupDatabase({ seed: process.env.SEED_DEMO !== "false" });
    // The outbox worker runs inside the app process once the schema is there (MAIL_WORKER=off to leave it out).
    if (process.env.MAIL_WORKER !== "off") startMailWorker();
    startPhotoSweeper(); // interrupted uploads' leftovers, at start and hourly (PHOTO_SWEEPER=off to leave it out)
    startSearchWorker(); // reconcile the search index with the library once, then drain index jobs (SEARCH_WORKER=off)
  })().catch((e) => {
    ready = null;
    throw e;
  });
  return ready;
}

/** Whether the database answers (for the health route). */
export async function databaseHealthy(): Promise<boolean> {
  try {
    await ensureDatabase();
    await sequelize.query("SELECT 1");
    return true;
  } catch {
    return false;
  }
}
