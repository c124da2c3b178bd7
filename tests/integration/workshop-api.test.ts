/**
 * The workshop computations of /work/shared/API.md ("Workshop computations"), over HTTP against the production build with a
 * freshly migrated and seeded database: wire sizing, the bench sheet, the colour finder, a family's circuits, the circuit walk
 * and the diagnosis. Check values and their sources are in /work/shared/REFERENCE-FACTS.md §3–§4 ("RF" below).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DomUtils, parseDocument } from "htmlparser2";
import { z } from "zod";
import { startServer, type TestServer } from "../support/server";
import { errorBody, shape, stateDigest, client } from "./helpers";
import { mulberry32 } from "../fixtures/random";

// ---------------------------------------------------------------------------------------------------------------------
// Shapes (API.md). z.object ignores extra keys ("add fields freely") but fails on a renamed, dropped or retyped one.

const slug = z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "lowercase kebab-case slug");
const text = z.string().min(1);
const int = z.number().int();
const num = z.number().finite();

const wireSizeBody = z.object({
  minAreaMm2: num.positive(),
  metric: z.object({ sizeMm2: num.positive(), dropV: num.nonnegative(), dropPct: num.nonnegative() }),
  awg: z.object({ gauge: int, areaMm2: num.positive(), dropV: num.nonnegative() }),
  fuseA: num.positive().nullable(),
  basis: z.array(z.object({ value: num, unit: text, source: text })).min(1),
});
type WireSize = z.infer<typeof wireSizeBody>;

const VERDICTS = ["in_range", "low", "high"] as const;
const MATERIALS = ["copper", "carbon", "other"] as const;
// measured and at20C are numbers, or "OL" for an open circuit (JSON has no Infinity); max null is "no upper limit".
const reading = num.or(z.literal("OL"));
const benchBody = z.object({
  results: z.array(
    z.object({
      name: text,
      measured: reading,
      at20C: reading,
      verdict: z.enum(VERDICTS),
      unit: text,
      max: num.nullable(),
      material: z.enum(MATERIALS),
      steps: z.array(text),
    }),
  ),
  cautions: z.array(z.object({ kind: text, title: text, text })).min(1),
});

const QUALITIES = ["exact", "tracer-missing", "faded", "none"] as const;
const finderBody = z.object({
  candidates: z.array(
    z.object({
      connector: z.object({ slug, name: text, family: slug }),
      score: z.number().min(0).max(1),
      matches: z.array(z.object({ wire: text, cavity: text.nullable(), pinColour: text.nullable(), quality: z.enum(QUALITIES) })),
    }),
  ),
});
type Finder = z.infer<typeof finderBody>;

const circuitsBody = z.object({
  circuits: z.array(z.object({ slug, name: text, system: text })),
  // Not in API.md's one-liner but what the route adds: how the family's ignition pairs cylinders (RF §4.1).
  wastedSpark: z.object({ suitable: z.boolean(), status: text, pairs: z.array(z.tuple([int, int])) }),
});

const expectSchema = z.object({
  quantity: z.enum(["voltage", "continuity", "resistance"]),
  // A continuity check past a load with no spec on the card has no upper bound: null is allowed for either end.
  min: num.nullable(),
  max: num.nullable(),
  unit: text,
  // The healthy loom's value and whether it is steady (added with the engine states; not in API.md's minimum).
  nominal: num.nullable().optional(),
  steady: z.boolean().optional(),
});
const walkBody = z.object({
  // Whether current flows through the circuit's load in these positions (added with the engine states).
  loaded: z.boolean().optional(),
  probePoints: z
    .array(
      z.object({
        step: int.min(1),
        connector: slug.nullable(),
        cavity: text,
        colour: text.nullable(),
        expect: expectSchema,
        how: text,
        // Extra fields of the route (used to follow the current's path, not in API.md): the previous point on this point's path.
        after: int.min(1).nullable().optional(),
        side: z.enum(["supply", "return"]).optional(),
        label: z.string().optional(),
        elementsBefore: z.array(z.string()).optional(),
      }),
    )
    .min(1),
});
type Walk = z.infer<typeof walkBody>;
type Point = Walk["probePoints"][number];

const diagnoseBody = z.object({
  fault: z.object({ between: z.tuple([int.min(1), int.min(1)]), likely: z.array(text).min(1) }).nullable(),
  next: int.min(1).nullable(),
});

const cardBody = z.object({
  connector: z.object({
    slug,
    name: text,
    family: z.object({ slug }),
    gender: z.enum(["plug", "socket"]),
    matesWith: slug.nullable(),
    layout: z.object({ cavities: z.array(z.object({ cavity: text })).min(1) }),
    pins: z.array(z.object({ cavity: text, colour: z.object({ code: text.nullable() }) })),
  }),
});
type Card = z.infer<typeof cardBody>["connector"];

const familiesBody = z.object({ families: z.array(z.object({ slug, firingOrder: text, cylinders: int })), total: int });

// ---------------------------------------------------------------------------------------------------------------------
// Plumbing

let server: TestServer;
let digestBefore: string;
let familySlugs: string[] = [];
const cards = new Map<string, Card>();

const { call, getJson } = client(() => server.url);

const jsonInit = (body: unknown, type = "application/json"): RequestInit => ({
  method: "POST",
  headers: { "Content-Type": type },
  body: typeof body === "string" ? body : JSON.stringify(body),
});

/** POST JSON → 200 JSON, parsed against a schema. */
async function postJson<T extends z.ZodType>(path: string, body: unknown, schema: T): Promise<z.infer<T>> {
  const r = await call(path, jsonInit(body));
  expect(r.status, `POST ${path} ${JSON.stringify(body).slice(0, 200)} → ${r.body.slice(0, 300)}`).toBe(200);
  expect(r.type, path).toMatch(/^application\/json\b/);
  return shape(schema, JSON.parse(r.body), path);
}

/** Any request that must fail: status, JSON Content-Type, the API.md error shape; returns the error. */
async function expectError(path: string, status: number, init?: RequestInit) {
  const r = await call(path, init);
  expect(r.status, `${init?.method ?? "GET"} ${path.slice(0, 120)} ${String(init?.body ?? "").slice(0, 120)} → ${r.status} ${r.body.slice(0, 200)}`).toBe(
    status,
  );
  expect(r.type, `${path.slice(0, 120)}: error responses are JSON (API.md conventions)`).toMatch(/^application\/json\b/);
  return { ...shape(errorBody, JSON.parse(r.body), path.slice(0, 120)).error, status: r.status, res: r.res };
}

/** A connector card through the API (GET must answer 200), cached. */
async function card(s: string): Promise<Card> {
  let c = cards.get(s);
  if (!c) {
    c = (await getJson(`/api/v1/connectors/${s}`, cardBody)).connector;
    cards.set(s, c);
  }
  return c;
}

// The shuffles use the shared seeded generator, so they are the same on every run.
const prng = mulberry32;
function shuffle<T>(xs: readonly T[], rnd: () => number): T[] {
  const out = [...xs];
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [out[i], out[j]] = [out[j], out[i]];
  }
  return out;
}

const FT = 0.3048; // m per international foot

beforeAll(async () => {
  server = await startServer();
  digestBefore = await stateDigest(server.dbPath);
  familySlugs = (await getJson("/api/v1/families?limit=100", familiesBody)).families.map((f) => f.slug);
});

afterAll(async () => {
  await server?.stop();
});

// ---------------------------------------------------------------------------------------------------------------------
// Media type, size and method errors shared by every POST computation (http.server.ts readJson: 415 / 413 / 400).

const POST_ROUTES: [string, unknown][] = [
  ["/api/v1/wire-size", { currentA: 10, lengthM: 3 }],
  ["/api/v1/bench", { readings: [{ name: "coil primary", min: 2, max: 4, unit: "Ω", measured: 3 }] }],
  ["/api/v1/colour-finder", { wires: ["B/Y", "O/W"] }],
  ["/api/v1/families/rx750-four/circuits/ignition/diagnose", { readings: [] }],
];

