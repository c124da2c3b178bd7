/** Starting, editing and submitting: a contributor's draft and its way into review (each write conditional on its version). */
import { randomUUID } from "node:crypto";
import { UniqueConstraintError, type Transaction } from "sequelize";
import { Connector, Family, Make, Submission, SubmissionMessage } from "~db/models/index.ts";
import { connectorSnapshot } from "~db/snapshot.ts";
import { can } from "~/domain/roles";
import { authorCanEdit, blankProposal, nextState, STATE_LABELS, type CardProposal, type SubmissionEvent, type SubmissionState } from "~/domain/submissions";
import { familyRequestSchema, type FamilyRequest } from "~/validation/submissions";
import { audit, sequelize } from "../auth.server";
import { snapshotToProposal, submissionProblems } from "./context.server";
import { afterRelease, checkPhotos, releaseDroppedPhotos } from "./draft-photos.server";
import { notFound, stale, SubmissionError, type Actor } from "./errors.server";

export interface StartInput {
  connector?: string;
  family?: string;
  familyRequest?: FamilyRequest;
  content?: CardProposal;
  sourceKind?: string;
  sourceDetail?: string;
  summary?: string;
  idempotencyKey?: string;
  submit?: boolean;
}

/**
 * Start a draft: an edit of a published card (starting from its live revision), a new card in a family, or a new card
 * with a request for a new family. The same idempotency key from the same author returns the first draft (D12).
 */
export async function startSubmission(actor: Actor, input: StartInput): Promise<{ id: number; created: boolean }> {
  if (!can(actor.role, "submission.create"))
    throw new SubmissionError(403, "forbidden", "Confirm your e-mail address first: contributing needs a verified address.");
  if (input.idempotencyKey) {
    const existing = await Submission.findOne({ where: { authorId: actor.id, idempotencyKey: input.idempotencyKey } });
    if (existing) return { id: existing.id, created: false };
  }
  try {
    const id = await sequelize.transaction(async (transaction) => {
      let kind: "new" | "edit" = "new";
      let familyId: number | null = null;
      let connectorId: number | null = null;
      let baseRevision: number | null = null;
      let content: CardProposal = input.content ?? blankProposal();
      let familyRequest: FamilyRequest | null = null;
      if (input.connector) {
        const c = await Connector.findOne({ where: { slug: input.connector }, transaction });
        if (!c) throw new SubmissionError(404, "not_found", `There is no connector card “${input.connector}”.`, "connector");
        kind = "edit";
        familyId = c.familyId;
        connectorId = c.id;
        baseRevision = c.revision;
        content = input.content ?? snapshotToProposal(await connectorSnapshot(c.id, transaction));
      } else if (input.family) {
        const f = await Family.findOne({ where: { slug: input.family }, transaction });
        if (!f) throw new SubmissionError(404, "not_found", `There is no family “${input.family}”.`, "family");
        familyId = f.id;
      } else if (input.familyRequest) {
        familyRequest = familyRequestSchema.parse(input.familyRequest);
        if (!(await Make.findOne({ where: { slug: familyRequest.make }, transaction }))) {
          throw new SubmissionError(400, "bad_request", "Choose a make that is in the library (an admin adds makes).", "familyRequest.make");
        }
      } else {
        throw new SubmissionError(400, "bad_request", "Say which card to edit, or which family a new card belongs to.");
      }
      const now = new Date();
      const s = await Submission.create(
        {
          authorId: actor.id,
          kind,
          familyId,
          connectorId,
          familyRequest,
          baseRevision,
          content,
          sourceKind: input.sourceKind ?? "",
          sourceDetail: input.sourceDetail ?? "",
          summary: input.summary ?? "",
          idempotencyKey: input.idempotencyKey ?? null,
          createdAt: now,
          updatedAt: now,
        },
        { transaction },
      );
      await checkPhotos(s, content, transaction);
      await audit(actor.id, "submission.start", "submission", s.id, { kind, connector: input.connector ?? null, family: input.family ?? null }, transaction);
      if (input.submit) await transition(actor, s, "submit", {}, transaction);
      return s.id;
    });
    return { id, created: true };
  } catch (e) {
    // Two identical requests racing: the unique (author, key) index lets one in; the other returns it.
    if (e instanceof UniqueConstraintError && input.idempotencyKey) {
      const existing = await Submission.findOne({ where: { authorId: actor.id, idempotencyKey: input.idempotencyKey } });
      if (existing) return { id: existing.id, created: false };
    }
    throw e;
  }
}

