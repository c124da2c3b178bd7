/**
 * Contract tests for the search stand-in (search/server.ts), run THROUGH THE REAL CLIENT (meilisearch 0.62.0) against
 * the wire protocol in ../shared/STACK.md §4. By default the stand-in is started in-process on a free port with a
 * temporary data dir and an API key. Pointing SEARCH_URL (and SEARCH_KEY) at a real instance runs the same suite
 * against it; the stand-in-only parts (persistence across a restart, the /_standin fault modes) are then skipped.
 * Every index this suite creates is named contract_<pid>_<time>_* and deleted at the end. Documents are invented.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Meilisearch, MeilisearchApiError, MeilisearchRequestError, MeilisearchRequestTimeOutError, type Index, type Task } from "meilisearch";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { startSearchStandIn, type SearchStandIn } from "../../search/server.ts";

const REAL_URL = process.env.SEARCH_URL;
const REAL = Boolean(REAL_URL);
const STANDIN_KEY = "contract-test-key";
const KEY = REAL ? process.env.SEARCH_KEY : STANDIN_KEY;
const PREFIX = `contract_${process.pid}_${Date.now()}`;

let dataDir = "";
let standIn: SearchStandIn | null = null;
let host = "";
let client: Meilisearch;

const uid = (name: string) => `${PREFIX}_${name}`;

interface Card {
  id: string;
  family: string;
  make: string;
  title: string;
  circuits: string[];
  codes: string[];
  terminals: string[];
  cavities: number;
  year: number;
  kind: string;
}

// Invented families and makers (the demo library's invented names), circuits and colour codes in several notations.
const CARDS: Card[] = [
  {
    id: "rx750-pickup",
    family: "RX750 Four",
    make: "Asagiri",
    title: "Pickup coil plug",
    circuits: ["pickup coil", "ignition"],
    codes: ["W/R", "B/Y"],
    terminals: ["1", "2"],
    cavities: 2,
    year: 1979,
    kind: "connector",
  },
  {
    id: "b800-kill",
    family: "B 800 Boxer",
    make: "Brennwald",
    title: "Handlebar kill switch",
    circuits: ["kill switch", "ignition"],
    codes: ["ws/rt", "sw"],
    terminals: ["15", "31"],
    cavities: 4,
    year: 1976,
    kind: "connector",
  },
  {
    id: "b800-relay",
    family: "B 800 Boxer",
    make: "Brennwald",
    title: "Starter relay socket",
    circuits: ["starting"],
    codes: ["BLGN", "rt/sw"],
    terminals: ["30", "87a", "31b"],
    cavities: 4,
    year: 1977,
    kind: "connector",
  },
  {
    id: "sov650-reg",
    family: "Sovereign 650",
    make: "Ashcombe",
    title: "Regulator rectifier block",
    circuits: ["charging"],
    codes: ["Y/G", "R"],
    terminals: ["B+", "L"],
    cavities: 3,
    year: 1968,
    kind: "connector",
  },
  {
    id: "rx750-tail",
    family: "RX750 Four",
    make: "Asagiri",
    title: "Tail lamp feed",
    circuits: ["lighting"],
    codes: ["W", "R"],
    terminals: ["58"],
    cavities: 1,
    year: 1980,
    kind: "pin",
  },
  {
    id: "marquis-horn",
    family: "Marquis 500",
    make: "Ashcombe",
    title: "Horn push",
    circuits: ["horn"],
    codes: ["P/B"],
    terminals: ["H"],
    cavities: 2,
    year: 1971,
    kind: "connector",
  },
];

// Shapes from STACK.md §4 (not strict: a real instance may add fields).
const enqueuedTaskShape = z.object({
  taskUid: z.number().int().nonnegative(),
  indexUid: z.string().nullable(),
  status: z.literal("enqueued"),
  type: z.string(),
  enqueuedAt: z.string(),
});
const errorShape = z.object({ message: z.string().min(1), code: z.string(), type: z.string(), link: z.string() });
const taskShape = z.object({
  uid: z.number().int(),
  batchUid: z.number().int().nullable(),
  indexUid: z.string().nullable(),
  status: z.enum(["enqueued", "processing", "succeeded", "failed", "canceled"]),
  type: z.string(),
  canceledBy: z.number().nullable(),
  details: z.record(z.string(), z.unknown()).optional(),
  error: errorShape.nullable(),
  duration: z.string().nullable(),
  enqueuedAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});

/** The error a call rejects with, as a MeilisearchApiError. */
async function apiError(p: Promise<unknown>): Promise<MeilisearchApiError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof MeilisearchApiError) return e;
    throw e;
  }
  throw new Error("expected the call to fail");
}

