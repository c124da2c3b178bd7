/**
 * Search through the hosted service's official client (meilisearch), with the database as the fallback.
 *
 * SEARCH_URL (default http://127.0.0.1:7700, the stand-in in search/) and SEARCH_KEY point at the service; a real hosted
 * instance needs no code change. Every publish writes an `index_jobs` row in its transaction; the worker here drains
 * them into the service (and `reconcile` repairs any drift). /api/v1/search asks the service with a short timeout
 * (SEARCH_TIMEOUT_MS, 300 ms: QUALITY's suggestion) and answers from the database's FTS5 copy when the service is down,
 * slow or failing; after 5 failures in a row a breaker skips the service for 30 s, so an outage costs no timeouts.
 */
import { Meilisearch, type SearchParams } from "meilisearch";
import { Op, QueryTypes } from "sequelize";
import { sequelize } from "~db/index.server.ts";
import { IndexJob } from "~db/models/index.ts";
import { libraryDocs, rebuildFallbackIndex } from "~db/search-index.ts";
import { SEARCH_SETTINGS, type SearchDoc, type SearchDocType } from "~/domain/search-docs";
import { env } from "~/env.server";

export const SEARCH_INDEX = env.SEARCH_INDEX;
const TIMEOUT_MS = () => env.SEARCH_TIMEOUT_MS;
const BREAKER_FAILURES = 5;
const BREAKER_OPEN_MS = () => env.SEARCH_BREAKER_MS;

let clientInstance: Meilisearch | null = null;
/** The one client of this process. */
export function searchClient(): Meilisearch {
  clientInstance ??= new Meilisearch({ host: env.SEARCH_URL, apiKey: env.SEARCH_KEY, timeout: TIMEOUT_MS() });
  return clientInstance;
}
/** A client with a longer timeout for indexing work (never on a reader's request path). */
function workClient(): Meilisearch {
  return new Meilisearch({ host: env.SEARCH_URL, apiKey: env.SEARCH_KEY, timeout: env.SEARCH_WORK_TIMEOUT_MS });
}

// --- circuit breaker ------------------------------------------------------------------------------------------------
const breaker = { failures: 0, openUntil: 0 };
const breakerOpen = () => Date.now() < breaker.openUntil;
function failed() {
  breaker.failures++;
  if (breaker.failures >= BREAKER_FAILURES) breaker.openUntil = Date.now() + BREAKER_OPEN_MS();
}
function succeeded() {
  breaker.failures = 0;
  breaker.openUntil = 0;
}
/** For tests and the health route: the breaker's state. */
export function searchBreaker() {
  return { failures: breaker.failures, open: breakerOpen(), openForMs: Math.max(0, breaker.openUntil - Date.now()) };
}

/** Whether the service answers its health check (within the reader timeout). */
export async function searchHealthy(): Promise<boolean> {
  try {
    return await searchClient().isHealthy();
  } catch {
    return false;
  }
}

// --- indexing ---------------------------------------------------------------------------------------------------------

async function waitOk(task: { taskUid: number }, client: Meilisearch) {
  const done = await client.tasks.waitForTask(task.taskUid, { timeout: env.SEARCH_TASK_TIMEOUT_MS, interval: 50 });
  if (done.status !== "succeeded") throw new Error(`search task ${task.taskUid} ${done.status}: ${done.error?.message ?? ""}`);
}

/** Create the index if it is missing and set its searchable, filterable and sortable attributes. */
export async function configureIndex(client = workClient()): Promise<void> {
  try {
    await client.getIndex(SEARCH_INDEX);
  } catch (e) {
    if ((e as { cause?: { code?: string } }).cause?.code !== "index_not_found") throw e;
    await waitOk(await client.createIndex(SEARCH_INDEX, { primaryKey: "id" }), client);
  }
  await waitOk(
    await client.index(SEARCH_INDEX).updateSettings({
      ...SEARCH_SETTINGS,
      searchableAttributes: [...SEARCH_SETTINGS.searchableAttributes],
      filterableAttributes: [...SEARCH_SETTINGS.filterableAttributes],
      sortableAttributes: [...SEARCH_SETTINGS.sortableAttributes],
    }),
    client,
  );
}

/** Send documents in batches and wait until the service has them. */
async function putDocs(docs: SearchDoc[], client: Meilisearch) {
  for (let i = 0; i < docs.length; i += 5000) await waitOk(await client.index(SEARCH_INDEX).addDocuments(docs.slice(i, i + 5000)), client);
}