export interface UpdateInput {
  version: number;
  content?: CardProposal;
  sourceKind?: string;
  sourceDetail?: string;
  summary?: string;
  action?: "save" | "submit" | "withdraw";
  answer?: string;
}

/** Save a draft or a returned submission, submit it for review, or answer a moderator's question and resubmit. */
export async function updateSubmission(actor: Actor, id: number, input: UpdateInput): Promise<void> {
  if (!Number.isSafeInteger(id)) throw notFound();
  let released: string[] = [];
  // A save on a version that is already gone is refused before it joins the one-writer queue: under a burst of saves
  // to one draft the losers answer 409 at once instead of waiting their turn to be told so. The check is repeated
  // inside, where it counts (and the update is conditional on the version besides).
  const seen = await Submission.findByPk(id, { attributes: ["id", "authorId", "version", "state"] });
  if (!seen || seen.authorId !== actor.id) throw notFound();
  if (seen.version !== input.version) throw stale(seen);
  await sequelize.transaction(async (transaction) => {
    const s = await Submission.findByPk(id, { transaction });
    if (!s || s.authorId !== actor.id) throw notFound();
    if (s.version !== input.version) throw stale(s);
    if (!authorCanEdit(s.state as SubmissionState)) {
      throw new SubmissionError(
        409,
        "conflict",
        `This submission is ${STATE_LABELS[s.state as SubmissionState] ?? s.state} and can no longer be changed.`,
        undefined,
        [],
        { state: s.state, version: s.version },
      );
    }
    const changes: Partial<Submission> = {};
    if (input.content) {
      await checkPhotos(s, input.content, transaction);
      released = await releaseDroppedPhotos(
        s.id,
        input.content.photos.map((p) => p.id),
        transaction,
      );
      changes.content = input.content;
    }
    if (input.sourceKind !== undefined) changes.sourceKind = input.sourceKind;
    if (input.sourceDetail !== undefined) changes.sourceDetail = input.sourceDetail;
    if (input.summary !== undefined) changes.summary = input.summary;
    await writeSubmission(s, { ...changes, updatedAt: new Date() }, transaction);
    if (input.action === "submit") await transition(actor, s, "submit", { answer: input.answer }, transaction);
  });
  afterRelease(released);
}

/** Conditional update on the version the caller read: exactly one row or a 409 (no write bypasses the check). */
export async function writeSubmission(s: Submission, changes: Partial<Submission>, transaction: Transaction) {
  const [affected] = await Submission.update({ ...changes, version: s.version + 1 } as never, { where: { id: s.id, version: s.version }, transaction });
  if (affected !== 1) {
    const now = await Submission.findByPk(s.id, { transaction });
    throw now ? stale(now) : notFound();
  }
  Object.assign(s, changes, { version: s.version + 1 });
}

/** The author's transition to review (first time or after a question). */
async function transition(actor: Actor, s: Submission, event: SubmissionEvent, opts: { answer?: string }, transaction: Transaction) {
  const to = nextState(s.state as SubmissionState, event);
  if (!to)
    throw new SubmissionError(409, "conflict", `A submission that is ${STATE_LABELS[s.state as SubmissionState]} cannot be sent for review.`, undefined, [], {
      state: s.state,
      version: s.version,
    });
  const problems = await submissionProblems(s, transaction);
  if (problems.length)
    throw new SubmissionError(
      400,
      "bad_request",
      `Fix ${problems.length === 1 ? "this" : `these ${problems.length} things`} before sending it for review: ${problems[0].message}`,
      problems[0].field,
      problems,
    );
  const returned = s.state === "returned";
  if (returned && !(opts.answer ?? "").trim())
    throw new SubmissionError(400, "bad_request", "Answer the moderator's question before sending it back.", "answer");
  await writeSubmission(s, { state: to, submittedAt: s.submittedAt ?? new Date(), updatedAt: new Date() }, transaction);
  if (returned)
    await SubmissionMessage.create(
      { submissionId: s.id, authorId: actor.id, kind: "answer", text: opts.answer!.trim(), createdAt: new Date() },
      { transaction },
    );
  await audit(actor.id, returned ? "submission.resubmit" : "submission.submit", "submission", s.id, { version: s.version }, transaction);
}

/** A fresh idempotency key for a form that creates something. */
export const newIdempotencyKey = () => randomUUID();
