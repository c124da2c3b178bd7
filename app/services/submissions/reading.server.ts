/** Reading submissions: one for its author or a moderator, the lists, and the review queue. */
import { BikeCheck, Connector, Family, Make, MistakeReport, Submission, SubmissionMessage, User } from "~db/models/index.ts";
import { connectorSnapshot } from "~db/snapshot.ts";
import { can } from "~/domain/roles";
import { authorCanEdit, diffCards, STATE_LABELS, type CardProposal, type SubmissionState } from "~/domain/submissions";
import type { FamilyRequest } from "~/validation/submissions";
import { familyContext, proposalOf, snapshotToProposal, submissionProblems } from "./context.server";
import type { Actor } from "./errors.server";

export type SubmissionView = Awaited<ReturnType<typeof viewSubmission>>;

/** Whether `id` is `viewer`'s own submission: one lookup, for an action that must refuse early (before reading a body). */
export async function ownsSubmission(viewer: Actor, id: number): Promise<boolean> {
  if (!Number.isSafeInteger(id)) return false;
  return (await Submission.count({ where: { id, authorId: viewer.id } })) === 1;
}

/** A submission for its author or a moderator (anyone else: null, so its existence does not leak). */
export async function viewSubmission(viewer: Actor | null, id: number) {
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
    SubmissionMessage.findAll({ where: { submissionId: s.id }, order: [["id", "ASC"]] }).then(
      async (ms) => [ms, await User.findAll({ where: { id: ms.map((m) => m.authorId).filter((x): x is number => !!x) } })] as const,
    ),
    connectorId ? BikeCheck.findAll({ where: { connectorId } }) : [],
    connectorId ? MistakeReport.findAll({ where: { connectorId, status: "open" }, order: [["id", "ASC"]] }) : [],
  ]);
  const content = proposalOf(s);
  const problems = await submissionProblems(s, undefined, ctx, before); // the family and the published card were just read: not again
  const state = s.state as SubmissionState;
  return {
    id: s.id,
    kind: s.kind,
    state,
    stateLabel: STATE_LABELS[state],
    version: s.version,
    family: ctx.family,
    familyRequest,
    colourSystem: ctx.colourSystem,
    houseStyle: ctx.houseStyle,
    familyCards: ctx.cards,
    connector: connector ? { slug: connector.slug, name: connector.name, revision: connector.revision } : null,
    baseRevision: s.baseRevision,
    // The card was published again after this edit began: approving would overwrite that revision.
    stale: s.kind === "edit" && s.state !== "published" && !!connector && connector.revision !== s.baseRevision,
    content,
    before,
    diff: diffCards(before, content),
    sourceKind: s.sourceKind,
    sourceDetail: s.sourceDetail,
    summary: s.summary,
    author: { id: s.authorId, displayName: author?.displayName ?? "—" },
    mine: s.authorId === viewer.id,
    canEdit: s.authorId === viewer.id && authorCanEdit(state),
    canReview: moderator && state === "in_review" && s.authorId !== viewer.id,
    problems,
    messages: messages.map((m) => ({
      kind: m.kind,
      text: m.text,
      author: people.find((u) => u.id === m.authorId)?.displayName ?? "—",
      createdAt: m.createdAt.toISOString(),
    })),
    bikeChecked: { count: checks.length, years: [...new Set(checks.map((c) => c.year).filter((y): y is number => y !== null))].sort() },
    openReports: reports.map((r) => ({ id: r.id, text: r.text, revision: r.revision, createdAt: r.createdAt.toISOString() })),
    createdAt: s.createdAt.toISOString(),
    updatedAt: s.updatedAt.toISOString(),
    submittedAt: s.submittedAt?.toISOString() ?? null,
    decidedAt: s.decidedAt?.toISOString() ?? null,
    publishedRevision: s.publishedRevision,
  };
}

/** The API's JSON for a submission (the view without display-only extras). */
export function submissionJson(v: NonNullable<SubmissionView>) {
  const { familyCards: _cards, before: _before, ...rest } = v;
  return rest;
}

export interface ListQuery {
  state?: SubmissionState;
  make?: string;
  family?: string;
  mine?: boolean;
  limit: number;
  offset: number;
}

/** Submissions: the author's own, or (moderators) everyone's; the queue is `state: in_review`, oldest first. */
export async function listSubmissions(viewer: Actor, q: ListQuery) {
  const where: Record<string | symbol, unknown> = {};
  if (q.mine || !can(viewer.role, "review.work")) where.authorId = viewer.id;
  if (q.state) where.state = q.state;
  const familyIds = await familyFilter(q.make, q.family);
  if (familyIds) where.familyId = familyIds;
  const queue = q.state === "in_review";
  const { rows, count } = await Submission.findAndCountAll({
    where,
    limit: q.limit,
    offset: q.offset,
    order: queue
      ? [
          ["submittedAt", "ASC"],
          ["id", "ASC"],
        ]
      : [
          ["updatedAt", "DESC"],
          ["id", "DESC"],
        ],
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
      id: s.id,
      kind: s.kind,
      state: s.state as SubmissionState,
      stateLabel: STATE_LABELS[s.state as SubmissionState],
      version: s.version,
      title: content.name || c?.name || "Untitled card",
      family: f ? { slug: f.slug, name: f.name, make: { slug: f.make!.slug, name: f.make!.name } } : null,
      familyRequest: req ? { make: req.make, name: req.name } : null,
      connector: c ? { slug: c.slug, name: c.name } : null,
      author: { id: s.authorId, displayName: authors.find((u) => u.id === s.authorId)?.displayName ?? "—" },
      lastMessage: last ? { kind: last.kind, text: last.text, createdAt: last.createdAt.toISOString() } : null,
      submittedAt: s.submittedAt?.toISOString() ?? null,
      updatedAt: s.updatedAt.toISOString(),
    };
  });
}

/** The review queue: submissions in review and open mistake reports, oldest first, filterable by make and family. */
export async function reviewQueue(q: { make?: string; family?: string }) {
  const familyIds = await familyFilter(q.make, q.family);
  const subs = await Submission.findAll({
    where: { state: "in_review", ...(familyIds ? { familyId: familyIds } : {}) },
    order: [
      ["submittedAt", "ASC"],
      ["id", "ASC"],
    ],
    limit: 200,
  });
  const connWhere = familyIds ? { familyId: familyIds } : {};
  const conns = await Connector.findAll({ where: connWhere, include: [{ model: Family, as: "family" }] });
  const reports = await MistakeReport.findAll({ where: { status: "open", connectorId: conns.map((c) => c.id) }, order: [["createdAt", "ASC"]], limit: 200 });
  const reporters = await User.findAll({ where: { id: reports.map((r) => r.userId) } });
  const items = [
    ...(await summaries(subs)).map((s) => ({ type: "submission" as const, key: String(s.id), at: s.submittedAt ?? s.updatedAt, submission: s, report: null })),
    ...reports.map((r) => {
      const c = conns.find((x) => x.id === r.connectorId)!;
      return {
        type: "report" as const,
        key: `report-${r.id}`,
        at: r.createdAt.toISOString(),
        submission: null,
        report: {
          id: r.id,
          text: r.text,
          revision: r.revision,
          connector: { slug: c.slug, name: c.name },
          family: { slug: c.family!.slug, name: c.family!.name },
          reporter: reporters.find((u) => u.id === r.userId)?.displayName ?? "—",
        },
      };
    }),
  ].sort((a, b) => a.at.localeCompare(b.at));
  return { items };
}
