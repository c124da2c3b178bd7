import { describe, expect, it } from "vitest";
import { decodeColour } from "~/domain/colours";
import {
  MIN_PRACTICAL_MM2,
  cutListCsv,
  nominalLoadA,
  planLoom,
  type CutRow,
  type PlanResult,
  type PlannerCircuit,
  type PlannerInput,
  type PlannerWire,
} from "~/domain/loom-planner";
import { FUSE_RATINGS_A, defaultDropPct, wireSize } from "~/domain/wire-size";

// Sources are named beside each check: REFERENCE-FACTS.md sections (/work/shared), the standards they
// cite, or "common practice" / "rule of thumb" where the trade has no single source.

const RHO_20C = 0.017241; // IEC 60028 (REFERENCE-FACTS §3.3), Ω·mm²/m: only to cross-check a drop

// A made-up twin with electronic ignition, two coils, a starter and the usual lights.
function wire(id: string, from: string, to: string, code: string, feed: PlannerWire["feed"], defaultLengthM: number | null, factorySizeMm2: number | null = null): PlannerWire {
  const decoded = decodeColour(code, "jis");
  if (!decoded.ok) throw new Error(`fixture colour ${code}`);
  return { id, from, to, code, colours: decoded.value.colours, defaultLengthM, factorySizeMm2, earth: feed === "earth", feed };
}

const WIRES: PlannerWire[] = [
  wire("bat", "battery:+", "main-switch:1", "R", "battery", 0.8, 2),
  wire("sw", "main-switch:2", "fuse-box:1", "Br", "switched", 0.4, 1.25),
  wire("ign1", "fuse-box:2", "right-switch:1", "B/W", "switched", 0.9, 1.25),
  wire("ign2", "right-switch:2", "coil-1:+", "O/W", "switched", 1.1),
  wire("ign3", "coil-1:+", "coil-2:+", "O/W", "switched", 0.3),
  wire("neg1", "coil-1:-", "igniter:1", "Y", "load", 0.3),
  wire("neg2", "coil-2:-", "igniter:2", "B/Y", "load", 0.3),
  wire("pu-a", "pickup:1", "igniter:3", "L/Y", "signal", 0.5),
  wire("pu-b", "pickup:2", "igniter:4", "G/W", "signal", 0.5),
  wire("e-ign", "igniter:5", "frame", "B/W", "earth", 0.4),
  wire("st1", "stator:1", "regulator:1", "Y", "load", 0.6),
  wire("st2", "stator:2", "regulator:2", "Y", "load", 0.6),
  wire("st3", "stator:3", "regulator:3", "Y", "load", 0.6),
  wire("chg", "regulator:4", "battery:+", "R/W", "battery", 0.6),
  wire("e-reg", "regulator:5", "frame", "G", "earth", 0.3),
  wire("crank-b", "battery:+", "solenoid:B", "R", "battery", 0.3),
  wire("crank-m", "solenoid:M", "starter:+", "B", "load", 0.4),
  wire("crank-e", "battery:-", "engine", "B", "earth", 0.5),
  wire("start", "fuse-box:3", "start-button:1", "Y/R", "switched", 1.0),
  wire("sol", "start-button:2", "solenoid:C", "Y/R", "switched", 0.9),
  wire("e-sol", "solenoid:E", "frame", "G", "earth", 0.2),
  wire("lt", "fuse-box:4", "light-switch:1", "L/W", "switched", 0.9),
  wire("head", "light-switch:2", "headlamp:1", "L", "switched", 0.5),
  wire("e-head", "headlamp:3", "frame", "G", "earth", 0.3),
  wire("tail", "light-switch:3", "tail-lamp:1", "Br/W", "switched", 1.8),
  wire("brk1", "fuse-box:5", "brake-switch:1", "G/Y", "switched", null),
  wire("brk2", "brake-switch:2", "tail-lamp:2", "G/Y", "switched", 1.2),
  wire("e-tail", "tail-lamp:3", "frame", "G", "earth", 0.3),
  wire("fl", "fuse-box:6", "flasher:1", "Br/W", "switched", 0.6),
  wire("ind", "flasher:2", "left-switch:1", "Gr", "load", 1.0),
  wire("e-ind", "left-switch:3", "frame", "G", "earth", 0.5),
  wire("inst", "fuse-box:7", "instruments:1", "Br/W", "switched", 0.9),
  wire("neu", "instruments:2", "neutral-switch:1", "Lg", "load", 1.2),
];

