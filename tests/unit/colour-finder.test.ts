import { describe, expect, it } from "vitest";
import { mulberry32, pick } from "../fixtures/random";
import { COLOUR_NAMES, encodeColour, type ColourName, type ColourSystemId } from "~/domain/colours";
import {
  DEFAULT_LIMIT,
  FADING_PAIRS,
  FAMILY_BOOST,
  FINDER_COSTS,
  MAX_LIMIT,
  MAX_WIRES,
  areConfusable,
  buildFinderIndex,
  findConnectors,
  readWires,
  wireCost,
  type FinderCandidate,
  type FinderConnector,
  type FinderPin,
  type FinderQuery,
} from "~/domain/colour-finder";

// All connectors, families and slugs here are invented test data.

// Colours an old loom is made of; the tracer is never the base colour.
const PALETTE: ColourName[] = [
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
  "light green",
  "light blue",
  "sky blue",
  "dark green",
  "chocolate",
  "tan",
];
const FAMILIES = ["fam-north", "fam-south", "fam-east", "fam-west"];
const SYSTEMS = ["ignition", "lighting", "charging", "signals"];

/** A code as a card would print it: Japanese-style letters, or English where those have no letter (tan). */
const cardCode = (colours: ColourName[]) => encodeColour(colours[0], colours.slice(1), "jis") ?? encodeColour(colours[0], colours.slice(1), "en");

function pin(cavity: string | number, colours: ColourName[]): FinderPin {
  return { cavity: String(cavity), code: colours.length ? cardCode(colours) : null, colours };
}

function connector(slug: string, colours: ColourName[][], extra: Partial<FinderConnector> = {}): FinderConnector {
  return {
    slug,
    name: `Connector ${slug}`,
    family: "fam-north",
    system: "lighting",
    gender: "plug",
    pins: colours.map((c, i) => pin(i + 1, c)),
    ...extra,
  };
}

function randomColours(rnd: () => number): ColourName[] {
  const base = pick(rnd, PALETTE);
  if (rnd() < 0.45) return [base];
  let tracer = pick(rnd, PALETTE);
  while (tracer === base) tracer = pick(rnd, PALETTE);
  return [base, tracer];
}

function syntheticLibrary(count: number, seed: number): FinderConnector[] {
  const rnd = mulberry32(seed);
  const out: FinderConnector[] = [];
  for (let i = 0; i < count; i++) {
    const cavities = 2 + Math.floor(rnd() * 7); // 2–8
    const pins: ColourName[][] = [];
    for (let k = 0; k < cavities; k++) pins.push(k >= 2 && rnd() < 0.1 ? [] : randomColours(rnd));
    out.push(
      connector(`syn-${String(i).padStart(3, "0")}`, pins, {
        family: FAMILIES[i % FAMILIES.length],
        system: SYSTEMS[Math.floor(i / 4) % SYSTEMS.length],
        gender: i % 3 === 0 ? "socket" : "plug",
      }),
    );
  }
  return out;
}

// Hand-made cards: a 3-way and an 8-way that share the 3-way's colours, a card that exists in two
// families with the same colours, and a 2-way earth lead in the protective-earth colour.
const HAND_MADE: FinderConnector[] = [
  connector("hand-headlamp-3", [["yellow", "white"], ["white", "black"], ["green"]], { family: "fam-north", system: "lighting" }),
  connector("hand-switch-8", [["yellow", "white"], ["white", "black"], ["green"], ["blue", "white"], ["red"], ["brown", "white"], ["orange"], ["grey"]], {
    family: "fam-north",
    system: "lighting",
  }),
  connector("hand-coil-2-a", [["black", "white"], ["orange"]], { family: "fam-south", system: "ignition", gender: "socket" }),
  connector("hand-coil-2-b", [["black", "white"], ["orange"]], { family: "fam-west", system: "ignition", gender: "plug" }),
  connector("hand-earth-2", [["green-yellow"], ["black"]], { family: "fam-east", system: "charging" }),
];

const LIBRARY = [...syntheticLibrary(60, 20261201), ...HAND_MADE];
const INDEX = buildFinderIndex(LIBRARY);

function find(query: FinderQuery, index = INDEX): FinderCandidate[] {
  const r = findConnectors(index, query);
  if (!r.ok) throw new Error(`findConnectors failed: ${r.error.message}`);
  return r.candidates;
}
const slugs = (cs: FinderCandidate[]) => cs.map((c) => c.connector.slug);