async function ok(p: Promise<Task>): Promise<Task> {
  const task = await p;
  if (task.status !== "succeeded") throw new Error(`task ${task.uid} ${task.type} ${task.status}: ${JSON.stringify(task.error)}`);
  return task;
}

const ids = (hits: { id?: unknown }[]) => hits.map((h) => h.id);

async function cardsIndex(name: string): Promise<Index<Card>> {
  const index = client.index<Card>(uid(name));
  await ok(client.createIndex(uid(name), { primaryKey: "id" }).waitTask());
  await ok(
    index
      .updateSettings({
        searchableAttributes: ["family", "title", "circuits", "codes", "terminals"],
        filterableAttributes: ["make", "family", "cavities", "year", "codes", "kind"],
        sortableAttributes: ["year", "family", "cavities"],
      })
      .waitTask(),
  );
  await ok(index.addDocuments(CARDS).waitTask());
  return index;
}

beforeAll(async () => {
  if (REAL) host = REAL_URL!;
  else {
    dataDir = mkdtempSync(path.join(tmpdir(), "loomlore-search-"));
    standIn = await startSearchStandIn({ port: 0, dataDir, apiKey: STANDIN_KEY });
    host = standIn.url;
  }
  client = new Meilisearch({ host, apiKey: KEY, defaultWaitOptions: { interval: 10 } });
});

afterAll(async () => {
  if (client) {
    const { results } = await client.getRawIndexes({ limit: 1000 }).catch(() => ({ results: [] as { uid: string }[] }));
    for (const i of results.filter((r) => r.uid.startsWith(PREFIX)))
      await client
        .deleteIndex(i.uid)
        .waitTask()
        .catch(() => {});
  }
  await standIn?.close();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

describe("health and keys", () => {
  it("health() answers {status: available}; /health needs no key", async () => {
    expect(await client.health()).toEqual({ status: "available" });
    expect(await client.isHealthy()).toBe(true);
    const res = await fetch(new URL("health", `${host}/`));
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: "available" });
  });

  it.skipIf(REAL && !process.env.SEARCH_KEY)("no Authorization header → 401 missing_authorization_header; a wrong key → 403 invalid_api_key", async () => {
    const res = await fetch(new URL("indexes", `${host}/`));
    expect(res.status).toBe(401);
    const body = errorShape.parse(await res.json());
    expect(body.code).toBe("missing_authorization_header");
    expect(body.type).toBe("auth");

    const wrong = new Meilisearch({ host, apiKey: "not-the-key" });
    const e = await apiError(wrong.getIndexes());
    expect(e.response.status).toBe(403);
    expect(e.cause?.code).toBe("invalid_api_key");
    expect(e.cause?.type).toBe("auth");
    expect(await wrong.isHealthy()).toBe(true); // health stays public
  });
});

describe("indexes", () => {
  it("createIndex answers 202 with an EnqueuedTask; the task succeeds; getIndex and getIndexes show it", async () => {
    const enqueued = await client.createIndex(uid("idx"), { primaryKey: "id" });
    enqueuedTaskShape.parse(enqueued);
    expect(enqueued.type).toBe("indexCreation");
    expect(enqueued.indexUid).toBe(uid("idx"));
    const task = await client.tasks.waitForTask(enqueued.taskUid);
    taskShape.parse(task);
    expect(task.status).toBe("succeeded");
    expect(task.details?.primaryKey).toBe("id");

    const info = await client.index(uid("idx")).getRawInfo();
    expect(info).toMatchObject({ uid: uid("idx"), primaryKey: "id" });
    expect(Number.isNaN(Date.parse(info.createdAt as unknown as string))).toBe(false);
    const listed = await client.getRawIndexes({ limit: 1000 });
    expect(listed.results.map((r) => r.uid)).toContain(uid("idx"));
    expect(listed).toMatchObject({ offset: 0, limit: 1000 });
    expect(listed.total).toBeGreaterThanOrEqual(1);
  });

  it("a duplicate createIndex is a failed task that waitTask returns (it does not throw: gotcha 13)", async () => {
    const task = await client.createIndex(uid("idx"), { primaryKey: "id" }).waitTask();
    taskShape.parse(task);
    expect(task.status).toBe("failed");
    expect(task.error?.code).toBe("index_already_exists");
    expect(task.error?.type).toBe("invalid_request");
  });

  it("a missing index → MeilisearchApiError 404 index_not_found (getIndex, search)", async () => {
    for (const p of [client.getIndex(uid("nope")), client.index(uid("nope")).search("coil")]) {
      const e = await apiError(p);
      expect(e.response.status).toBe(404);
      expect(e.cause?.code).toBe("index_not_found");
      errorShape.parse(e.cause);
    }
  });

  it("an invalid index uid → 400 invalid_index_uid", async () => {
    const e = await apiError(client.getIndex("not a valid uid!"));
    expect(e.response.status).toBe(400);
    expect(e.cause?.code).toBe("invalid_index_uid");
  });

  it("deleteIndex is a task (indexDeletion); afterwards the index is gone", async () => {
    await ok(client.createIndex(uid("gone")).waitTask());
    const task = await ok(client.deleteIndex(uid("gone")).waitTask());
    expect(task.type).toBe("indexDeletion");
    expect((await apiError(client.getIndex(uid("gone")))).cause?.code).toBe("index_not_found");
  });
});