const FEED = ["bat", "sw"];
const CIRCUITS: PlannerCircuit[] = [
  { slug: "coil-1", name: "Ignition, coil 1", system: "ignition", loadA: 4, loadBasis: "coil primary 3 Ω at 12 V ≈ 4 A", wires: [...FEED, "ign1", "ign2", "neg1", "e-ign"], fuse: { name: "ignition", ratingA: 10 } },
  { slug: "coil-2", name: "Ignition, coil 2", system: "ignition", loadA: 4, loadBasis: "coil primary 3 Ω at 12 V ≈ 4 A", wires: [...FEED, "ign1", "ign2", "ign3", "neg2", "e-ign"], fuse: { name: "ignition", ratingA: 10 } },
  { slug: "pickup", name: "Pickup", system: "ignition", loadA: 0, loadBasis: "signal, a few mA", wires: ["pu-a", "pu-b"], fuse: null },
  { slug: "charging", name: "Charging", system: "charging", loadA: 15, loadBasis: "180 W alternator at 12 V ≈ 15 A", wires: ["st1", "st2", "st3", "chg", "e-reg"], fuse: null },
  { slug: "starter", name: "Starter motor", system: "starting", loadA: 150, loadBasis: "cranking ≈ 150 A", wires: ["crank-b", "crank-m", "crank-e"], fuse: null },
  { slug: "start-control", name: "Starter solenoid", system: "starting", loadA: 4, loadBasis: "solenoid coil ≈ 3 Ω", wires: [...FEED, "start", "sol", "e-sol"], fuse: { name: "ignition", ratingA: 10 } },
  { slug: "headlamp", name: "Headlamp", system: "lighting", loadA: 5, loadBasis: "60 W at 12 V ≈ 5 A", wires: [...FEED, "lt", "head", "e-head"], fuse: { name: "lights", ratingA: 15 } },
  { slug: "tail", name: "Tail lamp", system: "lighting", loadA: 5 / 12, loadBasis: "5 W at 12 V", wires: [...FEED, "lt", "tail", "e-tail"], fuse: { name: "lights", ratingA: 15 } },
  { slug: "brake", name: "Brake lamp", system: "lighting", loadA: 21 / 12, loadBasis: "21 W at 12 V", wires: [...FEED, "brk1", "brk2", "e-tail"], fuse: { name: "lights", ratingA: 15 } },
  { slug: "indicators", name: "Indicators", system: "signals", loadA: 3.5, loadBasis: "2 × 21 W", wires: [...FEED, "fl", "ind", "e-ind"], fuse: { name: "signals", ratingA: 10 } },
  { slug: "neutral", name: "Neutral lamp", system: "instruments", loadA: 0.25, loadBasis: "3 W", wires: [...FEED, "inst", "neu"], fuse: { name: "signals", ratingA: 10 } },
];

const MINIMAL = ["coil-1", "coil-2", "pickup", "charging", "starter", "start-control", "headlamp", "tail", "brake"];

function plan(over: Partial<PlannerInput> = {}): PlanResult {
  const r = planLoom({ circuits: CIRCUITS, wires: WIRES, keep: MINIMAL, scheme: "factory", notation: "jis", ...over });
  if (!r.ok) throw new Error(`${r.error.field}: ${r.error.message}`);
  return r.plan;
}

const row = (p: PlanResult, id: string): CutRow => {
  const r = p.rows.find((x) => x.wire === id);
  if (!r) throw new Error(`no row ${id}`);
  return r;
};

