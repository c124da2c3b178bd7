import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { sequelize } from "../index.server.ts";

const common = { sequelize, underscored: true, timestamps: false } as const;
const pk = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };

export type Role = "rider" | "contributor" | "moderator" | "admin";

/** A signed-up account. */
export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare displayName: string;
  declare passwordHash: string;
  declare role: Role;
  declare emailVerifiedAt: Date | null;
  declare passwordChangedAt: Date;
  declare createdAt: Date;
  declare disabledAt: Date | null;
}
User.init(
  {
    id: pk,
    email: { type: DataTypes.STRING, allowNull: false, unique: true },
    displayName: { type: DataTypes.STRING, allowNull: false },
    passwordHash: { type: DataTypes.STRING, allowNull: false },
    role: { type: DataTypes.STRING, allowNull: false, defaultValue: "rider" },
    emailVerifiedAt: { type: DataTypes.DATE, allowNull: true },
    passwordChangedAt: { type: DataTypes.DATE, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    disabledAt: { type: DataTypes.DATE, allowNull: true },
  },
  { ...common, tableName: "users" },
);

/** A server-side session; the cookie holds the random id whose hash is `tokenHash`. */
export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
  declare id: CreationOptional<number>;
  declare tokenHash: string;
  declare userId: ForeignKey<number>;
  declare createdAt: Date;
  declare lastSeenAt: Date;
  declare expiresAt: Date;
  declare revokedAt: Date | null;
  declare userAgent: string;
}
Session.init(
  {
    id: pk,
    tokenHash: { type: DataTypes.STRING, allowNull: false, unique: true },
    userId: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    lastSeenAt: { type: DataTypes.DATE, allowNull: false },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    revokedAt: { type: DataTypes.DATE, allowNull: true },
    userAgent: { type: DataTypes.STRING(300), allowNull: false, defaultValue: "" },
  },
  { ...common, tableName: "sessions" },
);

/** A single-use e-mail token (verify e-mail, reset password); only its hash is stored. */
export class Token extends Model<InferAttributes<Token>, InferCreationAttributes<Token>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare kind: "verify" | "reset";
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: Date;
}
Token.init(
  {
    id: pk,
    userId: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    tokenHash: { type: DataTypes.STRING, allowNull: false, unique: true },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    usedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "tokens" },
);

/** A message committed with the action that causes it, delivered later by the outbox worker. */
export class MailOutbox extends Model<InferAttributes<MailOutbox>, InferCreationAttributes<MailOutbox>> {
  declare id: CreationOptional<number>;
  declare messageId: string;
  declare kind: string;
  declare toAddr: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare status: CreationOptional<"queued" | "sending" | "sent" | "failed">;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare leaseUntil: Date | null;
  declare lastError: string | null;
  declare createdAt: Date;
  declare sentAt: Date | null;
}
MailOutbox.init(
  {
    id: pk,
    messageId: { type: DataTypes.STRING, allowNull: false, unique: true },
    kind: { type: DataTypes.STRING, allowNull: false },
    toAddr: { type: DataTypes.STRING, allowNull: false },
    subject: { type: DataTypes.STRING, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    html: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING, allowNull: false, defaultValue: "queued" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    nextAttemptAt: { type: DataTypes.DATE, allowNull: false },
    leaseUntil: { type: DataTypes.DATE, allowNull: true },
    lastError: { type: DataTypes.TEXT, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    sentAt: { type: DataTypes.DATE, allowNull: true },
  },
  { ...common, tableName: "mail_outbox" },
);

/** Who did what, when and why. */
export class AuditLog extends Model<InferAttributes<AuditLog>, InferCreationAttributes<AuditLog>> {
  declare id: CreationOptional<number>;
  declare actorId: ForeignKey<number> | null;
  declare action: string;
  declare subjectType: string;
  declare subjectId: string | null;
  declare detail: string;
  declare at: Date;
}
AuditLog.init(
  {
    id: pk,
    actorId: { type: DataTypes.INTEGER, allowNull: true },
    action: { type: DataTypes.STRING, allowNull: false },
    subjectType: { type: DataTypes.STRING, allowNull: false },
    subjectId: { type: DataTypes.STRING, allowNull: true },
    detail: { type: DataTypes.TEXT, allowNull: false, defaultValue: "{}" },
    at: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "audit_log" },
);

/** A card or a bike a rider keeps in their garage. */
export class GarageItem extends Model<InferAttributes<GarageItem>, InferCreationAttributes<GarageItem>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare kind: "card" | "bike";
  declare connectorId: ForeignKey<number> | null;
  declare familyId: ForeignKey<number> | null;
  declare year: number | null;
  declare label: string;
  declare createdAt: Date;
}
GarageItem.init(
  {
    id: pk,
    userId: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    connectorId: { type: DataTypes.INTEGER, allowNull: true },
    familyId: { type: DataTypes.INTEGER, allowNull: true },
    year: { type: DataTypes.INTEGER, allowNull: true },
    label: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "garage_items" },
);

/** A rider's confirmation that a card matches their own bike. */
export class BikeCheck extends Model<InferAttributes<BikeCheck>, InferCreationAttributes<BikeCheck>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare connectorId: ForeignKey<number>;
  declare year: number | null;
  declare createdAt: Date;
}
BikeCheck.init(
  {
    id: pk,
    userId: { type: DataTypes.INTEGER, allowNull: false },
    connectorId: { type: DataTypes.INTEGER, allowNull: false },
    year: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "bike_checks" },
);

/** A rider's report that a card is wrong; it feeds the review queue. */
export class MistakeReport extends Model<InferAttributes<MistakeReport>, InferCreationAttributes<MistakeReport>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare connectorId: ForeignKey<number>;
  declare revision: number;
  declare text: string;
  declare status: CreationOptional<string>; // open | resolved | dismissed
  declare createdAt: Date;
  declare resolvedBy: CreationOptional<number | null>;
  declare resolvedAt: CreationOptional<Date | null>;
  declare resolution: CreationOptional<string>;
}
MistakeReport.init(
  {
    id: pk,
    userId: { type: DataTypes.INTEGER, allowNull: false },
    connectorId: { type: DataTypes.INTEGER, allowNull: false },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING, allowNull: false, defaultValue: "open" },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    resolvedBy: { type: DataTypes.INTEGER, allowNull: true },
    resolvedAt: { type: DataTypes.DATE, allowNull: true },
    resolution: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
  },
  { ...common, tableName: "mistake_reports" },
);
