import type { QueryInterface } from "sequelize";

/**
 * What the workshop answers need to be a professional's: the family's system voltage and earth polarity, the make's
 * colour house style, each spec value's measuring conditions and kind (and "no upper limit" for an insulation test),
 * each component link's electrical model, and the fitting of each bare terminal (ring, spade, bullet).
 *
 * SQLite cannot drop NOT NULL from a column, so spec_values is rebuilt under its own name (nothing references it).
 */
export async function up({ context: q }: { context: QueryInterface }) {
  const run = (sql: string) => q.sequelize.query(sql);
  await run("ALTER TABLE makes ADD COLUMN house_style TEXT NOT NULL DEFAULT ''");
  await run("ALTER TABLE families ADD COLUMN system_voltage INTEGER NOT NULL DEFAULT 12");
  await run("ALTER TABLE families ADD COLUMN earth TEXT NOT NULL DEFAULT 'negative'");
  await run("ALTER TABLE component_links ADD COLUMN params TEXT");
  await run("ALTER TABLE pins ADD COLUMN fitting TEXT");
  await run("ALTER TABLE spec_values RENAME TO spec_values_old");
  await run(`CREATE TABLE spec_values (
    id INTEGER PRIMARY KEY AUTOINCREMENT,
    connector_id INTEGER NOT NULL REFERENCES connectors (id) ON DELETE CASCADE,
    name VARCHAR(255) NOT NULL,
    min REAL NOT NULL,
    max REAL,
    unit VARCHAR(255) NOT NULL,
    between_a VARCHAR(255) NOT NULL,
    between_b VARCHAR(255) NOT NULL,
    at_c REAL NOT NULL DEFAULT 20,
    source VARCHAR(255) NOT NULL,
    conditions TEXT NOT NULL DEFAULT '',
    kind TEXT NOT NULL DEFAULT 'resistance',
    material TEXT
  )`);
  await run(`INSERT INTO spec_values (id, connector_id, name, min, max, unit, between_a, between_b, at_c, source)
    SELECT id, connector_id, name, min, max, unit, between_a, between_b, at_c, source FROM spec_values_old`);
  await run("DROP TABLE spec_values_old");
  await run("CREATE INDEX spec_values_connector_id ON spec_values (connector_id)");
}

export async function down({ context: q }: { context: QueryInterface }) {
  const run = (sql: string) => q.sequelize.query(sql);
  await run(`CREATE TABLE spec_values_old (
    id INTEGER PRIMARY KEY AUTOINCREMENT,
    connector_id INTEGER NOT NULL REFERENCES connectors (id) ON DELETE CASCADE,
    name VARCHAR(255) NOT NULL, min REAL NOT NULL, max REAL NOT NULL, unit VARCHAR(255) NOT NULL,
    between_a VARCHAR(255) NOT NULL, between_b VARCHAR(255) NOT NULL, at_c REAL NOT NULL DEFAULT 20, source VARCHAR(255) NOT NULL
  )`);
  await run(`INSERT INTO spec_values_old SELECT id, connector_id, name, min, COALESCE(max, 1e12), unit, between_a, between_b, at_c, source FROM spec_values`);
  await run("DROP TABLE spec_values");
  await run("ALTER TABLE spec_values_old RENAME TO spec_values");
  for (const [table, column] of [
    ["pins", "fitting"],
    ["component_links", "params"],
    ["families", "earth"],
    ["families", "system_voltage"],
    ["makes", "house_style"],
  ]) {
    await run(`ALTER TABLE ${table} DROP COLUMN ${column}`);
  }
}
