/** A moderator's decision on a submission: one IMMEDIATE transaction, all or nothing (QUALITY D3, D4). */
import { IndexJob, Submission, SubmissionMessage, User, type Connector } from "~db/models/index.ts";
import { reviewOutcomeMessage } from "~/domain/mail-templates";
import { can } from "~/domain/roles";
import { nextState, STATE_LABELS, type SubmissionState } from "~/domain/submissions";
import { appUrl } from "../accounts.server";
import { audit, sequelize } from "../auth.server";
import { forgetFamilyGraph } from "../circuits.server";
import { forgetFinderIndex } from "../finder.server";
import { enqueueMail } from "../mail.server";
import { proposalOf } from "./context.server";
import { afterRelease, releaseDroppedPhotos } from "./draft-photos.server";
import { writeSubmission } from "./editing.server";
import { notFound, stale, SubmissionError, type Actor } from "./errors.server";
import { wrote } from "./faults.server";
import { publish } from "./publish.server";

export interface Decision {
  version: number;
  decision: "approve" | "return" | "decline";
  message: string;
}

const OUTCOME = { approve: "published", return: "returned", decline: "declined" } as const;

/**
 * A moderator's decision, all or nothing. Two moderators on one item: the first commits, the second gets 409 with the
 * current state (the conditional update on `version` matches no row). Approving publishes a new revision of the card.
 */
export async function decide(
  actor: Actor,
  id: number,
  d: Decision,
): Promise<{ state: SubmissionState; version: number; connector?: string; revision?: number }> {
  if (!can(actor.role, "review.work")) throw new SubmissionError(403, "forbidden", "This needs the moderator role.");
  if (!Number.isSafeInteger(id)) throw notFound();
  let familySlug: string | null = null;
  let released: string[] = [];
  const result = await sequelize.transaction(async (transaction) => {
    const s = await Submission.findByPk(id, { transaction });
    if (!s) throw notFound();
    if (s.version !== d.version) throw stale(s);
    if (s.authorId === actor.id) throw new SubmissionError(403, "forbidden", "Another moderator has to review your own submission.");
    const to = nextState(s.state as SubmissionState, d.decision);
    if (!to)
      throw new SubmissionError(409, "conflict", `This submission is ${STATE_LABELS[s.state as SubmissionState]}; there is nothing to decide.`, undefined, [], {
        state: s.state,
        version: s.version,
      });
    const now = new Date();
    await writeSubmission(s, { state: to, decidedAt: now, decidedBy: actor.id, updatedAt: now }, transaction);
    wrote("submission");
    let published: { connector: Connector; revision: number; familySlug: string } | null = null;
    if (d.decision === "approve") {
      published = await publish(s, transaction);
      familySlug = published.familySlug;
      await Submission.update(
        { connectorId: published.connector.id, familyId: published.connector.familyId, publishedRevision: published.revision },
        { where: { id: s.id }, transaction },
      );
    }
    // A declined submission is final: its unpublished photos are released.
    if (d.decision === "decline") released = await releaseDroppedPhotos(s.id, [], transaction);
    if (d.message.trim() || d.decision !== "approve") {
      await SubmissionMessage.create(
        {
          submissionId: s.id,
          authorId: actor.id,
          kind: d.decision === "approve" ? "approve" : d.decision === "return" ? "question" : "decline",
          text: d.message.trim(),
          createdAt: now,
        },
        { transaction },
      );
      wrote("message");
    }
    await audit(
      actor.id,
      `review.${d.decision}`,
      "submission",
      s.id,
      {
        version: s.version,
        reason: d.message.trim() || null,
        ...(published ? { connector: published.connector.slug, revision: published.revision } : {}),
      },
      transaction,
    );
    wrote("audit");
    const author = await User.findByPk(s.authorId, { transaction, rejectOnEmpty: true });
    const cardName = published?.connector.name ?? (proposalOf(s).name || "a connector card");
    await enqueueMail(
      {
        kind: `review-${OUTCOME[d.decision]}`,
        to: author.email,
        ...reviewOutcomeMessage({
          displayName: author.displayName,
          cardName,
          outcome: OUTCOME[d.decision],
          note: d.message,
          link: `${appUrl()}/submissions/${s.id}`,
        }),
      },
      transaction,
    );
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
