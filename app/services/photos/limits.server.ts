/** The photo pipeline's limits: sizes, counts and rates (env overrides), the licence, and the quota check. */
import { type Transaction } from "sequelize";
import { Photo, Submission } from "~db/models/index.ts";
import { PhotoError } from "./errors.server";
import { env } from "~/env.server";

export const KiB = 1024;
const MiB = 1024 * KiB;

/** Upload limits (QUALITY "Open choices": 15 MB per photo, 12 per submission, 50 MP pixel cap); env overrides. */
export const PHOTO_LIMITS = Object.freeze({
  /** Bytes per uploaded file (PHOTO_MAX_BYTES). */
  maxBytes: env.PHOTO_MAX_BYTES,
  /** Photos on one submission. */
  perSubmission: env.PHOTO_PER_SUBMISSION,
  /** Files in one request. */
  perRequest: env.PHOTO_PER_REQUEST,
  /** Photos one contributor may keep (PHOTO_USER_COUNT). */
  perUserCount: env.PHOTO_USER_COUNT,
  /** Stored bytes (display + thumbnail) one contributor may keep (PHOTO_USER_BYTES). */
  perUserBytes: env.PHOTO_USER_BYTES,
  /** Upload requests per user per minute (PHOTO_PER_MINUTE; ASVS V11.1.4). */
  perMinute: env.PHOTO_PER_MINUTE,
  /**
   * Decoded pixels per image, checked from the header before decoding (ASVS 5.0 V5.2.6 "pixel flood"). QUALITY.md
   * suggests 50 MP; sharp's own default, 268 402 689 (0x3FFF²), is far more than any phone photo needs.
   */
  maxPixels: env.PHOTO_MAX_PIXELS,
  /** Long edge of the display size and of the thumbnail, in pixels. */
  displayEdge: 1600,
  thumbEdge: 320,
  /** Text fields in one request, and their total size. */
  maxFields: 50,
  textBytes: 64 * KiB,
});

/** The whole body may not exceed this: every file at its limit plus 64 KiB for the text fields and part headers. */
export const MAX_BODY_BYTES = PHOTO_LIMITS.perRequest * PHOTO_LIMITS.maxBytes + 64 * KiB;

/** The licence every photo is shared under; the contributor consents to it on upload. */
export const PHOTO_LICENCE = "CC BY-SA 4.0";
export const PHOTO_LICENCE_URL = "https://creativecommons.org/licenses/by-sa/4.0/";

export const mb = (n: number) => `${Math.round((n / MiB) * 10) / 10} MB`;

// ---- quotas -----------------------------------------------------------------------------------------------------

/** Quotas and the submission's rules for adding `count` photos of `bytes` stored bytes; returns the submission. */
export async function checkLimits(userId: number, submissionId: number | null, count: number, bytes: number, transaction?: Transaction) {
  const mine = { ownerId: userId, removedAt: null };
  const [have, used] = await Promise.all([
    Photo.count({ where: mine, transaction }),
    Photo.sum("bytes", { where: mine, transaction }).then((n) => Number(n ?? 0)),
  ]);
  if (have + count > PHOTO_LIMITS.perUserCount) {
    throw new PhotoError(
      429,
      "rate_limited",
      `You can keep at most ${PHOTO_LIMITS.perUserCount} photos and have ${have}: remove some from your drafts first.`,
      "photo",
    );
  }
  if (used + bytes > PHOTO_LIMITS.perUserBytes) {
    throw new PhotoError(
      413,
      "too_large",
      `Your photos may take at most ${mb(PHOTO_LIMITS.perUserBytes)} in all and already take ${mb(used)}: remove some from your drafts first.`,
      "photo",
    );
  }
  if (submissionId === null) return null;
  const submission = await Submission.findByPk(submissionId, { transaction });
  // Someone else's submission answers exactly like a missing one (QUALITY S2: no existence leak).
  if (!submission || submission.authorId !== userId) throw new PhotoError(404, "not_found", "There is no such submission of yours.", "submission");
  if (submission.state !== "draft" && submission.state !== "returned") {
    throw new PhotoError(
      409,
      "conflict",
      "This submission is with the moderators or decided: photos can only be added to a draft or a returned submission.",
      "submission",
    );
  }
  const onIt = await Photo.count({ where: { submissionId, removedAt: null }, transaction });
  if (onIt + count > PHOTO_LIMITS.perSubmission) {
    throw new PhotoError(429, "rate_limited", `A submission can have at most ${PHOTO_LIMITS.perSubmission} photos; this one has ${onIt}.`, "photo");
  }
  return submission;
}
