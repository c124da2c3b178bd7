/**
 * The local stand-in for the hosted search service: an HTTP server on 127.0.0.1 that speaks the subset of the
 * service's API that its official JavaScript client (meilisearch 0.62.0) uses — the endpoints and JSON shapes listed in
 * ../shared/STACK.md §4, which is this file's contract. `npm start` runs it beside the app; tests start it in-process
 * with startSearchStandIn({ port: 0, dataDir }); `npm run search:standin` runs it alone. See search/README.md.
 *
 *   health · indexes (create/get/list/update/delete) · documents (add = replace, update = merge, delete one / batch /
 *   by filter / all, list, fetch with filter, get one) · settings (whole object and per-setting routes) · search
 *   (POST and GET) · tasks (GET /tasks/:uid, GET /tasks) · Bearer key checks · errors in the service's shape.
 *
 * Writes answer 202 with an EnqueuedTask and are processed asynchronously, in order, by one queue; consecutive tasks
 * of one index are processed as one batch (as the service auto-batches) and persisted once, before any of them is
 * reported succeeded: <dataDir>/indexes/<uid>.json (settings + documents; temp file, fsync, rename). On start the
 * indexes are loaded and their MiniSearch indexes rebuilt, so a restart loses nothing a succeeded task reported. Task
 * history is kept in memory; a restarted stand-in numbers new tasks after the last persisted one.
 *
 * Not part of the service's API (tests only; no key needed): POST /_standin/fault {"mode": "normal" | "hang" | "error"
 * | "slow", "delayMs"?} and GET /_standin/state.
 */
import { randomUUID } from "node:crypto";
import { mkdirSync, readdirSync, readFileSync, renameSync } from "node:fs";
import { open, rename, unlink } from "node:fs/promises";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { compareForSort, compileFilter, filterablePatterns, SearchIndex, SETTINGS, applySetting, validateSetting, type Doc, type IndexSnapshot, type SearchRequest } from "./engine.ts";
import { ApiError, DOCUMENT_ID_RULE, errorBody, INDEX_UID_RULE, indexNotFound, isValidIndexUid, type ErrorBody } from "./errors.ts";
import { attributeAllowed, FilterSyntaxError, matchesFilter, parseFilter } from "./filter.ts";

const HOST = "127.0.0.1";
/** The service's default payload limit (100 MiB). */
const PAYLOAD_LIMIT = 100 * 1024 * 1024;
/** Tasks of one index processed (and persisted) together at most. */
const MAX_BATCH = 200;
const MODES = ["normal", "hang", "error", "slow"] as const;
export type SearchFaultMode = (typeof MODES)[number];

export interface SearchStandInOptions {
  /** 0 picks a free port. Default SEARCH_PORT or 7700. */
  port?: number;
  host?: "127.0.0.1";
  /** When set, every request except GET /health needs `Authorization: Bearer <key>`. Default SEARCH_KEY (unset: open). */
  apiKey?: string;
  /** Where the indexes are kept. Default SEARCH_DATA_DIR or search/data next to this file. */
  dataDir?: string;
}

export interface SearchStandIn {
  port: number;
  url: string;
  close: () => Promise<void>;
}

type TaskStatus = "enqueued" | "processing" | "succeeded" | "failed" | "canceled";
type TaskType = "indexCreation" | "indexUpdate" | "indexDeletion" | "documentAdditionOrUpdate" | "documentDeletion" | "settingsUpdate";
const TASK_STATUSES: TaskStatus[] = ["enqueued", "processing", "succeeded", "failed", "canceled"];
const TASK_TYPES = [
  "documentAdditionOrUpdate", "documentEdition", "documentDeletion", "settingsUpdate", "indexCreation", "indexDeletion",
  "indexUpdate", "indexSwap", "taskCancelation", "taskDeletion", "dumpCreation", "snapshotCreation", "upgradeDatabase",
];

type Payload =
  | { kind: "createIndex"; primaryKey: string | null }
  | { kind: "updateIndex"; primaryKey: string | null }
  | { kind: "deleteIndex" }
  | { kind: "documents"; docs: Doc[]; primaryKey: string | null; merge: boolean }
  | { kind: "deleteIds"; ids: string[] }
  | { kind: "deleteFilter"; filter: unknown }
  | { kind: "deleteAll" }
  | { kind: "settings"; settings: Record<string, unknown> };

/** The service's Task object (STACK.md §4), plus what the processor needs. */
interface TaskRecord {
  uid: number;
  batchUid: number | null;
  indexUid: string | null;
  status: TaskStatus;
  type: TaskType;
  canceledBy: null;
  details: Record<string, unknown>;
  error: ErrorBody | null;
  duration: string | null;
  enqueuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  payload?: Payload;
}

function taskView(t: TaskRecord) {
  const { payload: _payload, ...view } = t;
  return view;
}

function envPort(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`${name} must be a port number, got ${JSON.stringify(raw)}`);
  return n;
}

/** ISO 8601 duration, as the service writes task durations ("PT0.001S"). */
const isoDuration = (ms: number) => `PT${(ms / 1000).toFixed(6).replace(/0+$/, "").replace(/\.$/, ".0")}S`;

// ---- persistence ----

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

class Store {
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

// ---- HTTP helpers ----

function send(res: ServerResponse, status: number, body?: unknown) {
  if (body === undefined) {
    res.writeHead(status, { "Content-Length": 0 });
    res.end();
    return;
  }
  const text = JSON.stringify(body);
  res.writeHead(status, { "Content-Type": "application/json", "Content-Length": Buffer.byteLength(text) });
  res.end(text);
}

async function readBody(req: IncomingMessage): Promise<string> {
  let size = 0;
  const chunks: Buffer[] = [];
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > PAYLOAD_LIMIT) {
      throw new ApiError(413, "payload_too_large", "The provided payload reached the size limit. The maximum accepted payload size is 100 MiB.");
    }
    chunks.push(chunk);
  }
  return Buffer.concat(chunks).toString("utf8");
}