const keptLoad = (keep: string[], wireId: string) =>
  CIRCUITS.filter((c) => keep.includes(c.slug) && c.wires.includes(wireId)).reduce((s, c) => s + c.loadA, 0);

describe("currents (Kirchhoff's current law)", () => {
  it("a shared feed carries the sum of its kept circuits' currents", () => {
    const p = plan();
    // KCL: the battery lead and the switched feed carry every kept circuit routed through them.
    expect(row(p, "bat").currentA).toBeCloseTo(4 + 4 + 4 + 5 + 5 / 12 + 21 / 12, 12);
    expect(row(p, "sw").currentA).toBeCloseTo(keptLoad(MINIMAL, "sw"), 12);
    expect(row(p, "ign1").currentA).toBe(8); // both coils
    expect(row(p, "ign3").currentA).toBe(4); // coil 2 only
    expect(row(p, "neg1").currentA).toBe(4);
    expect(row(p, "bat").circuits).toEqual(["coil-1", "coil-2", "start-control", "headlamp", "tail", "brake"]);
  });

  it("dropping a circuit removes its own wires and reduces the shared currents", () => {
    const all = CIRCUITS.map((c) => c.slug);
    const full = plan({ keep: all });
    const less = plan({ keep: all.filter((s) => s !== "indicators") });
    expect(full.rows.map((r) => r.wire)).toEqual(expect.arrayContaining(["fl", "ind", "e-ind"]));
    for (const id of ["fl", "ind", "e-ind"]) expect(less.rows.some((r) => r.wire === id)).toBe(false);
    expect(row(full, "bat").currentA - row(less, "bat").currentA).toBeCloseTo(3.5, 12);
    expect(less.dropped).toEqual([{ slug: "indicators", name: "Indicators" }]);
    // Wires no kept circuit uses are not cut at all.
    const minimal = plan();
    for (const id of ["fl", "ind", "e-ind", "inst", "neu"]) expect(minimal.rows.some((r) => r.wire === id)).toBe(false);
    expect(minimal.dropped.map((d) => d.slug)).toEqual(["indicators", "neutral"]);
    expect(minimal.totals.wires).toBe(minimal.rows.length);
  });
});

