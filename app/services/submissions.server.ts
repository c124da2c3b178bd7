/**
 * Submissions and review: a contributor's draft of a new card or an edit, its way through review, and the atomic
 * publish. One decision = one IMMEDIATE transaction writing the submission (state, version + 1), the live card and its
 * revision snapshot, the conversation, the audit row, the outbox mail and the search index job (QUALITY "Design the
 * tests assume"). Every write to a submission is conditional on the version the writer read (optimistic locking).
 */
import { randomUUID } from "node:crypto";
import { Op, UniqueConstraintError, type Transaction } from "sequelize";
import { checkLibrary } from "~db/check.ts";
import {
  BikeCheck, Circuit, ComponentLink, Connector, Family, IndexJob, Make, MistakeReport, Photo, Pin, Revision, SpecValue,
  Submission, SubmissionMessage, System, User, Wire,
} from "~db/models/index.ts";
import { libraryDocs, writeFallbackDocs } from "~db/search-index.ts";
import { connectorSnapshot, type ConnectorSnapshot } from "~db/snapshot.ts";
import { houseFor, type ColourSystemId } from "~/domain/colours";
import { reviewOutcomeMessage } from "~/domain/mail-templates";
import { can, type Role } from "~/domain/roles";
import {
  authorCanEdit, blankProposal, diffCards, nextState, proposalProblems, STATE_LABELS,
  type CardProposal, type Problem, type SubmissionEvent, type SubmissionState,
} from "~/domain/submissions";
import { familyRequestSchema, proposalSchema, type FamilyRequest } from "~/validation/submissions";
import { appUrl } from "./accounts.server";
import { audit, sequelize } from "./auth.server";
import { forgetFamilyGraph } from "./circuits.server";
import { ensureDatabase } from "./database.server";
import { forgetFinderIndex } from "./finder.server";
import type { ApiErrorCode } from "./http.server";
import { apiError } from "./http.server";
import { enqueueMail } from "./mail.server";
import { deleteRemovedPhotoFiles } from "./photos.server";

interface Actor { id: number; role: Role; displayName?: string }

/** A refusal with its HTTP status; `problems` lists what keeps a proposal from review or publication. */
export class SubmissionError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly field?: string,
    readonly problems: Problem[] = [],
    readonly current?: { state: string; version: number },
  ) {
    super(message);
  }
}

/** The API's error shape for a SubmissionError (with problems and, on a 409, the current state and version). */
export function submissionErrorResponse(e: SubmissionError): Response {
  const base = apiError(e.status, e.code, e.message, e.field);
  if (!e.problems.length && !e.current) return base;
  return Response.json({ error: { code: e.code, message: e.message, ...(e.field ? { field: e.field } : {}), ...(e.problems.length ? { problems: e.problems } : {}), ...(e.current ? { current: e.current } : {}) } }, { status: e.status });
}

const notFound = () => new SubmissionError(404, "not_found", "There is no such submission.");
const stale = (s: Submission) => new SubmissionError(409, "conflict", "This submission changed since you opened it; reload to see its current state.", "version", [], { state: s.state, version: s.version });

// D4 (QUALITY): a test may inject a throw after each write of a decision to prove the whole decision rolls back.
type FaultPoint = "submission" | "card" | "revision" | "message" | "audit" | "outbox" | "index";
let faultHook: ((point: FaultPoint) => void) | null = null;
/** Test only: call `hook` after each write of a decision (throwing from it must roll everything back). */
export function setDecisionFaultHook(hook: typeof faultHook) {
  faultHook = hook;
}
const wrote = (point: FaultPoint) => faultHook?.(point);

// ---------------------------------------------------------------------------------------------------------------------
// Families and their cards

/** A family's notation (with its make's house style) and the cards a wire can go to (slug, name, cavities). */
async function familyContext(familyId: number | null, familyRequest: FamilyRequest | null, transaction?: Transaction) {
  if (familyId) {
    const family = await Family.findByPk(familyId, { include: [{ model: Make, as: "make" }], transaction, rejectOnEmpty: true });
    // Only what the editor needs of each card (a family has dozens; whole rows cost a millisecond more per view).
    const connectors = await Connector.findAll({ where: { familyId }, attributes: ["slug", "name", "cavities"], order: [["name", "ASC"]], transaction });
    return {
      family: { slug: family.slug, name: family.name, make: { slug: family.make!.slug, name: family.make!.name } },
      colourSystem: family.colourSystem as ColourSystemId,
      houseStyle: houseFor(family.colourSystem, family.make!.houseStyle),
      cards: connectors.map((c) => ({ slug: c.slug, name: c.name, cavities: c.cavities.map((x) => x.cavity) })),
    };
  }
  const make = familyRequest ? await Make.findOne({ where: { slug: familyRequest.make }, transaction }) : null;
  return {
    family: null,
    colourSystem: (make?.colourSystem ?? "en") as ColourSystemId,
    houseStyle: make ? houseFor(make.colourSystem, make.houseStyle) : null,
    cards: [] as { slug: string; name: string; cavities: string[] }[],
  };
}