// ---- Costs ----------------------------------------------------------------------------------

describe("wireCost: the cost ladder (FINDER_COSTS)", () => {
  const exact = wireCost(["white", "red"], ["white", "red"]);
  const tracerMissing = wireCost(["white"], ["white", "red"]);
  const extraTracer = wireCost(["white", "red"], ["white"]);
  const faded = wireCost(["grey", "red"], ["white", "red"]);
  const fadedTracerMissing = wireCost(["grey"], ["white", "red"]);
  const wrongBase = wireCost(["black", "red"], ["white", "red"]);
  const emptyCavity = wireCost(["white", "red"], []);

  it("names each case with its quality and documented cost", () => {
    expect(exact).toEqual({ cost: FINDER_COSTS.exact, quality: "exact" });
    expect(tracerMissing).toEqual({ cost: FINDER_COSTS.tracerMissing, quality: "tracer-missing" });
    expect(extraTracer).toEqual({ cost: FINDER_COSTS.extraTracer, quality: "tracer-missing" });
    expect(faded).toEqual({ cost: FINDER_COSTS.faded, quality: "faded" });
    expect(fadedTracerMissing).toEqual({ cost: FINDER_COSTS.fadedTracerMissing, quality: "faded" });
    expect(wrongBase).toEqual({ cost: FINDER_COSTS.wrongBase, quality: "none" });
    expect(emptyCavity).toEqual({ cost: FINDER_COSTS.noCavity, quality: "none" });
  });

  it("orders exact < tracer missing < extra tracer < faded < faded + tracer missing < wrong base < no cavity", () => {
    const ladder = [exact, tracerMissing, extraTracer, faded, fadedTracerMissing, wrongBase, emptyCavity].map((c) => c.cost);
    for (let i = 1; i < ladder.length; i++) expect(ladder[i]).toBeGreaterThan(ladder[i - 1]);
    expect(FINDER_COSTS.noCavity).toBe(Math.max(...Object.values(FINDER_COSTS)));
  });

  it("a missing tracer costs less than a wrong base, and a wrong tracer sits between faded and a wrong base", () => {
    expect(tracerMissing.cost).toBeLessThan(wrongBase.cost);
    const wrongTracer = wireCost(["white", "green"], ["white", "red"]);
    expect(wrongTracer).toEqual({ cost: FINDER_COSTS.wrongTracer, quality: "none" });
    expect(wrongTracer.cost).toBeGreaterThan(fadedTracerMissing.cost);
    expect(wrongTracer.cost).toBeLessThan(wrongBase.cost);
  });

  it("a faded tracer is faded; base and tracer both faded cost a little more (common practice table)", () => {
    expect(wireCost(["white", "orange"], ["white", "red"])).toEqual({ cost: FINDER_COSTS.faded, quality: "faded" });
    expect(wireCost(["grey", "orange"], ["white", "red"])).toEqual({ cost: FINDER_COSTS.fadedBoth, quality: "faded" });
  });

  it("reads the protective-earth colour as green with a yellow tracer, so G/Y finds a GNYE cavity", () => {
    expect(wireCost(["green", "yellow"], ["green-yellow"]).quality).toBe("exact");
    expect(wireCost(["green"], ["green-yellow"]).quality).toBe("tracer-missing");
  });
});

describe("fading table (common practice)", () => {
  it("holds the pairs the trade reports: white↔grey, light green↔green, chocolate↔brown, sky/light blue↔blue, yellow↔white, orange↔red, pink↔red, dark green↔green, tan↔brown", () => {
    const pairs: [ColourName, ColourName][] = [
      ["white", "grey"],
      ["light green", "green"],
      ["chocolate", "brown"],
      ["sky blue", "blue"],
      ["light blue", "blue"],
      ["yellow", "white"],
      ["orange", "red"],
      ["pink", "red"],
      ["dark green", "green"],
      ["tan", "brown"],
    ];
    for (const [a, b] of pairs) expect(areConfusable(a, b), `${a} ↔ ${b}`).toBe(true);
    expect(areConfusable("black", "white")).toBe(false);
    expect(areConfusable("red", "blue")).toBe(false);
    expect(areConfusable("white", "white")).toBe(false); // equal is "exact", not "faded"
  });

  it("is symmetric over every pair of colour words, and every listed pair is read both ways", () => {
    for (const a of COLOUR_NAMES) for (const b of COLOUR_NAMES) expect(areConfusable(a, b)).toBe(areConfusable(b, a));
    for (const [a, b] of FADING_PAIRS) {
      expect(wireCost([a], [b])).toEqual({ cost: FINDER_COSTS.faded, quality: "faded" });
      expect(wireCost([b], [a])).toEqual({ cost: FINDER_COSTS.faded, quality: "faded" });
    }
  });
});