describe("sizing follows wire-size.ts", () => {
  it("sizes each unfused wire exactly as wireSize does, one-way (roundTrip false)", () => {
    const p = plan();
    // Wires not protected by any fuse alone keep wireSize's answer (REFERENCE-FACTS §3.4 method, IEC 60028 ρ).
    for (const id of ["bat", "sw", "chg", "e-ign", "e-head", "head"]) {
      const r = row(p, id);
      if (r.notes.some((n) => n.startsWith("Upsized"))) continue;
      const ws = wireSize({ currentA: r.currentA, lengthM: r.lengthM, systemV: 12, maxDropPct: r.maxDropPct, roundTrip: false, tempC: 20 });
      expect(r.sizeMm2, id).toBe(Math.max(ws.metric.sizeMm2, MIN_PRACTICAL_MM2));
      if (ws.metric.sizeMm2 >= MIN_PRACTICAL_MM2) {
        expect(r.decidedBy, id).toBe(ws.metric.decidedBy);
        expect(r.awg, id).toBe(ws.awg.gauge);
        expect(r.dropV, id).toBeCloseTo(ws.metric.dropV, 12);
      }
    }
  });

  it("cross-checks a drop: ΔU = I·ρ·L/A", () => {
    const p = plan();
    // ΔU = I·ρ·L/A with ρ = 0.017241 Ω·mm²/m (IEC 60028, §3.3), L one way.
    for (const r of p.rows.filter((x) => x.currentA > 0)) {
      expect(r.dropV, r.wire).toBeCloseTo((r.currentA * RHO_20C * r.lengthM) / r.sizeMm2, 10);
      expect(r.dropPct, r.wire).toBeCloseTo((r.dropV / 12) * 100, 10);
      expect(r.dropPct, r.wire).toBeLessThanOrEqual(r.maxDropPct + 1e-9);
    }
  });

  it("marks the ampacity rule of thumb and the 0.5 mm² minimum", () => {
    const p = plan();
    // 8 A over 0.9 m at 3 %: the drop needs ~0.35 mm², 5 A/mm² (rule of thumb, §5) needs 1.6 mm² → 2 mm².
    const ign1 = row(plan({ keep: ["coil-1", "coil-2"] }), "ign1");
    expect(wireSize({ currentA: 8, lengthM: 0.9, maxDropPct: 3, roundTrip: false }).decidedBy).toBe("ampacity");
    expect(ign1.decidedBy).toBe("ampacity");
    expect(ign1.sizeMm2).toBe(2); // a Japanese harness size (REFERENCE-FACTS §1.3)
    expect(ign1.notes.join(" ")).toMatch(/rule of thumb/);
    // Pickups carry no load current: the minimum for mechanical strength (common practice).
    for (const id of ["pu-a", "pu-b"]) {
      expect(row(p, id).sizeMm2).toBe(0.5);
      expect(row(p, id).decidedBy).toBe("minimum");
      expect(row(p, id).dropV).toBe(0);
    }
    // The tail lamp's 0.42 A would fit 0.3 mm² by wireSize; the minimum decides (common practice).
    const tail = row(plan({ keep: ["tail"] }), "e-tail");
    expect(wireSize({ currentA: 5 / 12, lengthM: 0.3, maxDropPct: 10, roundTrip: false }).metric.sizeMm2).toBeLessThan(0.5);
    expect(tail.sizeMm2).toBe(0.5);
    expect(tail.decidedBy).toBe("minimum");
    expect(p.rows.every((r) => r.sizeMm2 >= 0.5)).toBe(true);
  });

  it("3 % for ignition and charging, 10 % elsewhere; a shared wire takes the strictest (ABYC critical/non-critical, REFERENCE-FACTS §3.4)", () => {
    const p = plan();
    expect(row(p, "ign1").maxDropPct).toBe(defaultDropPct("ignition"));
    expect(row(p, "ign1").maxDropPct).toBe(3);
    expect(row(p, "chg").maxDropPct).toBe(3);
    expect(row(p, "head").maxDropPct).toBe(10);
    expect(row(p, "sol").maxDropPct).toBe(10);
    expect(row(p, "sw").maxDropPct).toBe(3); // shared by the ignition and the lights
    expect(row(plan({ keep: ["headlamp", "tail"] }), "sw").maxDropPct).toBe(10);
    // "instruments" is no wire-size circuit kind: it counts as "other", 10 %.
    expect(row(plan({ keep: ["neutral"] }), "neu").maxDropPct).toBe(defaultDropPct("other"));
  });

  it("uses the conductor temperature and says when it is the default", () => {
    // The headlamp's earth return: on no fuse, so wireSize's answer stands unchanged.
    const cold = plan({ keep: ["headlamp"], lengthsM: { "e-head": 6 } });
    const hot = plan({ keep: ["headlamp"], lengthsM: { "e-head": 6 }, tempC: 80 });
    expect(cold.assumptions[0]).toMatch(/20 °C \(the default/);
    expect(hot.assumptions[0]).toMatch(/80 °C/);
    const c = row(cold, "e-head");
    const h = row(hot, "e-head");
    const ws = wireSize({ currentA: 5, lengthM: 6, maxDropPct: 10, roundTrip: false, tempC: 80 });
    expect(h.sizeMm2).toBe(ws.metric.sizeMm2);
    // IEC 60028 α = 0.00393/°C: at one size, R80/R20 = 1 + 0.00393 × 60 (§3.3).
    expect(c.sizeMm2).toBe(h.sizeMm2);
    expect(h.dropV / c.dropV).toBeCloseTo(1.2358, 10);
  });

  it("sizes the starter cable for cranking drop, notes it, and gives it no fuse", () => {
    const p = plan();
    const m = row(p, "crank-m");
    expect(m.currentA).toBe(150);
    // Short-term 10 A/mm² rule of thumb (REFERENCE-FACTS §5) → 15 mm² → 16 mm²; the drop alone needs less.
    const ws = wireSize({ currentA: 150, lengthM: 0.4, maxDropPct: 10, roundTrip: false });
    expect(ws.minAreaMm2).toBeLessThan(16);
    expect(m.sizeMm2).toBe(16);
    expect(m.notes.join(" ")).toMatch(/cranking/);
    expect(m.notes.join(" ")).toMatch(/unfused/);
    expect(m.dropPct).toBeLessThanOrEqual(10);
    expect(p.fuses.some((f) => f.circuits.includes("starter"))).toBe(false);
    expect(p.fuses.flatMap((f) => f.protects)).not.toContain("crank-m");
    // The solenoid's control wire is its own circuit and stays thin.
    expect(row(p, "sol").currentA).toBe(4);
  });
});

describe("lengths", () => {
  it("builder lengths override the family defaults; missing ones are assumed 1.0 m and noted", () => {
    const p = plan({ lengthsM: { head: 2.5, brk1: 0.7 } });
    expect(row(p, "head")).toMatchObject({ lengthM: 2.5, lengthSource: "builder" });
    expect(row(p, "brk1")).toMatchObject({ lengthM: 0.7, lengthSource: "builder" });
    expect(row(p, "tail")).toMatchObject({ lengthM: 1.8, lengthSource: "family default" });
    const q = plan();
    expect(row(q, "brk1")).toMatchObject({ lengthM: 1, lengthSource: "assumed" });
    expect(row(q, "brk1").notes.join(" ")).toMatch(/assumed/);
    expect(q.assumptions.join(" ")).toMatch(/1 wire has no entered or family length/);
    expect(q.totals.lengthM).toBeCloseTo(q.rows.reduce((s, r) => s + r.lengthM, 0), 9);
    const byGaugeSum = Object.values(q.totals.byGauge).reduce((s, m) => s + m, 0);
    expect(byGaugeSum).toBeCloseTo(q.totals.lengthM, 9);
  });
});

describe("simple colour scheme", () => {
  const connectorsOf = (r: CutRow) => [...new Set([r.from, r.to].map((e) => e.split(":")[0]))];

  it.each(["jis", "iec", "din", "bs", "en"] as const)("gives black earths and distinct colours per connector (%s)", (notation) => {
    const p = plan({ keep: CIRCUITS.map((c) => c.slug), scheme: "simple", notation });
    const earth = new Set(WIRES.filter((w) => w.earth).map((w) => w.id));
    for (const r of p.rows.filter((x) => earth.has(x.wire))) expect(r.colours, r.wire).toEqual(["black"]);
    const seen = new Map<string, Map<string, string>>();
    for (const r of p.rows.filter((x) => !earth.has(x.wire))) {
      expect(r.colour, r.wire).not.toBe("");
      for (const c of connectorsOf(r)) {
        const inConn = seen.get(c) ?? new Map<string, string>();
        for (const key of new Set([r.colour, r.colours.join("/")])) {
          expect(inConn.get(key), `${r.wire} vs ${inConn.get(key)} in ${c}`).toBeUndefined();
          inConn.set(key, r.wire);
        }
        seen.set(c, inConn);
      }
      // IEC 60757 keeps green-and-yellow for the protective earth (REFERENCE-FACTS §1.1).
      expect(r.colours.includes("green") && r.colours.includes("yellow"), r.wire).toBe(false);
    }
  });

  it("follows the documented scheme by feed and system", () => {
    const p = plan({ keep: CIRCUITS.map((c) => c.slug), scheme: "simple", notation: "jis" });
    const c = (id: string) => row(p, id).colours;
    expect(c("bat")).toEqual(["red"]); // unswitched battery feed
    expect(c("sw")).toEqual(["red", "white"]); // switched feed shared by several systems
    expect(c("ign1")[0]).toBe("white"); // ignition switched feed
    expect(c("neg1").slice(0, 2)).toEqual(["white", "black"]); // coil negatives
    expect(c("neg2").slice(0, 2)).toEqual(["white", "black"]);
    expect(c("neg1")).not.toEqual(c("neg2")); // per-coil tracer: both end at the igniter
    expect(c("pu-a")).toEqual(["violet"]);
    expect(c("pu-b")).toEqual(["grey"]);
    expect(c("chg")).toEqual(["red", "yellow"]);
    expect(c("start")).toEqual(["yellow", "red"]);
    expect(c("head")).toEqual(["blue"]);
    expect(c("tail")).toEqual(["brown"]);
    expect(c("brk1")).toEqual(["green"]);
    expect(c("brk2")[0]).toBe("green"); // a tracer added: both meet at the brake switch
    expect(row(p, "bat").colour).toBe("R");
    expect(row(p, "chg").colour).toBe("R/Y");
    expect(p.assumptions.join(" ")).toMatch(/simple scheme/);
  });

  it("writes factory colours in the chosen notation, falling back to English where it has no code", () => {
    const p = plan({ keep: CIRCUITS.map((c) => c.slug), notation: "din" });
    expect(row(p, "ign1").colour).toBe("sw/ws");
    expect(row(p, "ign1").colours).toEqual(["black", "white"]);
    // DIN 47002 has no light green (REFERENCE-FACTS §1.2): written in English.
    expect(row(p, "neu").colour).toBe("lt grn");
    expect(row(p, "neu").notes.join(" ")).toMatch(/English/);
    // IEC 60757 writes table order, not base first (§1.1): white with red is RDWH.
    expect(row(plan({ notation: "iec" }), "chg").colour).toBe("RDWH");
  });
});

describe("fuses", () => {
  it("one row per factory fuse among the kept circuits, ≥ 1.25 × current and within the thinnest wire's 10 A/mm² short-term", () => {
    const keep = CIRCUITS.map((c) => c.slug);
    const p = plan({ keep });
    expect(p.fuses.map((f) => f.circuits)).toEqual([["coil-1", "coil-2", "start-control"], ["headlamp", "tail", "brake"], ["indicators", "neutral"]]);
    for (const f of p.fuses) {
      const currentA = CIRCUITS.filter((c) => f.circuits.includes(c.slug)).reduce((s, c) => s + c.loadA, 0);
      // Common practice: fuse ≥ 1.25 × continuous current, the smallest standard rating that is.
      expect(FUSE_RATINGS_A).toContain(f.ratingA);
      expect(f.ratingA).toBeGreaterThanOrEqual(1.25 * currentA);
      expect(FUSE_RATINGS_A.filter((r) => r >= 1.25 * currentA)[0]).toBe(f.ratingA);
      // Rule of thumb 10 A/mm² short-term (REFERENCE-FACTS §5): the fuse may not exceed what the thinnest wire it protects stands.
      expect(f.protects.length).toBeGreaterThan(0);
      const thinnest = Math.min(...f.protects.map((id) => row(p, id).sizeMm2));
      expect(f.ratingA).toBeLessThanOrEqual(10 * thinnest + 1e-9);
    }
    const ign = p.fuses[0];
    expect(ign.ratingA).toBe(15); // 1.25 × 12 A = 15 A
    // Shared feeds lie upstream (they serve other fuses' circuits); earths and pickups are not on the supply path.
    expect(ign.protects).toEqual(["ign1", "ign2", "ign3", "neg1", "neg2", "start", "sol"]);
    expect(ign.basis).toMatch(/factory fitted 10 A/);
    // The thinnest wire as first sized (0.85 mm², 8.5 A short-term at 10 A/mm²) is too thin for 15 A: those wires grow to 1.5 mm².
    expect(ign.basis).toMatch(/0\.85 mm²\) carries only 8\.5 A/);
    expect(row(p, "neg1").sizeMm2).toBe(1.5);
    expect(row(p, "neg1").notes.join(" ")).toMatch(/Upsized/);
    expect(row(p, "neg1").decidedBy).toBe("ampacity");
  });

  it("re-checks the rating when circuits are dropped and warns where the factory's differs", () => {
    const p = plan({ keep: ["headlamp"] });
    expect(p.fuses).toHaveLength(1);
    const f = p.fuses[0];
    expect(f.circuits).toEqual(["headlamp"]);
    expect(f.ratingA).toBe(7.5); // 1.25 × 5 A = 6.25 A → 7.5 A
    expect(f.basis).toMatch(/Warning: the factory fitted 15 A/);
    expect(plan({ keep: ["pickup"] }).fuses).toEqual([]);
  });
});

