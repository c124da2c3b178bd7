import { UniqueConstraintError, type QueryInterface } from "sequelize";
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

/**
 * The migrator: dated migrations, each in its own transaction, recorded in SequelizeMeta. The record is written inside
 * the migration's own transaction, so a crash can never leave a migrated schema without its record (umzug's storage
 * would otherwise record it in a separate step afterwards, and every later start would fail re-running it); umzug's own
 * record that follows then finds the row there and is a no-op.
 */
export function migrator() {
  const storage = new SequelizeStorage({ sequelize });
  const log = storage.logMigration.bind(storage);
  storage.logMigration = async (params) => {
    try {
      await log(params);
    } catch (e) {
      if (!(e instanceof UniqueConstraintError)) throw e;
    }
  };
  const table = () => String(storage.model.getTableName()); // "sequelize_meta" (the models are underscored)
  const record = (name: string) => sequelize.query(`INSERT OR IGNORE INTO "${table()}" ("name") VALUES (?)`, { replacements: [name] });
  const unrecord = (name: string) => sequelize.query(`DELETE FROM "${table()}" WHERE "name" = ?`, { replacements: [name] });
  return new Umzug<QueryInterface>({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }: { context: QueryInterface }) =>
        inTransaction(async () => {
          await m.up({ context });
          await record(m.name);
        }),
      down: ({ context }: { context: QueryInterface }) =>
        inTransaction(async () => {
          await m.down({ context });
          await unrecord(m.name);
        }),
    })),
    context: sequelize.getQueryInterface(),
    storage,
    logger: undefined,
  });
}

/** Apply every pending migration. */
export async function migrateUp() {
  return migrator().up();
}
