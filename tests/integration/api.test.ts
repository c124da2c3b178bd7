/**
 * Every /api/v1 route of app/routes.ts, over HTTP, against the production build with a freshly migrated and seeded database.
 * The contract is /work/shared/API.md ("API.md" below); the demo data is the invented library of db/seeders/demo.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { startServer, type TestServer } from "../support/server";
import { errorBody, parseCsv, shape, stateDigest, undefuse, client } from "./helpers";

// ---------------------------------------------------------------------------------------------------------------------
// Shapes (API.md). z.object ignores extra keys ("add fields freely") but fails on a renamed, dropped or retyped one.

const SYSTEM_IDS = ["jis", "iec", "din", "bs", "en"] as const;
// API.md "Colour words": lowercase English names from one fixed list.
const COLOUR_WORDS = [
  "black",
  "brown",
  "red",
  "orange",
  "yellow",
  "green",
  "blue",
  "violet",
  "grey",
  "white",
  "pink",
  "turquoise",
  "gold",
  "silver",
  "light green",
  "dark green",
  "light blue",
  "sky blue",
  "chocolate",
  "tan",
  "green-yellow",
] as const;

const slug = z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "lowercase kebab-case slug"); // API.md: slugs are lowercase kebab-case
const text = z.string().min(1);
const int = z.number().int();
const colourWord = z.enum(COLOUR_WORDS);
const iecDesignation = z.string().regex(/^(?:[A-Z]{2})+$/, "IEC 60757 letter pairs");

const makeSchema = z.object({ slug, name: text, colourSystem: z.enum(SYSTEM_IDS), familyCount: int.min(0) });
const makesBody = z.object({ makes: z.array(makeSchema) });

const familySummary = z
  .object({
    slug,
    name: text,
    make: z.object({ slug, name: text }),
    yearFrom: int.min(1900),
    yearTo: int.max(2100),
    engine: text,
    cylinders: int.min(1),
    firingOrder: text,
    ignition: text,
  })
  .refine((f) => f.yearFrom <= f.yearTo, "yearFrom after yearTo");
type FamilySummary = z.infer<typeof familySummary>;
const familiesBody = z.object({ families: z.array(familySummary), total: int.min(0) });

const familyDetailBody = z.object({
  family: z.object({
    slug,
    name: text,
    make: z.object({ slug, name: text }),
    yearFrom: int,
    yearTo: int,
    engine: text,
    cylinders: int,
    firingOrder: text,
    ignition: text,
    systems: z.array(z.object({ kind: text, connectors: z.array(z.object({ slug, name: text, pinCount: int.min(0), location: text })) })),
  }),
});

const pinSchema = z.object({
  cavity: text,
  colour: z.object({ code: text.nullable(), base: colourWord.nullable(), tracers: z.array(colourWord), iec: iecDesignation.nullable() }),
  circuit: z.string(),
  terminal: text.nullable(), // DIN 72552 terminal designation or null
  goesTo: z.object({ connector: slug, cavity: text }).nullable(),
});
const connectorSchema = z.object({
  slug,
  name: text,
  family: z.object({ slug, name: text }),
  system: text,
  location: text,
  gender: z.enum(["plug", "socket"]),
  matesWith: slug.nullable(),
  colourSystem: z.enum(SYSTEM_IDS),
  layout: z.object({ rows: int.min(1), cols: int.min(1), cavities: z.array(z.object({ cavity: text, row: int.min(1), col: int.min(1) })).min(1) }),
  pins: z.array(pinSchema),
  // max null: no upper limit (an insulation test that must read open); conditions say how it is measured (issue 11).
  specs: z.array(
    z.object({
      name: text,
      min: z.number(),
      max: z.number().nullable(),
      unit: text,
      conditions: text,
      between: z.tuple([text, text]),
      atC: z.number(),
      source: text,
    }),
  ),
  photos: z.array(z.object({ url: text, thumbUrl: text, width: int.min(1), height: int.min(1), caption: z.string(), credit: z.string() })),
  revision: z.object({ number: int.min(1), publishedAt: z.iso.datetime() }),
  bikeChecked: int.min(0),
});
type Card = z.infer<typeof connectorSchema>;
const connectorBody = z.object({ connector: connectorSchema });

const LATCHES = ["top", "bottom", "left", "right"] as const;
const faceBody = z.object({
  view: z.enum(["mating", "wire"]),
  half: z.enum(["this", "mate"]),
  width: z.number().positive(),
  height: z.number().positive(),
  cavities: z.array(z.object({ cavity: text, x: z.number(), y: z.number() })),
  pin1: text,
  latch: z.enum(LATCHES),
});
type Face = z.infer<typeof faceBody>;

const systemsBody = z.object({
  systems: z.array(z.object({ id: z.enum(SYSTEM_IDS), name: text, codes: z.array(z.object({ code: text, colour: colourWord })).min(1) })),
});

const colourPart = z.object({ name: colourWord, iec: iecDesignation.nullable() });
const decodeBody = z.object({
  input: z.string(),
  system: z.enum(SYSTEM_IDS),
  base: colourPart.nullable(),
  tracers: z.array(colourPart),
  colours: z.array(colourWord).min(1),
  iec: iecDesignation.nullable(),
  ambiguities: z.array(z.object({ system: z.enum(SYSTEM_IDS), reading: text })),
});

// ---------------------------------------------------------------------------------------------------------------------
// Plumbing

let server: TestServer;
let digestBefore: string;
let families: FamilySummary[] = [];
const cards = new Map<string, Card>();

const { call, getJson } = client(() => server.url);

/** Any request that must fail: status, JSON Content-Type, the error shape; returns the error. */
async function expectError(path: string, status: number | number[], init?: RequestInit) {
  const r = await call(path, init);
  const allowed = Array.isArray(status) ? status : [status];
  expect(allowed, `${init?.method ?? "GET"} ${path.slice(0, 120)} → ${r.status} ${r.body.slice(0, 200)}`).toContain(r.status);
  expect(r.type, `${path.slice(0, 120)}: error responses are JSON (API.md conventions)`).toMatch(/^application\/json\b/);
  return { ...shape(errorBody, JSON.parse(r.body), path.slice(0, 120)).error, status: r.status, res: r.res };
}