/** Rebuild everything from the database: the service's index and the database's own full-text copy. */
export async function reindexAll(): Promise<{ documents: number }> {
  const client = workClient();
  await rebuildFallbackIndex();
  await configureIndex(client);
  await waitOk(await client.index(SEARCH_INDEX).deleteAllDocuments(), client);
  const covered = await lastJobId();
  const docs = await libraryDocs();
  await putDocs(docs, client);
  await markCovered(covered);
  return { documents: docs.length };
}

/** The newest index job's id (0 when none): read before the library, it bounds the jobs a full pass has covered. */
async function lastJobId(): Promise<number> {
  return ((await IndexJob.max("id")) as number | null) ?? 0;
}
/**
 * A full pass (reindex, reconcile) read the library after jobs up to `covered` were written, so those are done. A job
 * written after that read (an approval committed meanwhile) may not be in what was sent: it stays for the worker.
 * (Marking every undone job done let an approval that landed mid-reconcile never reach the index.)
 */
async function markCovered(covered: number): Promise<void> {
  if (covered > 0)
    await sequelize.transaction((transaction) => IndexJob.update({ doneAt: new Date() }, { where: { doneAt: null, id: { [Op.lte]: covered } }, transaction }));
}

/** Push the outstanding index jobs to the service (oldest first); a job stays until the service has taken it. */
export async function drainIndexJobs(limit = 200): Promise<{ done: number; failed: number }> {
  const jobs = await IndexJob.findAll({ where: { doneAt: null }, order: [["id", "ASC"]], limit });
  if (!jobs.length) return { done: 0, failed: 0 };
  const client = workClient();
  try {
    await configureIndex(client);
    const connectorIds = [...new Set(jobs.filter((j) => j.kind === "connector").map((j) => j.subjectId))];
    const familyIds = [...new Set(jobs.filter((j) => j.kind === "family").map((j) => j.subjectId))];
    const docs = await libraryDocs({ connectorIds, familyIds });
    // A card's pins that are gone: replace the card's pin documents wholesale.
    const slugs = [...new Set(docs.filter((d) => d.type === "connector").map((d) => d.slug))];
    for (const slug of slugs) await waitOk(await client.index(SEARCH_INDEX).deleteDocuments({ filter: [`type = pin`, `slug = "${slug}"`] }), client);
    await putDocs(docs, client);
    // Job bookkeeping in transactions (handles of their own): a write on the shared handle that waits for the lock would
    // hold up every page read of the process (QUALITY F9: reads continue).
    await sequelize.transaction((transaction) => IndexJob.update({ doneAt: new Date() }, { where: { id: jobs.map((j) => j.id) }, transaction }));
    return { done: jobs.length, failed: 0 };
  } catch {
    await sequelize.transaction((transaction) => IndexJob.increment("attempts", { where: { id: jobs.map((j) => j.id) }, transaction }));
    return { done: 0, failed: jobs.length };
  }
}

/**
 * D11 (QUALITY): the database is the truth. Compare every document's id and version in the service with the library's
 * and repair the difference (add missing or stale ones, delete extras). Twice in a row, the second finds nothing.
 */
export async function reconcile(): Promise<{ added: number; updated: number; removed: number }> {
  const client = workClient();
  await configureIndex(client);
  const covered = await lastJobId();
  const want = await libraryDocs();
  const have = new Map<string, number>();
  for (let offset = 0; ; offset += 1000) {
    const page = await client.index(SEARCH_INDEX).getDocuments<{ id: string; version: number }>({ offset, limit: 1000, fields: ["id", "version"] });
    for (const d of page.results) have.set(d.id, d.version);
    if (page.results.length < 1000) break;
  }
  const wantIds = new Set(want.map((d) => d.id));
  const missing = want.filter((d) => !have.has(d.id));
  const stale = want.filter((d) => have.has(d.id) && have.get(d.id) !== d.version);
  const extra = [...have.keys()].filter((id) => !wantIds.has(id));
  await putDocs([...missing, ...stale], client);
  if (extra.length) await waitOk(await client.index(SEARCH_INDEX).deleteDocuments(extra), client);
  if (missing.length || stale.length || extra.length) await markCovered(covered);
  return { added: missing.length, updated: stale.length, removed: extra.length };
}

