/**
 * /api/v1/search through the production server with the search stand-in (search/server.ts) behind the real
 * meilisearch client: the index is filled at start, the API shape of API.md "Search", filters and facets, bad input,
 * search quality on the demo library, an approved edit reaching the index, and D11 reconciliation (QUALITY.md).
 *
 * Search-quality expectations are about our invented demo data (db/seeders/demo: three invented makers, six invented
 * families). The cards expected first are looked up in the test server's database, not typed in by hand: "the card
 * whose jis-coded pin is O/B", "the cards with a terminal 31d". Every card exists as a plug and a socket with the same
 * pins, so "first" means the first connector hit is one of the cards the database names.
 */
import { Meilisearch } from "meilisearch";
import sqlite3 from "sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { DEMO, req, signIn, where, type Role } from "../support/http";
import { startServer, type TestServer } from "../support/server";
import { errorBody, reconcileOnce, shape } from "./helpers";

const INDEX = "library"; // SEARCH_INDEX's default (app/services/search.server.ts)

let srv: TestServer;
let search: Meilisearch;
const sessions = {} as Record<Role, string>;

// API.md "Search": hits type/slug/title/subtitle/url; facets make/system/pinCount; total; source; tookMs.
const counts = z.record(z.string(), z.number().int().nonnegative());
const hitShape = z.looseObject({
  type: z.enum(["family", "connector", "pin"]),
  slug: z.string().min(1),
  title: z.string().min(1),
  subtitle: z.string(),
  url: z.string().startsWith("/"),
});
const resultShape = z.looseObject({
  hits: z.array(hitShape),
  facets: z.object({ make: counts, system: counts, pinCount: counts }).passthrough(),
  total: z.number().int().nonnegative(),
  source: z.enum(["index", "database"]),
  tookMs: z.number().nonnegative(),
});
type Hit = z.infer<typeof hitShape> & { cavity?: string | null };
type Result = z.infer<typeof resultShape> & { hits: Hit[]; facets: Record<string, Record<string, number>>; limit?: number; offset?: number };

async function find(params: Record<string, string>): Promise<Result> {
  const qs = new URLSearchParams(params).toString();
  const r = await req(srv, `/api/v1/search?${qs}`);
  expect(r.status, `GET /api/v1/search?${qs}: ${where(r)}`).toBe(200);
  expect(r.headers.get("content-type")).toMatch(/^application\/json\b/);
  return shape(resultShape, JSON.parse(r.body), `search ${qs}`) as Result;
}
const firstOf = (r: Result, type: Hit["type"]) => r.hits.find((h) => h.type === type);

function dbAll<T = Record<string, unknown>>(sql: string, params: unknown[] = []): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(srv.dbPath, sqlite3.OPEN_READONLY, (err) => {
      if (err) return reject(err);
      db.all(sql, params, (e, rows) => db.close(() => (e ? reject(e) : resolve(rows as T[]))));
    });
  });
}
/** Card slugs: published connector cards with a pin matching `cond` (SQL over pins p, connectors c, families f). */
async function cardsWhere(cond: string, params: unknown[] = []): Promise<string[]> {
  const rows = await dbAll<{ slug: string }>(
    `SELECT DISTINCT c.slug FROM pins p JOIN connectors c ON c.id = p.connector_id JOIN families f ON f.id = c.family_id WHERE ${cond} ORDER BY c.slug`,
    params,
  );
  return rows.map((r) => r.slug);
}

/** How the start went: the first answer from the index (or the last answer within 15 s) and when it came. */
let startup: { ms: number; last: Result | null };

