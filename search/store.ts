/**
 * Persistence of the search stand-in: <dataDir>/indexes/<uid>.json per index (uid, primary key, dates, settings,
 * documents, last task uid) and <dataDir>/meta.json (last task uid), each written as temp file, fsync, rename.
 */
import { randomUUID } from "node:crypto";
import { mkdirSync, readdirSync, readFileSync, renameSync } from "node:fs";
import { open, rename, unlink } from "node:fs/promises";
import path from "node:path";
import { SearchIndex, type IndexSnapshot } from "./engine.ts";

async function writeAtomic(file: string, text: string): Promise<void> {
  const tmp = `${file}.${process.pid}.${randomUUID()}.tmp`;
  try {
    const fh = await open(tmp, "w");
    try {
      await fh.writeFile(text);
      await fh.sync();
    } finally {
      await fh.close();
    }
    await rename(tmp, file);
    const dir = await open(path.dirname(file), "r");
    try {
      await dir.sync();
    } catch {
      // some file systems cannot fsync a directory; the rename is still atomic
    } finally {
      await dir.close();
    }
  } catch (e) {
    await unlink(tmp).catch(() => {});
    throw e;
  }
}

interface IndexFile extends IndexSnapshot {
  lastTaskUid: number;
}

export class Store {
  readonly indexDir: string;
  private readonly metaFile: string;
  constructor(readonly dir: string) {
    this.indexDir = path.join(dir, "indexes");
    this.metaFile = path.join(dir, "meta.json");
    mkdirSync(this.indexDir, { recursive: true });
  }

  private fileOf(uid: string) {
    return path.join(this.indexDir, `${uid}.json`);
  }

  /** Load every index; an unreadable file is set aside (never silently dropped). */
  load(): { indexes: SearchIndex[]; lastTaskUid: number } {
    const indexes: SearchIndex[] = [];
    let lastTaskUid = -1;
    try {
      lastTaskUid = Number((JSON.parse(readFileSync(this.metaFile, "utf8")) as { lastTaskUid?: number }).lastTaskUid ?? -1);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "ENOENT") console.error(`[search] ${this.metaFile} could not be read; task numbers continue from the indexes`);
    }
    for (const name of readdirSync(this.indexDir)) {
      const file = path.join(this.indexDir, name);
      if (name.endsWith(".tmp")) {
        void unlink(file).catch(() => {});
        continue;
      }
      if (!name.endsWith(".json")) continue;
      try {
        const data = JSON.parse(readFileSync(file, "utf8")) as IndexFile;
        indexes.push(SearchIndex.fromSnapshot(data));
        lastTaskUid = Math.max(lastTaskUid, Number(data.lastTaskUid ?? -1));
      } catch (e) {
        const aside = `${file}.unreadable-${Date.now()}`;
        renameSync(file, aside);
        console.error(`[search] ${file} could not be read (${(e as Error).message}); kept it as ${aside}`);
      }
    }
    return { indexes, lastTaskUid: Number.isFinite(lastTaskUid) ? lastTaskUid : -1 };
  }

  loadOne(uid: string): SearchIndex | null {
    try {
      return SearchIndex.fromSnapshot(JSON.parse(readFileSync(this.fileOf(uid), "utf8")) as IndexFile);
    } catch {
      return null;
    }
  }

  async save(index: SearchIndex, lastTaskUid: number): Promise<void> {
    await writeAtomic(this.fileOf(index.uid), JSON.stringify({ ...index.snapshot(), lastTaskUid } satisfies IndexFile));
  }

  async remove(uid: string): Promise<void> {
    await unlink(this.fileOf(uid)).catch((e: NodeJS.ErrnoException) => {
      if (e.code !== "ENOENT") throw e;
    });
  }

  async saveMeta(lastTaskUid: number): Promise<void> {
    await writeAtomic(this.metaFile, JSON.stringify({ lastTaskUid }));
  }
}
