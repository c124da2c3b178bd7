import { DataTypes, type QueryInterface } from "sequelize";

const id = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const ref = (table: string, allowNull = false, onDelete = "CASCADE") => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: "id" },
  onDelete,
});
const at = (allowNull = false) => ({ type: DataTypes.DATE, allowNull });

/** Accounts, server-side sessions, single-use tokens, the mail outbox, the audit log and the rider's garage. */
export async function up({ context: q }: { context: QueryInterface }) {
  await q.createTable("users", {
    id,
    email: { type: DataTypes.STRING, allowNull: false, unique: true },
    display_name: { type: DataTypes.STRING, allowNull: false },
    password_hash: { type: DataTypes.STRING, allowNull: false },
    role: { type: DataTypes.STRING, allowNull: false, defaultValue: "rider" },
    email_verified_at: at(true),
    password_changed_at: at(),
    created_at: at(),
    disabled_at: at(true),
  });
  // The cookie carries a random id; only its SHA-256 is stored, so a leaked table cannot be replayed.
  await q.createTable("sessions", {
    id,
    token_hash: { type: DataTypes.STRING, allowNull: false, unique: true },
    user_id: ref("users"),
    created_at: at(),
    last_seen_at: at(),
    expires_at: at(),
    revoked_at: at(true),
    user_agent: { type: DataTypes.STRING(300), allowNull: false, defaultValue: "" },
  });
  await q.addIndex("sessions", ["user_id"]);
  await q.createTable("tokens", {
    id,
    user_id: ref("users"),
    kind: { type: DataTypes.STRING, allowNull: false },
    token_hash: { type: DataTypes.STRING, allowNull: false, unique: true },
    expires_at: at(),
    used_at: at(true),
    created_at: at(),
  });
  await q.createTable("mail_outbox", {
    id,
    message_id: { type: DataTypes.STRING, allowNull: false, unique: true },
    kind: { type: DataTypes.STRING, allowNull: false },
    to_addr: { type: DataTypes.STRING, allowNull: false },
    subject: { type: DataTypes.STRING, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING, allowNull: false, defaultValue: "queued" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: at(),
    lease_until: at(true),
    last_error: { type: DataTypes.TEXT, allowNull: true },
    created_at: at(),
    sent_at: at(true),
  });
  await q.addIndex("mail_outbox", ["status", "next_attempt_at"]);
  await q.createTable("audit_log", {
    id,
    actor_id: ref("users", true, "SET NULL"),
    action: { type: DataTypes.STRING, allowNull: false },
    subject_type: { type: DataTypes.STRING, allowNull: false },
    subject_id: { type: DataTypes.STRING, allowNull: true },
    detail: { type: DataTypes.TEXT, allowNull: false, defaultValue: "{}" },
    at: at(),
  });
  await q.createTable("garage_items", {
    id,
    user_id: ref("users"),
    kind: { type: DataTypes.STRING, allowNull: false }, // card | bike
    connector_id: ref("connectors", true),
    family_id: ref("families", true),
    year: { type: DataTypes.INTEGER, allowNull: true },
    label: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    created_at: at(),
  });
  await q.addIndex("garage_items", ["user_id"]);
  await q.createTable("bike_checks", {
    id,
    user_id: ref("users"),
    connector_id: ref("connectors"),
    year: { type: DataTypes.INTEGER, allowNull: true },
    created_at: at(),
  });
  await q.addIndex("bike_checks", ["user_id", "connector_id"], { unique: true });
  await q.createTable("mistake_reports", {
    id,
    user_id: ref("users"),
    connector_id: ref("connectors"),
    revision: { type: DataTypes.INTEGER, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING, allowNull: false, defaultValue: "open" },
    created_at: at(),
  });
}

/** Drop the account tables, children first. */
export async function down({ context: q }: { context: QueryInterface }) {
  for (const t of ["mistake_reports", "bike_checks", "garage_items", "audit_log", "mail_outbox", "tokens", "sessions", "users"]) await q.dropTable(t);
}