beforeAll(async () => {
  srv = await startServer({ search: true });
  search = new Meilisearch({ host: srv.searchUrl! });
  // The app reconciles the fresh (empty) stand-in by itself once its database is up: poll until the index answers.
  const started = Date.now();
  let last: Result | null = null;
  while (Date.now() - started < 15_000) {
    last = await find({ q: "" });
    if (last.source === "index" && last.total > 0) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  startup = { ms: Date.now() - started, last };
  for (const role of ["contributor", "moderator"] as Role[]) sessions[role] = await signIn(srv, DEMO[role].email, DEMO[role].password);
}, 120_000);
afterAll(async () => srv?.stop());

describe("the index at start", () => {
  it("the app reconciles the fresh stand-in by itself: the index answers within 15 s and holds every document", async () => {
    const { last } = startup;
    expect(last?.source, `still ${last?.source} with ${last?.total} after 15 s`).toBe("index");
    expect(last!.total).toBeGreaterThan(0);
    expect(startup.ms).toBeLessThanOrEqual(15_000);
    // Every search document the database holds (its FTS5 copy is written with each publish) is in the index.
    const [{ n }] = await dbAll<{ n: number }>("SELECT COUNT(*) AS n FROM search_fts");
    await expect.poll(async () => (await search.index(INDEX).getStats()).numberOfDocuments, { timeout: 10_000 }).toBe(n);
    console.log(`[search] index ready ${startup.ms} ms after the server's first health answer, ${n} documents`);
  });
});

describe("API shape, filters and facets", () => {
  it("answers in the API.md shape, from the index", async () => {
    const r = await find({ q: "pickup", limit: "100" });
    expect(r.source).toBe("index");
    expect(r.hits.length).toBeGreaterThan(0);
    expect(new Set(r.hits.map((h) => h.type))).toEqual(new Set(["family", "connector", "pin"]));
    for (const h of r.hits) {
      if (h.type === "family") expect(h.url).toBe(`/families/${h.slug}`);
      if (h.type === "connector") expect(h.url).toBe(`/connectors/${h.slug}`);
      if (h.type === "pin") expect(h.url).toMatch(new RegExp(`^/connectors/${h.slug}\\?cavity=[^#]+#pin-`));
    }
    // facet counts are counts of the whole result, not of the page
    expect(Object.values(r.facets.type).reduce((a, b) => a + b, 0)).toBe(r.total);
    const page = await find({ q: "pickup", limit: "5" });
    expect(page.hits).toHaveLength(5);
    expect(page.total).toBe(r.total);
    expect(page.facets).toEqual(r.facets);
  });

  it("make, family, system, pins and type each narrow the result to what the unfiltered facet counted", async () => {
    const all = await find({ q: "pickup" });
    const cases: [string, string, string][] = [
      ["make", "asagiri", "make"],
      ["family", "rx750-four", "family"],
      ["system", "ignition", "system"],
      ["pins", "4", "pinCount"],
      ["type", "connector", "type"],
    ];
    for (const [param, value, facet] of cases) {
      const expected = all.facets[facet]?.[value];
      expect(expected, `facet ${facet} counts ${value}`).toBeGreaterThan(0);
      const r = await find({ q: "pickup", [param]: value });
      expect(r.total, `${param}=${value}`).toBe(expected);
      expect(r.total).toBeLessThan(all.total);
      expect(Object.keys(r.facets[facet]), `${param}=${value} leaves only that ${facet}`).toEqual([value]);
    }
    // Combined filters: AND.
    const both = await find({ q: "pickup", make: "asagiri", type: "connector" });
    expect(both.hits.length).toBeGreaterThan(0);
    for (const h of both.hits) {
      expect(h.type).toBe("connector");
      expect(h.slug).toMatch(/^rx(750|400)-four-/); // the invented maker Asagiri's two families
    }
    const none = await find({ q: "pickup", make: "ashcombe", system: "charging" });
    expect(none.total).toBe(0);
  });

  it("limit and offset page through the same ranking", async () => {
    const ten = await find({ q: "earth", limit: "10" });
    const second = await find({ q: "earth", limit: "5", offset: "5" });
    expect(second.hits.map((h) => h.url)).toEqual(ten.hits.slice(5, 10).map((h) => h.url));
  });

  it("bad input is a 400 with the API's error body, never a 500", async () => {
    const bad: Record<string, string>[] = [
      { q: "a".repeat(201) },
      { q: "pickup", pins: "abc" },
      { q: "pickup", pins: "0" },
      { q: "pickup", type: "nope" },
      { q: "x", make: "Not A Slug" },
      { q: "x", family: "\u0000" },
      { q: "x", make: "asagiri\u0000" },
      { q: "x", system: "nope" },
      { q: "x", limit: "1000" },
      { q: "x", offset: "-1" },
    ];
    for (const params of bad) {
      const qs = new URLSearchParams(params).toString();
      const r = await req(srv, `/api/v1/search?${qs}`);
      expect(r.status, `${qs.slice(0, 80)}: ${where(r)}`).toBe(400);
      expect(r.headers.get("content-type")).toMatch(/^application\/json\b/);
      expect(errorBody.safeParse(JSON.parse(r.body)).success, r.body).toBe(true);
    }
    // NUL and other control characters inside the words are read as spaces (app/validation/library.ts): an answer, not an error.
    for (const q of ["pick\u0000up", "\u0000", "W/R\u0007", '"unclosed', "-", "*", "NEAR(a b)", "^", "'", "a OR b", "31d AND"]) {
      const r = await req(srv, `/api/v1/search?q=${encodeURIComponent(q)}`);
      expect(r.status, `${JSON.stringify(q)}: ${where(r)}`).toBe(200);
    }
    expect((await req(srv, "/api/v1/search?q=x", { method: "POST", json: {} })).status).toBe(405);
  });
});

describe("search quality on the (invented) demo library", () => {
  it("a typo in a family name finds that family first", async () => {
    // one letter swapped, one dropped, a letter O for a zero (typo tolerance: 1 typo from 5 characters, as the service's defaults)
    for (const [q, family] of [
      ["sovereing", "sovereign-650"],
      ["marqis 500", "marquis-500"],
      ["rx75o four", "rx750-four"],
      ["rx40o", "rx400-four"],
    ] as const) {
      const r = await find({ q });
      expect(r.source).toBe("index");
      expect(firstOf(r, "family")?.slug, q).toBe(family);
      expect((await find({ q, type: "family" })).hits[0]?.slug, `${q} type=family`).toBe(family);
    }
  });

  // A colour code from each notation's family (jis, din, bs), written in its own notation and in the others: the card
  // with that wire comes first among connector cards. Each combination was chosen because only one card pair of the demo
  // library has it, which the database confirms before the search is asked.
  const COLOUR_CASES: { system: string; code: string; others: string[] }[] = [
    // orange with black tracer on an Asagiri card: IEC 60757 BKOG (table order), DIN 47002 or/sw, British OB, English org/blk
    { system: "jis", code: "O/B", others: ["BKOG", "or/sw", "OB", "org/blk"] },
    // black with violet tracer on a Brennwald card: Japanese-style B/V, IEC BKVT, British BP (P = purple), English blk/vio
    { system: "din", code: "sw/vi", others: ["B/V", "BKVT", "BP", "blk/vio"] },
    // brown with green tracer on an Ashcombe card (the rectifier's output): Japanese-style Br/G, IEC BNGN, DIN br/gn, English brn/grn
    { system: "bs", code: "NG", others: ["Br/G", "BNGN", "br/gn", "brn/grn"] },
  ];
  for (const c of COLOUR_CASES) {
    it(`${c.system} ${c.code}, and the same wire as ${c.others.join(", ")}, finds its card first`, async () => {
      const cards = await cardsWhere("f.colour_system = ? AND p.colour_code = ?", [c.system, c.code]);
      expect(cards.length, `${c.code} is on one plug/socket pair of the demo library`).toBe(2);
      for (const q of [c.code, ...c.others]) {
        const r = await find({ q });
        expect(r.source).toBe("index");
        expect(cards, `${q}: first connector ${firstOf(r, "connector")?.slug}`).toContain(firstOf(r, "connector")?.slug);
        expect(cards, `${q} type=connector`).toContain((await find({ q, type: "connector" })).hits[0]?.slug);
        // its pin comes first among pins, too
        const pin = firstOf(await find({ q, type: "pin" }), "pin");
        expect(cards, `${q} type=pin`).toContain(pin?.slug);
      }
    });
  }

  it("jis W/R, and the same wire as wht/red, ws/rt or WR, finds a card with a white/red wire first", async () => {
    // Three card pairs of the demo library carry a jis W/R pin. RDWH is left out on purpose: IEC 60757 names no base
    // colour, so RDWH is red-with-white as much as white-with-red, and more demo cards have that.
    const cards = await cardsWhere("f.colour_system = 'jis' AND p.colour_code = 'W/R'");
    expect(cards.length).toBeGreaterThan(0);
    for (const q of ["W/R", "wht/red", "ws/rt", "WR", "w/r"]) {
      const r = await find({ q, type: "connector" });
      expect(cards, `${q}: ${r.hits[0]?.slug}`).toContain(r.hits[0]?.slug);
    }
    const rdwh = await find({ q: "RDWH", type: "connector" });
    const whiteRedOrRedWhite = await cardsWhere(
      "(f.colour_system = 'jis' AND p.colour_code IN ('W/R', 'R/W')) OR (f.colour_system = 'din' AND p.colour_code IN ('rt/ws', 'RTWS')) OR (f.colour_system = 'bs' AND p.colour_code IN ('R/W', 'RW', 'WR'))",
    );
    expect(whiteRedOrRedWhite).toContain(rdwh.hits[0]?.slug);
  });

  it("a terminal number finds a card with that terminal first", async () => {
    for (const terminal of ["31d", "87", "D+", "B+", "1a"]) {
      const cards = await cardsWhere("p.terminal = ?", [terminal]);
      if (!cards.length) continue; // not every DIN 72552 number is on a demo card
      const r = await find({ q: terminal, type: "connector" });
      expect(cards, `${terminal}: ${r.hits[0]?.slug}`).toContain(r.hits[0]?.slug);
    }
    const cards = await cardsWhere("p.terminal = '31d'");
    expect(cards.length).toBeGreaterThan(0);
    expect(cards).toContain(firstOf(await find({ q: "31d", limit: "50" }), "connector")?.slug);
  });

  it("a circuit word finds the expected card first (type=connector)", async () => {
    // "pickup": the pickup cards (the cards named after the pickups) — of any of the three families that have one
    const pickups = (await dbAll<{ slug: string }>("SELECT slug FROM connectors WHERE name LIKE 'Pickup%'")).map((r) => r.slug);
    expect(pickups.length).toBeGreaterThan(0);
    expect(pickups).toContain((await find({ q: "pickup", type: "connector" })).hits[0]?.slug);
    expect(pickups).toContain((await find({ q: "pickups", type: "connector" })).hits[0]?.slug);
    // "kill switch": the kill button cards (the switch itself) come first …
    const kill = (await dbAll<{ slug: string }>("SELECT slug FROM connectors WHERE name LIKE 'Kill%'")).map((r) => r.slug);
    expect(kill).toContain((await find({ q: "kill switch", type: "connector" })).hits[0]?.slug);
    // … and in a family without one, the card that carries the kill switch's circuit
    const rxKill = await cardsWhere("f.slug = 'rx750-four' AND p.circuit LIKE '%kill switch%' AND c.name LIKE '%switch%'");
    expect(rxKill).toContain((await find({ q: "kill switch", type: "connector", family: "rx750-four" })).hits[0]?.slug);
    // "headlamp" (a circuit and a card name), "brake lamp"
    const head = (await dbAll<{ slug: string }>("SELECT slug FROM connectors WHERE name LIKE 'Headlamp%'")).map((r) => r.slug);
    expect(head).toContain((await find({ q: "headlamp", type: "connector" })).hits[0]?.slug);
    const brake = await cardsWhere("p.circuit = 'brake lamp'");
    expect(brake).toContain((await find({ q: "brake lamp", type: "connector" })).hits[0]?.slug);
  });

  it("as you type: a prefix of a family name already finds it", async () => {
    for (const [q, family] of [
      ["sov", "sovereign-650"],
      ["marq", "marquis-500"],
      ["rx4", "rx400-four"],
    ] as const) {
      expect(firstOf(await find({ q }), "family")?.slug, q).toBe(family);
    }
  });
});

describe("an approved edit reaches the index; D11 reconcile", () => {
  const CARD = "b800-boxer-coil-plug";
  const WORD = "tachometer";

  it("after a moderator approves an edit, the change is found in the index within a few seconds", async () => {
    const before = await find({ q: WORD });
    expect(before.source).toBe("index");
    expect(before.total, `nothing in the demo library says ${WORD} yet`).toBe(0);

    let r = await req(srv, "/api/v1/submissions", { json: { connector: CARD }, session: sessions.contributor });
    expect(r.status, where(r)).toBe(201);
    let sub = JSON.parse(r.body).submission as { id: number; version: number; content: { pins: { circuit: string }[] } };
    const content = structuredClone(sub.content);
    content.pins[0].circuit = `${WORD} signal from the coil negative`;
    r = await req(srv, `/api/v1/submissions/${sub.id}`, {
      method: "PATCH",
      session: sessions.contributor,
      json: {
        version: sub.version,
        content,
        sourceKind: "traced",
        sourceDetail: "Traced with a meter on a 1976 bike",
        summary: "Rev counter lead",
        action: "submit",
      },
    });
    expect(r.status, where(r)).toBe(200);
    sub = JSON.parse(r.body).submission;
    r = await req(srv, `/api/v1/submissions/${sub.id}/review`, { json: { version: sub.version, decision: "approve" }, session: sessions.moderator });
    expect(r.status, where(r)).toBe(200);
    const approvedAt = Date.now();

    // The decision's transaction wrote an index job; the worker (every SEARCH_POLL_MS, 2 s) sends it to the service.
    const jobs = await dbAll<{ id: number }>(
      "SELECT i.id FROM index_jobs i JOIN connectors c ON c.id = i.subject_id WHERE i.kind = 'connector' AND c.slug = ?",
      [CARD],
    );
    expect(jobs.length).toBeGreaterThan(0);
    let found: Result | null = null;
    while (Date.now() - approvedAt < 10_000) {
      found = await find({ q: WORD });
      if (found.source === "index" && found.total > 0) break;
      await new Promise((res) => setTimeout(res, 200));
    }
    expect(found?.source).toBe("index");
    expect(firstOf(found!, "connector")?.slug).toBe(CARD);
    const pin = firstOf(found!, "pin");
    expect(pin?.slug).toBe(CARD);
    expect(pin?.cavity).toBe("1");
    console.log(`[search] approved edit found in the index ${Date.now() - approvedAt} ms after the decision`);
    await expect.poll(async () => (await dbAll<{ n: number }>("SELECT COUNT(*) AS n FROM index_jobs WHERE done_at IS NULL"))[0].n, { timeout: 10_000 }).toBe(0);
    // the card's old circuit text is gone from its pin 1 document (the pin documents were replaced, not added to)
    const doc = await search.index(INDEX).getDocument<{ circuits: string[]; version: number }>(`pin-${CARD}-1`);
    expect(doc.circuits).toEqual([`${WORD} signal from the coil negative`]);
  });

  it("D11: reconcile repairs drift (a missing, a stale and an extra document); run again, it is a no-op", async () => {
    const idx = search.index(INDEX);
    const wait = async (t: { taskUid: number }) => expect((await search.tasks.waitForTask(t.taskUid, { timeout: 10_000 })).status).toBe("succeeded");
    await wait(await idx.deleteDocument("family-marquis-500"));
    await wait(await idx.updateDocuments([{ id: `connector-${CARD}`, version: 999 }]));
    await wait(await idx.addDocuments([{ id: "connector-nobody-s-card", type: "connector", slug: "nobody-s-card", title: "Not in the library", version: 1 }]));

    expect(await reconcileOnce(srv)).toEqual({ added: 1, updated: 1, removed: 1 });
    expect(await reconcileOnce(srv), "a second reconcile finds nothing to do").toEqual({ added: 0, updated: 0, removed: 0 });

    // D11 pass: the documents in the index are the library's (ids and versions), the same as the database's own copy.
    const want = new Map((await dbAll<{ id: string; version: number }>("SELECT id, version FROM search_fts")).map((r) => [r.id, Number(r.version)]));
    const have = new Map<string, number>();
    for (let offset = 0; ; offset += 1000) {
      const page = await idx.getDocuments<{ id: string; version: number }>({ offset, limit: 1000, fields: ["id", "version"] });
      for (const d of page.results) have.set(d.id, d.version);
      if (page.results.length < 1000) break;
    }
    expect(have.size).toBe(want.size);
    expect([...have].filter(([id, v]) => want.get(id) !== v)).toEqual([]);
    expect(have.get(`connector-${CARD}`)).toBeGreaterThan(1); // the approved revision
    expect(firstOf(await find({ q: "marquis" }), "family")?.slug).toBe("marquis-500");
  }, 90_000);
});

describe("the database's fallback copy", () => {
  it("each full-text row has its facet row (same rowid, same columns) and there are no others", async () => {
    const rows = await dbAll<Record<string, unknown>>(
      `SELECT f.rowid AS rid, f.type, f.make_slug, f.family_slug, f.system, f.pin_count,
              s.rid AS s_rid, s.type AS s_type, s.make_slug AS s_make_slug, s.family_slug AS s_family_slug, s.system AS s_system, s.pin_count AS s_pin_count
         FROM search_fts f LEFT JOIN search_facets s ON s.rid = f.rowid`,
    );
    expect(rows.length).toBeGreaterThan(100);
    const unpaired = rows.filter(
      (r) => r.s_rid === null || ["type", "make_slug", "family_slug", "system", "pin_count"].some((c) => String(r[c]) !== String(r[`s_${c}`])),
    );
    expect(unpaired).toEqual([]);
    const [{ n }] = await dbAll<{ n: number }>("SELECT COUNT(*) AS n FROM search_facets");
    expect(n, "no facet row without its full-text row").toBe(rows.length);
  });

  it("with the service away, the database gives the same total and facets as the index for the whole library and for filters", async () => {
    const asks: Record<string, string>[] = [{ q: "" }, { q: "", type: "connector" }, { q: "", make: "brennwald" }, { q: "", pins: "2" }];
    const fromIndex = [];
    for (const a of asks) {
      const r = await find({ ...a, limit: "5" });
      expect(r.source).toBe("index");
      fromIndex.push(r);
    }
    await srv.search!.stop();
    try {
      for (const [i, a] of asks.entries()) {
        const r = await find({ ...a, limit: "5" });
        expect(r.source).toBe("database");
        expect(r.total, JSON.stringify(a)).toBe(fromIndex[i].total);
        expect(r.facets, JSON.stringify(a)).toEqual(fromIndex[i].facets);
      }
    } finally {
      await srv.search!.restart();
    }
  });
});