describe("cutListCsv", () => {
  it("has a header row, CRLF records and RFC 4180 quoting, and defuses formulas", () => {
    const wires = WIRES.map((w) => (w.id === "head" ? { ...w, from: 'light switch, "L" side', to: "=HYPERLINK(\"x\")" } : w));
    const r = planLoom({ circuits: CIRCUITS, wires, keep: ["headlamp"], scheme: "factory", notation: "jis" });
    if (!r.ok) throw new Error(r.error.message);
    const csv = cutListCsv(r.plan);
    const lines = csv.split("\r\n");
    expect(lines[0]).toBe("wire,from,to,colour,colours,length_m,length_source,current_a,circuits,max_drop_pct,size_mm2,awg,drop_v,drop_pct,decided_by,notes");
    expect(csv.endsWith("\r\n")).toBe(true);
    expect(lines).toHaveLength(r.plan.rows.length + 2); // header, rows, and the empty string after the last CRLF
    const head = lines.find((l) => l.startsWith("head,"))!;
    // RFC 4180: a field with a comma or quote is quoted and its quotes doubled.
    expect(head).toContain('"light switch, ""L"" side"');
    // A leading "=" would run as a formula in a spreadsheet: prefixed with an apostrophe (quoted because of its quotes).
    expect(head).toContain(`"'=HYPERLINK(""x"")"`);
    expect(head).toContain(",L,blue,0.5,family default,5,headlamp,10,");
  });
});

