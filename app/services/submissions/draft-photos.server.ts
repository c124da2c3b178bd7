/** Which photos a proposal may show, and the release of a submission's own uploads it no longer lists. */
import { Op, type Transaction } from "sequelize";
import { Photo, type Submission } from "~db/models/index.ts";
import type { CardProposal } from "~/domain/submissions";
import { deleteRemovedPhotoFiles } from "../photos.server";
import { SubmissionError } from "./errors.server";

/**
 * Photos a proposal may show: those already on the card it edits, or the author's own unpublished uploads (to this
 * submission, or to none yet). Never another contributor's draft photo, nor a photo published on another card: either
 * would be served publicly on approval, under this submission's credit. Checked wherever a proposal's photos are set
 * (start, every edit) and again when it is published, inside the publishing transaction.
 */
export async function checkPhotos(
  s: Pick<Submission, "id" | "authorId" | "connectorId">,
  content: CardProposal,
  transaction: Transaction,
  status: 400 | 409 = 400,
) {
  if (!content.photos.length) return;
  const rows = await Photo.findAll({ where: { id: content.photos.map((p) => p.id), removedAt: null }, transaction });
  for (const [i, p] of content.photos.entries()) {
    const row = rows.find((r) => r.id === p.id);
    const onThisCard = !!row && s.connectorId !== null && row.connectorId === s.connectorId;
    const ownUnpublished = !!row && row.ownerId === s.authorId && row.connectorId === null && (row.submissionId === s.id || row.submissionId === null);
    if (!onThisCard && !ownUnpublished) {
      throw new SubmissionError(
        status,
        status === 400 ? "bad_request" : "conflict",
        `Photo ${i + 1} is not one of yours (unpublished) or of this card.`,
        `photos.${i}`,
      );
    }
  }
}

/**
 * Photos uploaded to this submission and never published that its proposal no longer lists are removed: the row is
 * marked (`removedAt`, so they stop counting against the uploader's quota and are no longer served) and the sweeper
 * deletes their files. A photo on a card is never touched here.
 */
export async function releaseDroppedPhotos(submissionId: number, keep: string[], transaction: Transaction): Promise<string[]> {
  const where = { submissionId, connectorId: null, removedAt: null, ...(keep.length ? { id: { [Op.notIn]: keep } } : {}) };
  const dropped = (await Photo.findAll({ where, attributes: ["id"], transaction })).map((r) => r.id);
  if (dropped.length) await Photo.update({ removedAt: new Date() }, { where: { id: dropped }, transaction });
  return dropped;
}

/** After the commit: the released photos' files go now (the sweeper catches what a crash leaves). */
export function afterRelease(ids: string[]) {
  if (ids.length) void deleteRemovedPhotoFiles(ids).catch((e) => console.error(`[photos] could not delete removed files: ${(e as Error)?.message ?? e}`));
}
