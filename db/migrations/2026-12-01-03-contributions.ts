import { DataTypes, type QueryInterface } from "sequelize";

const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ref = (table: string, allowNull = false, onDelete = "CASCADE") => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
});
const at = (allowNull = false) => ({ type: DataTypes.DATE, allowNull });
const text = (defaultValue = "") => ({ type: DataTypes.TEXT, allowNull: false, defaultValue });

/**
 * Contributions: submissions (a proposed card or an edit, with its conversation), photos, the search index's job
 * queue, and the moderator's side of a mistake report.
 */
export async function up({ context: q }: { context: QueryInterface }) {
  await q.createTable("submissions", {
    id,
    author_id: ref("users"),
    kind: { type: DataTypes.STRING, allowNull: false }, // new | edit
    family_id: ref("families", true, "SET NULL"),
    connector_id: ref("connectors", true, "SET NULL"), // the card an edit changes, or the card a new one became
    family_request: { type: DataTypes.TEXT, allowNull: true }, // JSON: a family that is not in the library yet
    base_revision: { type: DataTypes.INTEGER, allowNull: true },
    state: { type: DataTypes.STRING, allowNull: false, defaultValue: "draft" },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    content: text("{}"), // JSON: the proposed card (db/snapshot.ts's shape plus photos and goesTo)
    source_kind: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    source_detail: text(),
    summary: text(),
    idempotency_key: { type: DataTypes.STRING, allowNull: true },
    published_revision: { type: DataTypes.INTEGER, allowNull: true },
    created_at: at(),
    updated_at: at(),
    submitted_at: at(true),
    decided_at: at(true),
    decided_by: ref("users", true, "SET NULL"),
  });
  await q.addIndex("submissions", ["state", "submitted_at"]);
  await q.addIndex("submissions", ["author_id", "idempotency_key"], { unique: true });
  await q.createTable("submission_messages", {
    id,
    submission_id: ref("submissions"),
    author_id: ref("users", true, "SET NULL"),
    kind: { type: DataTypes.STRING, allowNull: false }, // question | answer | decline | approve
    text: text(),
    created_at: at(),
  });
  await q.addIndex("submission_messages", ["submission_id"]);
  await q.createTable("photos", {
    id: { type: DataTypes.STRING(36), primaryKey: true }, // a generated UUID: also the file's name
    owner_id: ref("users"),
    submission_id: ref("submissions", true, "SET NULL"),
    connector_id: ref("connectors", true, "SET NULL"), // set once published on a card
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    caption: text(),
    credit: text(),
    licence: { type: DataTypes.STRING, allowNull: false },
    consent_at: at(),
    original_name: text(), // escaped, for the moderator's eyes only; never a path
    width: { type: DataTypes.INTEGER, allowNull: false },
    height: { type: DataTypes.INTEGER, allowNull: false },
    thumb_width: { type: DataTypes.INTEGER, allowNull: false },
    thumb_height: { type: DataTypes.INTEGER, allowNull: false },
    bytes: { type: DataTypes.INTEGER, allowNull: false },
    created_at: at(),
    removed_at: at(true),
  });
  await q.addIndex("photos", ["owner_id"]);
  await q.addIndex("photos", ["submission_id"]);
  await q.addIndex("photos", ["connector_id"]);
  await q.createTable("index_jobs", {
    id,
    kind: { type: DataTypes.STRING, allowNull: false }, // connector | family
    subject_id: { type: DataTypes.INTEGER, allowNull: false },
    op: { type: DataTypes.STRING, allowNull: false, defaultValue: "upsert" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    created_at: at(),
    done_at: at(true),
  });
  await q.addIndex("index_jobs", ["done_at"]);
  await q.addColumn("mistake_reports", "resolved_by", ref("users", true, "SET NULL"));
  await q.addColumn("mistake_reports", "resolved_at", at(true));
  await q.addColumn("mistake_reports", "resolution", text());
}

/** Drop the contribution tables, children first. */
export async function down({ context: q }: { context: QueryInterface }) {
  await q.removeColumn("mistake_reports", "resolution");
  await q.removeColumn("mistake_reports", "resolved_at");
  await q.removeColumn("mistake_reports", "resolved_by");
  for (const t of ["index_jobs", "photos", "submission_messages", "submissions"]) await q.dropTable(t);
}