describe("POST computations: media type, size, malformed JSON, method", () => {
  it.each(POST_ROUTES)("%s: a valid JSON body → 200 JSON (application/json and a +json type)", async (path, body) => {
    for (const type of ["application/json", "application/json; charset=utf-8", "application/vnd.api+json"]) {
      const r = await call(path, jsonInit(body, type));
      expect(r.status, `${path} as ${type}: ${r.body.slice(0, 200)}`).toBe(200);
      expect(r.type).toMatch(/^application\/json\b/);
    }
  });

  it.each(POST_ROUTES)("%s: text/plain, form-urlencoded, multipart or no Content-Type → 415 unsupported_media_type", async (path, body) => {
    for (const type of ["text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x", "application/jsonp", ""]) {
      const init: RequestInit = { method: "POST", body: JSON.stringify(body), headers: type ? { "Content-Type": type } : {} };
      // fetch adds text/plain;charset=UTF-8 to a string body without a type: that is not JSON either.
      const err = await expectError(path, 415, init);
      expect(err.code, `${path} as ${type || "(none)"}`).toBe("unsupported_media_type");
    }
  });

  it.each(POST_ROUTES)("%s: malformed JSON → 400 bad_request (not 500)", async (path) => {
    for (const raw of ["{", '{"currentA": 10,}', "not json", "", "{'a': 1}"]) {
      const err = await expectError(path, 400, jsonInit(raw));
      expect(err.code, JSON.stringify(raw)).toBe("bad_request");
    }
  });

  it.each(POST_ROUTES)("%s: a body over 64 KiB → 413 too_large, with and without Content-Length", async (path, body) => {
    const big = JSON.stringify({ ...(body as object), pad: "x".repeat(64 * 1024) });
    expect(Buffer.byteLength(big)).toBeGreaterThan(64 * 1024);
    expect((await expectError(path, 413, jsonInit(big))).code).toBe("too_large");
    // Chunked, no Content-Length: the byte count after reading must catch it too.
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        const bytes = new TextEncoder().encode(big);
        for (let i = 0; i < bytes.length; i += 8192) c.enqueue(bytes.subarray(i, i + 8192));
        c.close();
      },
    });
    const chunked = { method: "POST", headers: { "Content-Type": "application/json" }, body: stream, duplex: "half" } as RequestInit;
    expect((await expectError(path, 413, chunked)).code).toBe("too_large");
  });

  it("exactly 64 KiB is still accepted (the limit is inclusive)", async () => {
    const head = JSON.stringify({ currentA: 10, lengthM: 3, pad: "" });
    const exact = head.replace('"pad":""', `"pad":"${"x".repeat(64 * 1024 - Buffer.byteLength(head))}"`);
    expect(Buffer.byteLength(exact)).toBe(64 * 1024);
    const r = await call("/api/v1/wire-size", jsonInit(exact));
    expect(r.status, r.body.slice(0, 200)).toBe(200);
  });

  it.each(POST_ROUTES)("GET / PUT / DELETE %s → 405 method_not_allowed, Allow: POST", async (path) => {
    for (const method of ["GET", "PUT", "DELETE", "PATCH"]) {
      const init: RequestInit = method === "GET" ? {} : { method, headers: { "Content-Type": "application/json" }, body: "{}" };
      const err = await expectError(path, 405, init);
      expect(err.code).toBe("method_not_allowed");
      expect(err.res.headers.get("allow"), `${method} ${path}`).toMatch(/\bPOST\b/);
    }
  });

  it.each(["/api/v1/families/rx750-four/circuits", "/api/v1/families/rx750-four/circuits/ignition/walk"])(
    "POST %s (read-only) → 405 with Allow: GET",
    async (path) => {
      const err = await expectError(path, 405, jsonInit({}));
      expect(err.code).toBe("method_not_allowed");
      expect(err.res.headers.get("allow")).toMatch(/\bGET\b/);
    },
  );
});

// ---------------------------------------------------------------------------------------------------------------------

