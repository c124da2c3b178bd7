import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { sequelize } from "../index.server.ts";

const common = { sequelize, underscored: true, timestamps: false } as const;
const pk = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true };
const json = (field: string, allowNull = false) => ({
  type: DataTypes.TEXT,
  allowNull,
  get(this: Model) {
    const raw = this.getDataValue(field as never) as unknown as string | null;
    return raw == null ? null : JSON.parse(raw);
  },
  set(this: Model, value: unknown) {
    this.setDataValue(field as never, (value == null ? null : JSON.stringify(value)) as never);
  },
});

/** A proposed card or an edit to a published one, from draft to a decision. States: app/domain/submissions.ts. */
export class Submission extends Model<InferAttributes<Submission>, InferCreationAttributes<Submission>> {
  declare id: CreationOptional<number>;
  declare authorId: ForeignKey<number>;
  declare kind: "new" | "edit";
  declare familyId: number | null;
  declare connectorId: number | null;
  declare familyRequest: unknown;
  declare baseRevision: number | null;
  declare state: CreationOptional<string>;
  /** Bumped by every change; every write is a conditional UPDATE on it (optimistic locking). */
  declare version: CreationOptional<number>;
  declare content: unknown;
  declare sourceKind: CreationOptional<string>;
  declare sourceDetail: CreationOptional<string>;
  declare summary: CreationOptional<string>;
  declare idempotencyKey: string | null;
  declare publishedRevision: CreationOptional<number | null>;
  declare createdAt: Date;
  declare updatedAt: Date;
  declare submittedAt: CreationOptional<Date | null>;
  declare decidedAt: CreationOptional<Date | null>;
  declare decidedBy: CreationOptional<number | null>;
}
Submission.init(
  {
    id: pk,
    authorId: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING, allowNull: false },
    familyId: { type: DataTypes.INTEGER, allowNull: true },
    connectorId: { type: DataTypes.INTEGER, allowNull: true },
    familyRequest: json("familyRequest", true),
    baseRevision: { type: DataTypes.INTEGER, allowNull: true },
    state: { type: DataTypes.STRING, allowNull: false, defaultValue: "draft" },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    content: json("content"),
    sourceKind: { type: DataTypes.STRING, allowNull: false, defaultValue: "" },
    sourceDetail: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    summary: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    idempotencyKey: { type: DataTypes.STRING, allowNull: true },
    publishedRevision: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    updatedAt: { type: DataTypes.DATE, allowNull: false },
    submittedAt: { type: DataTypes.DATE, allowNull: true },
    decidedAt: { type: DataTypes.DATE, allowNull: true },
    decidedBy: { type: DataTypes.INTEGER, allowNull: true },
  },
  { ...common, tableName: "submissions" },
);

/** One turn of the conversation on a submission: a moderator's question, the contributor's answer, a decision's reason. */
export class SubmissionMessage extends Model<InferAttributes<SubmissionMessage>, InferCreationAttributes<SubmissionMessage>> {
  declare id: CreationOptional<number>;
  declare submissionId: ForeignKey<number>;
  declare authorId: number | null;
  declare kind: "question" | "answer" | "decline" | "approve";
  declare text: string;
  declare createdAt: Date;
}
SubmissionMessage.init(
  {
    id: pk,
    submissionId: { type: DataTypes.INTEGER, allowNull: false },
    authorId: { type: DataTypes.INTEGER, allowNull: true },
    kind: { type: DataTypes.STRING, allowNull: false },
    text: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    createdAt: { type: DataTypes.DATE, allowNull: false },
  },
  { ...common, tableName: "submission_messages" },
);

/** A processed photo (WebP display size and thumbnail under uploads/photos/<id>.webp and <id>.thumb.webp). */
export class Photo extends Model<InferAttributes<Photo>, InferCreationAttributes<Photo>> {
  declare id: string;
  declare ownerId: ForeignKey<number>;
  declare submissionId: number | null;
  /** Set while the photo is on a published card. */
  declare connectorId: CreationOptional<number | null>;
  declare position: CreationOptional<number>;
  declare caption: CreationOptional<string>;
  declare credit: CreationOptional<string>;
  declare licence: string;
  declare consentAt: Date;
  declare originalName: CreationOptional<string>;
  declare width: number;
  declare height: number;
  declare thumbWidth: number;
  declare thumbHeight: number;
  declare bytes: number;
  declare createdAt: Date;
  declare removedAt: CreationOptional<Date | null>;
}
Photo.init(
  {
    id: { type: DataTypes.STRING(36), primaryKey: true },
    ownerId: { type: DataTypes.INTEGER, allowNull: false },
    submissionId: { type: DataTypes.INTEGER, allowNull: true },
    connectorId: { type: DataTypes.INTEGER, allowNull: true },
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    caption: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    credit: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    licence: { type: DataTypes.STRING, allowNull: false },
    consentAt: { type: DataTypes.DATE, allowNull: false },
    originalName: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    width: { type: DataTypes.INTEGER, allowNull: false },
    height: { type: DataTypes.INTEGER, allowNull: false },
    thumbWidth: { type: DataTypes.INTEGER, allowNull: false },
    thumbHeight: { type: DataTypes.INTEGER, allowNull: false },
    bytes: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    removedAt: { type: DataTypes.DATE, allowNull: true },
  },
  { ...common, tableName: "photos" },
);

/** Work for the search index (issue 6 drains it): written in the same transaction as the change it follows. */
export class IndexJob extends Model<InferAttributes<IndexJob>, InferCreationAttributes<IndexJob>> {
  declare id: CreationOptional<number>;
  declare kind: "connector" | "family";
  declare subjectId: number;
  declare op: CreationOptional<"upsert" | "delete">;
  declare attempts: CreationOptional<number>;
  declare createdAt: Date;
  declare doneAt: CreationOptional<Date | null>;
}
IndexJob.init(
  {
    id: pk,
    kind: { type: DataTypes.STRING, allowNull: false },
    subjectId: { type: DataTypes.INTEGER, allowNull: false },
    op: { type: DataTypes.STRING, allowNull: false, defaultValue: "upsert" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    createdAt: { type: DataTypes.DATE, allowNull: false },
    doneAt: { type: DataTypes.DATE, allowNull: true },
  },
  { ...common, tableName: "index_jobs" },
);
