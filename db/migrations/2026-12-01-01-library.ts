import { DataTypes, type QueryInterface } from "sequelize";

const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ref = (table: string, allowNull = false, onDelete = "CASCADE") => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
});

/** The library and its loom graph: makes → families → systems → connectors → pins, wires, links, circuits. */
export async function up({ context: q }: { context: QueryInterface }) {
  await q.createTable("makes", {
    id,
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    colour_system: { type: DataTypes.STRING, allowNull: false },
    blurb: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
  });
  await q.createTable("families", {
    id,
    make_id: ref("makes"),
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    model_range: { type: DataTypes.STRING, allowNull: false },
    year_from: { type: DataTypes.INTEGER, allowNull: false },
    year_to: { type: DataTypes.INTEGER, allowNull: false },
    engine: { type: DataTypes.STRING, allowNull: false },
    displacement_cc: { type: DataTypes.INTEGER, allowNull: false },
    cylinders: { type: DataTypes.INTEGER, allowNull: false },
    firing_order: { type: DataTypes.STRING, allowNull: false },
    crank_deg: { type: DataTypes.INTEGER, allowNull: true },
    ignition: { type: DataTypes.STRING, allowNull: false },
    colour_system: { type: DataTypes.STRING, allowNull: false },
    blurb: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
  });
  await q.createTable("systems", {
    id,
    family_id: ref("families"),
    kind: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
  });
  await q.addIndex("systems", ["family_id", "kind"], { unique: true });
  await q.createTable("components", {
    id,
    family_id: ref("families"),
    system_id: ref("systems", true, "SET NULL"),
    key: { type: DataTypes.STRING, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
    location: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
  });
  await q.addIndex("components", ["family_id", "key"], { unique: true });
  await q.createTable("connectors", {
    id,
    family_id: ref("families"),
    system_id: ref("systems"),
    component_id: ref("components", true, "SET NULL"),
    slug: { type: DataTypes.STRING, allowNull: false, unique: true },
    name: { type: DataTypes.STRING, allowNull: false },
    location: { type: DataTypes.STRING, allowNull: false },
    gender: { type: DataTypes.STRING, allowNull: false },
    housing: { type: DataTypes.STRING, allowNull: false },
    mates_with_id: ref("connectors", true, "SET NULL"),
    rows: { type: DataTypes.INTEGER, allowNull: false },
    cols: { type: DataTypes.INTEGER, allowNull: false },
    cavities: { type: DataTypes.TEXT, allowNull: false },
    pin1: { type: DataTypes.STRING, allowNull: false },
    latch: { type: DataTypes.STRING, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    published_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.createTable("pins", {
    id,
    family_id: ref("families"),
    connector_id: ref("connectors", true),
    component_id: ref("components", true),
    cavity: { type: DataTypes.STRING, allowNull: false },
    colour_code: { type: DataTypes.STRING, allowNull: true },
    circuit: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    terminal: { type: DataTypes.STRING, allowNull: true },
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
  });
  // A cavity holds one pin; a bare component terminal exists once.
  await q.sequelize.query("CREATE UNIQUE INDEX pins_connector_cavity ON pins (connector_id, cavity) WHERE connector_id IS NOT NULL");
  await q.sequelize.query("CREATE UNIQUE INDEX pins_component_terminal ON pins (component_id, cavity) WHERE connector_id IS NULL");
  await q.createTable("wires", {
    id,
    family_id: ref("families"),
    from_pin_id: ref("pins"),
    to_pin_id: ref("pins"),
    colour_code: { type: DataTypes.STRING, allowNull: false },
    size_mm2: { type: DataTypes.REAL, allowNull: true },
    length_mm: { type: DataTypes.INTEGER, allowNull: true },
  });
  await q.addIndex("wires", ["from_pin_id"]);
  await q.addIndex("wires", ["to_pin_id"]);
  await q.createTable("component_links", {
    id,
    component_id: ref("components"),
    from_pin_id: ref("pins"),
    to_pin_id: ref("pins"),
    kind: { type: DataTypes.STRING, allowNull: false },
    label: { type: DataTypes.STRING, allowNull: false },
    switch_id: { type: DataTypes.STRING, allowNull: true },
    positions: { type: DataTypes.TEXT, allowNull: true },
    rating_a: { type: DataTypes.REAL, allowNull: true },
  });
  await q.createTable("circuits", {
    id,
    family_id: ref("families"),
    system_id: ref("systems"),
    slug: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING, allowNull: false },
    from_pin_id: ref("pins"),
    to_pin_id: ref("pins"),
    via: { type: DataTypes.TEXT, allowNull: false },
    switches: { type: DataTypes.TEXT, allowNull: false },
  });
  await q.addIndex("circuits", ["family_id", "slug"], { unique: true });
  await q.createTable("spec_values", {
    id,
    connector_id: ref("connectors"),
    name: { type: DataTypes.STRING, allowNull: false },
    min: { type: DataTypes.REAL, allowNull: false },
    max: { type: DataTypes.REAL, allowNull: false },
    unit: { type: DataTypes.STRING, allowNull: false },
    between_a: { type: DataTypes.STRING, allowNull: false },
    between_b: { type: DataTypes.STRING, allowNull: false },
    at_c: { type: DataTypes.REAL, allowNull: false, defaultValue: 20 },
    source: { type: DataTypes.STRING, allowNull: false },
  });
  await q.createTable("revisions", {
    id,
    connector_id: ref("connectors"),
    number: { type: DataTypes.INTEGER, allowNull: false },
    snapshot: { type: DataTypes.TEXT, allowNull: false },
    summary: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    published_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex("revisions", ["connector_id", "number"], { unique: true });
}

/** Drop the library tables, children first. */
export async function down({ context: q }: { context: QueryInterface }) {
  for (const t of ["revisions", "spec_values", "circuits", "component_links", "wires", "pins", "connectors", "components", "systems", "families", "makes"]) {
    await q.dropTable(t);
  }
}