describe("settings", () => {
  it("updateSettings (PATCH) is a settingsUpdate task; getSettings shows the values", async () => {
    await ok(client.createIndex(uid("settings"), { primaryKey: "id" }).waitTask());
    const index = client.index(uid("settings"));
    const task = await ok(
      index
        .updateSettings({
          searchableAttributes: ["family", "title"],
          filterableAttributes: ["make"],
          sortableAttributes: ["year"],
          displayedAttributes: ["id", "family", "title", "year"],
          rankingRules: ["words", "typo", "sort", "proximity", "attribute", "exactness"],
        })
        .waitTask(),
    );
    expect(task.type).toBe("settingsUpdate");
    const s = await index.getSettings();
    expect(s.searchableAttributes).toEqual(["family", "title"]);
    expect(s.filterableAttributes).toEqual(["make"]);
    expect(s.sortableAttributes).toEqual(["year"]);
    expect(s.displayedAttributes).toEqual(["id", "family", "title", "year"]);
    expect(s.rankingRules).toEqual(["words", "typo", "sort", "proximity", "attribute", "exactness"]);
  });

  it("the per-setting PUT routes replace one setting; reset (DELETE) goes back to the default", async () => {
    const index = client.index(uid("settings"));
    await ok(index.updateFilterableAttributes(["make", "cavities"]).waitTask());
    await ok(index.updateSortableAttributes(["year", "cavities"]).waitTask());
    await ok(index.updateSearchableAttributes(["title", "family", "codes"]).waitTask());
    expect(await index.getFilterableAttributes()).toEqual(["make", "cavities"]);
    expect(await index.getSortableAttributes()).toEqual(["year", "cavities"]);
    expect(await index.getSearchableAttributes()).toEqual(["title", "family", "codes"]);
    await ok(index.resetSearchableAttributes().waitTask());
    await ok(index.resetDisplayedAttributes().waitTask());
    expect(await index.getSearchableAttributes()).toEqual(["*"]);
    expect(await index.getDisplayedAttributes()).toEqual(["*"]);
  });

  it("displayedAttributes limit what documents and hits show", async () => {
    const index = client.index(uid("settings"));
    await ok(index.addDocuments([{ id: "d1", family: "RX750 Four", title: "Pickup coil plug", year: 1979, secret: "hidden" }]).waitTask());
    await ok(index.updateDisplayedAttributes(["id", "title"]).waitTask());
    expect(await index.getDocument("d1")).toEqual({ id: "d1", title: "Pickup coil plug" });
    expect((await index.search("pickup")).hits[0]).toEqual({ id: "d1", title: "Pickup coil plug" });
  });
});