// ---- Reading the wires ----------------------------------------------------------------------

describe("readWires", () => {
  it("reads every plausible notation, the auto reading first", () => {
    const r = readWires(["W/R", "Gr", "RDWH", "ws/rt"]);
    if (!r.ok) throw new Error(r.error.message);
    expect(r.readings[0][0]).toEqual(["white", "red"]);
    // Gr is grey in DIN 47002 and Japanese usage, green in English shorthand (REFERENCE-FACTS 1.5).
    expect(r.readings[1]).toContainEqual(["grey"]);
    expect(r.readings[1]).toContainEqual(["green"]);
    // IEC 60757 has no base: either colour may be the base (REFERENCE-FACTS 1.1).
    expect(r.readings[2]).toContainEqual(["white", "red"]);
    expect(r.readings[2]).toContainEqual(["red", "white"]);
    expect(r.readings[3]).toContainEqual(["white", "red"]);
  });

  it("reads IEC BU as blue or light blue, as the standard's blue row includes light blue (REFERENCE-FACTS 1.1)", () => {
    const r = readWires(["BU"], "iec");
    expect(r.ok && r.readings[0]).toEqual([["blue"], ["light blue"]]);
    const long = readWires(["BU".repeat(40)], "iec");
    expect(long.ok && long.readings[0].length).toBeLessThanOrEqual(4 * 40);
  });

  it("keeps to one notation when told", () => {
    const r = readWires(["Gr"], "din");
    expect(r.ok && r.readings).toEqual([[["grey"]]]);
  });

  it("names the wire it cannot read", () => {
    const r = readWires(["W/R", "Xq"]);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.code).toBe("unknown_colour");
    expect(r.error.field).toBe("wires.1");
    expect(r.error.message).toContain("Wire 2");
    expect(r.error.message).toContain("Xq");
  });
});

// ---- Assignment optimality ------------------------------------------------------------------

describe("assignment optimality: brute force over all permutations", () => {
  // Confusable colours on purpose, so that wires compete for the same cavities.
  const TIGHT: ColourName[] = ["white", "grey", "yellow", "red", "orange", "pink", "blue", "sky blue", "green", "light green"];

  /** Minimum total over every injective wire → cavity map (a wire may also stay unplaced at cost 1). */
  function bruteForce(cost: number[][], P: number): number {
    const used = new Array<boolean>(P).fill(false);
    const go = (w: number): number => {
      if (w === cost.length) return 0;
      let best = FINDER_COSTS.noCavity + go(w + 1);
      for (let p = 0; p < P; p++) {
        if (used[p]) continue;
        used[p] = true;
        best = Math.min(best, cost[w][p] + go(w + 1));
        used[p] = false;
      }
      return best;
    };
    return go(0);
  }

  function greedy(cost: number[][], P: number): number {
    const used = new Array<boolean>(P).fill(false);
    let total = 0;
    for (const row of cost) {
      let best = -1;
      for (let p = 0; p < P; p++) if (!used[p] && (best < 0 || row[p] < row[best])) best = p;
      if (best < 0) total += FINDER_COSTS.noCavity;
      else {
        used[best] = true;
        total += row[best];
      }
    }
    return total;
  }

  it("munkres total equals the brute-force minimum on 300 random cases (≤ 6 wires, ≤ 6 cavities), where greedy often is not", () => {
    const rnd = mulberry32(757);
    let greedyWorse = 0;
    for (let trial = 0; trial < 300; trial++) {
      const P = 1 + Math.floor(rnd() * 6);
      const W = 1 + Math.floor(rnd() * 6);
      const colour = (): ColourName[] => {
        const base = pick(rnd, TIGHT);
        if (rnd() < 0.5) return [base];
        let t = pick(rnd, TIGHT);
        while (t === base) t = pick(rnd, TIGHT);
        return [base, t];
      };
      const pins = Array.from({ length: P }, () => (rnd() < 0.12 ? [] : colour()));
      const con = connector(`case-${trial}`, pins);
      const wires = Array.from({ length: W }, () => {
        const c = colour();
        return encodeColour(c[0], c.slice(1), pick(rnd, ["jis", "en"] as const)) ?? encodeColour(c[0], c.slice(1), "en")!;
      });
      const read = readWires(wires);
      if (!read.ok) throw new Error(read.error.message);
      const cost = read.readings.map((readings) => pins.map((p) => Math.min(...readings.map((r) => wireCost(r, p).cost))));
      const [best] = find({ wires, limit: 1 }, buildFinderIndex([con]));
      const total = best.matches.reduce((s, m) => s + m.cost, 0);
      const optimum = bruteForce(cost, P);
      expect(total, `case ${trial}: ${JSON.stringify({ wires, pins })}`).toBeCloseTo(optimum, 9);
      // The reported assignment is injective and each cost is that cell of the matrix.
      const cavities = best.matches.filter((m) => m.cavity !== null).map((m) => m.cavity);
      expect(new Set(cavities).size).toBe(cavities.length);
      best.matches.forEach((m, w) => {
        if (m.cavity !== null) expect(m.cost).toBeCloseTo(cost[w][Number(m.cavity) - 1], 9);
      });
      // Score is 1 − mean cost less the unexplained-pin penalty.
      expect(best.score).toBeLessThanOrEqual(1 - optimum / W + 1e-4);
      if (greedy(cost, P) > optimum + 1e-9) greedyWorse++;
    }
    expect(greedyWorse).toBeGreaterThan(10);
  });

  it("pruning does not change the ranking: the same top 10 as scoring every connector on its own", () => {
    const rnd = mulberry32(4242);
    for (let trial = 0; trial < 20; trial++) {
      const wires = Array.from({ length: 2 + Math.floor(rnd() * 4) }, () => cardCode(randomColours(rnd))!);
      const r = findConnectors(INDEX, { wires });
      if (!r.ok) throw new Error(r.error.message);
      const alone = LIBRARY.map((c) => find({ wires, limit: 1 }, buildFinderIndex([c]))[0]).sort((a, b) => b.score - a.score || 0);
      expect(r.candidates.map((c) => c.score)).toEqual(alone.slice(0, DEFAULT_LIMIT).map((c) => c.score));
      expect(r.stats.assigned).toBeLessThanOrEqual(r.stats.considered);
    }
  });
});