const card = (s: string) => {
  const c = cards.get(s);
  if (!c) throw new Error(`connector ${s} not in the walked catalogue`);
  return c;
};
const pinAt = (c: Card, cavity: string) => c.pins.find((p) => p.cavity === cavity);
const face = (s: string, view: "mating" | "wire", half: "this" | "mate") => getJson(`/api/v1/connectors/${s}/face?view=${view}&half=${half}`, faceBody);
const byCavity = (f: Face) => new Map(f.cavities.map((c) => [c.cavity, { x: c.x, y: c.y }]));
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

beforeAll(async () => {
  server = await startServer();
  digestBefore = await stateDigest(server.dbPath);
  // Walk the whole library through the API itself: list families → each family → each connector card.
  families = (await getJson("/api/v1/families?limit=100", familiesBody)).families;
  for (const f of families) {
    const { family } = await getJson(`/api/v1/families/${f.slug}`, familyDetailBody);
    for (const s of family.systems) for (const c of s.connectors) cards.set(c.slug, (await getJson(`/api/v1/connectors/${c.slug}`, connectorBody)).connector);
  }
});

afterAll(async () => {
  await server?.stop();
});

// ---------------------------------------------------------------------------------------------------------------------

describe("GET /api/v1/health", () => {
  it("answers 200 with status and the database check ok (API.md Library)", async () => {
    const body = await getJson(
      "/api/v1/health",
      z.object({
        status: z.enum(["ok", "degraded"]),
        checks: z.object({ database: z.literal("ok"), search: z.enum(["ok", "down"]), mail: z.enum(["ok", "down"]) }),
      }),
    );
    // 200 even when degraded; "ok" only when every backing service answers (search and mail have no stand-in yet).
    expect(body.status).toBe(Object.values(body.checks).every((c) => c === "ok") ? "ok" : "degraded");
  });
});

describe("GET /api/v1/makes", () => {
  it("lists the four demo makes, each colour notation jis / din / bs (two Japanese-style houses)", async () => {
    const { makes } = await getJson("/api/v1/makes", makesBody);
    expect(makes).toHaveLength(4); // db/seeders/demo/makes.ts: four invented makers
    expect(makes.map((m) => m.colourSystem).sort()).toEqual(["bs", "din", "jis", "jis"]);
    expect(new Set(makes.map((m) => m.slug)).size).toBe(4);
  });

  it("familyCount agrees with the families list filtered by make", async () => {
    const { makes } = await getJson("/api/v1/makes", makesBody);
    for (const m of makes) {
      const list = await getJson(`/api/v1/families?make=${m.slug}`, familiesBody);
      expect(list.total, m.slug).toBe(m.familyCount);
      expect(
        list.families.every((f) => f.make.slug === m.slug),
        m.slug,
      ).toBe(true);
    }
    expect(makes.reduce((n, m) => n + m.familyCount, 0)).toBe(families.length);
  });
});

