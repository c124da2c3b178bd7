/** Who may see a stored photo's file. */
import path from "node:path";
import { Photo } from "~db/models/index.ts";
import { can, type Role } from "~/domain/roles";
import { PHOTOS_DIR, SERVED_NAME } from "./storage.server";

/**
 * The file behind /photos/<file> if `viewer` may see it: a published photo (on a card) to anyone; any other only to
 * its owner and to moderators. Anything else is null, answered with 404, so a draft's existence does not leak.
 */
export async function photoForViewer(file: string, viewer: { id: number; role: string } | null): Promise<{ path: string; published: boolean } | null> {
  const m = SERVED_NAME.exec(file);
  if (!m) return null;
  const row = await Photo.findByPk(m[1], { attributes: ["id", "ownerId", "connectorId", "removedAt"] });
  if (!row || row.removedAt) return null;
  const published = row.connectorId != null;
  const allowed = published || (!!viewer && (viewer.id === row.ownerId || can(viewer.role as Role, "review.work")));
  return allowed ? { path: path.join(PHOTOS_DIR, file), published } : null;
}
