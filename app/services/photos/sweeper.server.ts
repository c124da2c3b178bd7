/** Sweeping what interrupted uploads and removed photos leave behind, now and then hourly. */
import { lstat, readdir, rm } from "node:fs/promises";
import path from "node:path";
import { Op } from "sequelize";
import { Photo } from "~db/models/index.ts";
import { ensureDirs, inFlight, PHOTO_FILE, PHOTOS_DIR, TMP_DIR, TMP_FILE } from "./storage.server";

const HOUR = 3600_000;

export interface SweepResult {
  tmpRemoved: number;
  partsRemoved: number;
  orphansRemoved: number;
  removedSwept: number;
  kept: number;
}

async function existingIds(ids: string[]): Promise<Set<string>> {
  const found = new Set<string>();
  for (let i = 0; i < ids.length; i += 500) {
    const rows = await Photo.findAll({ where: { id: { [Op.in]: ids.slice(i, i + 500) } }, attributes: ["id"] });
    for (const r of rows) found.add(r.id);
  }
  return found;
}

/** How old each file is (ms since its last change), null for one that is gone; stat'ed 64 at a time. */
async function agesOf(files: string[], now: number): Promise<(number | null)[]> {
  const ages: (number | null)[] = [];
  for (let i = 0; i < files.length; i += 64) {
    ages.push(
      ...(await Promise.all(
        files.slice(i, i + 64).map((f) =>
          lstat(f).then(
            (st) => now - st.mtimeMs,
            () => null,
          ),
        ),
      )),
    );
  }
  return ages;
}

/**
 * Remove what interrupted uploads leave behind: tmp/* older than tmpAgeMs (1 h), photos/*.part older than tmpAgeMs,
 * and photos/ files without a Photo row older than orphanAgeMs (24 h). A file whose row exists is never removed
 * (checked again right before unlinking), nor one an upload in this process is working on; and the files of photos
 * whose row is marked removed and is on no card. Idempotent.
 */
export async function sweepPhotos(opts: { now?: Date; tmpAgeMs?: number; orphanAgeMs?: number } = {}): Promise<SweepResult> {
  const now = (opts.now ?? new Date()).getTime();
  const tmpAge = opts.tmpAgeMs ?? HOUR;
  const orphanAge = opts.orphanAgeMs ?? 24 * HOUR;
  const result: SweepResult = { tmpRemoved: 0, partsRemoved: 0, orphansRemoved: 0, removedSwept: 0, kept: 0 };
  await ensureDirs();

  const tmp: { file: string; id?: string }[] = [];
  for (const name of await readdir(TMP_DIR)) {
    const id = TMP_FILE.exec(name)?.[1];
    if (id && inFlight.has(id)) result.kept++;
    else tmp.push({ file: path.join(TMP_DIR, name), id });
  }
  const tmpAges = await agesOf(
    tmp.map((t) => t.file),
    now,
  );
  for (const [i, t] of tmp.entries()) {
    if (tmpAges[i] === null || tmpAges[i]! < tmpAge || (t.id && inFlight.has(t.id))) {
      result.kept++;
      continue;
    }
    await rm(t.file, { force: true, recursive: true });
    result.tmpRemoved++;
  }

  // In-flight first, then the row: an upload that is no longer in flight has either committed its row or removed its files.
  const listed = (await readdir(PHOTOS_DIR)).flatMap((name) => {
    const m = PHOTO_FILE.exec(name);
    if (!m) return []; // not ours (e.g. .gitkeep): left alone
    if (inFlight.has(m[1])) {
      result.kept++;
      return [];
    }
    return [{ file: path.join(PHOTOS_DIR, name), id: m[1], part: !!m[3] }];
  });
  const photoAges = await agesOf(
    listed.map((c) => c.file),
    now,
  );
  const candidates = listed.filter((c, i) => {
    const old = photoAges[i] !== null && photoAges[i]! >= (c.part ? tmpAge : orphanAge);
    if (!old) result.kept++;
    return old;
  });
  const rows = await existingIds([...new Set(candidates.filter((c) => !c.part).map((c) => c.id))]);
  const orphans = candidates.filter((c) => c.part || !rows.has(c.id));
  result.kept += candidates.length - orphans.length;
  // Right before unlinking, look again: never remove a file whose row exists.
  const recheck = await existingIds([...new Set(orphans.filter((c) => !c.part).map((c) => c.id))]);
  for (const c of orphans) {
    if (inFlight.has(c.id) || (!c.part && recheck.has(c.id))) {
      result.kept++;
      continue;
    }
    await rm(c.file, { force: true });
    if (c.part) result.partsRemoved++;
    else result.orphansRemoved++;
  }

  // Photos removed from a draft (or a declined submission): the row stays, marked; its files go, whatever their age.
  const removed = await Photo.findAll({ where: { removedAt: { [Op.ne]: null }, connectorId: null }, attributes: ["id"] });
  const removedIds = new Set(removed.map((r) => r.id));
  for (const c of listed) {
    if (c.part || !removedIds.has(c.id) || inFlight.has(c.id)) continue;
    await rm(c.file, { force: true });
    result.removedSwept++;
  }
  return result;
}

/**
 * Delete the files of photos whose rows are marked removed and on no card (called once the removal has committed; a
 * crash before it leaves them to sweepPhotos). Returns how many files went.
 */
export async function deleteRemovedPhotoFiles(ids: string[]): Promise<number> {
  if (!ids.length) return 0;
  const rows = await Photo.findAll({ where: { id: { [Op.in]: ids }, removedAt: { [Op.ne]: null }, connectorId: null }, attributes: ["id"] });
  let n = 0;
  for (const r of rows) {
    for (const file of [`${r.id}.webp`, `${r.id}.thumb.webp`]) {
      await rm(path.join(PHOTOS_DIR, file), { force: true });
      n++;
    }
  }
  return n;
}

let sweeper: NodeJS.Timeout | null = null;

/** Sweep now and then hourly (an unref'd timer: it never keeps the process alive); app/startup.server.ts starts it. */
export function startPhotoSweeper(): void {
  if (sweeper) return;
  const run = () => void sweepPhotos().catch((e) => console.error(`[photos] sweep failed: ${(e as Error)?.message ?? e}`));
  run();
  sweeper = setInterval(run, HOUR);
  sweeper.unref();
}

/** Stop the hourly sweep (a sweep in progress finishes on its own: it only deletes files nobody references). */
export function stopPhotoSweeper(): void {
  if (sweeper) clearInterval(sweeper);
  sweeper = null;
}