describe("errors name the field", () => {
  const base: PlannerInput = { circuits: CIRCUITS, wires: WIRES, keep: ["headlamp"], scheme: "factory", notation: "jis" };
  it.each([
    [{ keep: [] }, "keep"],
    [{ keep: ["headlamp", "sidecar"] }, "keep"],
    [{ lengthsM: { head: 0 } }, "lengthsM.head"],
    [{ lengthsM: { head: 10.5 } }, "lengthsM.head"],
    [{ lengthsM: { head: Number.NaN } }, "lengthsM.head"],
    [{ lengthsM: { nowhere: 1 } }, "lengthsM.nowhere"],
    [{ scheme: "rainbow" as never }, "scheme"],
    [{ notation: "klingon" as never }, "notation"],
    [{ systemV: -12 }, "systemV"],
    [{ tempC: 400 }, "tempC"],
  ] as [Partial<PlannerInput>, string][])("%o → %s", (over, field) => {
    const r = planLoom({ ...base, ...over });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.field).toBe(field);
      expect(r.error.message.length).toBeGreaterThan(10);
      expect(r.error.message.startsWith(`${field}:`)).toBe(false);
    }
  });

  it("accepts a builder length of exactly 10 m", () => {
    expect(planLoom({ ...base, lengthsM: { head: 10 } }).ok).toBe(true);
  });
});