describe("GET /api/v1/families", () => {
  it("lists at least the six demo families with total", async () => {
    const body = await getJson("/api/v1/families", familiesBody);
    expect(body.total).toBeGreaterThanOrEqual(6);
    expect(body.families.length).toBe(Math.min(20, body.total)); // API.md: limit defaults to 20
    expect(families.map((f) => f.slug)).toContain("rx750-four");
  });

  it("make= keeps only that make's families", async () => {
    const body = await getJson("/api/v1/families?make=asagiri", familiesBody);
    expect(body.total).toBe(2);
    expect(body.families.map((f) => f.slug).sort()).toEqual(["rx400-four", "rx750-four"]);
  });

  it("year= keeps the families whose year range covers it, ends inclusive", async () => {
    for (const year of [1975, 1980, 1966, 1988]) {
      const body = await getJson(`/api/v1/families?year=${year}`, familiesBody);
      const expected = families
        .filter((f) => f.yearFrom <= year && year <= f.yearTo)
        .map((f) => f.slug)
        .sort();
      expect(expected.length, `${year} must be covered by some families`).toBeGreaterThan(0);
      expect(expected.length, `${year} must not be covered by all families`).toBeLessThan(families.length);
      expect(body.families.map((f) => f.slug).sort(), String(year)).toEqual(expected);
      expect(body.total).toBe(expected.length);
    }
    // 1980 is both b800-boxer's last year and b1000-boxer's first (db/seeders/demo/makes.ts).
    const y1980 = (await getJson("/api/v1/families?year=1980", familiesBody)).families.map((f) => f.slug);
    expect(y1980).toEqual(expect.arrayContaining(["b800-boxer", "b1000-boxer"]));
    expect((await getJson("/api/v1/families?year=1950", familiesBody)).total).toBe(0);
  });

  it("make= and year= combine", async () => {
    const body = await getJson("/api/v1/families?make=brennwald&year=1975", familiesBody);
    expect(body.families.map((f) => f.slug)).toEqual(["b800-boxer"]);
    expect(body.total).toBe(1);
  });

  it("limit/offset page through the whole list with a constant total, no gaps, no repeats", async () => {
    const seen: string[] = [];
    for (let offset = 0; ; offset += 2) {
      const page = await getJson(`/api/v1/families?limit=2&offset=${offset}`, familiesBody);
      expect(page.total).toBe(families.length);
      expect(page.families.length).toBeLessThanOrEqual(2);
      if (page.families.length === 0) break;
      seen.push(...page.families.map((f) => f.slug));
    }
    expect(seen).toEqual(families.map((f) => f.slug));
    const beyond = await getJson(`/api/v1/families?offset=${families.length}`, familiesBody);
    expect(beyond).toEqual({ families: [], total: families.length });
    expect((await getJson("/api/v1/families?limit=100", familiesBody)).families).toHaveLength(families.length); // max 100 accepted
  });

  it.each([
    ["limit=0", "limit"],
    ["limit=101", "limit"],
    ["limit=2.5", "limit"],
    ["offset=-1", "offset"],
    ["year=abc", "year"],
    ["year=1980.5", "year"],
  ])("?%s → 400 bad input naming the field (API.md: limit max 100)", async (query, field) => {
    const err = await expectError(`/api/v1/families?${query}`, 400);
    expect(err.field).toBe(field);
  });
});

describe("GET /api/v1/families/:slug", () => {
  it("returns the family with its systems and their connectors", async () => {
    const { family } = await getJson("/api/v1/families/rx750-four", familyDetailBody);
    expect(family).toMatchObject({ slug: "rx750-four", make: { slug: "asagiri" }, cylinders: 4, firingOrder: "1-2-4-3" });
    expect(family.systems.map((s) => s.kind)).toEqual(expect.arrayContaining(["ignition", "charging", "starting", "lighting"]));
    const all = family.systems.flatMap((s) => s.connectors);
    expect(all.map((c) => c.slug)).toEqual(expect.arrayContaining(["rx750-four-ignition-unit-plug", "rx750-four-ignition-unit-socket"]));
    for (const c of all) expect(c.pinCount, c.slug).toBe(card(c.slug).pins.length);
  });

  it("unknown slug → 404 not_found in the error shape", async () => {
    const err = await expectError("/api/v1/families/no-such-family", 404);
    expect(err.code).toBe("not_found");
  });
});