describe("documents", () => {
  let index: Index<Card>;
  beforeAll(async () => {
    index = await cardsIndex("docs");
  });

  it("addDocuments is a documentAdditionOrUpdate task counting received and indexed documents", async () => {
    const task = await ok(index.addDocuments([{ ...CARDS[0] }]).waitTask());
    expect(task.type).toBe("documentAdditionOrUpdate");
    expect(task.details).toMatchObject({ receivedDocuments: 1, indexedDocuments: 1 });
  });

  it("getDocuments pages in insertion order with offset, limit, fields and total; getDocument reads one", async () => {
    const page = await index.getDocuments({ offset: 1, limit: 2 });
    expect(page).toMatchObject({ offset: 1, limit: 2, total: CARDS.length });
    expect(ids(page.results)).toEqual([CARDS[1].id, CARDS[2].id]);
    const slim = await index.getDocuments({ limit: 1, fields: ["id", "family"] });
    expect(slim.results).toEqual([{ id: CARDS[0].id, family: CARDS[0].family }]);
    expect(await index.getDocument("b800-relay")).toEqual(CARDS[2]);
    expect(await index.getDocument("b800-relay", { fields: ["title"] })).toEqual({ title: CARDS[2].title });
  });

  it("getDocuments with a filter (POST …/documents/fetch)", async () => {
    const r = await index.getDocuments({ filter: "make = Brennwald AND cavities >= 4", fields: ["id"] });
    expect(r.results).toEqual([{ id: "b800-kill" }, { id: "b800-relay" }]);
    expect(r.total).toBe(2);
  });

  it("a missing document → 404 document_not_found", async () => {
    const e = await apiError(index.getDocument("no-such-card"));
    expect(e.response.status).toBe(404);
    expect(e.cause?.code).toBe("document_not_found");
  });

  it("addDocuments replaces a whole document; updateDocuments merges fields into it", async () => {
    const idx = client.index(uid("merge"));
    await ok(idx.addDocuments([{ id: "m1", title: "Horn push", cavities: 2, colour: "P/B" }]).waitTask());
    await ok(
      idx
        .updateDocuments([
          { id: "m1", title: "Horn push switch" },
          { id: "m2", title: "Neutral lamp" },
        ])
        .waitTask(),
    );
    expect(await idx.getDocument("m1")).toEqual({ id: "m1", title: "Horn push switch", cavities: 2, colour: "P/B" });
    expect(await idx.getDocument("m2")).toEqual({ id: "m2", title: "Neutral lamp" });
    await ok(idx.addDocuments([{ id: "m1", title: "Horn relay" }]).waitTask());
    expect(await idx.getDocument("m1")).toEqual({ id: "m1", title: "Horn relay" });
    // addDocuments created the index and inferred the primary key "id"
    expect((await idx.getRawInfo()).primaryKey).toBe("id");
  });

  it("bad documents make the task fail with the service's codes (returned, not thrown)", async () => {
    const idx = client.index(uid("bad"));
    await ok(client.createIndex(uid("bad"), { primaryKey: "id" }).waitTask());
    const badId = await idx.addDocuments([{ id: "has space" }]).waitTask();
    expect(badId.status).toBe("failed");
    expect(badId.error?.code).toBe("invalid_document_id");
    const missing = await idx.addDocuments([{ title: "no id" }]).waitTask();
    expect(missing.status).toBe("failed");
    expect(missing.error?.code).toBe("missing_document_id");
    const none = await client
      .index(uid("nokey"))
      .addDocuments([{ title: "nothing ending in i-d" }])
      .waitTask();
    expect(none.status).toBe("failed");
    expect(none.error?.code).toBe("index_primary_key_no_candidate_found");
    expect((await idx.getDocuments()).total).toBe(0); // a failed task changes nothing
  });

  it("deletes: one id, a batch of ids, by filter, all — each a documentDeletion task", async () => {
    const idx = await cardsIndex("delete");
    const one = await ok(idx.deleteDocument("rx750-tail").waitTask());
    expect(one.type).toBe("documentDeletion");
    expect(one.details).toMatchObject({ deletedDocuments: 1 });
    const batch = await ok(idx.deleteDocuments(["b800-kill", "marquis-horn", "never-was"]).waitTask());
    expect(batch.details).toMatchObject({ providedIds: 3, deletedDocuments: 2 });
    expect(ids((await idx.getDocuments()).results)).toEqual(["rx750-pickup", "b800-relay", "sov650-reg"]);
    const byFilter = await ok(idx.deleteDocuments({ filter: "make = Ashcombe OR year < 1978" }).waitTask());
    expect(byFilter.details).toMatchObject({ deletedDocuments: 2 });
    expect(ids((await idx.getDocuments()).results)).toEqual(["rx750-pickup"]);
    const all = await ok(idx.deleteAllDocuments().waitTask());
    expect(all.details).toMatchObject({ deletedDocuments: 1 });
    expect((await idx.getDocuments()).total).toBe(0);
  });

  it("delete by filter on an attribute that is not filterable fails the task", async () => {
    const task = await index.deleteDocuments({ filter: "title = x" }).waitTask();
    expect(task.status).toBe("failed");
    expect(task.error?.code).toBe("invalid_document_filter");
  });
});