let worker: NodeJS.Timeout | null = null;
let pass: Promise<unknown> | null = null; // the reconcile or drain in progress, for stopSearchWorker to wait on
/** Reconcile once, then drain index jobs every SEARCH_POLL_MS (2 s) in this process (app/startup.server.ts starts it). */
export function startSearchWorker(): void {
  if (worker) return;
  // First bring the index in line with the library (a fresh stand-in is empty; a restarted one may lag), then follow jobs.
  // If the service is away at start, the reconcile is tried again each round until it has run once: otherwise an
  // index that came up empty after the app would hold only what later jobs sent, until the next app start.
  let busy = true;
  let reconciled = false;
  pass = reconcile()
    .then(
      () => {
        reconciled = true;
      },
      () => {
        /* service away: retried below */
      },
    )
    .finally(() => {
      busy = false;
    });
  worker = setInterval(() => {
    if (busy) return;
    busy = true;
    pass = (async () => {
      try {
        if (!reconciled) {
          await reconcile();
          reconciled = true;
        } else await drainIndexJobs();
      } catch {
        /* the next round tries again */
      } finally {
        busy = false;
      }
    })();
  }, env.SEARCH_POLL_MS);
  worker.unref();
}

/** Stop the worker and wait for a pass in progress (jobs not yet sent stay in index_jobs for the next start). */
export async function stopSearchWorker(): Promise<void> {
  if (worker) clearInterval(worker);
  worker = null;
  await pass?.catch(() => {});
  pass = null;
}

// --- searching --------------------------------------------------------------------------------------------------------

export interface SearchQuery {
  q: string;
  type?: SearchDocType;
  make?: string;
  family?: string;
  system?: string;
  pins?: number;
  limit: number;
  offset: number;
}
export interface SearchHit {
  type: SearchDocType;
  slug: string;
  cavity: string | null;
  title: string;
  subtitle: string;
  url: string;
  family: string;
  make: string;
}
export interface SearchResult {
  hits: SearchHit[];
  total: number;
  facets: {
    type: Record<string, number>;
    make: Record<string, number>;
    family: Record<string, number>;
    system: Record<string, number>;
    pinCount: Record<string, number>;
  };
  source: "index" | "database";
  tookMs: number;
}

const quote = (s: string) => `"${s.replace(/["\\]/g, "")}"`;
const HIT_FIELDS = ["type", "slug", "cavity", "title", "subtitle", "url", "family", "make"] as const satisfies readonly (keyof SearchHit)[];
const hitOf = (d: Pick<SearchDoc, (typeof HIT_FIELDS)[number]>): SearchHit => ({
  type: d.type,
  slug: d.slug,
  cavity: d.cavity ?? null,
  title: d.title,
  subtitle: d.subtitle,
  url: d.url,
  family: d.family,
  make: d.make,
});

/** The library search: the service when it answers in time, else the database (says which in `source`). */
export async function searchLibrary(q: SearchQuery): Promise<SearchResult> {
  const started = performance.now();
  if (!breakerOpen()) {
    try {
      const r = await fromService(q);
      succeeded();
      return { ...r, source: "index", tookMs: Math.round(performance.now() - started) };
    } catch {
      failed();
    }
  }
  const r = await fromDatabase(q);
  return { ...r, source: "database", tookMs: Math.round(performance.now() - started) };
}

async function fromService(q: SearchQuery): Promise<Omit<SearchResult, "source" | "tookMs">> {
  const filter: string[] = [];
  if (q.type) filter.push(`type = ${q.type}`);
  if (q.make) filter.push(`makeSlug = ${quote(q.make)}`);
  if (q.family) filter.push(`familySlug = ${quote(q.family)}`);
  if (q.system) filter.push(`system = ${quote(q.system)}`);
  if (q.pins !== undefined) filter.push(`pinCount = ${q.pins}`);
  // Only the fields a hit shows come back: the documents' code, colour and year lists would be serialized and parsed
  // on every keystroke for nothing.
  const params: SearchParams = {
    filter,
    facets: ["type", "makeSlug", "familySlug", "system", "pinCount"],
    limit: q.limit,
    offset: q.offset,
    attributesToRetrieve: [...HIT_FIELDS],
  };
  const r = await searchClient().index(SEARCH_INDEX).search<SearchDoc>(q.q, params);
  const fd = (r.facetDistribution ?? {}) as Record<string, Record<string, number>>;
  return {
    hits: r.hits.map((h) => hitOf(h)),
    total: r.estimatedTotalHits ?? r.hits.length,
    facets: { type: fd.type ?? {}, make: fd.makeSlug ?? {}, family: fd.familySlug ?? {}, system: fd.system ?? {}, pinCount: fd.pinCount ?? {} },
  };
}