/** A JSON body for the non-document routes: malformed or missing → 400 bad_request (the service's code for these). */
async function jsonBody(req: IncomingMessage): Promise<unknown> {
  const text = await readBody(req);
  if (text.trim() === "") throw new ApiError(400, "bad_request", "A json payload is missing.");
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new ApiError(400, "bad_request", `Json deserialize error: ${(e as Error).message}`);
  }
}

/** Documents for POST/PUT …/documents: a JSON array (or one object), or NDJSON; else 400 malformed_payload. */
async function documentsBody(req: IncomingMessage): Promise<Doc[]> {
  const type = (req.headers["content-type"] ?? "application/json").toLowerCase();
  const text = await readBody(req);
  if (text.trim() === "") throw new ApiError(400, "missing_payload", "A json payload is missing.");
  let parsed: unknown;
  if (type.includes("ndjson")) {
    try {
      parsed = text.split("\n").filter((l) => l.trim()).map((l) => JSON.parse(l) as unknown);
    } catch (e) {
      throw new ApiError(400, "malformed_payload", `The \`ndjson\` payload provided is malformed. \`${(e as Error).message}\`.`);
    }
  } else if (type.includes("json")) {
    try {
      parsed = JSON.parse(text);
    } catch (e) {
      throw new ApiError(400, "malformed_payload", `The \`json\` payload provided is malformed. \`Couldn't serialize document value: ${(e as Error).message}\`.`);
    }
  } else {
    throw new ApiError(
      415,
      "invalid_content_type",
      `The Content-Type \`${type}\` is invalid. Accepted values for the Content-Type header are: \`application/json\`, \`application/x-ndjson\``,
    );
  }
  const list = Array.isArray(parsed) ? parsed : [parsed];
  for (const d of list) {
    if (!d || typeof d !== "object" || Array.isArray(d)) {
      throw new ApiError(400, "malformed_payload", `The \`json\` payload provided is malformed. \`Couldn't serialize document value: invalid type: ${JSON.stringify(d)}, expected a map\`.`);
    }
  }
  return list as Doc[];
}

const typeName = (v: unknown) => (v === null ? "null" : Array.isArray(v) ? "an array" : typeof v === "object" ? "an object" : `a ${typeof v}`);

function badType(code: string, field: string, expected: string, value: unknown): never {
  throw new ApiError(400, code, `Invalid value type at \`.${field}\`: expected ${expected}, but found ${typeName(value)}: \`${JSON.stringify(value)}\``);
}

function rejectUnknown(body: Record<string, unknown>, allowed: readonly string[], where = "") {
  for (const k of Object.keys(body)) {
    if (!allowed.includes(k)) {
      throw new ApiError(400, "bad_request", `Unknown field \`${k}\`${where}: expected one of ${allowed.map((a) => `\`${a}\``).join(", ")}`);
    }
  }
}

const asObject = (v: unknown): Record<string, unknown> => {
  if (!v || typeof v !== "object" || Array.isArray(v)) throw new ApiError(400, "bad_request", `Json deserialize error: invalid type: ${typeName(v)}, expected a map`);
  return v as Record<string, unknown>;
};

const nonNegativeInt = (code: string, field: string, v: unknown): number => {
  if (typeof v !== "number" || !Number.isInteger(v) || v < 0) badType(code, field, "a positive integer", v);
  return v;
};

const SEARCH_FIELDS = [
  "q", "offset", "limit", "page", "hitsPerPage", "filter", "facets", "sort", "attributesToRetrieve", "attributesToHighlight",
  "highlightPreTag", "highlightPostTag", "attributesToCrop", "cropLength", "cropMarker", "showMatchesPosition",
  "matchingStrategy", "showRankingScore", "showRankingScoreDetails", "rankingScoreThreshold", "attributesToSearchOn",
  "distinct", "vector", "hybrid", "retrieveVectors", "locales", "showPerformanceDetails", "media", "personalize",
  // GET spellings of `hybrid` (accepted, like the vector options, and ignored: the stand-in has no embedders)
  "hybridEmbedder", "hybridSemanticRatio",
] as const;

/** Validate a search body (POST) or the query parameters already parsed from GET. */
function searchRequest(raw: Record<string, unknown>): SearchRequest {
  rejectUnknown(raw, SEARCH_FIELDS);
  const r: SearchRequest = {};
  const strings = (field: string, v: unknown): string[] | undefined => {
    if (v === null || v === undefined) return undefined;
    if (!Array.isArray(v) || v.some((x) => typeof x !== "string")) badType(`invalid_search_${field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, field, "an array", v);
    return v as string[];
  };
  if (raw.q !== undefined && raw.q !== null && typeof raw.q !== "string") badType("invalid_search_q", "q", "a string", raw.q);
  r.q = (raw.q as string | null | undefined) ?? null;
  for (const f of ["offset", "limit", "page", "hitsPerPage", "cropLength"] as const) {
    if (raw[f] !== undefined && raw[f] !== null) r[f] = nonNegativeInt(`invalid_search_${f.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, f, raw[f]);
  }
  if (raw.filter !== undefined && raw.filter !== null && typeof raw.filter !== "string" && !Array.isArray(raw.filter)) {
    throw new ApiError(400, "invalid_search_filter", `Invalid syntax for the filter parameter: \`expected String, Array, found: ${JSON.stringify(raw.filter)}\`.`);
  }
  r.filter = raw.filter;
  r.facets = strings("facets", raw.facets);
  r.sort = strings("sort", raw.sort);
  r.attributesToRetrieve = strings("attributesToRetrieve", raw.attributesToRetrieve);
  r.attributesToHighlight = strings("attributesToHighlight", raw.attributesToHighlight);
  r.attributesToCrop = strings("attributesToCrop", raw.attributesToCrop);
  r.attributesToSearchOn = strings("attributesToSearchOn", raw.attributesToSearchOn) ?? null;
  for (const f of ["highlightPreTag", "highlightPostTag", "cropMarker", "distinct"] as const) {
    if (raw[f] !== undefined && raw[f] !== null) {
      if (typeof raw[f] !== "string") badType(`invalid_search_${f.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, f, "a string", raw[f]);
      r[f] = raw[f] as string;
    }
  }
  if (raw.matchingStrategy !== undefined && raw.matchingStrategy !== null) {
    if (!["last", "all", "frequency"].includes(raw.matchingStrategy as string)) {
      throw new ApiError(400, "invalid_search_matching_strategy", `Unknown value \`${String(raw.matchingStrategy)}\` at \`.matchingStrategy\`: expected one of \`last\`, \`all\`, \`frequency\``);
    }
    r.matchingStrategy = raw.matchingStrategy as SearchRequest["matchingStrategy"];
  }
  if (raw.showRankingScore !== undefined && raw.showRankingScore !== null) {
    if (typeof raw.showRankingScore !== "boolean") badType("invalid_search_show_ranking_score", "showRankingScore", "a boolean", raw.showRankingScore);
    r.showRankingScore = raw.showRankingScore;
  }
  return r;
}

