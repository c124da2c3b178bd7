import type { QueryInterface } from "sequelize";
import { Umzug, SequelizeStorage } from "umzug";
import { sequelize } from "./index.server.ts";
import { migrations } from "./migrations/index.ts";

// Sequelize's sqlite dialect runs untransacted queries on one shared handle, so a raw BEGIN there makes
// the whole migration atomic (a crash mid-migration leaves the schema as it was: re-runnable).
async function inTransaction(work: () => Promise<void>) {
  await sequelize.query("BEGIN IMMEDIATE");
  try {
    await work();
    await sequelize.query("COMMIT");
  } catch (e) {
    await sequelize.query("ROLLBACK");
    throw e;
  }
}

/** The migrator: dated migrations, each in its own transaction, recorded in SequelizeMeta. */
export function migrator() {
  return new Umzug<QueryInterface>({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }: { context: QueryInterface }) => inTransaction(() => m.up({ context })),
      down: ({ context }: { context: QueryInterface }) => inTransaction(() => m.down({ context })),
    })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize }),
    logger: undefined,
  });
}

/** Apply every pending migration. */
export async function migrateUp() {
  return migrator().up();
}
