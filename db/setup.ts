import { migrateUp } from "./migrate.ts";
import { seedDemo } from "./seeders/demo.ts";
import { Make } from "./models/index.ts";

/** Migrate, then seed the demo library if the database holds no makes yet. Returns whether it seeded. */
export async function setupDatabase({ seed = true } = {}) {
  await migrateUp();
  if (seed && (await Make.count()) === 0) {
    await seedDemo();
    return true;
  }
  return false;
}