// ---- Finding the true connector -------------------------------------------------------------

describe("finding the connector from damaged, re-written wires", () => {
  const partners = new Map<ColourName, ColourName[]>();
  for (const [a, b] of FADING_PAIRS) {
    partners.set(a, [...(partners.get(a) ?? []), b]);
    partners.set(b, [...(partners.get(b) ?? []), a]);
  }
  const fade = (rnd: () => number, c: ColourName) => {
    const p = partners.get(c);
    return p ? pick(rnd, p) : c;
  };
  const SYSTEMS_WRITTEN: ColourSystemId[] = ["jis", "din", "en", "bs", "iec"];

  /**
   * What a rewirer sees: some wires lost, colours faded, tracers worn off, any order, another
   * notation. "realistic": at least three wires survive, one of them damaged (two of four or more),
   * one way each; a 2-way card keeps both wires undamaged, because one faded wire of two is matched
   * exactly by any card holding the faded colour and its partner, which no finder can tell apart.
   * "harsh": down to two wires, every wire may be damaged twice (reported, loosely asserted).
   */
  function damage(con: FinderConnector, rnd: () => number, mode: "realistic" | "harsh"): string[] {
    let seen = con.pins.filter((p) => p.colours.length > 0).map((p) => [...p.colours]);
    const keep = mode === "realistic" ? Math.min(seen.length, 3) : 2;
    const maxDrop = Math.min(seen.length - keep, seen.length >= 5 ? 2 : 1);
    for (let d = Math.floor(rnd() * (maxDrop + 1)); d > 0; d--) seen.splice(Math.floor(rnd() * seen.length), 1);
    let damageLeft = mode === "realistic" ? (seen.length >= 4 ? 2 : seen.length === 3 ? 1 : 0) : Infinity;
    seen = seen.map((c) => {
      const out = [...c];
      const before = out.join("/");
      const once = mode === "realistic";
      if (damageLeft > 0 && rnd() < 0.2) out[0] = fade(rnd, out[0]);
      const fresh = out.join("/") === before || !once;
      if (damageLeft > 0 && fresh && out.length > 1 && rnd() < 0.2) out.length = 1;
      else if (damageLeft > 0 && fresh && out.length > 1 && rnd() < 0.1) out[1] = fade(rnd, out[1]);
      if (out.join("/") !== before) damageLeft--;
      return out;
    });
    for (let i = seen.length - 1; i > 0; i--) {
      const j = Math.floor(rnd() * (i + 1));
      [seen[i], seen[j]] = [seen[j], seen[i]];
    }
    const system = pick(rnd, SYSTEMS_WRITTEN);
    return seen.map((c) => encodeColour(c[0], c.slice(1), system) ?? encodeColour(c[0], c.slice(1), "en")!);
  }

  function trials(mode: "realistic" | "harsh", seed: number, count: number) {
    const rnd = mulberry32(seed);
    const ranks: number[] = [];
    const misses: string[] = [];
    for (let t = 0; t < count; t++) {
      const truth = pick(rnd, LIBRARY);
      const wires = damage(truth, rnd, mode);
      const rank = slugs(find({ wires })).indexOf(truth.slug) + 1 || Infinity;
      ranks.push(rank);
      if (rank > 3) misses.push(`${truth.slug} ${JSON.stringify(wires)} → rank ${rank}`);
    }
    const first = ranks.filter((r) => r === 1).length;
    const top3 = ranks.filter((r) => r <= 3).length;
    console.info(
      `colour-finder recall (${mode}, ${count} trials): first ${first} (${((100 * first) / count).toFixed(1)} %), top 3 ${top3} (${((100 * top3) / count).toFixed(1)} %)`,
    );
    return { first: first / count, top3: top3 / count, misses };
  }

  it("ranks the true connector in the top three in each of 240 seeded realistic trials (and reports how often first)", () => {
    const r = trials("realistic", 1983, 240);
    expect(r.misses).toEqual([]);
    expect(r.first).toBeGreaterThan(0.85);
  });

  it("still ranks it in the top three in nearly all harsh trials (two wires left, each damaged)", () => {
    const r = trials("harsh", 1983, 240);
    expect(r.top3).toBeGreaterThan(0.95);
    expect(r.first).toBeGreaterThan(0.8);
  });

  it("explains each wire of a demo-like case with its quality", () => {
    // hand-headlamp-3 (Y/W, W/B, G): the white has yellowed, the tracer of Y/W wore off, written in DIN.
    const [best] = find({ wires: ["gn", "ge/sw", "ge"] });
    expect(best.connector).toEqual({ slug: "hand-headlamp-3", name: "Connector hand-headlamp-3", family: "fam-north" });
    expect(best.matches.map((m) => [m.wire, m.cavity, m.pinColour, m.quality])).toEqual([
      ["gn", "3", "G", "exact"],
      ["ge/sw", "2", "W/B", "faded"],
      ["ge", "1", "Y/W", "tracer-missing"],
    ]);
    expect(best.score).toBeGreaterThan(0.5);
    expect(best.score).toBeLessThan(1);
  });

  it("fits three wires to the 3-cavity card rather than the 8-cavity card with the same colours (unexplained-pin penalty)", () => {
    const cs = find({ wires: ["Y/W", "W/B", "G"] });
    expect(slugs(cs).slice(0, 2)).toEqual(["hand-headlamp-3", "hand-switch-8"]);
    expect(cs[0].score).toBe(1);
    expect(cs[1].score).toBeLessThan(1);
    expect(cs[1].matches.every((m) => m.quality === "exact")).toBe(true);
  });

  it("gives a wire with no cavity on the card cost 1 and no cavity", () => {
    const [best] = find({ wires: ["B/W", "O", "R"], pinCount: 2, family: "fam-south" });
    expect(best.connector.slug).toBe("hand-coil-2-a");
    expect(best.matches[2]).toMatchObject({ wire: "R", cavity: null, pinColour: null, quality: "none", cost: 1 });
    expect(best.score).toBeCloseTo(1 - 1 / 3, 3);
  });

  it("finds the protective-earth cavity from a green wire with a yellow tracer", () => {
    const [best] = find({ wires: ["G/Y", "B"], system: "charging" });
    expect(best.connector.slug).toBe("hand-earth-2");
    expect(best.matches[0].quality).toBe("exact");
  });
});