describe("GET /api/v1/connectors/:slug", () => {
  it("the walk found a plausible library: ≥ 40 cards, ≥ 250 pins, every card in the API.md shape", () => {
    expect(cards.size).toBeGreaterThanOrEqual(40);
    expect([...cards.values()].reduce((n, c) => n + c.pins.length, 0)).toBeGreaterThanOrEqual(250);
  });

  it("the ignition unit loom plug carries every API.md field", async () => {
    const c = card("rx750-four-ignition-unit-plug");
    expect(c).toMatchObject({
      slug: "rx750-four-ignition-unit-plug",
      family: { slug: "rx750-four" },
      system: "ignition",
      gender: "plug",
      matesWith: "rx750-four-ignition-unit-socket",
      colourSystem: "jis",
      layout: { rows: 2, cols: 4 },
      revision: { number: 1 },
    });
    expect(c.layout.cavities).toHaveLength(8);
    expect(c.pins).toHaveLength(8);
    expect(c.specs.length).toBeGreaterThan(0);
    for (const s of c.specs) {
      if (s.max !== null) expect(s.min, s.name).toBeLessThanOrEqual(s.max);
      // A spec is measured between cavities of the card, or to earth, an HT tower or a plug cap (app/domain/specs.ts).
      for (const cav of s.between) if (!/^(earth|HT( [AB])?|cap( [AB])?)$/.test(cav)) expect(pinAt(c, cav), `${s.name} between ${cav}`).toBeDefined();
    }
    // JIS-style "O/W": orange base, white tracer; IEC 60757 joins in table order → OGWH (API.md "Colour words").
    expect(pinAt(c, "1")!.colour).toMatchObject({ code: "O/W", base: "orange", tracers: ["white"], iec: "OGWH" });
    expect(pinAt(c, "1")!.terminal).toBe("15"); // DIN 72552: 15 = switched ignition feed
  });

  it("every card: pins sit in cavities of the layout, each cavity at most once, layout inside its grid", () => {
    for (const c of cards.values()) {
      const cavities = new Set(c.layout.cavities.map((x) => x.cavity));
      expect(cavities.size, c.slug).toBe(c.layout.cavities.length);
      for (const x of c.layout.cavities) {
        expect(x.row, c.slug).toBeLessThanOrEqual(c.layout.rows);
        expect(x.col, c.slug).toBeLessThanOrEqual(c.layout.cols);
      }
      for (const p of c.pins) expect(cavities.has(p.cavity), `${c.slug} cavity ${p.cavity}`).toBe(true);
      expect(new Set(c.pins.map((p) => p.cavity)).size, c.slug).toBe(c.pins.length);
      for (const p of c.pins) if (p.colour.code) expect(p.colour.base, `${c.slug}:${p.cavity} ${p.colour.code} decodes`).not.toBeNull();
    }
  });

  it("matesWith round-trips: A↔B, opposite genders, same cavities, same colour code per cavity", () => {
    let pairs = 0;
    for (const a of cards.values()) {
      expect(a.matesWith, `${a.slug}: every demo card has a mate`).not.toBeNull();
      const b = card(a.matesWith!);
      expect(b.matesWith, `${b.slug} should mate back with ${a.slug}`).toBe(a.slug);
      expect(b.gender, `${a.slug} / ${b.slug}`).not.toBe(a.gender);
      expect(b.family.slug).toBe(a.family.slug);
      expect(b.pins.map((p) => p.cavity).sort(), `${a.slug} / ${b.slug} cavities`).toEqual(a.pins.map((p) => p.cavity).sort());
      for (const p of a.pins) expect(pinAt(b, p.cavity)!.colour.code, `${a.slug}:${p.cavity} vs ${b.slug}`).toBe(p.colour.code);
      pairs++;
    }
    expect(pairs).toBe(cards.size);
  });

  it("every goesTo names an existing card whose pin at that cavity has the same colour code (all families, all cards)", () => {
    let links = 0;
    for (const c of cards.values()) {
      for (const p of c.pins) {
        if (!p.goesTo) continue;
        links++;
        const where = `${c.slug}:${p.cavity} → ${p.goesTo.connector}:${p.goesTo.cavity}`;
        expect(p.goesTo.connector === c.slug && p.goesTo.cavity === p.cavity, `${where} points at itself`).toBe(false);
        const far = cards.get(p.goesTo.connector);
        expect(far, `${where}: no such card`).toBeDefined();
        expect(far!.family.slug, where).toBe(c.family.slug);
        const q = pinAt(far!, p.goesTo.cavity);
        expect(q, `${where}: no pin there`).toBeDefined();
        expect(q!.colour.code, where).toBe(p.colour.code); // one wire, one colour at both ends
      }
    }
    expect(links, "the demo looms have loom-to-loom wires").toBeGreaterThan(20);
  });

  it("goesTo looks through splices (db/seeders/demo/templates.ts: the kill-run net is spliced to both coils)", () => {
    // The ignition unit's feed (cavity 1) is the same net as the kill switch's output (right handlebar switch, cavity 2).
    expect(pinAt(card("rx750-four-ignition-unit-plug"), "1")!.goesTo).toEqual({ connector: "rx750-four-right-switch-socket", cavity: "2" });
    expect(pinAt(card("rx750-four-right-switch-socket"), "2")!.goesTo).toEqual({ connector: "rx750-four-ignition-unit-plug", cavity: "1" });
  });

  it("?format=csv: text/csv, a header row, one row per pin matching the JSON pins (every card)", async () => {
    for (const c of cards.values()) {
      const r = await call(`/api/v1/connectors/${c.slug}?format=csv`);
      expect(r.status, c.slug).toBe(200);
      expect(r.type, c.slug).toMatch(/^text\/csv\b/);
      const [head, ...rows] = parseCsv(r.body);
      expect(head.slice(0, 9)).toEqual(["cavity", "colour_code", "base", "tracers", "iec", "circuit", "terminal", "goes_to_connector", "goes_to_cavity"]);
      expect(rows, c.slug).toHaveLength(c.pins.length);
      const col = (row: string[], name: string) => undefuse(row[head.indexOf(name)] ?? "");
      c.pins.forEach((p, i) => {
        const row = rows[i];
        expect(row, `${c.slug} row ${i + 1}`).toHaveLength(head.length);
        expect(
          {
            cavity: col(row, "cavity"),
            code: col(row, "colour_code"),
            base: col(row, "base"),
            tracers: col(row, "tracers"),
            iec: col(row, "iec"),
            circuit: col(row, "circuit"),
            terminal: col(row, "terminal"),
            to: col(row, "goes_to_connector"),
            toCavity: col(row, "goes_to_cavity"),
          },
          `${c.slug} row ${i + 1}`,
        ).toEqual({
          cavity: p.cavity,
          code: p.colour.code ?? "",
          base: p.colour.base ?? "",
          tracers: p.colour.tracers.join(" "),
          iec: p.colour.iec ?? "",
          circuit: p.circuit,
          terminal: p.terminal ?? "",
          to: p.goesTo?.connector ?? "",
          toCavity: p.goesTo?.cavity ?? "",
        });
      });
    }
  });

  it("?format=xml → 400 naming format", async () => {
    const err = await expectError("/api/v1/connectors/rx750-four-ignition-unit-plug?format=xml", 400);
    expect(err.field).toBe("format");
  });

  it("ETag + If-None-Match → 304 without a body; a stale tag → 200 (API.md: ETag where cheap)", async () => {
    for (const path of [
      "/api/v1/connectors/rx750-four-ignition-unit-plug",
      "/api/v1/connectors/rx750-four-ignition-unit-plug/face?view=wire",
      "/api/v1/colours/systems",
    ]) {
      const first = await call(path);
      const tag = first.res.headers.get("etag");
      expect(tag, path).toMatch(/^(W\/)?"[^"]+"$/);
      expect(first.res.headers.get("cache-control"), path).toMatch(/max-age=\d+/);
      const again = await call(path, { headers: { "If-None-Match": tag! } });
      expect(again.status, path).toBe(304);
      expect(again.body).toBe("");
      expect(again.res.headers.get("etag")).toBe(tag);
      expect((await call(path, { headers: { "If-None-Match": '"not-this-one"' } })).status, path).toBe(200);
    }
  });

  it("unknown slug → 404 not_found", async () => {
    expect((await expectError("/api/v1/connectors/rx750-four-no-such-plug", 404)).code).toBe("not_found");
    expect((await expectError("/api/v1/connectors/rx750-four-no-such-plug/face", 404)).code).toBe("not_found");
  });
});

