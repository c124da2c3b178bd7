/**
 * The workshop answers a professional would sign, over HTTP against the production build with a freshly seeded database:
 * the walk and the diagnosis in the engine's states, 6 V and positive earth, the planner's cut list as JSON. Check values
 * and their sources are in /work/shared/REFERENCE-FACTS.md §5 and 5.1 ("RF" below).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { startServer, type TestServer } from "../support/server";
import { client, errorBody, shape, stateDigest } from "./helpers";

const text = z.string().min(1);
const num = z.number().finite();
const int = z.number().int();

const familyBody = z.object({
  family: z.object({ slug: text, systemVoltage: z.union([z.literal(6), z.literal(12)]), earth: z.enum(["negative", "positive"]) }),
});
const walkBody = z.object({
  state: z.object({ engine: z.enum(["stopped", "cranking", "running"]), points: z.enum(["open", "closed"]).nullable() }),
  reference: z.object({ post: z.enum(["+", "-"]), earth: z.enum(["negative", "positive"]), words: text }).nullable(),
  battery: z.object({ min: num, max: num, nominal: num }).nullable(),
  notes: z.array(text),
  probePoints: z
    .array(
      z.object({
        step: int,
        connector: z.string().nullable(),
        cavity: text,
        colour: z.string().nullable(),
        label: text,
        how: text,
        side: z.enum(["supply", "return"]),
        expect: z.object({
          quantity: text,
          min: num.nullable(),
          max: num.nullable(),
          unit: text,
          nominal: num.nullable().optional(),
          steady: z.boolean().optional(),
        }),
      }),
    )
    .min(2),
});
type Walk = z.infer<typeof walkBody>;
const diagnoseBody = z.object({
  fault: z.object({ between: z.tuple([int, int]), kind: z.enum(["open", "high_resistance", "short"]), likely: z.array(text).min(1), reason: text }).nullable(),
  next: int.nullable(),
  battery: z.object({ verdict: z.enum(["ok", "low", "high"]), message: text }).nullable(),
});
const planBody = z.object({
  wires: z
    .array(
      z.object({
        id: text,
        from: text,
        to: text,
        colour: z.string(),
        currentA: num,
        sizeMm2: num,
        awg: int.nullable(),
        dropV: num,
        decidedBy: text,
        notes: z.array(z.string()),
        role: z.enum(["power", "earth", "signal"]),
        net: text,
        colours: z.array(text),
      }),
    )
    .min(1),
  fuses: z.array(z.object({ name: text, ratingA: num, factoryA: num, raised: z.boolean(), basis: text })),
  parts: z.array(z.object({ kind: text, item: text, quantity: num, unit: text })),
  legend: z.array(z.object({ colour: z.string(), nets: z.array(text) })),
  circuitDrops: z.array(z.object({ circuit: text, dropV: num, budgetV: num })),
});

let server: TestServer;
let digestBefore: string;
const { call, getJson } = client(() => server.url);
const jsonInit = (body: unknown): RequestInit => ({ method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });

beforeAll(async () => {
  server = await startServer();
  digestBefore = await stateDigest(server.dbPath);
}, 120_000);
afterAll(async () => {
  await server?.stop();
});

const walk = (family: string, circuit: string, q = "") => getJson(`/api/v1/families/${family}/circuits/${circuit}/walk${q}`, walkBody);
async function diagnose(family: string, circuit: string, body: object) {
  const r = await call(`/api/v1/families/${family}/circuits/${circuit}/diagnose`, jsonInit(body));
  expect(r.status, r.body.slice(0, 300)).toBe(200);
  return shape(diagnoseBody, JSON.parse(r.body));
}
const readingsOf = (w: Walk) =>
  w.probePoints.filter((p) => p.expect.steady !== false && p.expect.nominal !== undefined).map((p) => ({ step: p.step, value: p.expect.nominal! }));

describe("families carry their system voltage and earth polarity", () => {
  it("the positive-earth British twin, the 6 V single, and a 12 V negative-earth four", async () => {
    expect((await getJson("/api/v1/families/sovereign-650", familyBody)).family).toMatchObject({ systemVoltage: 12, earth: "positive" });
    expect((await getJson("/api/v1/families/komadori-125", familyBody)).family).toMatchObject({ systemVoltage: 6, earth: "negative" });
    expect((await getJson("/api/v1/families/rx750-four", familyBody)).family).toMatchObject({ systemVoltage: 12, earth: "negative" });
  });
});

describe("the walk in the engine's states", () => {
  it("engine defaults to stopped; the walk says which state and points position it assumes", async () => {
    const w = await walk("marquis-500", "ignition");
    expect(w.state).toEqual({ engine: "stopped", points: "closed" });
    expect(w.notes.join(" ")).toMatch(/Points assumed closed/);
    const open = await walk("marquis-500", "ignition", "?points=open");
    expect(open.notes.join(" ")).toMatch(/Points assumed open/);
  });

  it("points open: coil negative at battery voltage; closed: near 0 V (RF 5.1, common practice)", async () => {
    const isNeg = (p: Walk["probePoints"][number]) => /Ignition coil, left cylinder, loom plug, cavity 2/.test(p.label);
    const open = (await walk("marquis-500", "ignition", "?points=open")).probePoints.find(isNeg)!;
    const closed = (await walk("marquis-500", "ignition", "?points=closed")).probePoints.find(isNeg)!;
    expect(open.expect.min!).toBeGreaterThan(11.5);
    // Near 0 V: the healthy drop across the points and their lead, plus ≈ 0.2 V per contact allowed under load (common practice).
    expect(closed.expect.nominal!).toBeLessThan(0.3);
    expect(closed.expect.max!).toBeLessThan(0.8);
  });

  it("a transistor unit that switches its coils off at rest: coil negative at battery voltage with the engine stopped (RF 5.1, from memory), no test point running", async () => {
    const stopped = await walk("rx750-four", "ignition");
    const neg = stopped.probePoints.filter((p) => /Ignition coil \d .*cavity 2/.test(p.label));
    expect(neg.length).toBe(2);
    for (const p of neg) expect(p.expect.min!).toBeGreaterThan(12);
    const running = await walk("rx750-four", "ignition", "?engine=running");
    for (const p of running.probePoints.filter((x) => /Ignition coil \d .*cavity 2/.test(x.label))) expect(p.expect.steady).toBe(false);
  });

  it("charging at rpm: 14.2 V at the battery is healthy; cranking: 10.2 V is healthy (RF 5.1, common practice) — neither is a flat battery", async () => {
    const run = await diagnose("rx400-four", "charging", { engine: "running", readings: [{ step: 1, value: 14.2 }] });
    expect(run.fault).toBeNull();
    expect(run.battery?.verdict).toBe("ok");
    const crank = await diagnose("rx400-four", "starter-control", { engine: "cranking", readings: [{ step: 1, value: 10.2 }] });
    expect(crank.fault).toBeNull();
    expect(crank.battery?.verdict).toBe("ok");
  });

  it("healthy readings in every engine state give no fault, on every demo family's ignition", async () => {
    for (const fam of ["rx750-four", "rx400-four", "komadori-125", "b800-boxer", "b1000-boxer", "sovereign-650", "marquis-500"]) {
      for (const engine of ["stopped", "running"]) {
        const w = await walk(fam, "ignition", `?engine=${engine}`);
        const d = await diagnose(fam, "ignition", { engine, readings: readingsOf(w) });
        expect(d.fault === null || /Every point reads as it should/.test(d.fault.reason), `${fam} ${engine}: ${d.fault?.reason}`).toBe(true);
      }
    }
  });

  it("a 0.8 V loss across the key switch's contact under load is high_resistance between the two points either side of it", async () => {
    const w = await walk("rx750-four", "headlamp-dip", "?switches=lights:on,beam:low");
    const readings = readingsOf(w);
    const keyIn = w.probePoints.find((p) => /Main switch, loom socket, cavity 1/.test(p.label))!;
    const keyOut = w.probePoints.find((p) => /Main switch, loom socket, cavity 3/.test(p.label))!;
    // Everything past the key switch reads 0.8 V lower: every reading alone is still inside the battery window.
    const bad = readings.map((r) => (r.step >= keyOut.step && w.probePoints[r.step - 1].side === "supply" ? { ...r, value: r.value - 0.8 } : r));
    const d = await diagnose("rx750-four", "headlamp-dip", { switches: { lights: "on", beam: "low" }, readings: bad });
    expect(d.fault).toMatchObject({ kind: "high_resistance", between: [keyIn.step, keyOut.step] });
  });

  it("engine and points are checked: an unknown engine state → 400 naming engine; points on a family without them is ignored and said", async () => {
    const r = await call("/api/v1/families/rx750-four/circuits/ignition/walk?engine=idling");
    expect(r.status).toBe(400);
    expect(shape(errorBody, JSON.parse(r.body)).error.field).toBe("engine");
    const p = await call("/api/v1/families/sovereign-650/circuits/ignition/walk?points=ajar");
    expect(shape(errorBody, JSON.parse(p.body)).error.field).toBe("points");
    const ignored = await walk("rx750-four", "ignition", "?points=open");
    expect(ignored.notes.join(" ")).toMatch(/no contact breakers/);
  });
});

describe("6 V and positive earth", () => {
  it("positive earth: the reference is the + post, live points read negative, and the page says so", async () => {
    const w = await walk("sovereign-650", "headlamp-dip", "?switches=lights:on");
    expect(w.reference?.post).toBe("+");
    expect(w.probePoints[0].expect.max!).toBeLessThan(-12);
    const page = await call("/families/sovereign-650/circuits/headlamp-dip");
    expect(page.body).toMatch(/positive earth/);
    // Readings typed without their minus sign are read as magnitudes, not as faults.
    const d = await diagnose("sovereign-650", "headlamp-dip", {
      switches: { lights: "on" },
      readings: readingsOf(w).map((r) => ({ ...r, value: Math.abs(r.value) })),
    });
    expect(d.fault === null || /Every point reads/.test(d.fault.reason)).toBe(true);
  });

  it("6 V: the walk's battery window is the 6 V one (three cells: half the 12 V figures, computed)", async () => {
    const w = await walk("komadori-125", "headlamp-dip", "?switches=lights:on");
    expect(w.battery).toMatchObject({ min: 6.1, max: 6.6 });
    const run = await walk("komadori-125", "charging", "?engine=running");
    expect(run.battery!.min).toBeLessThan(7.1);
    expect(run.battery!.max).toBeLessThan(7.5);
  });
});

describe("GET /api/v1/families/:slug/plan", () => {
  it("stator leads carry the alternator's output, not 0 A: never sized as signal wires (RF 5.1, common practice)", async () => {
    const p = await getJson("/api/v1/families/rx750-four/plan", planBody);
    const stator = p.wires.filter((w) => /Alternator stator/.test(`${w.from} ${w.to}`));
    expect(stator.length).toBe(3);
    for (const w of stator) {
      expect(w.role).toBe("power");
      expect(w.currentA).toBeGreaterThanOrEqual(12);
      expect(w.sizeMm2).toBeGreaterThanOrEqual(2);
    }
    for (const w of p.wires.filter((x) => x.role === "signal")) expect(`${w.from} ${w.to}`).toMatch(/Pickup|pickup/);
  });

  it("simple scheme: only earth nets are black, one code per net, and the legend agrees with the cut list", async () => {
    const p = await getJson("/api/v1/families/b1000-boxer/plan?scheme=simple", planBody);
    const nets = new Map<string, Set<string>>();
    for (const w of p.wires) {
      expect(w.colours.length === 1 && w.colours[0] === "black", `${w.from} → ${w.to}: ${w.colour}`).toBe(w.role === "earth");
      nets.set(w.colour, (nets.get(w.colour) ?? new Set()).add(w.net));
    }
    for (const [code, set] of nets) if (!p.wires.some((w) => w.colour === code && w.role === "earth")) expect(set.size, code).toBe(1);
    for (const w of p.wires) expect(p.legend.find((l) => l.colour === w.colour)?.nets).toContain(w.net);
  });

  it("keep, scheme and year are checked: unknown circuit, bad scheme, a year outside the family's range → 400 naming the field; unknown family → 404", async () => {
    const bad = async (q: string, field: string) => {
      const r = await call(`/api/v1/families/rx750-four/plan${q}`);
      expect(r.status, q).toBe(400);
      expect(shape(errorBody, JSON.parse(r.body)).error.field).toBe(field);
    };
    await bad("?keep=no-such", "keep");
    await bad("?scheme=rainbow", "scheme");
    await bad("?year=1950", "year");
    await bad("?year=19x9", "year");
    expect((await call("/api/v1/families/no-such/plan")).status).toBe(404);
    const kept = await getJson("/api/v1/families/rx750-four/plan?keep=ignition,pickup-1,pickup-2&year=1979", planBody);
    expect(kept.circuitDrops.map((d) => d.circuit).sort()).toEqual(["ignition", "pickup-1", "pickup-2"]);
    for (const d of kept.circuitDrops) expect(d.dropV).toBeLessThanOrEqual(d.budgetV);
  });

  it("fuses are never raised above the factory rating without saying why", async () => {
    for (const fam of ["rx750-four", "b800-boxer", "sovereign-650", "komadori-125"]) {
      const p = await getJson(`/api/v1/families/${fam}/plan`, planBody);
      for (const f of p.fuses) if (f.ratingA > f.factoryA) expect(f.raised && /Raised above the factory's/.test(f.basis)).toBe(true);
      expect(p.parts.some((x) => x.kind === "wire")).toBe(true);
    }
  });
});

describe("one caution set in the walk, the diagnosis and the plan", () => {
  // app/domain/cautions.ts (sources there: CCOHS and HSE via REFERENCE-FACTS §6; primary spikes §5.1, from memory).
  const cautionsBody = z.object({ cautions: z.array(z.object({ kind: text, title: text, text })).min(1) });
  const kinds = (b: { cautions: { kind: string }[] }) => b.cautions.map((c) => c.kind);

  it("stopped: connect the meter with the ignition off; cranking adds the primary spikes, moving parts and sparks near fuel; running the charging caution", async () => {
    const stopped = await getJson("/api/v1/families/marquis-500/circuits/ignition/walk", cautionsBody);
    expect(kinds(stopped)).toEqual(["meter", "battery", "ignition"]);
    expect(stopped.cautions[0].text).toMatch(/ignition off, then switch on/);
    const cranking = await getJson("/api/v1/families/marquis-500/circuits/ignition/walk?engine=cranking", cautionsBody);
    expect(kinds(cranking)).toEqual(expect.arrayContaining(["primary", "cranking", "spark"]));
    expect(cranking.cautions.find((c) => c.kind === "primary")!.text).toMatch(/Never probe the coil negative or the points while the engine is cranking/);
    expect(cranking.cautions.find((c) => c.kind === "spark")!.text).toMatch(/fuel/);
    const running = await getJson("/api/v1/families/rx400-four/circuits/charging/walk?engine=running", cautionsBody);
    expect(running.cautions.find((c) => c.kind === "charging")!.text).toMatch(/Never disconnect the battery while the engine runs/);
    const r = await call("/api/v1/families/rx400-four/circuits/charging/diagnose", jsonInit({ engine: "running", readings: [{ step: 1, value: 14.2 }] }));
    expect(kinds(shape(cautionsBody, JSON.parse(r.body)))).toContain("charging");
  });

  it("the plan: main fuse near the battery, the unfused starter cable protected", async () => {
    const plan = await getJson("/api/v1/families/rx750-four/plan", cautionsBody);
    const planner = plan.cautions.find((c) => c.kind === "planner")!;
    expect(planner.text).toMatch(/main fuse as close to the battery/);
    expect(planner.text).toMatch(/starter cable is usually unfused/);
  });
});

describe("computations write nothing", () => {
  it("the state digest is unchanged (QUALITY.md)", async () => {
    expect(await stateDigest(server.dbPath)).toBe(digestBefore);
  });
});
