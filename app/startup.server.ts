/**
 * The app's start-up and shut-down, in one place (the composition root). The server calls `startApp()` before it
 * listens, so no request ever waits on a migration; the CLI and tests call it with the workers they want. Order:
 *   1. settings (app/env.server.ts, checked when this module loads: a bad value has already stopped the process),
 *   2. the database: migrate, seed the demo library into an empty one when asked, fill the full-text copy,
 *   3. the workers: mail outbox delivery, search index jobs, the sweep of interrupted uploads.
 * `stopApp()` undoes it on SIGTERM: workers stop and finish the pass in progress, then the database closes.
 */
import { sequelize } from "~db/index.server.ts";
import { setupDatabase } from "~db/setup.ts";
import { env } from "./env.server";
import { watchEventLoop } from "./infra/event-loop.server";
import { markDatabaseReady } from "./services/database.server";
import { startMailWorker, stopMailWorker } from "./services/mail.server";
import { startPhotoSweeper, stopPhotoSweeper } from "./services/photos.server";
import { startSearchWorker, stopSearchWorker } from "./services/search.server";

export interface Workers {
  /** Deliver the mail outbox (MAIL_WORKER). */
  mail: boolean;
  /** Reconcile the search index, then drain index jobs (SEARCH_WORKER). */
  search: boolean;
  /** Sweep interrupted uploads' leftovers, at start and hourly (PHOTO_SWEEPER). */
  photoSweeper: boolean;
}

/** The workers the settings ask for: all of them unless switched off. */
export const configuredWorkers = (): Workers => ({
  mail: env.MAIL_WORKER === "on",
  search: env.SEARCH_WORKER === "on",
  photoSweeper: env.PHOTO_SWEEPER === "on",
});
/** No workers: a command that does its one job and exits. */
export const NO_WORKERS: Workers = { mail: false, search: false, photoSweeper: false };

let started: Promise<void> | null = null;
let running: Workers = NO_WORKERS;

/** Migrate (and seed when asked), then start the workers. Once per process; a second call waits for the first. */
export function startApp(o: { seed?: boolean; workers?: Workers } = {}): Promise<void> {
  started ??= (async () => {
    await setupDatabase({ seed: o.seed ?? env.SEED_DEMO });
    markDatabaseReady();
    running = o.workers ?? configuredWorkers();
    if (running.mail) startMailWorker();
    if (running.search) startSearchWorker();
    if (running.photoSweeper) startPhotoSweeper();
    watchEventLoop(); // the loop's delay, from here on (the migration and seed above are start-up, not requests)
  })().catch((e) => {
    started = null;
    throw e;
  });
  return started;
}

/** Stop the workers (each finishes the pass it is in), then close the database. */
export async function stopApp(): Promise<void> {
  stopPhotoSweeper();
  await Promise.allSettled([stopMailWorker(), stopSearchWorker()]);
  running = NO_WORKERS;
  started = null;
  await sequelize.close().catch(() => {});
}
