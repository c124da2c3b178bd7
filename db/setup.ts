import { migrateUp } from "./migrate.ts";
import { seedDemo } from "./seeders/demo.ts";
import { Make } from "./models/index.ts";
import { fallbackCount, rebuildFallbackIndex } from "./search-index.ts";

/**
 * Migrate, then seed the demo library if the database holds no makes yet, and fill the database's full-text index
 * when it is empty (a fresh seed, or a database from before it existed). Returns whether it seeded.
 */
export async function setupDatabase({ seed = true } = {}) {
  await migrateUp();
  let seeded = false;
  if (seed && (await Make.count()) === 0) {
    await seedDemo();
    seeded = true;
  }
  if ((await fallbackCount()) === 0 && (await Make.count()) > 0) await rebuildFallbackIndex();
  return seeded;
}