/** search_fts's columns before `title` (db/migrations/2026-12-01-05-search-prefix.ts): id, type, slug, make_slug, family_slug, system, pin_count, version, doc. */
const FTS_UNINDEXED_WEIGHTS = "0, ".repeat(9);
/** The facets the fallback counts, and their columns (in search_facets, and the same names in search_fts). */
const FACET_COLUMNS = [
  ["type", "type"],
  ["make", "make_slug"],
  ["family", "family_slug"],
  ["system", "system"],
  ["pinCount", "pin_count"],
] as const;

/** The FTS5 fallback: every word as a prefix, all of them required; ranked by bm25 with the title weighted up. */
async function fromDatabase(q: SearchQuery): Promise<Omit<SearchResult, "source" | "tookMs">> {
  const words = q.q
    .normalize("NFKC")
    .split(/\s+/)
    .map((w) => w.replace(/["*^():{}[\]\\]/g, "").trim())
    .filter(Boolean)
    .slice(0, 12);
  const match = words.length ? words.map((w) => `"${w}"*`).join(" AND ") : null;
  // the filters, on columns both tables have
  const filters: string[] = [];
  const filterParams: unknown[] = [];
  if (q.type) {
    filters.push("type = ?");
    filterParams.push(q.type);
  }
  if (q.make) {
    filters.push("make_slug = ?");
    filterParams.push(q.make);
  }
  if (q.family) {
    filters.push("family_slug = ?");
    filterParams.push(q.family);
  }
  if (q.system) {
    filters.push("system = ?");
    filterParams.push(q.system);
  }
  if (q.pins !== undefined) {
    filters.push("pin_count = ?");
    filterParams.push(q.pins);
  }
  const where = (conditions: string[]) => (conditions.length ? `WHERE ${conditions.join(" AND ")}` : "");

  // bm25() takes one weight per column in declaration order, the UNINDEXED ones included (sqlite.org/fts5.html, "The
  // bm25() function"): the nine stored-only columns get 0, then title 10 and body 3. Given as (10.0, 3.0) alone, the
  // weights landed on `id` and `type` and title and body both ranked at the default 1.0.
  const order = match ? `ORDER BY bm25(search_fts, ${FTS_UNINDEXED_WEIGHTS}10.0, 3.0), rowid` : "ORDER BY rowid";
  const rows = await sequelize.query<{ doc: string }>(
    `SELECT doc FROM search_fts ${where(match ? ["search_fts MATCH ?", ...filters] : filters)} ${order} LIMIT ? OFFSET ?`,
    {
      replacements: [...(match ? [match] : []), ...filterParams, q.limit, q.offset],
      type: QueryTypes.SELECT,
    },
  );
  // All five facets from one pass over the matches' rows in the narrow search_facets table (the FTS5 content rows
  // hold whole documents): read once into a materialized CTE, grouped five times. Measured on invented cards
  // (tests/perf/search.bench.ts; SQLite alone, 10 000 cards): facet p95 ~29 ms from the FTS rows, ~14 ms from here.
  const facetRows = await sequelize.query<{ f: string; k: string | number | null; n: number }>(
    `WITH m AS MATERIALIZED (SELECT ${FACET_COLUMNS.map(([, col]) => col).join(", ")} FROM search_facets ${where(match ? ["rid IN (SELECT rowid FROM search_fts WHERE search_fts MATCH ?)", ...filters] : filters)}) ` +
      FACET_COLUMNS.map(([name, col]) => `SELECT '${name}' AS f, ${col} AS k, COUNT(*) AS n FROM m GROUP BY ${col}`).join(" UNION ALL "),
    { replacements: [...(match ? [match] : []), ...filterParams], type: QueryTypes.SELECT },
  );
  const facet = (name: string) => Object.fromEntries(facetRows.filter((x) => x.f === name && x.k !== null && x.k !== "").map((x) => [String(x.k), x.n]));
  const [type, make, family, system, pinCount] = FACET_COLUMNS.map(([name]) => facet(name));
  return {
    hits: rows.map((r) => hitOf(JSON.parse(r.doc) as SearchDoc)),
    total: Object.values(type).reduce((a, b) => a + b, 0),
    facets: { type, make, family, system, pinCount },
  };
}

/** Outstanding index jobs (for the health route and tests). */
export async function pendingIndexJobs(): Promise<number> {
  return IndexJob.count({ where: { doneAt: { [Op.is]: null } } });
}