function proposalOf(s: Submission): CardProposal {
  const parsed = proposalSchema.safeParse(s.content);
  return parsed.success ? parsed.data : { ...blankProposal(), ...(s.content as object) } as CardProposal;
}

function snapshotToProposal(snap: ConnectorSnapshot): CardProposal {
  const { slug: _slug, ...rest } = snap;
  return rest as CardProposal;
}

/**
 * Everything that keeps this submission from review: the proposal's problems, how the contributor knows, photos, and
 * the conditions of every spec it adds or changes against the published card (`before`, read here when not given).
 */
async function submissionProblems(
  s: Submission, transaction?: Transaction, known?: Awaited<ReturnType<typeof familyContext>>, before?: CardProposal | null,
): Promise<Problem[]> {
  const ctx = known ?? await familyContext(s.familyId, (s.familyRequest as FamilyRequest | null) ?? null, transaction);
  const parsed = proposalSchema.safeParse(s.content);
  if (!parsed.success) return parsed.error.issues.map((i) => ({ field: i.path.map(String).join("."), message: i.message }));
  const cards = new Map(ctx.cards.map((c) => [c.slug, c.cavities]));
  const published = before !== undefined ? before
    : s.kind === "edit" && s.connectorId ? snapshotToProposal(await connectorSnapshot(s.connectorId, transaction)) : null;
  return proposalProblems(parsed.data, ctx.colourSystem, cards, {
    requireSource: { kind: s.sourceKind, detail: s.sourceDetail }, specsBefore: published?.specs ?? [], houseStyle: ctx.houseStyle,
  });
}

// ---------------------------------------------------------------------------------------------------------------------
// Starting, editing, submitting

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
  if (!can(actor.role, "submission.create")) throw new SubmissionError(403, "forbidden", "Confirm your e-mail address first: contributing needs a verified address.");
  await ensureDatabase();
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
      const s = await Submission.create({
        authorId: actor.id, kind, familyId, connectorId, familyRequest, baseRevision, content,
        sourceKind: input.sourceKind ?? "", sourceDetail: input.sourceDetail ?? "", summary: input.summary ?? "",
        idempotencyKey: input.idempotencyKey ?? null, createdAt: now, updatedAt: now,
      }, { transaction });
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

/**
 * Photos a proposal may show: those already on the card it edits, or the author's own unpublished uploads (to this
 * submission, or to none yet). Never another contributor's draft photo, nor a photo published on another card: either
 * would be served publicly on approval, under this submission's credit. Checked wherever a proposal's photos are set
 * (start, every edit) and again when it is published, inside the publishing transaction.
 */
async function checkPhotos(s: Pick<Submission, "id" | "authorId" | "connectorId">, content: CardProposal, transaction: Transaction, status: 400 | 409 = 400) {
  if (!content.photos.length) return;
  const rows = await Photo.findAll({ where: { id: content.photos.map((p) => p.id), removedAt: null }, transaction });
  for (const [i, p] of content.photos.entries()) {
    const row = rows.find((r) => r.id === p.id);
    const onThisCard = !!row && s.connectorId !== null && row.connectorId === s.connectorId;
    const ownUnpublished = !!row && row.ownerId === s.authorId && row.connectorId === null && (row.submissionId === s.id || row.submissionId === null);
    if (!onThisCard && !ownUnpublished) {
      throw new SubmissionError(status, status === 400 ? "bad_request" : "conflict", `Photo ${i + 1} is not one of yours (unpublished) or of this card.`, `photos.${i}`);
    }
  }
}

/**
 * Photos uploaded to this submission and never published that its proposal no longer lists are removed: the row is
 * marked (`removedAt`, so they stop counting against the uploader's quota and are no longer served) and the sweeper
 * deletes their files. A photo on a card is never touched here.
 */
async function releaseDroppedPhotos(submissionId: number, keep: string[], transaction: Transaction): Promise<string[]> {
  const where = { submissionId, connectorId: null, removedAt: null, ...(keep.length ? { id: { [Op.notIn]: keep } } : {}) };
  const dropped = (await Photo.findAll({ where, attributes: ["id"], transaction })).map((r) => r.id);
  if (dropped.length) await Photo.update({ removedAt: new Date() }, { where: { id: dropped }, transaction });
  return dropped;
}

/** After the commit: the released photos' files go now (the sweeper catches what a crash leaves). */
function afterRelease(ids: string[]) {
  if (ids.length) void deleteRemovedPhotoFiles(ids).catch((e) => console.error(`[photos] could not delete removed files: ${(e as Error)?.message ?? e}`));
}