describe("GET /api/v1/connectors/:slug/face", () => {
  it("defaults to view=mating, half=this", async () => {
    const f = shape(faceBody, JSON.parse((await call("/api/v1/connectors/rx750-four-ignition-unit-plug/face")).body));
    expect(f).toMatchObject({ view: "mating", half: "this" });
  });

  it("every card: geometry agrees with the layout; wire = x-mirror of mating; mate/mating = this/wire = the mate's own mating face", async () => {
    let sideLatches = 0;
    const faces = new Map(
      await Promise.all(
        [...cards.keys()].map(
          async (s) =>
            [s, await Promise.all([face(s, "mating", "this"), face(s, "wire", "this"), face(s, "mating", "mate"), face(s, "wire", "mate")])] as const,
        ),
      ),
    );
    for (const c of cards.values()) {
      const [mating, wire, mateMating, mateWire] = faces.get(c.slug)!;
      expect([mating.view, mating.half, wire.view, wire.half, mateMating.half], c.slug).toEqual(["mating", "this", "wire", "this", "mate"]);
      for (const f of [mating, wire, mateMating, mateWire]) {
        expect(f.cavities.map((x) => x.cavity).sort(), c.slug).toEqual(c.layout.cavities.map((x) => x.cavity).sort());
        // Origin at the housing's centre: every cavity inside the outline.
        for (const x of f.cavities) {
          expect(Math.abs(x.x), `${c.slug}:${x.cavity}`).toBeLessThan(f.width / 2);
          expect(Math.abs(x.y), `${c.slug}:${x.cavity}`).toBeLessThan(f.height / 2);
        }
      }
      // x to the viewer's right, y down: the mating face keeps the stored row/col order (layout is as seen on the mating face).
      const m = byCavity(mating);
      for (const a of c.layout.cavities)
        for (const b of c.layout.cavities) {
          if (a.col < b.col) expect(m.get(a.cavity)!.x, `${c.slug} ${a.cavity} left of ${b.cavity}`).toBeLessThan(m.get(b.cavity)!.x);
          if (a.row < b.row) expect(m.get(a.cavity)!.y, `${c.slug} ${a.cavity} above ${b.cavity}`).toBeLessThan(m.get(b.cavity)!.y);
        }
      if (c.layout.cavities.length === c.layout.rows * c.layout.cols) {
        expect(mean(mating.cavities.map((x) => x.x)), `${c.slug} mean x`).toBeCloseTo(0, 9);
        expect(mean(mating.cavities.map((x) => x.y)), `${c.slug} mean y`).toBeCloseTo(0, 9);
      }
      // The wire side is the mating face turned over: x → −x, y unchanged, latch left↔right.
      const w = byCavity(wire);
      for (const [cav, p] of m) expect(w.get(cav), `${c.slug}:${cav}`).toEqual({ x: p.x === 0 ? 0 : -p.x, y: p.y });
      const flip = { left: "right", right: "left", top: "top", bottom: "bottom" } as const;
      expect(wire.latch, c.slug).toBe(flip[mating.latch]);
      if (mating.latch === "left" || mating.latch === "right") sideLatches++;
      expect([wire.pin1, mateMating.pin1]).toEqual([mating.pin1, mating.pin1]);
      // The mate seen from its own mating face shows the same positions as this connector's wire side ...
      expect(byCavity(mateMating), c.slug).toEqual(w);
      expect(mateMating.latch).toBe(wire.latch);
      expect(byCavity(mateWire), c.slug).toEqual(m);
      // ... and is exactly what the mate's own card draws for its mating face.
      const own = faces.get(c.matesWith!)![0];
      expect(byCavity(own), `${c.slug} half=mate vs ${c.matesWith}`).toEqual(byCavity(mateMating));
      expect(own.latch, `${c.slug} half=mate latch vs ${c.matesWith}`).toBe(mateMating.latch);
    }
    expect(sideLatches, "some demo housings latch on the side, so the left↔right flip is exercised").toBeGreaterThan(0);
  });

  it.each(["view=sideways", "half=both", "view=WIRE"])("?%s → 400", async (q) => {
    const err = await expectError(`/api/v1/connectors/rx750-four-ignition-unit-plug/face?${q}`, 400);
    expect(err.field).toBe(q.split("=")[0]);
  });
});