describe("nominalLoadA (rules of thumb)", () => {
  it.each([
    ["headlamp", "60/55 W", 5], // lamp wattage / 12 V, the larger filament
    ["lamp", "2 × 21 W indicators", 3.5],
    ["tail", "tail lamp", 5 / 12], // 5 W filament
    ["coil", "ignition coil", 4], // 12 V / 3 Ω
    ["coil", "2 × 3 Ω", 8],
    ["coil", "4.5 ohm", 12 / 4.5],
    ["starter", "", 150], // cranking 100–150 A, the upper end
    ["pickup", "pulser", 0],
    ["horn", "horn 2.5 A", 2.5], // a stated current wins
  ] as [string, string, number][])("%s / %s → %f A", (kind, label, amps) => {
    const r = nominalLoadA(kind, label);
    expect(r.amps).toBeCloseTo(amps, 9);
    expect(r.basis.length).toBeGreaterThan(5);
  });

  it("throws for a kind with no rule and no figure", () => {
    expect(() => nominalLoadA("flux capacitor", "")).toThrow(/kind/);
    expect(() => nominalLoadA("lamp", "")).toThrow(/wattage/);
  });

  it("feeds planLoom: a load from nominalLoadA sizes the headlamp", () => {
    const { amps, basis } = nominalLoadA("headlamp", "60/55 W");
    const circuits = CIRCUITS.map((c) => (c.slug === "headlamp" ? { ...c, loadA: amps, loadBasis: basis } : c));
    const r = planLoom({ circuits, wires: WIRES, keep: ["headlamp"], scheme: "factory", notation: "jis" });
    expect(r.ok && r.plan.rows.find((x) => x.wire === "head")!.currentA).toBeCloseTo(5, 9);
    expect(r.ok && r.plan.assumptions.join(" ")).toMatch(/rule of thumb/);
  });
});