describe("POST /api/v1/wire-size", () => {
  const size = (body: Record<string, unknown>) => postJson("/api/v1/wire-size", body, wireSizeBody);

  it("ABYC E-11 worked example: 10 A, 21 ft loop, 3 % at 12 V → 12 AWG", async () => {
    // RF §3.4 ex. 1 (ABYC E-11 via the marine distributor's "Maintaining Three Percent Voltage Drop" note): a 10 A load,
    // 11 ft out + 10 ft back = 21 ft conductor, 3 % of 12 V = 0.36 V; CM = 10.75·10·21/0.36 = 6 270.8 CM → 12 AWG (6 530 CM).
    const r = await size({ currentA: 10, lengthM: (21 / 2) * FT, systemV: 12, maxDropPct: 3, roundTrip: true, tempC: 20 });
    expect(r.awg.gauge).toBe(12);
    // RF §3.1 computed AWG table (ASTM B258 formula, checked against published tables): 12 AWG = 3.3088 mm², ±0.1 %.
    expect(Math.abs(r.awg.areaMm2 / 3.3088 - 1)).toBeLessThan(0.001);
    // RF §3.3 IEC 60028: ρ = 0.017241 Ω·mm²/m → A = I·ρ·L/ΔU = 10 × 0.017241 × 6.4008 / 0.36 = 3.0654 mm².
    expect(r.minAreaMm2).toBeCloseTo((10 * 0.017241 * 21 * FT) / 0.36, 4);
    // ABYC's own K = 10.75 Ω·CM/ft gives 6 270.8 CM = 3.177 mm²; both lie between 13 AWG (2.624) and 12 AWG (3.309).
    expect(r.minAreaMm2).toBeGreaterThan(2.624);
    expect(r.awg.dropV).toBeLessThanOrEqual(0.36);
    // ISO 6722-1 / Japanese sizes: 3 mm² is below 3.065, so the metric choice is 4 mm² (RF §3.2).
    expect(r.metric.sizeMm2).toBe(4);
    expect(r.metric.dropV).toBeLessThanOrEqual(0.36);
    expect(r.metric.dropPct).toBeCloseTo((r.metric.dropV / 12) * 100, 9);
  });

  it("conductivity-56 example: 2.1 A lamp, 18 m one way, 5 % → 2.5 mm²", async () => {
    // RF §3.4 ex. 2: A = 2·18·2.1/(56·0.6) = 2.25 mm² → the standard 2.5 mm².
    // With IEC 60028's κ = 58 (ρ = 0.017241) the minimum is 2.172 mm²: still above 2 mm², so 2.5 mm² as well.
    const r = await size({ currentA: 2.1, lengthM: 18, systemV: 12, maxDropPct: 5, roundTrip: true });
    expect(r.metric.sizeMm2).toBe(2.5);
    expect(r.minAreaMm2).toBeCloseTo((2 * 18 * 2.1 * 0.017241) / 0.6, 4);
    expect(r.minAreaMm2).toBeGreaterThan(2);
    expect(r.minAreaMm2).toBeLessThan(2.25 + 1e-9);
    expect(r.metric.dropV).toBeLessThanOrEqual(0.6);
  });

  it("motorcycle-scale check: 5 A, 3 m one way, 5 % → 1.0 mm² dropping 0.517 V", async () => {
    // RF §3.4 ex. 5 [computed]: 1.0 mm², 6 m loop, 5 A with the ideal ρ = 0.017241 → ΔU = 0.517 V (4.3 %).
    const r = await size({ currentA: 5, lengthM: 3, maxDropPct: 5 });
    expect(r.metric.sizeMm2).toBe(1);
    expect(r.metric.dropV).toBeCloseTo(5 * 6 * 0.017241, 6);
    expect(r.metric.dropPct).toBeCloseTo(4.3, 1);
  });

  it("defaults (API.md): systemV 12, maxDropPct 3, roundTrip true, tempC 20 give the same answer as spelling them out", async () => {
    const spelled = await size({ currentA: 10, lengthM: 3.2004, systemV: 12, maxDropPct: 3, roundTrip: true, tempC: 20 });
    const defaulted = await size({ currentA: 10, lengthM: 3.2004 });
    expect(defaulted.minAreaMm2).toBeCloseTo(spelled.minAreaMm2, 12);
    expect([defaulted.metric.sizeMm2, defaulted.awg.gauge, defaulted.fuseA]).toEqual([spelled.metric.sizeMm2, spelled.awg.gauge, spelled.fuseA]);
  });

  it("roundTrip false (return through the frame) halves the conductor length: at a fixed size the drop halves", async () => {
    // API.md: roundTrip true → conductor = 2 × lengthM; false → lengthM. 10 A over 0.5 m is decided by the 5 A/mm² ampacity rule
    // (2 mm²), not the drop, so both runs get the same sizes and the drops can be compared directly.
    const both = await size({ currentA: 10, lengthM: 0.5, roundTrip: true });
    const frame = await size({ currentA: 10, lengthM: 0.5, roundTrip: false });
    expect(frame.metric.sizeMm2).toBe(both.metric.sizeMm2);
    expect(frame.awg.gauge).toBe(both.awg.gauge);
    expect(frame.metric.dropV).toBeCloseTo(both.metric.dropV / 2, 12);
    expect(frame.awg.dropV).toBeCloseTo(both.awg.dropV / 2, 12);
    expect(frame.minAreaMm2).toBeCloseTo(both.minAreaMm2 / 2, 12);
    // And by Ohm's law (RF §3.4: ΔU = I·R′·L): 10 A × 0.017241 / 2 mm² × 0.5 m.
    expect(frame.metric.dropV).toBeCloseTo((10 * 0.017241 * 0.5) / frame.metric.sizeMm2, 9);
  });

  it("a hot conductor needs more copper: tempC 80 scales the minimum area by 1 + 0.00393 × 60 = 1.2358", async () => {
    // RF §3.3 IEC 60028 / IACS: α20 = 0.00393 /°C, R80/R20 = 1.2358.
    const cold = await size({ currentA: 10, lengthM: 3, tempC: 20 });
    const hot = await size({ currentA: 10, lengthM: 3, tempC: 80 });
    expect(hot.minAreaMm2 / cold.minAreaMm2).toBeCloseTo(1.2358, 9);
  });

  // Fuse margin 1.25 × continuous current: common practice (wire-size.ts FUSE_MARGIN); ratings of blade and glass fuses.
  const RATINGS = [3, 5, 7.5, 10, 15, 20, 25, 30, 40];
  const RUNS = [0.5, 2.1, 4, 7.9, 10, 12, 16, 24, 31].flatMap((currentA) => [0.5, 2, 5].map((lengthM) => ({ currentA, lengthM })));

  it("fuseA, when given, is a standard rating ≥ 1.25 × current; each chosen size covers the minimum; null only with a warning", async () => {
    for (const run of RUNS) {
      const r = await call("/api/v1/wire-size", jsonInit(run));
      expect(r.status).toBe(200);
      const body = shape(wireSizeBody.extend({ warnings: z.array(z.string()) }), JSON.parse(r.body));
      const what = `${run.currentA} A over ${run.lengthM} m`;
      expect(body.metric.sizeMm2, what).toBeGreaterThanOrEqual(body.minAreaMm2 * (1 - 1e-9));
      expect(body.awg.areaMm2, what).toBeGreaterThanOrEqual(body.minAreaMm2 * (1 - 1e-9));
      if (body.fuseA === null) {
        expect(body.warnings.length, `${what}: fuseA null must say why`).toBeGreaterThan(0);
        continue;
      }
      expect(body.fuseA, what).toBeGreaterThanOrEqual(1.25 * run.currentA - 1e-9);
      expect(RATINGS, `${what} → ${body.fuseA} A`).toContain(body.fuseA);
    }
    // The ABYC run above: 10 A → 12.5 A minimum → the next standard rating is 15 A (4 mm² / 12 AWG carry it).
    expect((await size({ currentA: 10, lengthM: (21 / 2) * FT })).fuseA).toBe(15);
    // 40 A × 1.25 = 50 A: beyond the largest rating, so null with a warning, not a fuse too small for the load.
    const big = JSON.parse((await call("/api/v1/wire-size", jsonInit({ currentA: 40, lengthM: 1 }))).body) as { fuseA: number | null; warnings: string[] };
    expect(big.fuseA).toBeNull();
    expect(big.warnings.length).toBeGreaterThan(0);
  });

  // Common practice: fuse ≥ 1.25 × current; REFERENCE-FACTS §5: within what the wire stands short-term (10 A/mm²).
  it("every run a standard fuse can cover (1.25 × I ≤ 40 A) gets a fuseA ≥ 1.25 × current", async () => {
    const missing: string[] = [];
    for (const run of RUNS) {
      const body = JSON.parse((await call("/api/v1/wire-size", jsonInit(run))).body) as WireSize;
      if (body.fuseA === null) missing.push(`${run.currentA} A over ${run.lengthM} m → ${body.metric.sizeMm2} mm² / ${body.awg.gauge} AWG, no fuse`);
    }
    expect(missing, missing.join("\n")).toEqual([]);
  });

  it("every basis entry carries a value, a unit and a source; resistivity and α are IEC 60028's", async () => {
    const r = await size({ currentA: 10, lengthM: 3 });
    for (const b of r.basis) expect(b.source.trim(), JSON.stringify(b)).not.toBe("");
    const values = r.basis.map((b) => b.value);
    expect(values).toContain(0.017241); // RF §3.3 IEC 60028: ρ20 = 0.017241 Ω·mm²/m
    expect(values).toContain(0.00393); // RF §3.3 IEC 60028 / IACS: α20 = 0.00393 /°C
    expect(r.basis.find((b) => b.value === 0.017241)!.source).toMatch(/IEC 60028/);
    expect(
      r.basis.some((b) => b.unit === "m" && b.value === 6),
      "conductor length 2 × 3 m",
    ).toBe(true);
  });

  it.each([
    ["negative current", { currentA: -1, lengthM: 3 }, "currentA"],
    ["zero current", { currentA: 0, lengthM: 3 }, "currentA"],
    ["zero length", { currentA: 10, lengthM: 0 }, "lengthM"],
    ["negative length", { currentA: 10, lengthM: -2 }, "lengthM"],
    ["current as a string", { currentA: "10", lengthM: 3 }, "currentA"],
    ["length as a string", { currentA: 10, lengthM: "3 m" }, "lengthM"],
    ["systemV as a string", { currentA: 10, lengthM: 3, systemV: "12" }, "systemV"],
    ["roundTrip as a string", { currentA: 10, lengthM: 3, roundTrip: "yes" }, "roundTrip"],
    ["tempC out of range", { currentA: 10, lengthM: 3, tempC: 1000 }, "tempC"],
    ["maxDropPct zero", { currentA: 10, lengthM: 3, maxDropPct: 0 }, "maxDropPct"],
    ["missing current", { lengthM: 3 }, "currentA"],
    ["missing length", { currentA: 10 }, "lengthM"],
    ["null current", { currentA: null, lengthM: 3 }, "currentA"],
    ["a run too long for any size", { currentA: 500, lengthM: 100 }, "lengthM"],
  ])("%s → 400 bad_request naming the field", async (_, body, field) => {
    const err = await expectError("/api/v1/wire-size", 400, jsonInit(body));
    expect(err.code).toBe("bad_request");
    expect(err.field).toBe(field);
  });

  it.each([
    ["{}", "currentA"],
    ["[]", undefined],
    ["null", undefined],
    ["42", undefined],
    ['"10 A"', undefined],
  ])("a body of %s → 400 (never 500)", async (raw, field) => {
    const err = await expectError("/api/v1/wire-size", 400, jsonInit(raw));
    expect(err.code).toBe("bad_request");
    if (field) expect(err.field).toBe(field);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("POST /api/v1/bench", () => {
  const bench = (readings: unknown[]) => postJson("/api/v1/bench", { readings }, benchBody);
  const one = async (reading: Record<string, unknown>) => (await bench([reading])).results[0];

  it("a copper 500 Ω winding measured at 80 °C corrects to 500 / 1.2358 (IEC 60028 α = 0.00393)", async () => {
    // RF §3.3: R(t) = R20·(1 + 0.00393·(t − 20)); at 80 °C R80/R20 = 1.2358 → R20 = 500 / 1.2358 = 404.60 Ω.
    const r = await one({ name: "coil secondary", min: 380, max: 420, unit: "Ω", measured: 500, tempC: 80, copper: true });
    expect(r.at20C).toBeCloseTo(500 / 1.2358, 6);
    expect(r.measured).toBe(500);
    expect(r.verdict).toBe("in_range");
    // Not IEC 60228's simplified α ≈ 0.004 (RF §3.2 Kt table: 0.806 at 80 °C → 403 Ω): the app uses IEC 60028's 0.00393.
    expect(Math.abs(Number(r.at20C) - 500 * 0.806)).toBeGreaterThan(1);
    // copper defaults to true for a resistance in ohms (API.md).
    const byDefault = await one({ name: "coil secondary", min: 380, max: 420, unit: "Ω", measured: 500, tempC: 80 });
    expect(byDefault.at20C).toBeCloseTo(500 / 1.2358, 6);
  });

  it("at 20 °C (or no tempC) nothing is corrected", async () => {
    const r = await bench([
      { name: "at 20", min: 2, max: 4, unit: "Ω", measured: 3.1, tempC: 20 },
      { name: "no temp", min: 2, max: 4, unit: "Ω", measured: 3.1 },
    ]);
    expect(r.results.map((x) => x.at20C)).toEqual([3.1, 3.1]);
  });

  it("verdicts at and around the 20 °C boundaries (limits inclusive), also after the copper correction", async () => {
    // Pickup coil window 400–500 Ω (a generic range inside RF §4's 150–1000 Ω for inductive pickups).
    const spec = { min: 400, max: 500, unit: "Ω" };
    const cases: [number, number, (typeof VERDICTS)[number]][] = [
      [20, 399.9, "low"],
      [20, 400, "in_range"],
      [20, 400.1, "in_range"],
      [20, 450, "in_range"],
      [20, 499.9, "in_range"],
      [20, 500, "in_range"],
      [20, 500.1, "high"],
      [20, 0, "low"],
      // At 80 °C a reading of exactly min × 1.2358 is the minimum at 20 °C: in range, not flipped by rounding.
      [80, 400 * 1.2358, "in_range"],
      [80, 400 * 1.2358 - 0.1, "low"],
      [80, 500 * 1.2358, "in_range"],
      [80, 500 * 1.2358 + 0.1, "high"],
      // The uncorrected 80 °C reading 600 Ω would be "high"; corrected it is 485.5 Ω, in range.
      [80, 600, "in_range"],
      // Cold: at −10 °C the factor is 1 − 0.1179 = 0.8821; 360 Ω reads 408.1 Ω at 20 °C.
      [-10, 360, "in_range"],
      [-10, 350, "low"],
    ];
    const r = await bench(cases.map(([tempC, measured], i) => ({ name: `pickup ${i + 1}`, ...spec, measured, tempC })));
    expect(r.results).toHaveLength(cases.length);
    cases.forEach(([tempC, measured, verdict], i) => {
      const got = r.results[i];
      expect(got.verdict, `${measured} Ω at ${tempC} °C → ${got.at20C} Ω at 20 °C`).toBe(verdict);
      expect(got.at20C).toBeCloseTo(measured / (1 + 0.00393 * (tempC - 20)), 9);
    });
  });

  it("kΩ readings: compared in kΩ, corrected the same way", async () => {
    // RF §4: coil secondary several kΩ, typically 6–20 kΩ.
    const r = await bench([
      { name: "secondary ok", min: 6, max: 20, unit: "kΩ", measured: 15, tempC: 20 },
      { name: "secondary open-ish", min: 6, max: 20, unit: "kΩ", measured: 25, tempC: 20 },
      { name: "secondary shorted turns", min: 6, max: 20, unit: "kΩ", measured: 4, tempC: 20 },
      { name: "secondary hot", min: 6, max: 20, unit: "kΩ", measured: 15 * 1.2358, tempC: 80 },
      { name: "spelled kohm", min: 6, max: 20, unit: "kohm", measured: 21, tempC: 20 },
    ]);
    expect(r.results.map((x) => x.verdict)).toEqual(["in_range", "high", "low", "in_range", "high"]);
    expect(r.results[3].at20C).toBeCloseTo(15, 9);
    expect(r.results[0].at20C).toBe(15);
  });

  it("copper: false is not corrected (a carbon or resistor part)", async () => {
    // RF §4: resistor plug cap ≈ 5 kΩ typical.
    const r = await one({ name: "plug cap", min: 4, max: 6, unit: "kΩ", measured: 5.5, tempC: 80, copper: false });
    expect(r.at20C).toBe(5.5);
    expect(r.verdict).toBe("in_range");
    // The same reading as copper would have been brought down to 4.45 kΩ.
    const asCopper = await one({ name: "plug cap", min: 4, max: 6, unit: "kΩ", measured: 5.5, tempC: 80, copper: true });
    expect(asCopper.at20C).toBeCloseTo(5.5 / 1.2358, 9);
  });

  it("a 6.3 kΩ resistor cap at 40 °C against 4–6 kΩ is high: carbon, not corrected (the default for a cap)", async () => {
    // RF §4: resistor caps ≈ 5 kΩ (from memory / common practice); RF 5.1: copper's correction applies to copper windings
    // only, carbon caps and suppressors are not corrected (common practice). IEC 60028 α = 0.00393 (RF §3.3) would have
    // brought it to 6.3 / 1.0786 = 5.84 kΩ and called it in range.
    const r = await one({ name: "Resistor plug cap", min: 4, max: 6, unit: "kΩ", measured: 6.3, tempC: 40 });
    expect(r).toMatchObject({ at20C: 6.3, verdict: "high", material: "carbon", unit: "kΩ" });
    expect(r.steps.join(" ")).toMatch(/Material not given: carbon, from the name/);
    const forced = await one({ name: "Resistor plug cap", min: 4, max: 6, unit: "kΩ", measured: 6.3, tempC: 40, material: "copper" });
    expect(Number(forced.at20C)).toBeCloseTo(6.3 / (1 + 0.00393 * 20), 9);
    expect(Number(forced.at20C)).toBeCloseTo(5.84, 2);
    expect(forced.verdict).toBe("in_range");
  });

  it("material: copper corrects, carbon and other do not; the name decides when none is given, and the steps say so", async () => {
    // RF §3.3: at 80 °C R80/R20 = 1.2358 (IEC 60028 α = 0.00393).
    const spec = { min: 400, max: 600, unit: "ohm", measured: 600, tempC: 80 };
    const r = await bench([
      { name: "Pickup coil", ...spec },
      { name: "Pickup coil", ...spec, material: "carbon" },
      { name: "Pickup coil", ...spec, material: "other" },
      { name: "Pickup coil", ...spec, material: "copper" },
      { name: "Tail lamp filament", ...spec }, // tungsten: never copper's α (RF 5.1, common practice)
      { name: "Suppressor", ...spec },
      { name: "Unlabelled reading", ...spec }, // unrecognised in ohms → copper, said so
    ]);
    expect(r.results.map((x) => x.material)).toEqual(["copper", "carbon", "other", "copper", "other", "carbon", "copper"]);
    expect(r.results.map((x) => x.unit)).toEqual(Array(7).fill("Ω")); // "ohm" is answered as Ω
    for (const i of [0, 3, 6]) expect(Number(r.results[i].at20C)).toBeCloseTo(600 / 1.2358, 9);
    for (const i of [1, 2, 4, 5]) expect(r.results[i].at20C).toBe(600);
    expect(r.results[6].steps.join(" ")).toMatch(/not recognised from the name: taken as copper/);
    expect(r.results[4].steps.join(" ")).toMatch(/tungsten/);
  });

  it("a spec with no upper limit (max null): in range at or above min, OL counts as open; OL against a bounded spec is high", async () => {
    // Insulation of a stator phase to earth must read open, e.g. at least 1 MΩ (common practice).
    const r = await bench([
      { name: "Stator phase to earth", min: 1, max: null, unit: "MΩ", measured: "OL" },
      { name: "Stator phase to earth", min: 1, max: null, unit: "MΩ", measured: 5 },
      { name: "Stator phase to earth", min: 1, max: null, unit: "MΩ", measured: 0.05 },
      { name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: "OL", tempC: 30 },
      { name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: "ol" },
    ]);
    expect(r.results.map((x) => x.verdict)).toEqual(["in_range", "in_range", "low", "high", "high"]);
    expect(r.results[0]).toMatchObject({ measured: "OL", at20C: "OL", max: null });
    expect(r.results[3]).toMatchObject({ measured: "OL", at20C: "OL", max: 600 });
  });

  it("the answer carries the bench's cautions, the meter one first", async () => {
    const r = await one({ name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: 500 });
    expect(r.verdict).toBe("in_range");
    const { cautions } = await bench([{ name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: 500 }]);
    expect(cautions.map((c) => c.kind)).toEqual(["meter", "battery", "ignition"]);
    expect(cautions[0].text).toMatch(/ignition off, then switch on/);
  });

  it("a reading that is not a resistance is not corrected (copper defaults to false outside ohms)", async () => {
    const r = await one({ name: "pickup peak", min: 0.2, max: 2, unit: "V", measured: 1.5, tempC: 80 });
    expect(r.at20C).toBe(1.5);
    expect(r.verdict).toBe("in_range");
  });

  it("results come back in the order given, one per reading, names kept", async () => {
    const names = ["pickup 1", "pickup 2", "coil 1-4 primary", "coil 2-3 primary", "stator 1-2", "stator 2-3", "plug cap 1"];
    const r = await bench(names.map((name, i) => ({ name, min: 1, max: 10, unit: "Ω", measured: i * 2, tempC: 20 })));
    expect(r.results.map((x) => x.name)).toEqual(names);
    expect(r.results.map((x) => x.measured)).toEqual(names.map((_, i) => i * 2));
    // 0 < 1 low; 2 … 10 within 1–10 (limits inclusive); 12 high.
    expect(r.results.map((x) => x.verdict)).toEqual(["low", "in_range", "in_range", "in_range", "in_range", "in_range", "high"]);
  });

  it("200 readings are accepted (the limit); 0 and 201 → 400 naming readings", async () => {
    const reading = (i: number) => ({ name: `r${i}`, min: 1, max: 2, unit: "Ω", measured: 1.5 });
    expect((await bench(Array.from({ length: 200 }, (_, i) => reading(i)))).results).toHaveLength(200);
    for (const n of [0, 201]) {
      const err = await expectError("/api/v1/bench", 400, jsonInit({ readings: Array.from({ length: n }, (_, i) => reading(i)) }));
      expect(err.code, `${n} readings`).toBe("bad_request");
      expect(err.field, `${n} readings`).toBe("readings");
    }
  });

  it.each([
    ["no readings key", {}, "readings"],
    ["readings not a list", { readings: "3 Ω" }, "readings"],
    ["measured missing", { readings: [{ name: "a", min: 1, max: 2, unit: "Ω" }] }, "readings.0.measured"],
    ["measured as a string", { readings: [{ name: "a", min: 1, max: 2, unit: "Ω", measured: "1.5" }] }, "readings.0.measured"],
    ["empty name", { readings: [{ name: " ", min: 1, max: 2, unit: "Ω", measured: 1.5 }] }, "readings.0.name"],
    ["copper as a string", { readings: [{ name: "a", min: 1, max: 2, unit: "Ω", measured: 1.5, copper: "yes" }] }, "readings.0.copper"],
    ["max omitted (null is the way to say no upper limit)", { readings: [{ name: "a", min: 1, unit: "MΩ", measured: 5 }] }, "readings.0.max"],
    ["measured as a word other than OL", { readings: [{ name: "a", min: 1, max: 2, unit: "Ω", measured: "open" }] }, "readings.0.measured"],
    ["an unknown material", { readings: [{ name: "a", min: 1, max: 2, unit: "Ω", measured: 1.5, material: "brass" }] }, "readings.0.material"],
  ])("%s → 400 naming the field", async (_, body, field) => {
    const err = await expectError("/api/v1/bench", 400, jsonInit(body));
    expect(err.code).toBe("bad_request");
    expect(err.field).toBe(field);
  });

  it.each([
    ["min above max", { name: "a", min: 5, max: 2, unit: "Ω", measured: 3 }],
    ["negative resistance", { name: "a", min: 1, max: 2, unit: "Ω", measured: -1 }],
    ["tempC out of range", { name: "a", min: 1, max: 2, unit: "Ω", measured: 1.5, tempC: 900 }],
    ["copper correction on volts", { name: "a", min: 1, max: 2, unit: "V", measured: 1.5, copper: true }],
    ["material copper on volts", { name: "a", min: 1, max: 2, unit: "V", measured: 1.5, material: "copper" }],
    ["material and copper disagree", { name: "a", min: 1, max: 2, unit: "Ω", measured: 1.5, material: "carbon", copper: true }],
  ])("%s → 400 naming the reading (domain check, not 500)", async (_, reading) => {
    const err = await expectError("/api/v1/bench", 400, jsonInit({ readings: [{ name: "fine", min: 1, max: 2, unit: "Ω", measured: 1.5 }, reading] }));
    expect(err.code).toBe("bad_request");
    expect(err.field ?? "", "the second reading is named").toMatch(/^readings[.[]1\]?\./);
  });
});

describe("GET /bench (the page, without JavaScript: the sheet lives in its address)", () => {
  type El = ReturnType<typeof DomUtils.findAll>[number];
  async function page(query: string) {
    const r = await call(`/bench?${query}`);
    expect(r.status, r.body.slice(0, 300)).toBe(200);
    const nodes = parseDocument(r.body).children;
    const all = (pred: (e: El) => boolean) => DomUtils.findAll(pred, nodes);
    const text = (e: El) => DomUtils.textContent(e).replace(/\s+/g, " ").trim();
    const row = (i: number) => all((e) => e.name === "tr" && e.attribs["data-row"] === String(i))[0];
    const inRow = (i: number, pred: (e: El) => boolean) => DomUtils.findAll(pred, [row(i)]);
    const named = (i: number, name: string) => inRow(i, (e) => e.attribs.name === name)[0];
    // The option a browser submits: the one marked selected, else the first; its value, else its text.
    const selected = (sel: El) => {
      const options = DomUtils.findAll((o) => o.name === "option", [sel]);
      const o = options.find((x) => "selected" in x.attribs) ?? options[0];
      return o ? (o.attribs.value ?? text(o)) : "";
    };
    return { all, text, row, inRow, named, selected };
  }

  it("a resistor cap at 40 °C on auto is high, a pickup on auto is corrected, and each row has a material select", async () => {
    // RF §4 resistor caps ≈ 5 kΩ; RF 5.1 carbon is not corrected; RF §3.3 α = 0.00393: 560 / 1.0786 = 519.2 Ω.
    const q = new URLSearchParams({
      n0: "Resistor plug cap",
      lo0: "4",
      hi0: "6",
      u0: "kohm",
      m0: "6.3",
      t0: "40",
      n1: "Pickup coil",
      lo1: "420",
      hi1: "580",
      u1: "Ω",
      m1: "560",
      t1: "40",
    });
    const p = await page(q.toString());
    const verdict = (i: number) => p.inRow(i, (e) => e.attribs["data-verdict"] !== undefined)[0]?.attribs["data-verdict"];
    expect(verdict(0)).toBe("high");
    expect(p.inRow(0, (e) => e.attribs["data-material"] !== undefined)[0]?.attribs["data-material"]).toBe("carbon");
    expect(verdict(1)).toBe("in_range");
    expect(p.text(p.row(1))).toContain("519.2 Ω");
    for (const i of [0, 1, 2]) {
      const sel = p.named(i, `mt${i}`);
      expect(sel?.name, `row ${i + 1} has a material select`).toBe("select");
      expect(DomUtils.findAll((o) => o.name === "option", [sel]).map((o) => o.attribs.value)).toEqual(["", "copper", "carbon", "other"]);
    }
    // "kohm" is shown as kΩ in the unit select.
    expect(p.selected(p.named(0, "u0"))).toBe("kΩ");
  });

  it("a chosen material, an open maximum and OL are kept in the address and judged", async () => {
    const q = new URLSearchParams({
      n0: "Pickup coil",
      lo0: "420",
      hi0: "580",
      u0: "Ω",
      m0: "600",
      t0: "60",
      mt0: "carbon",
      n1: "Stator phase to earth",
      lo1: "1",
      hi1: "open",
      u1: "MΩ",
      m1: "OL",
    });
    const p = await page(q.toString());
    expect(p.selected(p.named(0, "mt0"))).toBe("carbon");
    expect(p.inRow(0, (e) => e.attribs["data-verdict"] !== undefined)[0].attribs["data-verdict"]).toBe("high"); // 600 not corrected
    expect(p.inRow(1, (e) => e.attribs["data-verdict"] !== undefined)[0].attribs["data-verdict"]).toBe("in_range");
    expect(p.text(p.row(1))).toContain("OL");
    // A sheet bookmarked with the older copper select (cu=no) still reads as not copper.
    const old = await page(new URLSearchParams({ n0: "Pickup coil", lo0: "420", hi0: "580", u0: "Ω", m0: "600", t0: "60", cu0: "no" }).toString());
    expect(old.selected(old.named(0, "mt0"))).toBe("other");
  });

  it("a blank maximum asks for a number or “open” instead of judging", async () => {
    const p = await page(new URLSearchParams({ n0: "Stator phase to earth", lo0: "1", hi0: "", u0: "MΩ", m0: "3" }).toString());
    expect(p.text(p.inRow(0, (e) => e.attribs.role === "alert")[0])).toMatch(/write “open”/);
  });

  it("shows the bench cautions with the meter first and the deferral to the manual", async () => {
    const p = await page("");
    const kinds = p.all((e) => e.attribs["data-caution"] !== undefined).map((e) => e.attribs["data-caution"]);
    expect(kinds).toEqual(["meter", "battery", "ignition"]);
    const aside = p.all((e) => e.name === "aside" && e.attribs["aria-label"] === "Safety cautions")[0];
    expect(p.text(aside)).toMatch(/factory service manual/);
  });

  it("a sheet from a card carries each spec's material, kind, conditions and open maximum into its row", async () => {
    const specBody = z.object({
      connector: z.object({
        specs: z.array(
          z.object({
            name: text,
            min: num,
            max: num.nullable(),
            unit: text,
            conditions: z.string(),
            kind: text,
            material: z.enum(MATERIALS).nullable(),
          }),
        ),
      }),
    });
    const withSpecs: { slug: string; specs: z.infer<typeof specBody>["connector"]["specs"] }[] = [];
    const detail = z.object({ family: z.object({ systems: z.array(z.object({ connectors: z.array(z.object({ slug })) })) }) });
    for (const f of familySlugs.slice(0, 3)) {
      const { family } = await getJson(`/api/v1/families/${f}`, detail);
      for (const c of family.systems.flatMap((x) => x.connectors)) {
        const { connector } = await getJson(`/api/v1/connectors/${c.slug}`, specBody);
        if (connector.specs.length) withSpecs.push({ slug: c.slug, specs: connector.specs });
      }
    }
    expect(withSpecs.length, "demo cards with specs").toBeGreaterThan(0);
    for (const { slug: s, specs } of withSpecs.slice(0, 6)) {
      const p = await page(`connector=${s}`);
      specs.forEach((spec, i) => {
        expect(p.named(i, `n${i}`).attribs.value, `${s} row ${i + 1}`).toMatch(
          new RegExp(`^${spec.name.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}, between cavities`),
        );
        expect(p.named(i, `hi${i}`).attribs.value).toBe(spec.max === null ? "open" : String(spec.max));
        expect(p.selected(p.named(i, `mt${i}`))).toBe(spec.material ?? "");
        const shown = p.inRow(i, (e) => e.attribs["data-conditions"] !== undefined)[0];
        if (spec.conditions.trim()) {
          expect(p.text(shown)).toBe(`Measure: ${spec.conditions.replace(/\s+/g, " ").trim()}`);
          expect(p.named(i, `c${i}`).attribs.value).toBe(spec.conditions);
        } else {
          expect(shown, "no empty conditions line").toBeUndefined();
        }
        if (spec.kind !== "resistance") expect(p.inRow(i, (e) => e.attribs["data-kind"] === spec.kind)).toHaveLength(1);
      });
    }
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("POST /api/v1/colour-finder", () => {
  const find = (body: Record<string, unknown>) => postJson("/api/v1/colour-finder", body, finderBody);

  /** Every demo connector with at least 4 coded pins, read through the API (family → connectors → card). */
  async function demoConnectors(): Promise<Card[]> {
    const out: Card[] = [];
    const detail = z.object({ family: z.object({ systems: z.array(z.object({ connectors: z.array(z.object({ slug })) })) }) });
    for (const f of familySlugs) {
      const { family } = await getJson(`/api/v1/families/${f}`, detail);
      for (const s of family.systems)
        for (const c of s.connectors) {
          const k = await card(c.slug);
          if (k.pins.filter((p) => p.colour.code).length >= 4) out.push(k);
        }
    }
    return out;
  }

  /** Check a response's matches against the cards: the wires in the order sent, cavities and pin colours from the card. */
  async function checkMatches(res: Finder, wires: string[]) {
    for (const c of res.candidates) {
      expect(
        c.matches.map((m) => m.wire),
        c.connector.slug,
      ).toEqual(wires);
      const k = await card(c.connector.slug);
      const used = c.matches.map((m) => m.cavity).filter((x) => x !== null);
      expect(new Set(used).size, `${c.connector.slug}: one wire per cavity`).toBe(used.length);
      for (const m of c.matches) {
        if (m.cavity === null) {
          expect(m.pinColour).toBeNull();
          expect(m.quality).toBe("none");
          continue;
        }
        const pin = k.pins.find((p) => p.cavity === m.cavity);
        expect(pin, `${c.connector.slug} cavity ${m.cavity}`).toBeDefined();
        expect(m.pinColour, `${c.connector.slug}:${m.cavity}`).toBe(pin!.colour.code);
      }
    }
    const scores = res.candidates.map((c) => c.score);
    expect(scores, "best first").toEqual([...scores].sort((a, b) => b - a));
  }

  it("cut-off demo plugs: 4 of the pins' codes, shuffled, one dropped → the card or its mating half in the top 3", async () => {
    const list = await demoConnectors();
    expect(list.length, "the demo library has connectors with ≥ 4 coded pins").toBeGreaterThanOrEqual(12);
    expect(new Set(list.map((c) => c.family.slug)).size, "from every demo family").toBe(familySlugs.length);
    const rnd = prng(20260601);
    let first = 0;
    const misses: string[] = [];
    for (const k of list) {
      const coded = k.pins.filter((p) => p.colour.code);
      const wires = shuffle(
        shuffle(coded, rnd)
          .slice(0, 4)
          .map((p) => p.colour.code!),
        rnd,
      ).slice(0, 3);
      const res = await find({ wires });
      await checkMatches(res, wires);
      const own = new Set([k.slug, k.matesWith]);
      const rank = res.candidates.findIndex((c) => own.has(c.connector.slug));
      if (rank === 0) first++;
      if (rank < 0 || rank > 2)
        misses.push(
          `${k.slug} ${JSON.stringify(wires)} → rank ${rank} (top: ${res.candidates
            .slice(0, 3)
            .map((c) => `${c.connector.slug} ${c.score}`)
            .join(", ")})`,
        );
      else {
        // The card (or its mate, same codes) explains every wire exactly.
        const hit = res.candidates[rank];
        expect(
          hit.matches.every((m) => m.quality === "exact"),
          `${k.slug}: ${JSON.stringify(hit.matches)}`,
        ).toBe(true);
      }
    }
    console.log(
      `colour finder: ${first}/${list.length} (${Math.round((100 * first) / list.length)} %) of the cut-off demo plugs ranked first, ${list.length - misses.length}/${list.length} in the top 3`,
    );
    expect(misses, misses.join("\n")).toEqual([]);
  });

  it("a faded or tracer-less wire still finds the rx750-four ignition unit plug, and says which", async () => {
    // rx750-four-ignition-unit-plug (api.test.ts): 1 O/W, 2 B, 3 B/Y, 4 B/L. "B" for B/L = the tracer wore off; "R/W" for O/W = red for a faded orange.
    const res = await find({ wires: ["B/Y", "R/W", "B"], family: "rx750-four" });
    const top = res.candidates
      .slice(0, 2)
      .map((c) => c.connector.slug)
      .sort();
    expect(top).toEqual(["rx750-four-ignition-unit-plug", "rx750-four-ignition-unit-socket"]);
    const q = Object.fromEntries(res.candidates[0].matches.map((m) => [m.wire, [m.cavity, m.quality]]));
    expect(q["B/Y"]).toEqual(["3", "exact"]);
    expect(q["R/W"]).toEqual(["1", "faded"]);
    expect(q["B"]).toEqual(["2", "exact"]);
  });

  it("family filter: only that family's connectors come back (every demo family)", async () => {
    for (const f of familySlugs) {
      const some = [...(await demoConnectors())].find((c) => c.family.slug === f)!;
      const wires = some.pins
        .map((p) => p.colour.code)
        .filter((x): x is string => !!x)
        .slice(0, 3);
      const res = await find({ wires, family: f });
      expect(res.candidates.length, f).toBeGreaterThan(0);
      expect(
        res.candidates.map((c) => c.connector.family).filter((x) => x !== f),
        f,
      ).toEqual([]);
      expect(
        res.candidates.map((c) => c.connector.slug),
        f,
      ).toContain(some.slug);
    }
    // An unknown family filters everything out: an empty list, not an error.
    expect((await find({ wires: ["B"], family: "no-such-family" })).candidates).toEqual([]);
  });

  it("pinCount and gender filters are respected", async () => {
    const wires = ["B", "R/W", "O/W"];
    for (const pinCount of [2, 3, 4, 8]) {
      const res = await find({ wires, pinCount, limit: 50 });
      for (const c of res.candidates) expect((await card(c.connector.slug)).pins.length, `${c.connector.slug} with pinCount ${pinCount}`).toBe(pinCount);
    }
    for (const gender of ["plug", "socket"] as const) {
      const res = await find({ wires, gender, limit: 50 });
      expect(res.candidates.length, gender).toBeGreaterThan(0);
      for (const c of res.candidates) expect((await card(c.connector.slug)).gender, c.connector.slug).toBe(gender);
    }
    const both = await find({ wires: ["O/W", "B/Y", "B/L"], pinCount: 8, gender: "socket", family: "rx750-four" });
    expect(both.candidates[0].connector.slug).toBe("rx750-four-ignition-unit-socket");
    for (const c of both.candidates) {
      const k = await card(c.connector.slug);
      expect([k.pins.length, k.gender, k.family.slug]).toEqual([8, "socket", "rx750-four"]);
    }
  });

  it("matches carry wire, cavity, pinColour and one of the four quality words", async () => {
    const res = await find({ wires: ["W/R", "B", "L/W", "Lg/R"] });
    expect(res.candidates.length).toBeGreaterThan(0);
    for (const c of res.candidates) for (const m of c.matches) expect(QUALITIES).toContain(m.quality);
    await checkMatches(res, ["W/R", "B", "L/W", "Lg/R"]);
  });

  it("an unknown code → 400 unknown_colour naming the wire", async () => {
    const err = await expectError("/api/v1/colour-finder", 400, jsonInit({ wires: ["B", "Xq", "W/R"] }));
    expect(err.code).toBe("unknown_colour");
    expect(err.message).toContain("Xq");
    expect(err.field).toBe("wires.1");
  });

  it.each([
    ["empty wires", { wires: [] }, "wires"],
    ["41 wires", { wires: Array.from({ length: 41 }, () => "B") }, "wires"],
    ["no wires key", { family: "rx750-four" }, "wires"],
    ["wires not a list", { wires: "B, W/R" }, "wires"],
    ["an empty wire", { wires: ["B", "  "] }, "wires.1"],
    ["a number for a wire", { wires: ["B", 7] }, "wires.1"],
    ["pinCount 0", { wires: ["B"], pinCount: 0 }, "pinCount"],
    ["pinCount not whole", { wires: ["B"], pinCount: 2.5 }, "pinCount"],
    ["gender unknown", { wires: ["B"], gender: "both" }, "gender"],
  ])("%s → 400 naming the field", async (_, body, field) => {
    const err = await expectError("/api/v1/colour-finder", 400, jsonInit(body));
    expect(["bad_request", "unknown_colour"]).toContain(err.code);
    expect(err.field).toBe(field);
  });

  it("40 wires is the limit and is accepted", async () => {
    const res = await find({ wires: Array.from({ length: 40 }, (_, i) => (i % 2 ? "B" : "W/R")) });
    for (const c of res.candidates) expect(c.matches).toHaveLength(40);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("GET /api/v1/families/:slug/circuits", () => {
  it("all seven demo families: ≥ 1 circuit each {slug, name, system}, unique slugs, every family has ignition", async () => {
    expect(familySlugs).toHaveLength(7);
    for (const f of familySlugs) {
      const { circuits } = await getJson(`/api/v1/families/${f}/circuits`, circuitsBody);
      expect(circuits.length, f).toBeGreaterThanOrEqual(1);
      expect(new Set(circuits.map((c) => c.slug)).size, f).toBe(circuits.length);
      expect(
        circuits.map((c) => c.slug),
        f,
      ).toContain("ignition");
      expect(circuits.find((c) => c.slug === "ignition")!.system, f).toBe("ignition");
    }
  });

  it("rx750-four (inline four, 1-2-4-3): wasted-spark pairs [1,4] and [2,3]", async () => {
    // RF §4.1, Halderman companion-cylinder method: 1 2 over 4 3 → columns 1&4, 2&3.
    const { wastedSpark } = await getJson("/api/v1/families/rx750-four/circuits", circuitsBody);
    expect(wastedSpark.suitable).toBe(true);
    expect(wastedSpark.pairs).toEqual([
      [1, 4],
      [2, 3],
    ]);
    // rx400-four has the same firing order (db/seeders/demo): the same pairs.
    expect((await getJson("/api/v1/families/rx400-four/circuits", circuitsBody)).wastedSpark.pairs).toEqual([
      [1, 4],
      [2, 3],
    ]);
  });

  it("sovereign-650 (360° parallel twin) suits wasted spark; marquis-500 (180° twin) does not", async () => {
    // RF §4.1: a 360° twin fires 360–360, one double-ended coil works; a 180° twin fires 180–540, each cylinder needs its own coil.
    const sov = (await getJson("/api/v1/families/sovereign-650/circuits", circuitsBody)).wastedSpark;
    expect(sov.suitable).toBe(true);
    expect(sov.pairs).toEqual([[1, 2]]);
    const mar = (await getJson("/api/v1/families/marquis-500/circuits", circuitsBody)).wastedSpark;
    expect(mar.suitable).toBe(false);
    expect(mar.pairs).toEqual([]);
  });

  it("unknown family → 404 not_found (also for a malformed slug)", async () => {
    for (const f of ["no-such-family", "RX750-FOUR", "rx750-four%00", "..%2F..%2Fetc"]) {
      expect((await expectError(`/api/v1/families/${f}/circuits`, 404)).code, f).toBe("not_found");
    }
  });
});

// ---------------------------------------------------------------------------------------------------------------------

const walkUrl = (family: string, circuit: string, switches?: string) =>
  `/api/v1/families/${family}/circuits/${circuit}/walk${switches === undefined ? "" : `?switches=${encodeURIComponent(switches)}`}`;
const walk = (family: string, circuit: string, switches?: string) => getJson(walkUrl(family, circuit, switches), walkBody);
// By magnitude (a positive-earth bike's live points read negative) and for 6 V as well as 12 V families; a pin with no
// steady reading (it switches with the points or the ignition unit) is neither.
const BATTERY = (p: Point) =>
  p.expect.quantity === "voltage" && p.expect.min !== null && p.expect.max !== null && Math.min(Math.abs(p.expect.min), Math.abs(p.expect.max)) >= 4.5;
const NEAR_ZERO = (p: Point) =>
  p.expect.quantity === "voltage" && p.expect.min !== null && p.expect.max !== null && Math.max(Math.abs(p.expect.min), Math.abs(p.expect.max)) <= 0.8;

/** Steps at or after `step` along the current's path (following each point's `after` back to it). */
function downstreamOf(w: Walk, step: number): Set<number> {
  const byStep = new Map(w.probePoints.map((p) => [p.step, p]));
  const out = new Set<number>();
  for (const p of w.probePoints) {
    const seen = new Set<number>();
    for (let q: Point | undefined = p; q && !seen.has(q.step); q = q.after ? byStep.get(q.after) : undefined) {
      seen.add(q.step);
      if (q.step === step) {
        out.add(p.step);
        break;
      }
    }
  }
  return out;
}
/** Steps from the first point up to `step` along its path. */
function upstreamOf(w: Walk, step: number): Set<number> {
  const byStep = new Map(w.probePoints.map((p) => [p.step, p]));
  const out = new Set<number>();
  for (let q = byStep.get(step); q && !out.has(q.step); q = q.after ? byStep.get(q.after) : undefined) out.add(q.step);
  return out;
}
const pointAt = (w: Walk, connector: string, cavity: string) => {
  const p = w.probePoints.find((x) => x.connector === connector && x.cavity === cavity);
  if (!p) throw new Error(`no probe point at ${connector} cavity ${cavity}: ${w.probePoints.map((x) => `${x.step} ${x.connector}:${x.cavity}`).join(", ")}`);
  return p;
};

describe("GET /api/v1/families/:slug/circuits/:circuit/walk", () => {
  it("every circuit of every family: steps 1..n, real connector cavities with the card's colour, expectations, instructions", async () => {
    let walks = 0;
    let connectorPoints = 0;
    const problems: string[] = [];
    for (const f of familySlugs) {
      const { circuits } = await getJson(`/api/v1/families/${f}/circuits`, circuitsBody);
      for (const c of circuits) {
        const r = await call(walkUrl(f, c.slug));
        if (r.status !== 200) {
          problems.push(`${f}/${c.slug}: walk → ${r.status} ${r.body.slice(0, 160)}`);
          continue;
        }
        const w = shape(walkBody, JSON.parse(r.body), `${f}/${c.slug} walk`);
        walks++;
        expect(
          w.probePoints.map((p) => p.step),
          `${f}/${c.slug} steps`,
        ).toEqual(w.probePoints.map((_, i) => i + 1));
        for (const p of w.probePoints) {
          const where = `${f}/${c.slug} step ${p.step}`;
          expect(p.how.trim(), where).not.toBe("");
          if (p.expect.min !== null && p.expect.max !== null) expect(p.expect.min, where).toBeLessThanOrEqual(p.expect.max);
          if (p.expect.quantity === "voltage") expect(p.expect.unit, where).toBe("V");
          else expect(p.expect.unit, where).toMatch(/Ω$/);
          if (p.connector === null) continue;
          connectorPoints++;
          const k =
            cards.get(p.connector) ??
            (await call(`/api/v1/connectors/${p.connector}`).then((x) => (x.status === 200 ? shape(cardBody, JSON.parse(x.body)).connector : null)));
          if (!k) {
            problems.push(`${where}: connector ${p.connector} → not a card`);
            continue;
          }
          cards.set(k.slug, k);
          expect(k.family.slug, where).toBe(f);
          if (!k.layout.cavities.some((x) => x.cavity === p.cavity)) problems.push(`${where}: ${p.connector} has no cavity ${p.cavity}`);
          const pin = k.pins.find((x) => x.cavity === p.cavity);
          if ((pin?.colour.code ?? null) !== p.colour) problems.push(`${where}: ${p.connector}:${p.cavity} colour ${p.colour} ≠ card's ${pin?.colour.code}`);
        }
      }
    }
    expect(problems, problems.join("\n")).toEqual([]);
    expect(walks).toBeGreaterThanOrEqual(familySlugs.length);
    expect(connectorPoints, "the walks pass through connectors").toBeGreaterThan(20);
  });

  it("a powered circuit starts at battery voltage and ends at 0 V (the battery − post)", async () => {
    for (const f of familySlugs) {
      const w = await walk(f, "ignition");
      const first = w.probePoints[0];
      expect(BATTERY(first), `${f}: step 1 ${JSON.stringify(first.expect)}`).toBe(true);
      expect(w.probePoints.some(NEAR_ZERO), f).toBe(true);
    }
  });

  it("?switches=kill:stop on rx750-four ignition: points past the kill switch drop from battery voltage to near 0 V", async () => {
    const riding = await walk("rx750-four", "ignition");
    const killed = await walk("rx750-four", "ignition", "kill:stop");
    // The layout of the walk is the same; only the expectations change.
    expect(killed.probePoints.map((p) => [p.step, p.connector, p.cavity])).toEqual(riding.probePoints.map((p) => [p.step, p.connector, p.cavity]));
    const dropped = riding.probePoints.filter((p, i) => BATTERY(p) && NEAR_ZERO(killed.probePoints[i]));
    expect(dropped.length, "some battery-voltage points now read near 0 V").toBeGreaterThan(0);
    // The kill switch's output is the right handlebar switch loom socket, cavity 2 (api.test.ts: same net as the unit's feed).
    const out = pointAt(riding, "rx750-four-right-switch-socket", "2");
    expect(
      riding.probePoints.every((p) => p.after !== undefined),
      "the walk says which point precedes each",
    ).toBe(true);
    const past = downstreamOf(killed, out.step);
    expect(past.size).toBeGreaterThan(1);
    const stillHigh = killed.probePoints.filter((p) => past.has(p.step) && BATTERY(p));
    expect(
      stillHigh.map((p) => `${p.step} ${p.connector ?? ""}:${p.cavity}`),
      "no point downstream of the kill switch expects battery voltage",
    ).toEqual([]);
    expect(dropped.map((p) => p.step)).toContain(out.step);
    // Upstream of the switch nothing changes: battery voltage up to the switch's input (cavity 1).
    const input = pointAt(riding, "rx750-four-right-switch-socket", "1");
    for (const s of upstreamOf(riding, input.step)) expect(BATTERY(killed.probePoints[s - 1]), `step ${s}`).toBe(true);
    // kill:run spelled out is the riding position.
    expect((await walk("rx750-four", "ignition", "kill:run")).probePoints.map((p) => p.expect)).toEqual(riding.probePoints.map((p) => p.expect));
  });

  it("?switches=main:off → fewer battery-voltage points than main:on", async () => {
    for (const f of familySlugs) {
      const on = (await walk(f, "ignition", "main:on")).probePoints.filter(BATTERY).length;
      const off = (await walk(f, "ignition", "main:off")).probePoints.filter(BATTERY).length;
      expect(off, `${f}: main:off ${off} vs main:on ${on}`).toBeLessThan(on);
      expect(off, `${f}: the battery itself still reads`).toBeGreaterThan(0);
    }
    // Several switches at once.
    expect((await walk("rx750-four", "ignition", "main:on,kill:stop,lights:on")).probePoints.length).toBeGreaterThan(0);
  });

  it.each([
    ["unknown switch id", "choke:on"],
    ["bad position", "main:sideways"],
    ["no position", "main"],
    ["empty position", "main:"],
    ["upper case", "MAIN:ON"],
    ["extra colon", "main:on:off"],
    ["one good, one bad", "main:on,kill:maybe"],
    ["prototype key", "__proto__:on"],
  ])("%s (%s) → 400 naming switches", async (_, sw) => {
    const err = await expectError(walkUrl("rx750-four", "ignition", sw), 400);
    expect(err.code).toBe("bad_request");
    expect(err.field).toBe("switches");
  });

  // Switch ids are looked up as own keys only: an Object.prototype name is just an unknown switch.
  it("an Object.prototype name as a switch id (constructor:on) → 400 naming switches", async () => {
    const err = await expectError(walkUrl("rx750-four", "ignition", "constructor:on"), 400);
    expect(err.field).toBe("switches");
  });

  it("unknown circuit → 404; unknown family → 404", async () => {
    expect((await expectError(walkUrl("rx750-four", "no-such-circuit"), 404)).code).toBe("not_found");
    expect((await expectError(walkUrl("no-such-family", "ignition"), 404)).code).toBe("not_found");
    // sovereign-650 has no pickups: another family's circuit slug is unknown here.
    expect((await expectError(walkUrl("sovereign-650", "pickup-1"), 404)).code).toBe("not_found");
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("POST /api/v1/families/:slug/circuits/:circuit/diagnose", () => {
  const url = (family = "rx750-four", circuit = "ignition") => `/api/v1/families/${family}/circuits/${circuit}/diagnose`;
  const diagnose = (body: unknown, family?: string, circuit?: string) => postJson(url(family, circuit), body, diagnoseBody);

  it("an open kill switch: 12.6 V up to the right handlebar switch socket cavity 1, 0 V from cavity 2 on → fault between them, kill switch likely", async () => {
    const w = await walk("rx750-four", "ignition");
    const input = pointAt(w, "rx750-four-right-switch-socket", "1");
    const output = pointAt(w, "rx750-four-right-switch-socket", "2");
    const up = upstreamOf(w, input.step);
    const down = downstreamOf(w, output.step);
    // Supply points only (what a rider probes with the red lead on the feed side); 12.6 V: a charged battery at rest (RF §5).
    const readings = w.probePoints
      .filter((p) => p.side !== "return")
      .flatMap((p) => (up.has(p.step) ? [{ step: p.step, value: 12.6 }] : down.has(p.step) ? [{ step: p.step, value: 0 }] : []));
    expect(readings.filter((r) => r.value === 0).length).toBeGreaterThan(0);
    const d = await diagnose({ switches: {}, readings });
    expect(d.fault, JSON.stringify(d)).not.toBeNull();
    expect(d.fault!.between).toEqual([input.step, output.step]);
    expect(d.fault!.likely.join(" | ")).toMatch(/kill switch/i);
    // The same readings with the switch set to stop are what a healthy loom shows: no fault.
    const stopped = await diagnose({ switches: { kill: "stop" }, readings });
    expect(stopped.fault).toBeNull();
  });

  it("every powered circuit of every family: an open between two consecutive feed points is found between them", async () => {
    // Kirchhoff, no current drawn by the meter: upstream of the open every feed point shows the battery, downstream 0 V.
    const wrong: string[] = [];
    let cases = 0;
    for (const f of familySlugs) {
      const { circuits } = await getJson(`/api/v1/families/${f}/circuits`, circuitsBody);
      for (const c of circuits) {
        const w = await walk(f, c.slug);
        for (const p of w.probePoints) {
          if (p.side !== "supply" || !p.after || !BATTERY(p) || !BATTERY(w.probePoints[p.after - 1])) continue;
          const up = upstreamOf(w, p.after);
          const down = downstreamOf(w, p.step);
          const readings = w.probePoints
            .filter((q) => q.side === "supply" && BATTERY(q) && (up.has(q.step) || down.has(q.step)))
            .map((q) => ({ step: q.step, value: up.has(q.step) ? (w.probePoints[0].expect.nominal ?? 12.6) : 0 }));
          const d = await diagnose({ readings }, f, c.slug);
          cases++;
          const want = [Math.min(p.after, p.step), Math.max(p.after, p.step)];
          if (JSON.stringify(d.fault?.between) !== JSON.stringify(want)) wrong.push(`${f}/${c.slug}: open ${p.after}→${p.step} → ${JSON.stringify(d.fault)}`);
        }
      }
    }
    expect(cases).toBeGreaterThan(20);
    expect(wrong, wrong.join("\n")).toEqual([]);
  });

  it("every powered circuit: an open in the earth return is found between the last floating point and the first at 0 V", async () => {
    // With the return open, the points between the load and the open float at battery voltage through the load (no current).
    const wrong: string[] = [];
    let cases = 0;
    for (const f of familySlugs) {
      const { circuits } = await getJson(`/api/v1/families/${f}/circuits`, circuitsBody);
      for (const c of circuits) {
        const w = await walk(f, c.slug);
        // The return can float up only when the load's supply side is live: a circuit switched off in the riding positions cannot show it.
        if (w.loaded === false) continue;
        for (const p of w.probePoints) {
          const a = p.after ? w.probePoints[p.after - 1] : undefined;
          if (p.side !== "return" || !a || a.side !== "return" || !NEAR_ZERO(p) || !NEAR_ZERO(a)) continue;
          const up = upstreamOf(w, a.step);
          const down = downstreamOf(w, p.step);
          const readings = w.probePoints
            .filter((q) => up.has(q.step) || down.has(q.step))
            .map((q) => ({ step: q.step, value: up.has(q.step) ? (w.probePoints[0].expect.nominal ?? 12.6) : 0 }));
          const d = await diagnose({ readings }, f, c.slug);
          cases++;
          const want = [Math.min(a.step, p.step), Math.max(a.step, p.step)];
          if (JSON.stringify(d.fault?.between) !== JSON.stringify(want)) wrong.push(`${f}/${c.slug}: open ${a.step}→${p.step} → ${JSON.stringify(d.fault)}`);
        }
      }
    }
    expect(cases).toBeGreaterThan(5);
    expect(wrong, wrong.join("\n")).toEqual([]);
  });

  it("no readings → no fault, and the next point to measure is in the middle of the walk", async () => {
    const w = await walk("rx750-four", "ignition");
    const n = w.probePoints.length;
    const d = await diagnose({ readings: [] });
    expect(d.fault).toBeNull();
    expect(d.next).not.toBeNull();
    expect(Math.abs(d.next! - (n + 1) / 2), `next ${d.next} of ${n}`).toBeLessThanOrEqual(1);
    // switches may be omitted altogether (API.md: riding positions).
    expect((await diagnose({ readings: [] })).next).toBe((await diagnose({ switches: {}, readings: [] })).next);
  });

  it('value "OL" (an ohmmeter\'s over-limit) is accepted', async () => {
    const w = await walk("rx750-four", "pickup-1");
    const last = w.probePoints[w.probePoints.length - 1].step;
    const r = await call(
      url("rx750-four", "pickup-1"),
      jsonInit({
        readings: [
          { step: 1, value: 0 },
          { step: last, value: "OL" },
        ],
      }),
    );
    expect(r.status, r.body.slice(0, 200)).toBe(200);
    const d = shape(diagnoseBody, JSON.parse(r.body));
    // An open loop past the first point: the fault lies somewhere between 1 and the OL point, or the next probe narrows it.
    expect(d.fault !== null || d.next !== null).toBe(true);
    expect((await call(url(), jsonInit({ readings: [{ step: 9, value: "OL" }] }))).status).toBe(200);
  });

  it.each([
    ["an unknown step", { readings: [{ step: 999, value: 12.6 }] }, "readings"],
    ["step 0", { readings: [{ step: 0, value: 12.6 }] }, "readings.0.step"],
    ["a fractional step", { readings: [{ step: 1.5, value: 12.6 }] }, "readings.0.step"],
    ["a value as text other than OL", { readings: [{ step: 1, value: "twelve" }] }, "readings.0.value"],
    ["no readings key", { switches: {} }, "readings"],
    ["an unknown switch", { switches: { choke: "on" }, readings: [] }, "switches"],
    ["a bad switch position", { switches: { main: "sideways" }, readings: [] }, "switches"],
  ])("%s → 400 naming the field", async (_, body, field) => {
    const err = await expectError(url(), 400, jsonInit(body));
    expect(err.code).toBe("bad_request");
    expect(err.field).toBe(field);
  });

  // As for the walk: an Object.prototype name in the body's switches is an unknown switch (400), never a 500.
  it("a switch named after an Object.prototype property → 400 naming switches", async () => {
    for (const id of ["constructor", "toString", "hasOwnProperty"]) {
      const err = await expectError(url(), 400, jsonInit({ switches: { [id]: "on" }, readings: [] }));
      expect(err.field, id).toBe("switches");
    }
  });

  it("a switch named __proto__ in raw JSON is never a 500 (dropped by the parser, or refused)", async () => {
    const r = await call(url(), jsonInit('{"switches": {"__proto__": "on"}, "readings": []}'));
    expect([200, 400], r.body.slice(0, 200)).toContain(r.status);
    expect(r.type).toMatch(/^application\/json\b/);
  });

  it("unknown circuit or family → 404", async () => {
    expect((await expectError(url("rx750-four", "no-such-circuit"), 404, jsonInit({ readings: [] }))).code).toBe("not_found");
    expect((await expectError(url("no-such-family", "ignition"), 404, jsonInit({ readings: [] }))).code).toBe("not_found");
  });

  it("non-JSON → 415", async () => {
    expect((await expectError(url(), 415, jsonInit("readings=1", "application/x-www-form-urlencoded"))).code).toBe("unsupported_media_type");
    expect((await expectError(url(), 415, jsonInit('{"readings": []}', "text/plain"))).code).toBe("unsupported_media_type");
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("computations write nothing", () => {
  it("the state digest is unchanged after every request of this file (QUALITY.md)", async () => {
    expect(await stateDigest(server.dbPath)).toBe(digestBefore);
  });
});
