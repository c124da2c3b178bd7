/**
 * Where photo files live and how they are written: a temporary file for the body (never fsynced), then files written
 * as .part, fsynced and renamed into place, the directory fsynced too (rename is atomic, not durable).
 */
import { mkdir, open, rm } from "node:fs/promises";
import path from "node:path";
import { writeFault } from "./faults.server";
import { env } from "~/env.server";

/** Where uploads live (UPLOADS_DIR, default ./uploads): tmp/ for bodies in flight, photos/ for processed files. */
export const UPLOADS_DIR = env.UPLOADS_DIR;
export const TMP_DIR = path.join(UPLOADS_DIR, "tmp");
export const PHOTOS_DIR = path.join(UPLOADS_DIR, "photos");

const UUID = "[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}";
export const SERVED_NAME = new RegExp(`^(${UUID})(\\.thumb)?\\.webp$`);
export const PHOTO_FILE = new RegExp(`^(${UUID})(\\.thumb)?\\.webp(\\.part)?$`);
export const TMP_FILE = new RegExp(`^(${UUID})\\.part$`);

/** Ids of uploads this process is working on: the sweeper leaves their files alone whatever their age. */
export const inFlight = new Set<string>();

export async function ensureDirs() {
  await mkdir(TMP_DIR, { recursive: true });
  await mkdir(PHOTOS_DIR, { recursive: true });
}

/** Stream an uploaded part to a new temporary file (never fsynced: a crash just leaves it for the sweeper). */
export async function writeTmp(dest: string, file: Blob) {
  const fh = await open(dest, "wx", 0o600);
  try {
    const fault = writeFault();
    const reader = file.stream().getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      await fh.write(value);
      if (fault) throw fault;
    }
    if (fault) throw fault;
  } finally {
    await fh.close();
  }
}

/** Write a new file and fsync it (before it is renamed into place). */
export async function writeDurable(dest: string, data: Buffer) {
  const fh = await open(dest, "wx", 0o644);
  try {
    const fault = writeFault();
    if (fault) {
      await fh.write(data.subarray(0, Math.min(data.length, 4096)));
      throw fault;
    }
    await fh.writeFile(data);
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** fsync a directory, so renames in it survive a power cut (rename is atomic, not durable). */
export async function syncDir(dir: string) {
  const fh = await open(dir, "r");
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

export async function removeAll(files: Iterable<string>) {
  await Promise.all([...files].map((f) => rm(f, { force: true }).catch(() => {})));
}