describe("search", () => {
  let index: Index<Card>;
  beforeAll(async () => {
    index = await cardsIndex("search");
  });

  it("returns the SearchResponse shape (hits, query, processingTimeMs, limit, offset, estimatedTotalHits)", async () => {
    const r = await index.search("coil");
    expect(r).toMatchObject({ query: "coil", limit: 20, offset: 0 });
    expect(typeof r.processingTimeMs).toBe("number");
    expect(r.estimatedTotalHits).toBe(1);
    expect(r.hits).toEqual([CARDS[0]]);
    expect(r.facetDistribution).toBeUndefined();
  });

  it("an empty q returns every document in insertion order; limit and offset page it", async () => {
    const all = await index.search("");
    expect(ids(all.hits)).toEqual(CARDS.map((c) => c.id));
    expect(all.estimatedTotalHits).toBe(CARDS.length);
    const page = await index.search(null, { offset: 2, limit: 2 });
    expect(ids(page.hits)).toEqual([CARDS[2].id, CARDS[3].id]);
    expect(page).toMatchObject({ offset: 2, limit: 2, estimatedTotalHits: CARDS.length });
  });

  it("a string filter", async () => {
    const r = await index.search("", { filter: "make = asagiri AND cavities > 1" });
    expect(ids(r.hits)).toEqual(["rx750-pickup"]);
    const ranged = await index.search("", { filter: "year 1970 TO 1979 AND NOT kind = pin" });
    expect(ids(ranged.hits)).toEqual(["rx750-pickup", "b800-kill", "b800-relay", "marquis-horn"]);
    const inList = await index.search("", { filter: "codes IN [BLGN, Y/G]" });
    expect(ids(inList.hits)).toEqual(["b800-relay", "sov650-reg"]);
  });

  it("the array filter form: outer AND, inner OR", async () => {
    const r = await index.search("", { filter: [["make = Brennwald", "make = Ashcombe"], "cavities <= 3"] });
    expect(ids(r.hits)).toEqual(["sov650-reg", "marquis-horn"]);
  });

  it("a bad filter → 400 invalid_search_filter; an attribute that is not filterable too", async () => {
    for (const filter of ["year >", "(make = Asagiri", "title = x"]) {
      const e = await apiError(index.search("", { filter }));
      expect(e.response.status).toBe(400);
      expect(e.cause?.code).toBe("invalid_search_filter");
    }
  });

  it("facets: facetDistribution (string keys, counted over all matches, each array element counted) and facetStats", async () => {
    const r = await index.search("", { facets: ["make", "cavities", "codes"], limit: 1 });
    expect(r.hits).toHaveLength(1);
    expect(r.facetDistribution?.make).toEqual({ Asagiri: 2, Ashcombe: 2, Brennwald: 2 });
    expect(r.facetDistribution?.cavities).toEqual({ "1": 1, "2": 2, "3": 1, "4": 2 });
    expect(r.facetDistribution?.codes).toMatchObject({ R: 2, "W/R": 1, "ws/rt": 1, BLGN: 1 });
    expect(r.facetStats?.cavities).toEqual({ min: 1, max: 4 });
    expect(r.facetStats?.make).toBeUndefined();
    const filtered = await index.search("", { facets: ["make"], filter: "cavities >= 3" });
    expect(filtered.facetDistribution?.make).toEqual({ Ashcombe: 1, Brennwald: 2 });
  });

  it("facets on an attribute that is not filterable → 400 invalid_search_facets", async () => {
    const e = await apiError(index.search("", { facets: ["title"] }));
    expect(e.response.status).toBe(400);
    expect(e.cause?.code).toBe("invalid_search_facets");
  });

  it("sort by one or several sortable attributes", async () => {
    const byYear = await index.search("", { sort: ["year:asc"] });
    expect(ids(byYear.hits)).toEqual(["sov650-reg", "marquis-horn", "b800-kill", "b800-relay", "rx750-pickup", "rx750-tail"]);
    const two = await index.search("", { sort: ["cavities:desc", "year:asc"] });
    expect(ids(two.hits)).toEqual(["b800-kill", "b800-relay", "sov650-reg", "marquis-horn", "rx750-pickup", "rx750-tail"]);
    const family = await index.search("", { sort: ["family:desc"], limit: 2 });
    expect(ids(family.hits)).toEqual(["sov650-reg", "rx750-pickup"]);
  });

  it("sort on an attribute that is not sortable → 400 invalid_search_sort", async () => {
    const e = await apiError(index.search("", { sort: ["title:asc"] }));
    expect(e.response.status).toBe(400);
    expect(e.cause?.code).toBe("invalid_search_sort");
  });

  it("attributesToRetrieve and attributesToHighlight → _formatted with <em> tags", async () => {
    const r = await index.search("kill", { attributesToRetrieve: ["id", "title"], attributesToHighlight: ["title"] });
    expect(r.hits[0]).toMatchObject({ id: "b800-kill", title: "Handlebar kill switch" });
    expect(Object.keys(r.hits[0]).sort()).toEqual(["_formatted", "id", "title"]);
    expect(r.hits[0]._formatted?.title).toBe("Handlebar <em>kill</em> switch");
  });

  it('attributesToHighlight ["*"] with custom tags marks every attribute (numbers become strings in _formatted)', async () => {
    const r = await index.search("ignition", { attributesToHighlight: ["*"], highlightPreTag: "[", highlightPostTag: "]" });
    const hit = r.hits.find((h) => h.id === "rx750-pickup")!;
    expect(hit._formatted?.circuits).toEqual(["pickup coil", "[ignition]"]);
    expect(hit._formatted?.title).toBe("Pickup coil plug");
    expect(String(hit._formatted?.year)).toBe("1979");
    expect(hit.year).toBe(1979);
  });

  it("typo tolerance: one typo in a word of 5–8 letters is forgiven", async () => {
    expect((await index.search("pickp")).hits[0]?.id).toBe("rx750-pickup");
    expect((await index.search("rx75o")).hits[0]?.id).toBe("rx750-pickup");
    expect(ids((await index.search("sovreign")).hits)).toEqual(["sov650-reg"]);
    expect(ids((await index.search("swtch")).hits)).toContain("b800-kill");
  });

  it("no typo is forgiven in a word under 5 letters", async () => {
    expect((await index.search("hron")).hits).toEqual([]);
  });

  it("prefix search: what is typed so far finds the word (as you type)", async () => {
    expect(ids((await index.search("kil")).hits)).toEqual(["b800-kill"]);
    expect(ids((await index.search("sove")).hits)).toEqual(["sov650-reg"]);
    expect(ids((await index.search("kill sw")).hits)).toContain("b800-kill");
  });

  // The service's prefix rule (meilisearch.com/docs/learn/advanced/prefix): "you can perform a search with only a single
  // letter as your query"; "Prefix search is only performed on the last word in a search query".
  it("one or two characters find every word they begin; the word typed whole ranks first", async () => {
    expect(ids((await index.search("st")).hits)).toEqual(["b800-relay"]);
    expect(ids((await index.search("r", { filter: "make = Ashcombe" })).hits)).toEqual(["sov650-reg"]);
    const r = await index.search("R");
    expect(ids(r.hits)).toEqual(expect.arrayContaining(["b800-relay", "sov650-reg", "rx750-tail", "rx750-pickup"]));
    // the cards holding the code R itself (or the r of W/R) come before the one that only has words beginning with r
    expect(ids(r.hits).indexOf("b800-relay")).toBeGreaterThan(Math.max(ids(r.hits).indexOf("sov650-reg"), ids(r.hits).indexOf("rx750-tail")));
  });

  it("a one-letter prefix is marked in _formatted as typed", async () => {
    const r = await index.search("st", { attributesToRetrieve: ["id", "title"], attributesToHighlight: ["title"] });
    expect(r.hits[0]?._formatted?.title).toBe("<em>St</em>arter relay socket");
  });

  it("only the last word is a prefix: earlier words must be whole", async () => {
    expect((await index.search("kil switch", { matchingStrategy: "all" })).hits).toEqual([]);
    expect(ids((await index.search("switch ki", { matchingStrategy: "all" })).hits)).toEqual(["b800-kill"]);
    expect(ids((await index.search("switch k", { matchingStrategy: "all" })).hits)).toEqual(["b800-kill"]);
  });

  it("short prefixes follow updates and deletes of documents", async () => {
    const own = client.index<{ id: string; title: string }>(uid("prefix-follow"));
    await ok(client.createIndex(uid("prefix-follow"), { primaryKey: "id" }).waitTask());
    await ok(
      own
        .addDocuments([
          { id: "a", title: "Zephyr lamp" },
          { id: "b", title: "Quartz horn" },
        ])
        .waitTask(),
    );
    expect(ids((await own.search("ze")).hits)).toEqual(["a"]);
    await ok(own.updateDocuments([{ id: "a", title: "Quill lamp" }]).waitTask());
    expect((await own.search("ze")).hits).toEqual([]);
    expect(ids((await own.search("qu")).hits).sort()).toEqual(["a", "b"]);
    await ok(own.deleteDocument("b").waitTask());
    expect(ids((await own.search("q")).hits)).toEqual(["a"]);
  });

  // Stand-in only: the service cuts "W/R" at the slash and matches w and r as two words (its tokenizer's separators).
  // The stand-in keeps a code whole, so a rider's W/R finds cards holding W/R; its parts are matched only when no
  // document holds the code itself (a typed "W-R", a hyphenated "kill-switch").
  it.skipIf(REAL)("a code is matched whole when the index holds it; by its parts only when it does not", async () => {
    expect(ids((await index.search("W/R")).hits)).toEqual(["rx750-pickup"]);
    expect(ids((await index.search("W-R")).hits).sort()).toEqual(["rx750-pickup", "rx750-tail"]);
    expect(ids((await index.search("kill-switch")).hits)).toEqual(["b800-kill"]);
    expect(ids((await index.search("B+")).hits)).toEqual(["sov650-reg"]);
  });

  it("colour codes in several notations find the card holding that code first", async () => {
    expect((await index.search("W/R")).hits[0]?.id).toBe("rx750-pickup");
    expect((await index.search("w/r")).hits[0]?.id).toBe("rx750-pickup");
    expect((await index.search("ws/rt")).hits[0]?.id).toBe("b800-kill");
    expect((await index.search("BLGN")).hits[0]?.id).toBe("b800-relay");
    expect((await index.search("Y/G")).hits[0]?.id).toBe("sov650-reg");
  });

  it("terminal numbers find their card first", async () => {
    expect((await index.search("31b")).hits[0]?.id).toBe("b800-relay");
    expect((await index.search("87a")).hits[0]?.id).toBe("b800-relay");
    expect((await index.search("58")).hits[0]?.id).toBe("rx750-tail");
  });

  it("circuit words and family names", async () => {
    expect((await index.search("kill switch")).hits[0]?.id).toBe("b800-kill");
    expect((await index.search("pickup coil")).hits[0]?.id).toBe("rx750-pickup");
    expect(
      ids((await index.search("RX750 Four")).hits)
        .slice(0, 2)
        .sort(),
    ).toEqual(["rx750-pickup", "rx750-tail"]);
    expect(ids((await index.search("charging", { filter: "make = Ashcombe" })).hits)).toEqual(["sov650-reg"]);
  });

  it("searchGet (GET …/search with query parameters) answers like POST", async () => {
    const r = await index.searchGet("kill", { filter: "cavities = 4", attributesToHighlight: ["title"], limit: 5 });
    expect(ids(r.hits)).toEqual(["b800-kill"]);
    expect(r.hits[0]._formatted?.title).toBe("Handlebar <em>kill</em> switch");
    expect(r.limit).toBe(5);
  });
});