// ---- Filters, limit, errors -----------------------------------------------------------------

describe("filters and limit", () => {
  const wires = ["B/W", "O"];

  it("pinCount filters exactly", () => {
    const cs = find({ wires, pinCount: 2, limit: MAX_LIMIT });
    expect(cs.length).toBeGreaterThan(0);
    for (const c of cs) expect(LIBRARY.find((k) => k.slug === c.connector.slug)!.pins).toHaveLength(2);
  });

  it("gender filters", () => {
    const plugs = find({ wires, gender: "plug", limit: MAX_LIMIT });
    expect(slugs(plugs)).toContain("hand-coil-2-b");
    expect(slugs(plugs)).not.toContain("hand-coil-2-a");
    for (const c of plugs) expect(LIBRARY.find((k) => k.slug === c.connector.slug)!.gender).toBe("plug");
  });

  it("system filters", () => {
    for (const c of find({ wires, system: "ignition", limit: MAX_LIMIT })) {
      expect(LIBRARY.find((k) => k.slug === c.connector.slug)!.system).toBe("ignition");
    }
  });

  it("family filters by default, and with familyMode boost only lifts that family by FAMILY_BOOST", () => {
    const filtered = find({ wires, family: "fam-west", limit: MAX_LIMIT });
    expect(filtered.every((c) => c.connector.family === "fam-west")).toBe(true);
    expect(slugs(filtered)[0]).toBe("hand-coil-2-b");

    // Without a family the twin cards tie on colour and come in slug order: -a first.
    const open = find({ wires });
    expect(slugs(open).slice(0, 2)).toEqual(["hand-coil-2-a", "hand-coil-2-b"]);
    const boosted = find({ wires: ["B/W", "O", "R"], family: "fam-west", familyMode: "boost" });
    expect(slugs(boosted)[0]).toBe("hand-coil-2-b");
    expect(slugs(boosted)).toContain("hand-coil-2-a"); // other families stay in the list
    const a = boosted.find((c) => c.connector.slug === "hand-coil-2-a")!;
    const b = boosted.find((c) => c.connector.slug === "hand-coil-2-b")!;
    expect(b.score - a.score).toBeCloseTo(FAMILY_BOOST, 4);
    expect(new Set(boosted.map((c) => c.connector.family)).size).toBeGreaterThan(1);
  });

  it("ranks best first with scores in 0..1", () => {
    const cs = find({ wires: ["W/R", "B", "L/W"], limit: MAX_LIMIT });
    for (let i = 1; i < cs.length; i++) expect(cs[i].score).toBeLessThanOrEqual(cs[i - 1].score);
    for (const c of cs) {
      expect(c.score).toBeGreaterThanOrEqual(0);
      expect(c.score).toBeLessThanOrEqual(1);
      expect(c.matches.map((m) => m.wire)).toEqual(["W/R", "B", "L/W"]);
    }
  });

  it(`returns ${DEFAULT_LIMIT} by default, the limit asked for, and at most ${MAX_LIMIT}`, () => {
    expect(find({ wires })).toHaveLength(DEFAULT_LIMIT);
    expect(find({ wires, limit: 3 })).toHaveLength(3);
    expect(find({ wires, limit: 500 })).toHaveLength(MAX_LIMIT);
  });

  it("an unknown family as a filter finds nothing, and an empty library answers with no candidates", () => {
    expect(find({ wires, family: "fam-nowhere" })).toEqual([]);
    expect(find({ wires }, buildFinderIndex([]))).toEqual([]);
  });
});