/** Save a draft or a returned submission, submit it for review, or answer a moderator's question and resubmit. */
export async function updateSubmission(actor: Actor, id: number, input: UpdateInput): Promise<void> {
  if (!Number.isSafeInteger(id)) throw notFound();
  await ensureDatabase();
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
      throw new SubmissionError(409, "conflict", `This submission is ${STATE_LABELS[s.state as SubmissionState] ?? s.state} and can no longer be changed.`, undefined, [], { state: s.state, version: s.version });
    }
    const changes: Partial<Submission> = {};
    if (input.content) {
      await checkPhotos(s, input.content, transaction);
      released = await releaseDroppedPhotos(s.id, input.content.photos.map((p) => p.id), transaction);
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
async function writeSubmission(s: Submission, changes: Partial<Submission>, transaction: Transaction) {
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
  if (!to) throw new SubmissionError(409, "conflict", `A submission that is ${STATE_LABELS[s.state as SubmissionState]} cannot be sent for review.`, undefined, [], { state: s.state, version: s.version });
  const problems = await submissionProblems(s, transaction);
  if (problems.length) throw new SubmissionError(400, "bad_request", `Fix ${problems.length === 1 ? "this" : `these ${problems.length} things`} before sending it for review: ${problems[0].message}`, problems[0].field, problems);
  const returned = s.state === "returned";
  if (returned && !(opts.answer ?? "").trim()) throw new SubmissionError(400, "bad_request", "Answer the moderator's question before sending it back.", "answer");
  await writeSubmission(s, { state: to, submittedAt: s.submittedAt ?? new Date(), updatedAt: new Date() }, transaction);
  if (returned) await SubmissionMessage.create({ submissionId: s.id, authorId: actor.id, kind: "answer", text: opts.answer!.trim(), createdAt: new Date() }, { transaction });
  await audit(actor.id, returned ? "submission.resubmit" : "submission.submit", "submission", s.id, { version: s.version }, transaction);
}

// ---------------------------------------------------------------------------------------------------------------------
// Reading

export type SubmissionView = Awaited<ReturnType<typeof viewSubmission>>;

/** Whether `id` is `viewer`'s own submission: one lookup, for an action that must refuse early (before reading a body). */
export async function ownsSubmission(viewer: Actor, id: number): Promise<boolean> {
  await ensureDatabase();
  if (!Number.isSafeInteger(id)) return false;
  return (await Submission.count({ where: { id, authorId: viewer.id } })) === 1;
}

/** A submission for its author or a moderator (anyone else: null, so its existence does not leak). */
export async function viewSubmission(viewer: Actor | null, id: number) {
  await ensureDatabase();
  if (!viewer || !Number.isSafeInteger(id)) return null;
  const s = await Submission.findByPk(id);
  if (!s) return null;
  const moderator = can(viewer.role, "review.work");
  if (s.authorId !== viewer.id && !moderator) return null;
  const familyRequest = (s.familyRequest as FamilyRequest | null) ?? null;
  // Independent reads side by side: under load each await waits its turn on the one read handle, so the number of
  // steps in a row, not the number of queries, sets how long a save's answer takes.
  const connectorId = s.connectorId;
  const [ctx, connector, before, author, [messages, people], checks, reports] = await Promise.all([
    familyContext(s.familyId, familyRequest),
    connectorId ? Connector.findByPk(connectorId, { attributes: ["slug", "name", "revision"] }) : null,
    s.kind === "edit" && connectorId ? connectorSnapshot(connectorId).then(snapshotToProposal) : null,
    User.findByPk(s.authorId),
    SubmissionMessage.findAll({ where: { submissionId: s.id }, order: [["id", "ASC"]] })
      .then(async (ms) => [ms, await User.findAll({ where: { id: ms.map((m) => m.authorId).filter((x): x is number => !!x) } })] as const),
    connectorId ? BikeCheck.findAll({ where: { connectorId } }) : [],
    connectorId ? MistakeReport.findAll({ where: { connectorId, status: "open" }, order: [["id", "ASC"]] }) : [],
  ]);
  const content = proposalOf(s);
  const problems = await submissionProblems(s, undefined, ctx, before); // the family and the published card were just read: not again
  const state = s.state as SubmissionState;
  return {
    id: s.id, kind: s.kind, state, stateLabel: STATE_LABELS[state], version: s.version,
    family: ctx.family, familyRequest, colourSystem: ctx.colourSystem, houseStyle: ctx.houseStyle, familyCards: ctx.cards,
    connector: connector ? { slug: connector.slug, name: connector.name, revision: connector.revision } : null,
    baseRevision: s.baseRevision,
    // The card was published again after this edit began: approving would overwrite that revision.
    stale: s.kind === "edit" && s.state !== "published" && !!connector && connector.revision !== s.baseRevision,
    content, before, diff: diffCards(before, content),
    sourceKind: s.sourceKind, sourceDetail: s.sourceDetail, summary: s.summary,
    author: { id: s.authorId, displayName: author?.displayName ?? "—" },
    mine: s.authorId === viewer.id,
    canEdit: s.authorId === viewer.id && authorCanEdit(state),
    canReview: moderator && state === "in_review" && s.authorId !== viewer.id,
    problems,
    messages: messages.map((m) => ({ kind: m.kind, text: m.text, author: people.find((u) => u.id === m.authorId)?.displayName ?? "—", createdAt: m.createdAt.toISOString() })),
    bikeChecked: { count: checks.length, years: [...new Set(checks.map((c) => c.year).filter((y): y is number => y !== null))].sort() },
    openReports: reports.map((r) => ({ id: r.id, text: r.text, revision: r.revision, createdAt: r.createdAt.toISOString() })),
    createdAt: s.createdAt.toISOString(), updatedAt: s.updatedAt.toISOString(),
    submittedAt: s.submittedAt?.toISOString() ?? null, decidedAt: s.decidedAt?.toISOString() ?? null,
    publishedRevision: s.publishedRevision,
  };
}

/** The API's JSON for a submission (the view without display-only extras). */
export function submissionJson(v: NonNullable<SubmissionView>) {
  const { familyCards: _cards, before: _before, ...rest } = v;
  return rest;
}

export interface ListQuery { state?: SubmissionState; make?: string; family?: string; mine?: boolean; limit: number; offset: number }

/** Submissions: the author's own, or (moderators) everyone's; the queue is `state: in_review`, oldest first. */
export async function listSubmissions(viewer: Actor, q: ListQuery) {
  await ensureDatabase();
  const where: Record<string | symbol, unknown> = {};
  if (q.mine || !can(viewer.role, "review.work")) where.authorId = viewer.id;
  if (q.state) where.state = q.state;
  const familyIds = await familyFilter(q.make, q.family);
  if (familyIds) where.familyId = familyIds;
  const queue = q.state === "in_review";
  const { rows, count } = await Submission.findAndCountAll({
    where, limit: q.limit, offset: q.offset,
    order: queue ? [["submittedAt", "ASC"], ["id", "ASC"]] : [["updatedAt", "DESC"], ["id", "DESC"]],
  });
  return { submissions: await summaries(rows), total: count };
}

async function familyFilter(make?: string, family?: string): Promise<number[] | null> {
  if (!make && !family) return null;
  const where: Record<string, unknown> = {};
  if (family) where.slug = family;
  const fams = await Family.findAll({ where, include: [{ model: Make, as: "make", ...(make ? { where: { slug: make } } : {}) }] });
  return fams.map((f) => f.id);
}

async function summaries(rows: Submission[]) {
  const [families, connectors, authors, lastMessages] = await Promise.all([
    Family.findAll({ where: { id: rows.map((r) => r.familyId).filter((x): x is number => !!x) }, include: [{ model: Make, as: "make" }] }),
    Connector.findAll({ where: { id: rows.map((r) => r.connectorId).filter((x): x is number => !!x) } }),
    User.findAll({ where: { id: rows.map((r) => r.authorId) } }),
    SubmissionMessage.findAll({ where: { submissionId: rows.map((r) => r.id) }, order: [["id", "DESC"]] }),
  ]);
  return rows.map((s) => {
    const f = families.find((x) => x.id === s.familyId);
    const c = connectors.find((x) => x.id === s.connectorId);
    const content = s.content as Partial<CardProposal>;
    const req = s.familyRequest as FamilyRequest | null;
    const last = lastMessages.find((m) => m.submissionId === s.id);
    return {
      id: s.id, kind: s.kind, state: s.state as SubmissionState, stateLabel: STATE_LABELS[s.state as SubmissionState], version: s.version,
      title: content.name || c?.name || "Untitled card",
      family: f ? { slug: f.slug, name: f.name, make: { slug: f.make!.slug, name: f.make!.name } } : null,
      familyRequest: req ? { make: req.make, name: req.name } : null,
      connector: c ? { slug: c.slug, name: c.name } : null,
      author: { id: s.authorId, displayName: authors.find((u) => u.id === s.authorId)?.displayName ?? "—" },
      lastMessage: last ? { kind: last.kind, text: last.text, createdAt: last.createdAt.toISOString() } : null,
      submittedAt: s.submittedAt?.toISOString() ?? null, updatedAt: s.updatedAt.toISOString(),
    };
  });
}

/** The review queue: submissions in review and open mistake reports, oldest first, filterable by make and family. */
export async function reviewQueue(q: { make?: string; family?: string }) {
  await ensureDatabase();
  const familyIds = await familyFilter(q.make, q.family);
  const subs = await Submission.findAll({ where: { state: "in_review", ...(familyIds ? { familyId: familyIds } : {}) }, order: [["submittedAt", "ASC"], ["id", "ASC"]], limit: 200 });
  const connWhere = familyIds ? { familyId: familyIds } : {};
  const conns = await Connector.findAll({ where: connWhere, include: [{ model: Family, as: "family" }] });
  const reports = await MistakeReport.findAll({ where: { status: "open", connectorId: conns.map((c) => c.id) }, order: [["createdAt", "ASC"]], limit: 200 });
  const reporters = await User.findAll({ where: { id: reports.map((r) => r.userId) } });
  const items = [
    ...(await summaries(subs)).map((s) => ({ type: "submission" as const, key: String(s.id), at: s.submittedAt ?? s.updatedAt, submission: s, report: null })),
    ...reports.map((r) => {
      const c = conns.find((x) => x.id === r.connectorId)!;
      return {
        type: "report" as const, key: `report-${r.id}`, at: r.createdAt.toISOString(), submission: null,
        report: { id: r.id, text: r.text, revision: r.revision, connector: { slug: c.slug, name: c.name }, family: { slug: c.family!.slug, name: c.family!.name }, reporter: reporters.find((u) => u.id === r.userId)?.displayName ?? "—" },
      };
    }),
  ].sort((a, b) => a.at.localeCompare(b.at));
  return { items };
}

// ---------------------------------------------------------------------------------------------------------------------
// Deciding

export interface Decision { version: number; decision: "approve" | "return" | "decline"; message: string }

const OUTCOME = { approve: "published", return: "returned", decline: "declined" } as const;

/**
 * A moderator's decision, all or nothing. Two moderators on one item: the first commits, the second gets 409 with the
 * current state (the conditional update on `version` matches no row). Approving publishes a new revision of the card.
 */
export async function decide(actor: Actor, id: number, d: Decision): Promise<{ state: SubmissionState; version: number; connector?: string; revision?: number }> {
  if (!can(actor.role, "review.work")) throw new SubmissionError(403, "forbidden", "This needs the moderator role.");
  if (!Number.isSafeInteger(id)) throw notFound();
  await ensureDatabase();
  let familySlug: string | null = null;
  let released: string[] = [];
  const result = await sequelize.transaction(async (transaction) => {
    const s = await Submission.findByPk(id, { transaction });
    if (!s) throw notFound();
    if (s.version !== d.version) throw stale(s);
    if (s.authorId === actor.id) throw new SubmissionError(403, "forbidden", "Another moderator has to review your own submission.");
    const to = nextState(s.state as SubmissionState, d.decision);
    if (!to) throw new SubmissionError(409, "conflict", `This submission is ${STATE_LABELS[s.state as SubmissionState]}; there is nothing to decide.`, undefined, [], { state: s.state, version: s.version });
    const now = new Date();
    await writeSubmission(s, { state: to, decidedAt: now, decidedBy: actor.id, updatedAt: now }, transaction);
    wrote("submission");
    let published: { connector: Connector; revision: number; familySlug: string } | null = null;
    if (d.decision === "approve") {
      published = await publish(s, transaction);
      familySlug = published.familySlug;
      await Submission.update({ connectorId: published.connector.id, familyId: published.connector.familyId, publishedRevision: published.revision }, { where: { id: s.id }, transaction });
    }
    // A declined submission is final: its unpublished photos are released.
    if (d.decision === "decline") released = await releaseDroppedPhotos(s.id, [], transaction);
    if (d.message.trim() || d.decision !== "approve") {
      await SubmissionMessage.create({ submissionId: s.id, authorId: actor.id, kind: d.decision === "approve" ? "approve" : d.decision === "return" ? "question" : "decline", text: d.message.trim(), createdAt: now }, { transaction });
      wrote("message");
    }
    await audit(actor.id, `review.${d.decision}`, "submission", s.id, {
      version: s.version, reason: d.message.trim() || null, ...(published ? { connector: published.connector.slug, revision: published.revision } : {}),
    }, transaction);
    wrote("audit");
    const author = await User.findByPk(s.authorId, { transaction, rejectOnEmpty: true });
    const cardName = published?.connector.name ?? (proposalOf(s).name || "a connector card");
    await enqueueMail({
      kind: `review-${OUTCOME[d.decision]}`, to: author.email,
      ...reviewOutcomeMessage({ displayName: author.displayName, cardName, outcome: OUTCOME[d.decision], note: d.message, link: `${appUrl()}/submissions/${s.id}` }),
    }, transaction);
    wrote("outbox");
    if (published) {
      await IndexJob.create({ kind: "connector", subjectId: published.connector.id, op: "upsert", createdAt: now }, { transaction });
      wrote("index");
    }
    return { state: to, version: s.version, ...(published ? { connector: published.connector.slug, revision: published.revision } : {}) };
  });
  if (familySlug) {
    forgetFamilyGraph(familySlug);
    forgetFinderIndex();
  }
  afterRelease(released);
  return result;
}

const slugify = (s: string) => s.toLowerCase().normalize("NFKD").replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "card";

async function uniqueSlug(model: typeof Connector | typeof Family, base: string, transaction: Transaction) {
  for (let n = 1; ; n++) {
    const slug = n === 1 ? base : `${base}-${n}`;
    if (!(await (model as typeof Connector).findOne({ where: { slug }, transaction }))) return slug;
  }
}

/** Write the proposal to the live tables and keep the revision; refuse if the loom would no longer hold together. */
async function publish(s: Submission, transaction: Transaction): Promise<{ connector: Connector; revision: number; familySlug: string }> {
  const parsed = proposalSchema.safeParse(s.content);
  if (!parsed.success) throw new SubmissionError(409, "conflict", "The proposal is not complete; return it to the contributor.");
  const p = parsed.data;
  const now = new Date();

  // The family: the one chosen, or the requested one created now.
  let family: Family;
  let newFamily = false;
  if (s.familyId) family = await Family.findByPk(s.familyId, { transaction, rejectOnEmpty: true });
  else {
    const req = familyRequestSchema.parse(s.familyRequest);
    const make = await Make.findOne({ where: { slug: req.make }, transaction });
    if (!make) throw new SubmissionError(409, "conflict", "The requested family's make is no longer in the library.");
    family = await Family.create({
      makeId: make.id, slug: await uniqueSlug(Family, slugify(req.name), transaction), name: req.name, modelRange: req.modelRange || req.name,
      yearFrom: req.yearFrom, yearTo: req.yearTo, engine: req.engine || "—", displacementCc: req.displacementCc, cylinders: req.cylinders,
      firingOrder: req.firingOrder || "—", crankDeg: null, ignition: req.ignition || "—", colourSystem: make.colourSystem, blurb: "",
    }, { transaction });
    await audit(s.decidedBy ?? null, "family.create", "family", family.id, { slug: family.slug, fromSubmission: s.id }, transaction);
    await IndexJob.create({ kind: "family", subjectId: family.id, op: "upsert", createdAt: now }, { transaction });
    newFamily = true;
  }
  const ctx = await familyContext(family.id, null, transaction);
  const problems = proposalProblems(p, ctx.colourSystem, new Map(ctx.cards.map((c) => [c.slug, c.cavities])), { houseStyle: ctx.houseStyle });
  if (problems.length) throw new SubmissionError(409, "conflict", `The proposal no longer fits the library: ${problems[0].message}`, problems[0].field, problems);
  const before = new Set(await checkLibrary({ familyId: family.id, transaction }));

  const [system] = await System.findOrCreate({ where: { familyId: family.id, kind: p.system }, defaults: { familyId: family.id, kind: p.system, name: p.system[0].toUpperCase() + p.system.slice(1) }, transaction });
  let connector: Connector;
  let oldSnapshot: ConnectorSnapshot | null = null;
  const fields = {
    name: p.name, location: p.location, housing: p.housing || "—", gender: p.gender, systemId: system.id,
    rows: p.layout.rows, cols: p.layout.cols, cavities: p.layout.cavities, pin1: p.layout.pin1, latch: p.layout.latch, notes: p.notes,
  };
  if (s.kind === "edit") {
    connector = await Connector.findByPk(s.connectorId!, { transaction, rejectOnEmpty: true });
    if (connector.revision !== s.baseRevision) {
      throw new SubmissionError(409, "conflict", `The card was published again (revision ${connector.revision}) after this edit began from revision ${s.baseRevision}; return it so the contributor can start from the current card.`);
    }
    oldSnapshot = await connectorSnapshot(connector.id, transaction);
    await connector.update({ ...fields, revision: connector.revision + 1, publishedAt: now }, { transaction });
  } else {
    connector = await Connector.create({
      ...fields, familyId: family.id, componentId: null, matesWithId: null, slug: await uniqueSlug(Connector, `${family.slug}-${slugify(p.name)}`, transaction),
      revision: 1, publishedAt: now,
    }, { transaction });
  }

  // Mating partner.
  const mate = p.matesWith ? await Connector.findOne({ where: { slug: p.matesWith, familyId: family.id }, transaction }) : null;
  if (p.matesWith && !mate) throw new SubmissionError(409, "conflict", `“${p.matesWith}” is not a card of this family.`, "matesWith");
  if (mate && mate.id === connector.id) throw new SubmissionError(409, "conflict", "A connector cannot mate with itself.", "matesWith");
  if (mate && mate.matesWithId && mate.matesWithId !== connector.id) throw new SubmissionError(409, "conflict", `${mate.name} already mates with another connector.`, "matesWith");
  if (connector.matesWithId && connector.matesWithId !== mate?.id) {
    await Connector.update({ matesWithId: null }, { where: { id: connector.matesWithId, matesWithId: connector.id }, transaction });
  }
  await connector.update({ matesWithId: mate?.id ?? null }, { transaction });
  if (mate) await mate.update({ matesWithId: connector.id }, { transaction });

  // Pins, matched by cavity so wires and circuits keep their ends.
  const existing = await Pin.findAll({ where: { connectorId: connector.id }, transaction });
  const byCavity = new Map(existing.map((x) => [x.cavity, x]));
  const keep = new Set(p.pins.map((x) => x.cavity));
  for (const gone of existing.filter((x) => !keep.has(x.cavity))) {
    const circuit = await Circuit.findOne({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction });
    if (circuit) throw new SubmissionError(409, "conflict", `Cavity ${gone.cavity} starts or ends the circuit “${circuit.name}”, so its row cannot be taken out.`);
    if (await ComponentLink.findOne({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction })) {
      throw new SubmissionError(409, "conflict", `Cavity ${gone.cavity} leads into its component, so its row cannot be taken out.`);
    }
    await Wire.destroy({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction });
    await gone.destroy({ transaction });
  }
  const touched = new Set<number>();
  const oldGoesTo = new Map((oldSnapshot?.pins ?? []).map((x) => [x.cavity, x.goesTo]));
  for (const [position, row] of p.pins.entries()) {
    let pin = byCavity.get(row.cavity);
    const oldCode = pin?.colourCode ?? null;
    if (pin) await pin.update({ colourCode: row.code, circuit: row.circuit, terminal: row.terminal, position }, { transaction });
    else pin = await Pin.create({ familyId: family.id, connectorId: connector.id, componentId: connector.componentId, cavity: row.cavity, colourCode: row.code, circuit: row.circuit, terminal: row.terminal, position }, { transaction });
    // One physical wire carries one colour: a corrected code follows the wire to its other end and across the mate.
    if (oldCode && row.code && oldCode !== row.code) for (const id of await recolour(pin, oldCode, row.code, transaction)) touched.add(id);
    const was = oldGoesTo.get(row.cavity) ?? null;
    const same = (was?.connector ?? null) === (row.goesTo?.connector ?? null) && (was?.cavity ?? null) === (row.goesTo?.cavity ?? null);
    if (!connector.componentId && !same) await rewire(pin, row.goesTo, family.id, transaction);
  }
  touched.delete(connector.id);

  await SpecValue.destroy({ where: { connectorId: connector.id }, transaction });
  for (const sp of p.specs) {
    await SpecValue.create({
      connectorId: connector.id, name: sp.name, min: sp.min, max: sp.max, unit: sp.unit, betweenA: sp.between[0], betweenB: sp.between[1], atC: sp.atC, source: sp.source,
      conditions: sp.conditions, kind: sp.kind, material: sp.material,
    }, { transaction });
  }

  // Photos: the proposal's list, in its order, becomes the card's; photos it drops leave the card (files stay for history).
  // Checked again here: a photo may have been published elsewhere since the proposal was last saved.
  await checkPhotos({ id: s.id, authorId: s.authorId, connectorId: connector.id }, p, transaction, 409);
  await Photo.update({ connectorId: null }, { where: { connectorId: connector.id, id: { [Op.notIn]: p.photos.map((x) => x.id) } }, transaction });
  for (const [position, ph] of p.photos.entries()) {
    const [n] = await Photo.update({ connectorId: connector.id, position, caption: ph.caption, credit: ph.credit }, { where: { id: ph.id, removedAt: null }, transaction });
    if (n !== 1) throw new SubmissionError(409, "conflict", `Photo ${position + 1} is no longer available.`, `photos.${position}`);
  }
  wrote("card");

  const after = await checkLibrary({ familyId: family.id, transaction });
  const fresh = after.filter((x) => !before.has(x));
  if (fresh.length) {
    throw new SubmissionError(409, "conflict", `Publishing would leave the loom inconsistent: ${fresh[0].replace(/^[^:]+: /, "")}`, undefined, fresh.map((m) => ({ field: "loom", message: m })));
  }

  const revision = connector.revision;
  await Revision.create({ connectorId: connector.id, number: revision, snapshot: await connectorSnapshot(connector.id, transaction), summary: s.summary.trim().slice(0, 250) || (s.kind === "new" ? "First published card." : "Edited card."), publishedAt: now }, { transaction });
  // Cards whose wire colours followed this one get a revision too, so their history explains the change.
  for (const otherId of touched) {
    const other = await Connector.findByPk(otherId, { transaction, rejectOnEmpty: true });
    await other.update({ revision: other.revision + 1, publishedAt: now }, { transaction });
    await Revision.create({ connectorId: other.id, number: other.revision, snapshot: await connectorSnapshot(other.id, transaction), summary: `Wire colours follow ${connector.name}, revision ${revision}.`, publishedAt: now }, { transaction });
    await IndexJob.create({ kind: "connector", subjectId: other.id, op: "upsert", createdAt: now }, { transaction });
  }
  wrote("revision");
  // The database's own search copy changes with the card, in this transaction (the service follows via index_jobs).
  await writeFallbackDocs(await libraryDocs({ connectorIds: [connector.id, ...touched], familyIds: newFamily ? [family.id] : [] }, transaction), transaction);
  return { connector, revision, familySlug: family.slug };
}

/** Change a wire's colour code along the wire and across mated cavities (not through splices or components). */
async function recolour(start: Pin, from: string, to: string, transaction: Transaction): Promise<Set<number>> {
  const seen = new Set<number>([start.id]);
  const queue = [start];
  const connectors = new Set<number>();
  while (queue.length) {
    const pin = queue.shift()!;
    if (pin.connectorId) connectors.add(pin.connectorId);
    const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: pin.id }, { toPinId: pin.id }] }, transaction });
    for (const w of wires) {
      if (w.colourCode === from) await w.update({ colourCode: to }, { transaction });
      const other = await Pin.findByPk(w.fromPinId === pin.id ? w.toPinId : w.fromPinId, { transaction });
      if (other && !seen.has(other.id) && other.connectorId && other.colourCode === from) {
        seen.add(other.id);
        await other.update({ colourCode: to }, { transaction });
        queue.push(other);
      }
    }
    if (pin.connectorId) {
      const c = await Connector.findByPk(pin.connectorId, { transaction });
      const matePin = c?.matesWithId ? await Pin.findOne({ where: { connectorId: c.matesWithId, cavity: pin.cavity }, transaction }) : null;
      if (matePin && !seen.has(matePin.id) && matePin.colourCode === from) {
        seen.add(matePin.id);
        await matePin.update({ colourCode: to }, { transaction });
        queue.push(matePin);
      }
    }
  }
  return connectors;
}