describe("tasks", () => {
  it("getTask reads one task; getTasks filters by statuses, indexUids and types and pages with limit/from/next", async () => {
    const name = uid("tasks");
    const created = await ok(client.createIndex(name, { primaryKey: "id" }).waitTask());
    const failed = await client.createIndex(name).waitTask();
    const added = await ok(
      client
        .index(name)
        .addDocuments([{ id: "t1" }])
        .waitTask(),
    );
    const one = await client.tasks.getTask(added.uid);
    taskShape.parse(one);
    expect(one).toMatchObject({ uid: added.uid, indexUid: name, status: "succeeded", type: "documentAdditionOrUpdate" });

    const mine = await client.tasks.getTasks({ indexUids: [name] });
    expect(mine.results.map((t) => t.uid)).toEqual([added.uid, failed.uid, created.uid]); // newest first
    expect(mine.total).toBe(3);
    expect(mine.next).toBeNull();
    const failures = await client.tasks.getTasks({ indexUids: [name], statuses: ["failed"] });
    expect(failures.results.map((t) => t.uid)).toEqual([failed.uid]);
    const creations = await client.tasks.getTasks({ indexUids: [name], types: ["indexCreation"] });
    expect(creations.results.map((t) => t.uid)).toEqual([failed.uid, created.uid]);
    const first = await client.tasks.getTasks({ indexUids: [name], limit: 2 });
    expect(first.results.map((t) => t.uid)).toEqual([added.uid, failed.uid]);
    expect(first).toMatchObject({ limit: 2, from: added.uid, next: created.uid });
    const second = await client.tasks.getTasks({ indexUids: [name], limit: 2, from: first.next! });
    expect(second.results.map((t) => t.uid)).toEqual([created.uid]);
    expect(second.next).toBeNull();
  });

  it("an unknown task → 404 task_not_found", async () => {
    const e = await apiError(client.tasks.getTask(987_654_321));
    expect(e.response.status).toBe(404);
    expect(e.cause?.code).toBe("task_not_found");
  });
});