/** GET /indexes/:uid/search query parameters → the POST body shape (lists are comma-joined by the client, STACK.md §4). */
function searchParamsFromQuery(params: URLSearchParams): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const lists = new Set(["facets", "sort", "attributesToRetrieve", "attributesToHighlight", "attributesToCrop", "attributesToSearchOn", "locales"]);
  const numbers = new Set(["offset", "limit", "page", "hitsPerPage", "cropLength", "rankingScoreThreshold"]);
  const booleans = new Set(["showMatchesPosition", "showRankingScore", "showRankingScoreDetails", "retrieveVectors", "showPerformanceDetails"]);
  for (const [k, v] of params) {
    if (lists.has(k)) out[k] = v === "" ? [] : v.split(",").map((s) => s.trim());
    else if (numbers.has(k)) {
      const n = Number(v);
      if (v.trim() === "" || !Number.isFinite(n)) {
        throw new ApiError(400, `invalid_search_${k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, `Invalid value in parameter \`${k}\`: could not parse \`${v}\` as a positive integer`);
      }
      out[k] = n;
    } else if (booleans.has(k)) {
      if (v !== "true" && v !== "false") throw new ApiError(400, "bad_request", `Invalid value in parameter \`${k}\`: could not parse \`${v}\` as a boolean, expected either \`true\` or \`false\``);
      out[k] = v === "true";
    } else out[k] = v;
  }
  return out;
}

/** A document id as the service accepts it (integer, or string of a-z A-Z 0-9 - _ up to 511 bytes). */
function documentKey(id: unknown): string | null {
  if (typeof id === "number") return Number.isSafeInteger(id) && id >= 0 ? String(id) : null;
  if (typeof id === "string") return /^[A-Za-z0-9_-]+$/.test(id) && Buffer.byteLength(id) <= 511 ? id : null;
  return null;
}

// ---- the stand-in ----