describe("GET /api/v1/colours/systems", () => {
  it("lists jis, iec, din, bs and en, each with a code table in colour words", async () => {
    const { systems } = await getJson("/api/v1/colours/systems", systemsBody);
    expect(systems.map((s) => s.id).sort()).toEqual([...SYSTEM_IDS].sort());
    const table = (id: string) => new Map(systems.find((s) => s.id === id)!.codes.map((c) => [c.code, c.colour]));
    // API.md "Colour notation": JIS-style L blue, Lg light green, Sb sky blue; BS U blue, N brown, K pink, LG light green; IEC 60757 RD red.
    expect([table("jis").get("L"), table("jis").get("Lg"), table("jis").get("Sb")]).toEqual(["blue", "light green", "sky blue"]);
    expect([table("bs").get("U"), table("bs").get("N"), table("bs").get("K"), table("bs").get("LG")]).toEqual(["blue", "brown", "pink", "light green"]);
    expect([table("iec").get("RD"), table("din").get("sw"), table("din").get("rt")]).toEqual(["red", "black", "red"]);
  });
});

describe("GET /api/v1/colours/decode", () => {
  const decode = (q: string) => getJson(`/api/v1/colours/decode?${q}`, decodeBody);

  it("W/R, auto → jis: white base, red tracer, iec RDWH (API.md example)", async () => {
    const d = await decode("code=W%2FR");
    expect(d).toMatchObject({
      input: "W/R",
      system: "jis",
      base: { name: "white", iec: "WH" },
      tracers: [{ name: "red", iec: "RD" }],
      colours: ["white", "red"],
      iec: "RDWH",
    });
  });

  it("ws/rt, din → the same colours (DIN 47002 lower case)", async () => {
    const d = await decode("code=ws%2Frt&system=din");
    expect(d).toMatchObject({ system: "din", base: { name: "white" }, tracers: [{ name: "red" }], colours: ["white", "red"], iec: "RDWH" });
  });

  it("BLGN and GNBL differ: base first, then stripe", async () => {
    // DIN 72551-7:2014 introduction: BLGN ≠ GNBL (base colour, then the stripe).
    const blgn = await decode("code=BLGN&system=din");
    const gnbl = await decode("code=GNBL&system=din");
    expect(blgn).toMatchObject({ base: { name: "blue" }, tracers: [{ name: "green" }] });
    expect(gnbl).toMatchObject({ base: { name: "green" }, tracers: [{ name: "blue" }] });
    // IEC 60757 joins in table order, so both are GNBU: the base/tracer distinction lives in base/tracers, never in iec (API.md).
    expect([blgn.iec, gnbl.iec]).toEqual(["GNBU", "GNBU"]);
  });

  it("RDWH, iec → no base, colours red and white (IEC 60757 names colours, not which is the base)", async () => {
    const d = await decode("code=RDWH&system=iec");
    expect(d.base).toBeNull();
    expect(d.colours).toEqual(expect.arrayContaining(["red", "white"]));
    expect(d.iec).toBe("RDWH");
  });

  it("Bl, auto → a reading plus ambiguities (API.md: blue in DIN, black in English shorthand)", async () => {
    const d = await decode("code=Bl");
    expect(d.ambiguities.length).toBeGreaterThan(0);
    expect(d.ambiguities.every((a) => a.system !== d.system)).toBe(true);
    const readings = [d.colours.join(" "), ...d.ambiguities.map((a) => a.reading)].join(" | ");
    expect(readings).toMatch(/blue/);
    expect(readings).toMatch(/black/);
  });

  it("unknown code Xq → 400 unknown_colour naming the part not understood", async () => {
    const err = await expectError("/api/v1/colours/decode?code=Xq", 400);
    expect(err.code).toBe("unknown_colour");
    expect(err.message).toContain("Xq");
    expect(err.field).toBe("code");
  });

  it.each([
    ["", "code"],
    ["code=", "code"],
    ["code=%20%20", "code"],
    ["code=W&system=klingon", "system"],
  ])("?%s → 400 naming %s", async (q, field) => {
    const err = await expectError(`/api/v1/colours/decode?${q}`, 400);
    expect(err.field).toBe(field);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

const GET_ROUTES = [
  "/api/v1/health",
  "/api/v1/makes",
  "/api/v1/families",
  "/api/v1/families/rx750-four",
  "/api/v1/connectors/rx750-four-ignition-unit-plug",
  "/api/v1/connectors/rx750-four-ignition-unit-plug/face",
  "/api/v1/colours/systems",
  "/api/v1/colours/decode?code=W%2FR",
  "/api/v1/families/rx750-four/circuits",
  "/api/v1/families/rx750-four/circuits/ignition/walk",
  "/api/v1/me",
  "/api/v1/search?q=pickup",
  "/api/v1/families/rx750-four/plan",
];
// Computations take a JSON body: POST only (GET → 405 is checked in workshop-api.test.ts).
const POST_ROUTES = [
  "api/v1/colour-finder",
  "api/v1/wire-size",
  "api/v1/bench",
  "api/v1/families/:slug/circuits/:circuit/diagnose",
  "api/v1/photos",
  "api/v1/submissions/:id/review",
];
// Read and write at one address (signed in): their methods are checked in submissions-api.test.ts.
const READ_WRITE_ROUTES = ["api/v1/submissions", "api/v1/submissions/:id"];

describe("methods and unknown addresses", () => {
  it("every GET route of app/routes.ts is in this list", async () => {
    const { default: routes } = await import("../../app/routes");
    const api = routes
      .map((r) => r.path)
      .filter((p): p is string => !!p && p.startsWith("api/v1/") && !POST_ROUTES.includes(p) && !READ_WRITE_ROUTES.includes(p));
    const covered = GET_ROUTES.map((u) => u.split("?")[0].replace(/^\//, ""));
    for (const p of api) {
      const re = new RegExp(`^${p.replace(/:[a-z]+/g, "[^/]+")}$`);
      expect(
        covered.some((c) => re.test(c)),
        `route ${p} has no test URL`,
      ).toBe(true);
    }
  });

  it.each(GET_ROUTES)("POST %s → 405 method_not_allowed with Allow (API.md: 405 wrong method)", async (path) => {
    for (const method of ["POST", "PUT", "DELETE", "PATCH"]) {
      const err = await expectError(path, 405, { method, headers: { "Content-Type": "application/json" }, body: "{}" });
      expect(err.code).toBe("method_not_allowed");
      expect(err.res.headers.get("allow") ?? "").toMatch(/\bGET\b/);
    }
  });

  it.each(["/api/v1/nope", "/api/v1/families/rx750-four/nope", "/api/v2/makes", "/api/v1/"])("%s → 404 JSON error", async (path) => {
    expect((await expectError(path, 404)).code).toBe("not_found");
    expect((await expectError(path, 404, { method: "POST" })).code).toBe("not_found");
  });
});

// ---------------------------------------------------------------------------------------------------------------------
// Hostile input: 400 or 404, never a 500, always the JSON error shape (API.md conventions; QUALITY.md: never a 500 for bad input).

const LONG = "a".repeat(5000);
const HOSTILE: [string, string][] = [
  ["path traversal", "../../etc/passwd"],
  ["NUL byte", "\u0000"],
  ["NUL inside a slug", "rx750-four\u0000"],
  ["5000 characters", LONG],
  ["SQL injection", "'; DROP TABLE pins;--"],
  ["SQL injection, quoted", 'rx750-four" OR "1"="1'],
  ["unicode", "zündkabel-ünïcødé-💥"],
  ["unicode homoglyph", "rx750-f\u043eur"], // Cyrillic о
  ["right-to-left override", "\u202erx750-four"],
];
// Path segments with a NUL byte reach Sequelize, whose SQLite dialect inlines the string: SQLite stops at the NUL and the query
// fails (SQLITE_ERROR: unrecognized token) → 500 text/plain. Known app bug, reported; flip to `it` when the routes validate the slug.

type Target = { name: string; url: (v: string) => string; emptyListOk?: boolean };
const enc = encodeURIComponent;
const TARGETS: Target[] = [
  { name: "families/:slug", url: (v) => `/api/v1/families/${enc(v)}` },
  { name: "connectors/:slug", url: (v) => `/api/v1/connectors/${enc(v)}` },
  { name: "connectors/:slug?format=csv", url: (v) => `/api/v1/connectors/${enc(v)}?format=csv` },
  { name: "connectors/:slug/face", url: (v) => `/api/v1/connectors/${enc(v)}/face` },
  // A make filter that matches nothing is an empty list, not an error: 200 with no families is accepted there.
  { name: "families?make=", url: (v) => `/api/v1/families?make=${enc(v)}`, emptyListOk: true },
  { name: "families?year=", url: (v) => `/api/v1/families?year=${enc(v)}` },
  { name: "families?limit=", url: (v) => `/api/v1/families?limit=${enc(v)}` },
  { name: "families?offset=", url: (v) => `/api/v1/families?offset=${enc(v)}` },
  { name: "connectors?format=", url: (v) => `/api/v1/connectors/rx750-four-ignition-unit-plug?format=${enc(v)}` },
  { name: "face?view=", url: (v) => `/api/v1/connectors/rx750-four-ignition-unit-plug/face?view=${enc(v)}` },
  { name: "face?half=", url: (v) => `/api/v1/connectors/rx750-four-ignition-unit-plug/face?half=${enc(v)}` },
  { name: "decode?code=", url: (v) => `/api/v1/colours/decode?code=${enc(v)}` },
  { name: "decode?system=", url: (v) => `/api/v1/colours/decode?code=W&system=${enc(v)}` },
];

describe("hostile input sweep", () => {
  const cases = TARGETS.flatMap((t) => HOSTILE.map(([label, value]) => ({ t, label, value })));
  for (const { t, label, value } of cases) {
    it(`${t.name} ← ${label}: 400/404 JSON, never 500`, async () => {
      const url = t.url(value);
      const r = await call(url);
      expect(r.status, `${url.slice(0, 100)} → ${r.status} ${r.body.slice(0, 120)}`).not.toBeGreaterThanOrEqual(500);
      if (t.emptyListOk && r.status === 200) {
        expect(shape(familiesBody, JSON.parse(r.body))).toEqual({ families: [], total: 0 });
        return;
      }
      await expectError(url, [400, 404]);
    });
  }

  it("a raw ../ in the path is resolved by the URL parser and lands on a JSON 404, never a file", async () => {
    const r = await call("/api/v1/connectors/../etc/passwd"); // → /api/v1/etc/passwd
    expect(r.body).not.toMatch(/root:/);
    expect((await expectError("/api/v1/connectors/../etc/passwd", 404)).code).toBe("not_found");
    expect((await call("/api/v1/connectors/../../../../etc/passwd")).body).not.toMatch(/root:x?:0:/);
  });

  // Malformed percent-encoding never reaches a route: our server answers it with the API's error shape.
  for (const raw of ["%", "%ff", "abc%E0%A4%A"]) {
    it(`malformed percent-encoding ${raw} in a slug → 400 JSON`, async () => {
      await expectError(`/api/v1/families/${raw}`, 400);
    });
  }

  it("the sweep (and every other request of this file) left the database unchanged (QUALITY.md state digest)", async () => {
    expect(await stateDigest(server.dbPath)).toBe(digestBefore);
    const { makes } = await getJson("/api/v1/makes", makesBody);
    expect(makes).toHaveLength(4); // and pins still answer after '; DROP TABLE pins;--
    expect(card("rx750-four-ignition-unit-plug").pins).toHaveLength(
      (await getJson("/api/v1/connectors/rx750-four-ignition-unit-plug", connectorBody)).connector.pins.length,
    );
  });
});

describe("control characters never reach a query (pages and the finder)", () => {
  // Sequelize's SQLite dialect inlines string values: a NUL byte once turned into SQLITE_ERROR and a 500.
  it.each(["/?family=%00", "/?family=a%00b", "/finder?wires=W%2FR&family=%00", "/planner?family=%00"])("GET %s is never a 500", async (path) => {
    expect((await call(path)).status).toBeLessThan(500);
  });

  it("a family that is not a slug is a 400 on the colour finder, naming the field", async () => {
    const r = await call("/api/v1/colour-finder", {
      method: "POST",
      headers: { "Content-Type": "application/json", Origin: server.url },
      body: JSON.stringify({ wires: ["W/R"], family: "a\u0000b" }),
    });
    expect(r.status).toBe(400);
    expect(JSON.parse(r.body).error.field).toBe("family");
  });
});