describe.skipIf(REAL)("stand-in only: persistence", () => {
  it("a restart on the same data dir keeps every index, setting and document a succeeded task reported", async () => {
    const index = await cardsIndex("persist");
    const last = await ok(index.updateDocuments([{ id: "rx750-tail", title: "Tail and stop lamp feed" }]).waitTask());
    await standIn!.close();
    // the port is closed now: the client's request fails as a request error, not an API error
    await expect(client.health()).rejects.toBeInstanceOf(MeilisearchRequestError);

    standIn = await startSearchStandIn({ port: 0, dataDir, apiKey: STANDIN_KEY });
    host = standIn.url;
    client = new Meilisearch({ host, apiKey: KEY, defaultWaitOptions: { interval: 10 } });
    const again = client.index<Card>(uid("persist"));
    expect((await again.getSettings()).sortableAttributes).toEqual(["year", "family", "cavities"]);
    expect((await again.getDocuments()).total).toBe(CARDS.length);
    expect((await again.search("stop lamp")).hits[0]?.id).toBe("rx750-tail");
    expect((await again.search("pickp")).hits[0]?.id).toBe("rx750-pickup");
    expect((await again.search("", { filter: "make = Brennwald", sort: ["year:desc"] })).hits.map((h) => h.id)).toEqual(["b800-relay", "b800-kill"]);
    // task numbers go on after the last persisted one
    const next = await client.createIndex(uid("after-restart")).waitTask();
    expect(next.uid).toBeGreaterThan(last.uid);
  });
});