describe("errors", () => {
  const error = (q: FinderQuery) => {
    const r = findConnectors(INDEX, q);
    if (r.ok) throw new Error("expected an error");
    return r.error;
  };

  it("an unknown code is unknown_colour naming the wire", () => {
    const e = error({ wires: ["W/R", "B", "Zz9"] });
    expect(e).toMatchObject({ code: "unknown_colour", field: "wires.2" });
    expect(e.message).toMatch(/Wire 3 \("Zz9"\)/);
  });

  it("an empty list, too many wires and bad options are bad_request naming the field", () => {
    expect(error({ wires: [] })).toMatchObject({ code: "bad_request", field: "wires" });
    expect(error({ wires: Array.from({ length: MAX_WIRES + 1 }, () => "B") })).toMatchObject({ code: "bad_request", field: "wires" });
    expect(error({ wires: ["B"], pinCount: 0 })).toMatchObject({ code: "bad_request", field: "pinCount" });
    expect(error({ wires: ["B"], limit: 0 })).toMatchObject({ code: "bad_request", field: "limit" });
    expect(error({ wires: ["B"], gender: "both" as "plug" })).toMatchObject({ code: "bad_request", field: "gender" });
    expect(error({ wires: ["B"], notation: "morse" as "jis" })).toMatchObject({ code: "bad_request", field: "notation" });
  });

  it(`accepts exactly ${MAX_WIRES} wires`, () => {
    expect(findConnectors(INDEX, { wires: Array.from({ length: MAX_WIRES }, () => "B") }).ok).toBe(true);
  });
});