const BASE = { wires: WIRES, scheme: "factory" as const, notation: "jis" as const };

describe("a main fuse ahead of the branch fuses", () => {
  // Kirchhoff's current law: the current through a fuse is the sum of the currents of every circuit fed through it,
  // so a main fuse is sized for all kept circuits behind it, not only the one it happens to be nearest to.
  const MAIN = { name: "main", ratingA: 30 };
  const withMain = CIRCUITS.map((c) => (c.fuse ? { ...c, fusesOnPath: [MAIN, c.fuse] } : c));
  const brakeOnMain = withMain.map((c) => (c.slug === "brake" ? { ...c, fuse: MAIN, fusesOnPath: [MAIN] } : c));

  it("rates the main fuse for the sum of every kept circuit behind it", () => {
    const keep = ["coil-1", "coil-2", "headlamp", "brake"];
    const r = planLoom({ ...BASE, circuits: brakeOnMain, keep });
    expect(r.ok).toBe(true);
    const plan = (r as { ok: true; plan: PlanResult }).plan;
    const main = plan.fuses.find((f) => f.basis.includes('"main"'))!;
    const behind = brakeOnMain.filter((c) => keep.includes(c.slug)).reduce((s, c) => s + c.loadA, 0);
    expect(main.circuits.sort()).toEqual([...keep].sort());
    // Common practice: ≥ 1.25 × the current behind it.
    expect(main.ratingA).toBeGreaterThanOrEqual(1.25 * behind);
    // The branch fuses still protect their own circuits only.
    const ign = plan.fuses.find((f) => f.basis.includes('"ignition"'))!;
    expect(ign.circuits.sort()).toEqual(["coil-1", "coil-2"]);
  });

  it("leaves wires behind a branch fuse to that fuse", () => {
    const r = planLoom({ ...BASE, circuits: brakeOnMain, keep: ["coil-1", "coil-2", "brake"] });
    const plan = (r as { ok: true; plan: PlanResult }).plan;
    const main = plan.fuses.find((f) => f.basis.includes('"main"'))!;
    const ign = plan.fuses.find((f) => f.basis.includes('"ignition"'))!;
    expect(ign.protects).toContain("neg1");
    expect(main.protects).not.toContain("neg1");
  });
});