describe.skipIf(REAL)("stand-in only: fault modes (QUALITY F2)", () => {
  const control = async (body: unknown) => {
    const res = await fetch(`${standIn!.url}/_standin/fault`, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
    expect(res.status).toBe(200);
    return res.json();
  };
  const state = async () => (await fetch(`${standIn!.url}/_standin/state`)).json() as Promise<{ mode: string; delayMs: number; hanging: number }>;

  afterAll(async () => {
    if (standIn) await control({ mode: "normal" });
  });

  it("hang: the request is accepted and never answered, so the client's timeout fires", async () => {
    await control({ mode: "hang" });
    const impatient = new Meilisearch({ host: standIn!.url, apiKey: KEY, timeout: 300 });
    const started = Date.now();
    let error: unknown;
    try {
      await impatient.index(uid("search")).search("coil");
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(MeilisearchRequestError);
    expect((error as Error).cause).toBeInstanceOf(MeilisearchRequestTimeOutError);
    expect(Date.now() - started).toBeGreaterThanOrEqual(290);
    expect((await state()).mode).toBe("hang");
    await control({ mode: "normal" });
    expect(await client.isHealthy()).toBe(true);
  });

  it("error: every service route answers 500 in the service's error shape", async () => {
    await control({ mode: "error" });
    for (const p of [client.health(), client.index(uid("search")).search("coil"), client.getIndexes()]) {
      const e = await apiError(p);
      expect(e.response.status).toBe(500);
      errorShape.parse(e.cause);
      expect(e.cause?.type).toBe("internal");
    }
    expect(await client.isHealthy()).toBe(false);
    await control({ mode: "normal" });
    expect(await client.isHealthy()).toBe(true);
  });

  it("slow: answers come after delayMs", async () => {
    expect(await control({ mode: "slow", delayMs: 400 })).toEqual({ mode: "slow", delayMs: 400 });
    const started = Date.now();
    const r = await client.index(uid("search")).search("coil");
    expect(Date.now() - started).toBeGreaterThanOrEqual(390);
    expect(r.hits[0]?.id).toBe("rx750-pickup");
    const impatient = new Meilisearch({ host: standIn!.url, apiKey: KEY, timeout: 150 });
    await expect(impatient.health()).rejects.toBeInstanceOf(MeilisearchRequestError);
    await control({ mode: "normal" });
    expect((await state()).mode).toBe("normal");
  });

  it("the control routes refuse an unknown mode", async () => {
    const res = await fetch(`${standIn!.url}/_standin/fault`, { method: "POST", body: JSON.stringify({ mode: "sideways" }) });
    expect(res.status).toBe(400);
  });
});

describe.skipIf(REAL)("stand-in only: routes outside the contract", () => {
  it("an unknown route → 404 and a wrong method → 405, both with an empty body (as the service answers)", async () => {
    const headers = { Authorization: `Bearer ${STANDIN_KEY}` };
    const unknown = await fetch(`${standIn!.url}/nowhere`, { headers });
    expect(unknown.status).toBe(404);
    expect(await unknown.text()).toBe("");
    const wrong = await fetch(`${standIn!.url}/indexes/${uid("search")}/search`, { method: "DELETE", headers });
    expect(wrong.status).toBe(405);
  });

  it("malformed JSON → 400 bad_request", async () => {
    const res = await fetch(`${standIn!.url}/indexes/${uid("search")}/search`, {
      method: "POST",
      headers: { Authorization: `Bearer ${STANDIN_KEY}`, "Content-Type": "application/json" },
      body: "{not json",
    });
    expect(res.status).toBe(400);
    expect(errorShape.parse(await res.json()).code).toBe("bad_request");
  });
});