/** Point a loom-side cavity's wire at a new far end (or none): its direct wires to connector cavities are replaced. */
async function rewire(pin: Pin, goesTo: { connector: string; cavity: string } | null, familyId: number, transaction: Transaction) {
  const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: pin.id }, { toPinId: pin.id }] }, transaction });
  for (const w of wires) {
    const other = await Pin.findByPk(w.fromPinId === pin.id ? w.toPinId : w.fromPinId, { transaction });
    if (other?.connectorId) await w.destroy({ transaction });
  }
  if (!goesTo) return;
  const target = await Connector.findOne({ where: { slug: goesTo.connector, familyId }, transaction });
  const end = target ? await Pin.findOne({ where: { connectorId: target.id, cavity: goesTo.cavity }, transaction }) : null;
  if (!end) throw new SubmissionError(409, "conflict", `${goesTo.connector} cavity ${goesTo.cavity} has no pin for the wire to end on.`);
  await Wire.create({ familyId, fromPinId: pin.id, toPinId: end.id, colourCode: pin.colourCode ?? end.colourCode ?? "", sizeMm2: null, lengthMm: null }, { transaction });
}

// ---------------------------------------------------------------------------------------------------------------------
// Mistake reports in the queue

/** One open or closed mistake report with its card, for a moderator. */
export async function viewReport(viewer: Actor | null, id: number) {
  if (!viewer || !can(viewer.role, "review.work") || !Number.isSafeInteger(id)) return null;
  await ensureDatabase();
  const r = await MistakeReport.findByPk(id);
  if (!r) return null;
  const c = await Connector.findByPk(r.connectorId, { include: [{ model: Family, as: "family" }] });
  const reporter = await User.findByPk(r.userId);
  const checks = await BikeCheck.findAll({ where: { connectorId: r.connectorId } });
  return {
    id: r.id, text: r.text, revision: r.revision, status: r.status, resolution: r.resolution, createdAt: r.createdAt.toISOString(),
    connector: { slug: c!.slug, name: c!.name, revision: c!.revision }, family: { slug: c!.family!.slug, name: c!.family!.name },
    reporter: reporter?.displayName ?? "—",
    bikeChecked: { count: checks.length, years: [...new Set(checks.map((x) => x.year).filter((y): y is number => y !== null))].sort() },
  };
}

/** Close a mistake report (fixed by an edit, or not a mistake), with a note; audited. A second moderator gets 409. */
export async function closeReport(actor: Actor, id: number, status: "resolved" | "dismissed", note: string) {
  if (!can(actor.role, "review.work")) throw new SubmissionError(403, "forbidden", "This needs the moderator role.");
  if (!note.trim()) throw new SubmissionError(400, "bad_request", "Say what was done about the report.", "message");
  await sequelize.transaction(async (transaction) => {
    const [n] = await MistakeReport.update({ status, resolution: note.trim(), resolvedBy: actor.id, resolvedAt: new Date() }, { where: { id, status: "open" }, transaction });
    if (n !== 1) {
      const r = await MistakeReport.findByPk(id, { transaction });
      if (!r) throw new SubmissionError(404, "not_found", "There is no such report.");
      throw new SubmissionError(409, "conflict", "Another moderator has already closed this report.", undefined, [], { state: r.status, version: 0 });
    }
    await audit(actor.id, `report.${status}`, "mistake_report", id, { note: note.trim() }, transaction);
  });
}

/** A fresh idempotency key for a form that creates something. */
export const newIdempotencyKey = () => randomUUID();