export async function startSearchStandIn(options: SearchStandInOptions = {}): Promise<SearchStandIn> {
  const here = path.dirname(fileURLToPath(import.meta.url));
  const store = new Store(options.dataDir ?? process.env.SEARCH_DATA_DIR ?? path.join(here, "data"));
  const apiKey = options.apiKey ?? (process.env.SEARCH_KEY || undefined);
  const host = options.host ?? HOST;

  const loaded = store.load();
  const indexes = new Map<string, SearchIndex>(loaded.indexes.map((i) => [i.uid, i]));
  const tasks: TaskRecord[] = [];
  const taskByUid = new Map<number, TaskRecord>();
  let nextTaskUid = loaded.lastTaskUid + 1;
  const queue: TaskRecord[] = [];
  let processing: Promise<void> | null = null;
  let closed = false;

  let mode: SearchFaultMode = "normal";
  let delayMs = 2000;
  const hanging = new Set<ServerResponse>();
  let requests = 0;

  // ---- tasks ----

  function enqueue(type: TaskType, indexUid: string | null, details: Record<string, unknown>, payload: Payload): TaskRecord {
    const task: TaskRecord = {
      uid: nextTaskUid++,
      batchUid: null,
      indexUid,
      status: "enqueued",
      type,
      canceledBy: null,
      details,
      error: null,
      duration: null,
      enqueuedAt: new Date().toISOString(),
      startedAt: null,
      finishedAt: null,
      payload,
    };
    tasks.push(task);
    taskByUid.set(task.uid, task);
    queue.push(task);
    kick();
    return task;
  }

  /** The EnqueuedTask the service answers a write with (HTTP 202, STACK.md §4). */
  const enqueued = (t: TaskRecord) => ({ taskUid: t.uid, indexUid: t.indexUid, status: t.status, type: t.type, enqueuedAt: t.enqueuedAt });

  function kick() {
    if (processing || closed) return;
    processing = new Promise<void>((resolve) => setImmediate(resolve)).then(runQueue).finally(() => {
      processing = null;
      if (queue.length && !closed) kick();
    });
  }

  async function runQueue() {
    while (queue.length && !closed) {
      const first = queue[0];
      let n = 1;
      while (n < queue.length && n < MAX_BATCH && queue[n].indexUid === first.indexUid) n += 1;
      const batch = queue.splice(0, n);
      const startedAt = new Date().toISOString();
      const t0 = performance.now();
      for (const t of batch) {
        t.status = "processing";
        t.batchUid = first.uid;
        t.startedAt = startedAt;
      }
      const outcomes: (ErrorBody | null)[] = [];
      const uid = first.indexUid!;
      let touched = false;
      for (const t of batch) {
        try {
          apply(t);
          outcomes.push(null);
          touched = true;
        } catch (e) {
          outcomes.push(e instanceof ApiError ? e.body : errorBody("internal", (e as Error).message, "internal"));
        }
      }
      const index = indexes.get(uid);
      let persistError: ErrorBody | null = null;
      if (touched) {
        try {
          index?.refresh();
          if (index) await store.save(index, batch[batch.length - 1].uid);
          else await store.remove(uid);
          await store.saveMeta(batch[batch.length - 1].uid);
        } catch (e) {
          persistError = errorBody("io_error", `The stand-in could not write its data: ${(e as Error).message}`, "system");
          // what is on disk is the truth: go back to it
          const back = store.loadOne(uid);
          if (back) indexes.set(uid, back);
          else indexes.delete(uid);
        }
      }
      const finishedAt = new Date().toISOString();
      const duration = isoDuration(performance.now() - t0);
      batch.forEach((t, i) => {
        const error = persistError && outcomes[i] === null ? persistError : outcomes[i];
        t.status = error ? "failed" : "succeeded";
        t.error = error;
        t.finishedAt = finishedAt;
        t.duration = duration;
        if (error) zeroDetails(t);
        delete t.payload;
      });
      // let HTTP requests in between batches
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
  }

  function zeroDetails(t: TaskRecord) {
    if ("indexedDocuments" in t.details) t.details.indexedDocuments = 0;
    if ("deletedDocuments" in t.details) t.details.deletedDocuments = 0;
  }

  const requireIndex = (uid: string) => {
    const i = indexes.get(uid);
    if (!i) throw indexNotFound(uid);
    return i;
  };

  /** Apply one task to the in-memory state; throws (changing nothing) when the task fails. */
  function apply(t: TaskRecord) {
    const uid = t.indexUid!;
    const p = t.payload!;
    const now = new Date().toISOString();
    switch (p.kind) {
      case "createIndex": {
        if (indexes.has(uid)) throw new ApiError(409, "index_already_exists", `Index \`${uid}\` already exists.`);
        indexes.set(uid, new SearchIndex(uid, p.primaryKey, now));
        return;
      }
      case "updateIndex": {
        const index = requireIndex(uid);
        if (p.primaryKey !== null && p.primaryKey !== index.primaryKey) {
          if (index.docs.size > 0) {
            throw new ApiError(400, "index_primary_key_already_exists", `Index \`${uid}\`: Index already has a primary key: \`${index.primaryKey}\`.`);
          }
          index.primaryKey = p.primaryKey;
          index.settingsChanged();
        }
        index.touch(now);
        return;
      }
      case "deleteIndex": {
        const index = requireIndex(uid);
        t.details.deletedDocuments = index.docs.size;
        indexes.delete(uid);
        return;
      }
      case "documents": {
        const existing = indexes.get(uid);
        let pk = existing?.primaryKey ?? null;
        if (p.primaryKey !== null) {
          if (pk !== null && pk !== p.primaryKey && (existing?.docs.size ?? 0) > 0) {
            throw new ApiError(400, "index_primary_key_already_exists", `Index \`${uid}\`: Index already has a primary key: \`${pk}\`.`);
          }
          pk = p.primaryKey;
        }
        if (pk === null) {
          const candidates = Object.keys(p.docs[0] ?? {}).filter((k) => k.toLowerCase().endsWith("id"));
          if (candidates.length === 0) {
            throw new ApiError(
              400,
              "index_primary_key_no_candidate_found",
              "The primary key inference failed as the engine did not find any field ending with `id` in its name. Please specify the primary key manually using the `primaryKey` query parameter.",
            );
          }
          if (candidates.length > 1) {
            throw new ApiError(
              400,
              "index_primary_key_multiple_candidates_found",
              `The primary key inference failed as the engine found ${candidates.length} fields ending with \`id\` in their names: ${candidates.map((c) => `'${c}'`).join(" and ")}. Please specify the primary key manually using the \`primaryKey\` query parameter.`,
            );
          }
          pk = candidates[0];
        }
        for (const doc of p.docs) {
          if (!Object.hasOwn(doc, pk)) {
            throw new ApiError(400, "missing_document_id", `Document doesn't have a \`${pk}\` attribute: \`${JSON.stringify(doc)}\`.`);
          }
          if (documentKey(doc[pk]) === null) {
            throw new ApiError(400, "invalid_document_id", `Document identifier \`${JSON.stringify(doc[pk])}\` is invalid. ${DOCUMENT_ID_RULE}`);
          }
        }
        let index = existing;
        if (!index) {
          index = new SearchIndex(uid, pk, now);
          indexes.set(uid, index);
        } else if (index.primaryKey !== pk) {
          index.primaryKey = pk;
          index.settingsChanged();
        }
        index.upsert(p.docs, p.merge);
        index.touch(now);
        t.details.indexedDocuments = p.docs.length;
        return;
      }
      case "deleteIds": {
        const index = requireIndex(uid);
        t.details.deletedDocuments = index.delete(p.ids);
        index.touch(now);
        return;
      }
      case "deleteFilter": {
        const index = requireIndex(uid);
        const node = compileFilter(p.filter, filterablePatterns(index.settings), index.primaryKey, "invalid_document_filter");
        const keys = [...index.docs].filter(([, d]) => matchesFilter(node, d)).map(([k]) => k);
        t.details.deletedDocuments = index.delete(keys);
        index.touch(now);
        return;
      }
      case "deleteAll": {
        const index = requireIndex(uid);
        t.details.deletedDocuments = index.clear();
        index.touch(now);
        return;
      }
      case "settings": {
        // updating settings creates the index when it does not exist (as the service does)
        let index = indexes.get(uid);
        const created = !index;
        index ??= new SearchIndex(uid, null, now);
        for (const [name, value] of Object.entries(p.settings)) applySetting(index.settings, name, value);
        index.settingsChanged();
        index.touch(now);
        if (created) indexes.set(uid, index);
        return;
      }
    }
  }

  // ---- request handling ----

  function authorize(req: IncomingMessage) {
    if (!apiKey) return;
    const header = req.headers.authorization;
    if (!header) {
      throw new ApiError(401, "missing_authorization_header", "The Authorization header is missing. It must use the bearer authorization method.", "auth");
    }
    const m = /^Bearer (.+)$/.exec(header);
    if (!m || m[1] !== apiKey) throw new ApiError(403, "invalid_api_key", "The provided API key is invalid.", "auth");
  }

  const indexUidParam = (raw: string): string => {
    const uid = decodeURIComponent(raw);
    if (!isValidIndexUid(uid)) throw new ApiError(400, "invalid_index_uid", `\`${uid}\` is not a valid index uid. ${INDEX_UID_RULE}`);
    return uid;
  };

  const listParam = (params: URLSearchParams, name: string): string[] | null => {
    const v = params.get(name);
    if (v === null || v === "*") return null;
    return v.split(",").map((s) => s.trim()).filter(Boolean);
  };

  const intParam = (params: URLSearchParams, name: string, fallback: number, code: string): number => {
    const v = params.get(name);
    if (v === null) return fallback;
    const n = Number(v);
    if (!Number.isInteger(n) || n < 0) throw new ApiError(400, code, `Invalid value in parameter \`${name}\`: could not parse \`${v}\` as a positive integer`);
    return n;
  };

  function listTasks(params: URLSearchParams) {
    const statuses = listParam(params, "statuses");
    const types = listParam(params, "types");
    const indexUids = listParam(params, "indexUids");
    const uids = listParam(params, "uids");
    const batchUids = listParam(params, "batchUids");
    for (const s of statuses ?? []) {
      if (!TASK_STATUSES.includes(s as TaskStatus)) {
        throw new ApiError(400, "invalid_task_statuses", `Invalid value in parameter \`statuses\`: \`${s}\` is not a valid task status. Available statuses are ${TASK_STATUSES.map((x) => `\`${x}\``).join(", ")}.`);
      }
    }
    for (const ty of types ?? []) {
      if (!TASK_TYPES.includes(ty)) {
        throw new ApiError(400, "invalid_task_types", `Invalid value in parameter \`types\`: \`${ty}\` is not a valid task type. Available types are ${TASK_TYPES.map((x) => `\`${x}\``).join(", ")}.`);
      }
    }
    const limit = intParam(params, "limit", 20, "invalid_task_limit");
    const fromRaw = params.get("from");
    const from = fromRaw === null ? null : intParam(params, "from", 0, "invalid_task_from");
    const reverse = params.get("reverse") === "true";
    const dates: [string, "enqueuedAt" | "startedAt" | "finishedAt", 1 | -1][] = [
      ["afterEnqueuedAt", "enqueuedAt", 1], ["beforeEnqueuedAt", "enqueuedAt", -1],
      ["afterStartedAt", "startedAt", 1], ["beforeStartedAt", "startedAt", -1],
      ["afterFinishedAt", "finishedAt", 1], ["beforeFinishedAt", "finishedAt", -1],
    ];
    const dateFilters = dates.flatMap(([param, field, dir]) => {
      const v = params.get(param);
      if (v === null || v === "*") return [];
      const at = Date.parse(v);
      if (Number.isNaN(at)) throw new ApiError(400, `invalid_task_${param.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)}`, `\`${v}\` is an invalid date-time. It should follow the YYYY-MM-DD or RFC 3339 date-time format.`);
      return [{ field, dir, at }];
    });
    const matching = tasks.filter(
      (t) =>
        (!statuses || statuses.includes(t.status)) &&
        (!types || types.includes(t.type)) &&
        (!indexUids || (t.indexUid !== null && indexUids.includes(t.indexUid))) &&
        (!uids || uids.includes(String(t.uid))) &&
        (!batchUids || (t.batchUid !== null && batchUids.includes(String(t.batchUid)))) &&
        dateFilters.every(({ field, dir, at }) => {
          const v = t[field];
          if (v === null) return false;
          return dir === 1 ? Date.parse(v) > at : Date.parse(v) < at;
        }),
    );
    const ordered = reverse ? matching : [...matching].reverse();
    const startAt = from === null ? 0 : ordered.findIndex((t) => (reverse ? t.uid >= from : t.uid <= from));
    const page = startAt < 0 ? [] : ordered.slice(startAt, startAt + limit);
    const after = startAt < 0 ? undefined : ordered[startAt + limit];
    return {
      results: page.map(taskView),
      total: matching.length,
      limit,
      from: page.length ? page[0].uid : null,
      next: after ? after.uid : null,
    };
  }

  function documentsList(index: SearchIndex, q: { offset: number; limit: number; fields: string[] | null; filter: unknown; ids: unknown[] | null; sort: string[] | null }) {
    let filter = null;
    if (q.filter !== undefined && q.filter !== null) {
      filter = compileFilter(q.filter, filterablePatterns(index.settings), index.primaryKey, "invalid_document_filter");
    }
    let docs = [...index.docs.entries()];
    if (q.ids) {
      const wanted = new Set(q.ids.map((id) => String(id)));
      docs = docs.filter(([k]) => wanted.has(k));
    }
    if (filter) docs = docs.filter(([, d]) => matchesFilter(filter, d));
    if (q.sort?.length) {
      const specs = q.sort.map((s) => {
        const m = /^(.+):(asc|desc)$/.exec(s.trim());
        if (!m) throw new ApiError(400, "invalid_document_sort", `Invalid syntax for the sort parameter: expected expression ending by \`:asc\` or \`:desc\`, found \`${s}\`.`);
        if (!attributeAllowed(m[1], index.settings.sortableAttributes)) {
          throw new ApiError(400, "invalid_document_sort", `Attribute \`${m[1]}\` is not sortable. Available sortable attributes are: \`${index.settings.sortableAttributes.join(", ")}\`.`);
        }
        return { attribute: m[1], desc: m[2] === "desc" };
      });
      docs = docs
        .map((d, i) => ({ d, i }))
        .sort((a, b) => {
          for (const s of specs) {
            const c = compareForSort(a.d[1], b.d[1], s.attribute, s.desc);
            if (c) return c;
          }
          return a.i - b.i;
        })
        .map((x) => x.d);
    }
    return {
      results: docs.slice(q.offset, q.offset + q.limit).map(([, d]) => index.project(d, q.fields)),
      offset: q.offset,
      limit: q.limit,
      total: docs.length,
    };
  }

  async function route(req: IncomingMessage, res: ServerResponse, url: URL): Promise<void> {
    const method = req.method ?? "GET";
    const segs = url.pathname.split("/").filter(Boolean);
    const params = url.searchParams;
    const allow = (...methods: string[]) => {
      if (!methods.includes(method)) {
        // wrong method on a known route: 405 with an empty body, as the service answers
        send(res, 405);
        return false;
      }
      return true;
    };

    // GET /health — public (STACK.md §4)
    if (segs.length === 1 && segs[0] === "health") {
      if (allow("GET")) send(res, 200, { status: "available" });
      return;
    }
    authorize(req);

    if (segs.length === 1 && segs[0] === "version") {
      if (allow("GET")) send(res, 200, { commitSha: "stand-in", commitDate: "unknown", pkgVersion: "stand-in" });
      return;
    }
    if (segs.length === 1 && segs[0] === "stats") {
      if (!allow("GET")) return;
      const out: Record<string, unknown> = {};
      for (const [uid, i] of indexes) out[uid] = { numberOfDocuments: i.docs.size, isIndexing: queue.some((t) => t.indexUid === uid) };
      send(res, 200, { databaseSize: 0, lastUpdate: null, indexes: out });
      return;
    }

    if (segs[0] === "tasks") {
      if (segs.length === 1) {
        if (allow("GET")) send(res, 200, listTasks(params));
        return;
      }
      if (segs.length === 2) {
        if (!allow("GET")) return;
        const n = Number(segs[1]);
        if (!/^\d+$/.test(segs[1]) || !Number.isSafeInteger(n)) {
          throw new ApiError(400, "invalid_task_uids", `Invalid value in parameter \`taskUid\`: could not parse \`${segs[1]}\` as a positive integer`);
        }
        const t = taskByUid.get(n);
        if (!t) throw new ApiError(404, "task_not_found", `Task \`${n}\` not found.`);
        send(res, 200, taskView(t));
        return;
      }
      send(res, 404);
      return;
    }

    if (segs[0] !== "indexes") {
      send(res, 404);
      return;
    }

    // /indexes
    if (segs.length === 1) {
      if (!allow("GET", "POST")) return;
      if (method === "GET") {
        const offset = intParam(params, "offset", 0, "invalid_index_offset");
        const limit = intParam(params, "limit", 20, "invalid_index_limit");
        const all = [...indexes.values()].sort((a, b) => (a.uid < b.uid ? -1 : 1));
        send(res, 200, { results: all.slice(offset, offset + limit).map((i) => i.info()), offset, limit, total: all.length });
        return;
      }
      const body = asObject(await jsonBody(req));
      rejectUnknown(body, ["uid", "primaryKey"]);
      if (body.uid === undefined) throw new ApiError(400, "missing_index_uid", "Missing field `uid`");
      if (!isValidIndexUid(body.uid)) throw new ApiError(400, "invalid_index_uid", `\`${String(body.uid)}\` is not a valid index uid. ${INDEX_UID_RULE}`);
      const pk = body.primaryKey ?? null;
      if (pk !== null && typeof pk !== "string") badType("invalid_index_primary_key", "primaryKey", "a string", pk);
      send(res, 202, enqueued(enqueue("indexCreation", body.uid, { primaryKey: pk }, { kind: "createIndex", primaryKey: pk as string | null })));
      return;
    }

    const uid = indexUidParam(segs[1]);

    // /indexes/:uid
    if (segs.length === 2) {
      if (!allow("GET", "PATCH", "DELETE")) return;
      if (method === "GET") {
        send(res, 200, requireIndex(uid).info());
        return;
      }
      if (method === "PATCH") {
        const body = asObject(await jsonBody(req));
        rejectUnknown(body, ["primaryKey", "uid"]);
        const pk = body.primaryKey ?? null;
        if (pk !== null && typeof pk !== "string") badType("invalid_index_primary_key", "primaryKey", "a string", pk);
        send(res, 202, enqueued(enqueue("indexUpdate", uid, { primaryKey: pk }, { kind: "updateIndex", primaryKey: pk as string | null })));
        return;
      }
      send(res, 202, enqueued(enqueue("indexDeletion", uid, { deletedDocuments: null }, { kind: "deleteIndex" })));
      return;
    }

    const section = segs[2];

    if (section === "stats" && segs.length === 3) {
      if (!allow("GET")) return;
      const index = requireIndex(uid);
      const fieldDistribution: Record<string, number> = {};
      for (const d of index.docs.values()) for (const k of Object.keys(d)) fieldDistribution[k] = (fieldDistribution[k] ?? 0) + 1;
      send(res, 200, { numberOfDocuments: index.docs.size, isIndexing: queue.some((t) => t.indexUid === uid), fieldDistribution });
      return;
    }

    if (section === "search" && segs.length === 3) {
      if (!allow("GET", "POST")) return;
      const raw = method === "POST" ? asObject(await jsonBody(req)) : searchParamsFromQuery(params);
      const request = searchRequest(raw);
      send(res, 200, requireIndex(uid).search(request));
      return;
    }

    if (section === "documents") {
      if (segs.length === 3) {
        if (!allow("GET", "POST", "PUT", "DELETE")) return;
        if (method === "GET") {
          const index = requireIndex(uid);
          const fields = params.get("fields");
          const ids = params.get("ids");
          const sort = params.get("sort");
          send(
            res,
            200,
            documentsList(index, {
              offset: intParam(params, "offset", 0, "invalid_document_offset"),
              limit: intParam(params, "limit", 20, "invalid_document_limit"),
              fields: fields === null ? null : fields.split(",").map((s) => s.trim()),
              filter: params.get("filter") ?? undefined,
              ids: ids === null ? null : ids.split(","),
              sort: sort === null ? null : sort.split(","),
            }),
          );
          return;
        }
        if (method === "DELETE") {
          send(res, 202, enqueued(enqueue("documentDeletion", uid, { providedIds: 0, deletedDocuments: null, originalFilter: null }, { kind: "deleteAll" })));
          return;
        }
        const docs = await documentsBody(req);
        const pkParam = params.get("primaryKey");
        send(
          res,
          202,
          enqueued(
            enqueue("documentAdditionOrUpdate", uid, { receivedDocuments: docs.length, indexedDocuments: null }, { kind: "documents", docs, primaryKey: pkParam, merge: method === "PUT" }),
          ),
        );
        return;
      }
      if (segs.length === 4 && segs[3] === "fetch" && method === "POST") {
        const body = asObject(await jsonBody(req));
        rejectUnknown(body, ["offset", "limit", "fields", "filter", "ids", "sort", "retrieveVectors"]);
        const offset = body.offset === undefined ? 0 : nonNegativeInt("invalid_document_offset", "offset", body.offset);
        const limit = body.limit === undefined ? 20 : nonNegativeInt("invalid_document_limit", "limit", body.limit);
        if (body.fields !== undefined && body.fields !== null && (!Array.isArray(body.fields) || body.fields.some((f) => typeof f !== "string"))) {
          badType("invalid_document_fields", "fields", "an array", body.fields);
        }
        if (body.ids !== undefined && body.ids !== null && !Array.isArray(body.ids)) badType("invalid_document_ids", "ids", "an array", body.ids);
        if (body.sort !== undefined && body.sort !== null && (!Array.isArray(body.sort) || body.sort.some((f) => typeof f !== "string"))) {
          badType("invalid_document_sort", "sort", "an array", body.sort);
        }
        send(
          res,
          200,
          documentsList(requireIndex(uid), {
            offset,
            limit,
            fields: (body.fields as string[] | null | undefined) ?? null,
            filter: body.filter,
            ids: (body.ids as unknown[] | null | undefined) ?? null,
            sort: (body.sort as string[] | null | undefined) ?? null,
          }),
        );
        return;
      }
      if (segs.length === 4 && segs[3] === "delete-batch" && method === "POST") {
        const body = await jsonBody(req);
        if (!Array.isArray(body) || body.some((id) => typeof id !== "string" && typeof id !== "number")) {
          throw new ApiError(400, "bad_request", `Json deserialize error: invalid type: ${typeName(body)}, expected a sequence of document ids`);
        }
        const ids = body.map((id) => String(id));
        send(res, 202, enqueued(enqueue("documentDeletion", uid, { providedIds: ids.length, deletedDocuments: null, originalFilter: null }, { kind: "deleteIds", ids })));
        return;
      }
      if (segs.length === 4 && segs[3] === "delete" && method === "POST") {
        const body = asObject(await jsonBody(req));
        rejectUnknown(body, ["filter"]);
        if (body.filter === undefined || body.filter === null) throw new ApiError(400, "missing_document_filter", "Missing field `filter`");
        try {
          parseFilter(body.filter);
        } catch (e) {
          if (e instanceof FilterSyntaxError) throw new ApiError(400, "invalid_document_filter", e.message);
          throw e;
        }
        send(
          res,
          202,
          enqueued(enqueue("documentDeletion", uid, { providedIds: 0, deletedDocuments: null, originalFilter: JSON.stringify(body.filter) }, { kind: "deleteFilter", filter: body.filter })),
        );
        return;
      }
      if (segs.length === 4) {
        if (!allow("GET", "DELETE")) return;
        const id = decodeURIComponent(segs[3]);
        if (method === "GET") {
          const index = requireIndex(uid);
          const doc = index.docs.get(id);
          if (!doc) throw new ApiError(404, "document_not_found", `Document \`${id}\` not found.`);
          const fields = params.get("fields");
          send(res, 200, index.project(doc, fields === null ? null : fields.split(",").map((s) => s.trim())));
          return;
        }
        send(res, 202, enqueued(enqueue("documentDeletion", uid, { providedIds: 1, deletedDocuments: null, originalFilter: null }, { kind: "deleteIds", ids: [id] })));
        return;
      }
      send(res, 404);
      return;
    }

    if (section === "settings") {
      if (segs.length === 3) {
        if (!allow("GET", "PATCH", "DELETE")) return;
        if (method === "GET") {
          send(res, 200, requireIndex(uid).settings);
          return;
        }
        let settings: Record<string, unknown>;
        if (method === "PATCH") {
          settings = asObject(await jsonBody(req));
          rejectUnknown(settings, Object.keys(SETTINGS));
          for (const [name, value] of Object.entries(settings)) validateSetting(name, value);
        } else {
          settings = Object.fromEntries(Object.keys(SETTINGS).map((k) => [k, null]));
        }
        send(res, 202, enqueued(enqueue("settingsUpdate", uid, { ...settings }, { kind: "settings", settings })));
        return;
      }
      if (segs.length === 4) {
        const name = Object.keys(SETTINGS).find((k) => SETTINGS[k].route === segs[3]);
        if (!name) {
          send(res, 404);
          return;
        }
        if (!allow("GET", "PUT", "PATCH", "DELETE")) return;
        if (method === "GET") {
          send(res, 200, requireIndex(uid).settings[name]);
          return;
        }
        let value: unknown = null;
        if (method !== "DELETE") {
          value = await jsonBody(req);
          validateSetting(name, value);
        }
        send(res, 202, enqueued(enqueue("settingsUpdate", uid, { [name]: value }, { kind: "settings", settings: { [name]: value } })));
        return;
      }
    }

    send(res, 404);
  }

  async function handle(req: IncomingMessage, res: ServerResponse) {
    const url = new URL(req.url ?? "/", `http://${HOST}`);
    const segs = url.pathname.split("/").filter(Boolean);

    // ---- control routes of the stand-in (not the service's API; see search/README.md) ----
    if (segs[0] === "_standin") {
      if (segs[1] === "state" && segs.length === 2 && req.method === "GET") {
        const counts: Record<string, number> = Object.fromEntries(TASK_STATUSES.map((s) => [s, 0]));
        for (const t of tasks) counts[t.status] += 1;
        send(res, 200, {
          mode,
          delayMs,
          hanging: hanging.size,
          requests,
          dataDir: store.dir,
          indexes: [...indexes.values()].map((i) => ({ uid: i.uid, documents: i.docs.size })),
          tasks: { total: tasks.length, ...counts },
        });
        return;
      }
      if (segs[1] === "fault" && segs.length === 2 && req.method === "POST") {
        const body = asObject(await jsonBody(req));
        if (!MODES.includes(body.mode as SearchFaultMode)) {
          throw new ApiError(400, "bad_request", `mode must be one of ${MODES.join(", ")}`);
        }
        if (body.delayMs !== undefined) delayMs = nonNegativeInt("bad_request", "delayMs", body.delayMs);
        else if (body.mode === "slow") delayMs = 2000;
        mode = body.mode as SearchFaultMode;
        if (mode !== "hang") releaseHanging();
        send(res, 200, { mode, delayMs });
        return;
      }
      send(res, 404);
      return;
    }

    requests += 1;
    if (mode === "hang") {
      // accept and never answer (until the mode changes or the stand-in closes)
      hanging.add(res);
      res.on("close", () => hanging.delete(res));
      req.resume();
      return;
    }
    if (mode === "error") {
      req.resume();
      send(res, 500, errorBody("internal", "The search stand-in is in fault mode `error`.", "internal"));
      return;
    }
    if (mode === "slow") await new Promise((resolve) => setTimeout(resolve, delayMs));
    await route(req, res, url);
  }

  function releaseHanging() {
    for (const res of hanging) res.destroy();
    hanging.clear();
  }

  const server: Server = createServer((req, res) => {
    handle(req, res).catch((e: unknown) => {
      if (res.headersSent) {
        res.destroy();
        return;
      }
      if (e instanceof ApiError) send(res, e.status, e.body);
      else if (e instanceof URIError) send(res, 400, errorBody("bad_request", `Invalid URL: ${e.message}`));
      else {
        console.error(`[search] ${(e as Error).stack ?? e}`);
        send(res, 500, errorBody("internal", (e as Error).message, "internal"));
      }
    });
  });
  server.keepAliveTimeout = 5_000;

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port ?? envPort("SEARCH_PORT", 7700), host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as AddressInfo).port;

  return {
    port,
    url: `http://${host}:${port}`,
    close: async () => {
      if (closed) return;
      closed = true;
      releaseHanging();
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      // a batch being written finishes (and is persisted) before close resolves
      await processing?.catch(() => {});
    },
  };
}

// Run directly: `npm run search:standin` (tsx search/server.ts).
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  try {
    const s = await startSearchStandIn();
    console.log(`[search] stand-in search service on ${s.url}`);
    for (const sig of ["SIGINT", "SIGTERM"] as const) {
      process.on(sig, () => {
        setTimeout(() => process.exit(0), 3_000).unref();
        s.close().then(() => process.exit(0));
      });
    }
  } catch (e) {
    console.error(`[search] stand-in could not start: ${(e as Error).message}`);
    process.exit(1);
  }
}