// ---- House styles: each connector reads the typed codes as its own maker writes them ---------

describe("reading the typed codes per connector (notation and house style)", () => {
  // Invented cards. Two Japanese-style houses that both write "Bl/W": black with white in one, blue with white in the
  // other (REFERENCE-FACTS 5 [from memory]); a DIN card (REFERENCE-FACTS 1.2); a British card (REFERENCE-FACTS 1.5).
  const housed = (
    slug: string,
    family: string,
    notation: ColourSystemId,
    houseStyle: FinderConnector["houseStyle"],
    pins: [string, ColourName[]][],
  ): FinderConnector => ({
    slug,
    name: `Connector ${slug}`,
    family,
    system: "lighting",
    gender: "plug",
    notation,
    houseStyle,
    pins: pins.map(([code, colours], i) => ({ cavity: String(i + 1), code, colours })),
  });
  const BLACK_HOUSE = housed("bl-black-2", "fam-bl-black", "jis", "jis-bl-black", [
    ["Bl/W", ["black", "white"]],
    ["R", ["red"]],
  ]);
  const BLUE_HOUSE = housed("bl-blue-2", "fam-bl-blue", "jis", "jis-bl-blue", [
    ["Bl/W", ["blue", "white"]],
    ["R", ["red"]],
  ]);
  const LETTERS = housed("letters-2", "fam-letters", "jis", "jis-letters", [
    ["B/W", ["black", "white"]],
    ["Gr", ["grey"]],
  ]);
  const GERMAN = housed("din-2", "fam-din", "din", "din", [
    ["bl/ws", ["blue", "white"]],
    ["gr", ["grey"]],
  ]);
  const BRITISH = housed("bs-2", "fam-bs", "bs", "bs", [
    ["N", ["brown"]],
    ["UW", ["blue", "white"]],
  ]);
  const HOUSED = buildFinderIndex([BLACK_HOUSE, BLUE_HOUSE, LETTERS, GERMAN, BRITISH]);
  const bySlug = (cs: FinderCandidate[], slug: string) => cs.find((c) => c.connector.slug === slug)!;

  it("readWires lists each Japanese-style house's reading with where it comes from", () => {
    // REFERENCE-FACTS 5 [from memory]: Bl black (one house), Bl blue (another).
    const r = readWires(["Bl/W"]);
    if (!r.ok) throw new Error(r.error.message);
    const of = (colours: ColourName[]) => r.origins[0][r.readings[0].findIndex((x) => x.join("/") === colours.join("/"))];
    expect(of(["black", "white"])).toEqual({ system: "jis", houseStyle: "jis-bl-black" });
    expect(of(["blue", "white"])).toEqual({ system: "jis", houseStyle: "jis-bl-blue" });
    const one = readWires(["Bl"], "jis", { houseStyle: "jis-bl-blue" });
    expect(one.ok && [one.readings, one.origins]).toEqual([[[["blue"]]], [[{ system: "jis", houseStyle: "jis-bl-blue" }]]]);
  });

  it("English words are English in every notation: brown is never B+R+O+W+N", () => {
    // Common practice; the British letters B R O W N (REFERENCE-FACTS 1.5) would otherwise spell it out.
    for (const notation of ["auto", "bs", "jis", "din"] as const) {
      const r = readWires(["BROWN"], notation);
      expect(r.ok && [r.readings, r.origins], notation).toEqual([[[["brown"]]], [[{ system: "en", houseStyle: "en" }]]]);
    }
    const [best] = find({ wires: ["brown", "blue/white"] }, HOUSED);
    expect(best.connector.slug).toBe("bs-2");
    expect(best.matches.map((m) => [m.cavity, m.quality, m.readAs?.system])).toEqual([
      ["1", "exact", "en"],
      ["2", "exact", "en"],
    ]);
  });

  it("with no family, each connector is compared in its own house, and each match says which reading it used", () => {
    // REFERENCE-FACTS 5 [from memory]: the same Bl/W is each house's own wire.
    const cs = find({ wires: ["Bl/W", "R"] }, HOUSED);
    const black = bySlug(cs, "bl-black-2");
    const blue = bySlug(cs, "bl-blue-2");
    expect([black.score, blue.score]).toEqual([1, 1]);
    expect(black.matches[0].readAs).toEqual({ system: "jis", houseStyle: "jis-bl-black", colours: ["black", "white"], words: "black with white tracer" });
    expect(blue.matches[0].readAs).toEqual({ system: "jis", houseStyle: "jis-bl-blue", colours: ["blue", "white"], words: "blue with white tracer" });
    // The DIN card reads the typed codes as DIN only if they all read there: "R" does not, so it keeps every reading.
    const din = bySlug(find({ wires: ["Bl/W", "R"], limit: 50 }, HOUSED), "din-2");
    expect(din.matches[0].readAs?.houseStyle).not.toBe("din");
  });

  it("with a family, reads every wire in that family's notation and house", () => {
    // REFERENCE-FACTS 1.2: DIN 47002 bl = blau, gr = grau [published]; jis-letters Gr grey (REFERENCE-FACTS 1.3).
    const [din] = find({ wires: ["Bl", "Gr"], family: "fam-din" }, HOUSED);
    expect(din.connector.slug).toBe("din-2");
    expect(din.matches.map((m) => [m.wire, m.cavity, m.quality, m.readAs?.houseStyle])).toEqual([
      ["Bl", "1", "tracer-missing", "din"],
      ["Gr", "2", "exact", "din"],
    ]);
    const [blue] = find({ wires: ["Bl/W", "R"], family: "fam-bl-blue" }, HOUSED);
    expect(blue.matches.every((m) => m.quality === "exact" && m.readAs?.houseStyle === "jis-bl-blue")).toBe(true);
    // Boosted, the other families still read in their own houses.
    const boosted = find({ wires: ["Bl/W", "R"], family: "fam-bl-blue", familyMode: "boost" }, HOUSED);
    expect(bySlug(boosted, "bl-black-2").matches[0].readAs?.houseStyle).toBe("jis-bl-black");
  });

  it("falls back to every reading when the typed codes are not in the connector's notation", () => {
    // Common practice: blk/wht is English shorthand, not a jis-letters code.
    const [best] = find({ wires: ["blk/wht", "gry"], family: "fam-letters" }, HOUSED);
    expect(best.connector.slug).toBe("letters-2");
    expect(best.matches.map((m) => [m.quality, m.readAs?.system])).toEqual([
      ["exact", "en"],
      ["exact", "en"],
    ]);
  });

  it("a notation named in the query reads for every connector", () => {
    // REFERENCE-FACTS 1.2: bl/ws is DIN blue with white, which only the bl-blue house's Bl/W card holds.
    const cs = find({ wires: ["bl/ws"], notation: "din" }, HOUSED);
    expect(bySlug(cs, "bl-blue-2").matches[0].quality).toBe("exact");
    expect(bySlug(cs, "bl-black-2").matches[0].quality).toBe("none");
  });

  it("a match with no cavity has no reading", () => {
    const [best] = find({ wires: ["Bl/W", "R", "Y"], family: "fam-bl-black" }, HOUSED);
    expect(best.matches[2]).toMatchObject({ cavity: null, readAs: null, reading: [] });
  });

  it("pruning does not change the ranking when connectors read in different houses", () => {
    // Same check as above (every connector scored on its own index), over a library whose families have notations.
    const HOUSES = [
      ["jis", "jis-letters"],
      ["jis", "jis-bl-black"],
      ["jis", "jis-bl-blue"],
      ["jis", "jis-caps"],
      ["din", "din"],
      ["bs", "bs"],
      ["jis", null],
    ] as const;
    const lib = LIBRARY.map((c, i) => ({ ...c, notation: HOUSES[i % HOUSES.length][0], houseStyle: HOUSES[i % HOUSES.length][1] }));
    const index = buildFinderIndex(lib);
    const rnd = mulberry32(60445);
    for (let trial = 0; trial < 20; trial++) {
      const system = pick(rnd, ["jis", "din", "bs", "en"] as const);
      const wires = Array.from({ length: 2 + Math.floor(rnd() * 4) }, () => {
        const c = randomColours(rnd);
        return encodeColour(c[0], c.slice(1), system) ?? encodeColour(c[0], c.slice(1), "en")!;
      });
      const r = findConnectors(index, { wires });
      if (!r.ok) throw new Error(r.error.message);
      const alone = lib.map((c) => find({ wires, limit: 1 }, buildFinderIndex([c]))[0]).sort((a, b) => b.score - a.score);
      expect(
        r.candidates.map((c) => c.score),
        JSON.stringify(wires),
      ).toEqual(alone.slice(0, DEFAULT_LIMIT).map((c) => c.score));
    }
  });
});
