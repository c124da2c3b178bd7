// Loom planner: the cut list of a minimal loom built from a family's circuits. The builder keeps some circuits
// (ignition, charging, one headlamp …) and gets each wire's run, colour, current, size and the fuses, with the parts to
// buy. Pure TypeScript: the planner service feeds it the family's network from the database.
//
// What a wire carries comes from the loom's electrics (electrics.ts), solved in the bike's worst real states — charging
// at rpm with the lights on, cranking, the horn pressed — with the dropped circuits' loads taken out. So a stator lead
// carries the alternator's output, each coil's negative its own coil's current, and only pickups and sensors are signal
// wires. The drop target holds for each circuit as a whole; conductors are stranded cable (IEC 60228 class 5).
// Bad input comes back as {ok:false, error:{field, message}} (the API's 400), never as a throw.

import { COLOUR_SYSTEM_IDS, encodeColour, type ColourName, type ColourSystemId } from "./colours";
import { solve, type Element, type Network, type Solution } from "./electrics";
import { LoomGraph, RIDING_POSITIONS, resolveSwitches, type SwitchState } from "./loom-graph";
import { FITTING_SOURCE, parseFitting } from "./terminals";
import {
  AMPACITY_A_PER_MM2, AWG_GAUGES, CLASS5_WORST_OHM_MM2_PER_KM, FUSE_MARGIN, FUSE_RATINGS_A, METRIC_SIZES_MM2, SHORT_TERM_A_PER_MM2,
  WorkshopInputError, awgAreaMm2, awgLabel, copperTempFactor, strandedResistance,
} from "./wire-size";

/** One wire of the family's loom, as the planner service reads it. */
export interface PlannerWire {
  /** The wire's element id in the network. */
  id: string;
  from: string;
  to: string;
  /** Fittings at its two ends ("2.8 mm flat-blade", "ring M6", "splice"), null when unknown. */
  fromFitting: string | null;
  toFitting: string | null;
  /** The factory's colour code as printed in the family's notation, and its decoded colours (base first). */
  code: string;
  colours: ColourName[];
  defaultLengthM: number | null;
  factorySizeMm2: number | null;
}

/** One circuit of the family: its load links and the positions it works in. */
export interface PlannerCircuit {
  slug: string;
  name: string;
  system: string;
  from: string;
  to: string;
  loads: string[];
  switches: Record<string, string>;
}

/** What the builder asks for: the family's network, circuits and wires, the circuits to keep, and how to colour and measure. */
export interface PlannerInput {
  network: Network;
  circuits: PlannerCircuit[];
  wires: PlannerWire[];
  /** Readable names of elements (fuses, switch contacts) by element id. */
  names: Record<string, string>;
  /** The frame earth point's node, if the loom has one: the earth net is the net joined to it or to the earth post. */
  frameEarth: string | null;
  keep: string[];
  /** factory: the family's own colours; simple: Loomlore's scheme (SIMPLE_SCHEME). */
  scheme: "factory" | "simple";
  /** How to write colours (the family's own notation for factory). */
  notation: ColourSystemId;
  lengthsM?: Record<string, number>;
  tempC?: number;
}

export type WireRole = "power" | "earth" | "signal";

/** One row of the cut list. */
export interface CutRow {
  wire: string;
  from: string;
  to: string;
  /** The net it belongs to: wires joined through splices and mated terminals share one. */
  net: string;
  colour: string;
  colours: ColourName[];
  lengthM: number;
  lengthSource: "builder" | "family default" | "assumed";
  /** Current in its worst real state (charging at rpm, cranking, lights on), A. */
  currentA: number;
  /** Worst current outside the moments a button is held (horn, start), A: what heats it steadily. */
  continuousA: number;
  /** Worst instant: every switching element closed at once, A. */
  peakA: number;
  /** Carries current only while a button is held (starter cable, horn wire). */
  momentary: boolean;
  role: WireRole;
  circuits: string[];
  sizeMm2: number;
  awg: number | null;
  dropV: number;
  dropPct: number;
  decidedBy: "voltage-drop" | "ampacity" | "minimum" | "fuse" | "factory";
  fittings: [string, string];
  notes: string[];
}

/** One fuse of the planned loom. */
export interface FuseRow {
  id: string;
  name: string;
  circuits: string[];
  factoryA: number;
  ratingA: number;
  continuousA: number;
  peakA: number;
  /** The rating went above the factory's (only with every part behind it checked). */
  raised: boolean;
  /** Wire ids it protects. */
  protects: string[];
  basis: string;
  warnings: string[];
}

export interface CircuitDrop { circuit: string; name: string; dropV: number; budgetV: number; budgetPct: number; basis: string }
export interface LegendRow { colour: string; colours: ColourName[]; nets: string[]; meaning: string }
export interface PartRow { kind: "wire" | "fuse" | "terminal" | "splice"; item: string; quantity: number; unit: string; notes: string }

/** The planned loom. */
export interface PlanResult {
  rows: CutRow[];
  fuses: FuseRow[];
  circuitDrops: CircuitDrop[];
  legend: LegendRow[];
  parts: PartRow[];
  dropped: { slug: string; name: string }[];
  /** byGauge: metres per size, keyed by the size in mm² as a string ("0.5", "1.25"). */
  totals: { wires: number; lengthM: number; byGauge: Record<string, number> };
  assumptions: string[];
  warnings: string[];
}

/** Thinnest wire the planner cuts, mm²: thinner crimped wire breaks under vibration (common practice), whatever its current. */
export const MIN_PRACTICAL_MM2 = 0.5;
/** Longest run a builder may enter, m: nothing on a motorcycle is further apart, so more is a typing slip. */
export const MAX_RUN_M = 10;
/** Run length taken when neither the builder nor the family gives one, m. */
export const ASSUMED_RUN_M = 1.0;
/** Extra wire bought for stripping, routing and mistakes (common practice). */
export const CUTTING_ALLOWANCE = 0.1;
/** A blade fuse holds about 135 % of its rating for minutes before it opens (from memory, the usual blade-fuse curve): a momentary load may reach it. */
export const FUSE_MOMENTARY_FACTOR = 1.35;
/** A wire carrying less than this in every state is taken as carrying none, A. */
const NO_CURRENT_A = 0.05;

/** Drop targets for a whole circuit (supply and return wires together), % of the system voltage. */
export function circuitDropPct(c: { system: string; slug: string; loads: string[] }): { pct: number; basis: string } {
  if (c.system === "ignition" || c.system === "charging") return { pct: 3, basis: "3 % for ignition and charging (ABYC's figure for critical circuits)" };
  if (/headlamp/.test(c.slug)) return { pct: 3, basis: "3 % for the headlamp: a lamp at 90 % of its voltage gives only about 70 % of its light (from memory)" };
  if (c.system === "starting") return { pct: 5, basis: "5 % while cranking: the ignition must still fire on what is left (common practice)" };
  return { pct: 10, basis: "10 % for the rest (ABYC's figure for non-critical circuits)" };
}

/** Loomlore's simple scheme, for the page and the assumptions: one line per rule. */
export const SIMPLE_SCHEME: readonly string[] = Object.freeze([
  "earth: black, and only earth (every wire joined to the frame or the earth post through no switch, fuse or load)",
  "battery feed, unswitched (fused or not): red",
  "switched feeds shared by several systems, and the ignition's own feeds: white",
  "coil negatives and the points' leads: green",
  "pickups and other signal wires: grey",
  "charging (stator leads, field, D+): yellow",
  "starting (button to relay, relay to motor): brown",
  "lighting: blue; indicators and horn: orange; instruments and warning lamps: violet; anything else: pink",
  "each net has its own colour: the first of a group plain, the others with a tracer (green and yellow never together: IEC 60757 keeps GNYE for the protective earth)",
]);

const GROUP_BASE: Record<string, ColourName> = {
  feed: "red", switched: "white", negative: "green", signal: "grey", charging: "yellow", starting: "brown", lighting: "blue",
  signals: "orange", instruments: "violet", other: "pink",
};
const TRACERS: readonly ColourName[] = ["white", "black", "red", "blue", "green", "yellow", "orange", "violet", "grey", "brown", "pink"];

const EPS = 1e-9;
const fmt = (x: number, sig = 3) => String(Number(x.toPrecision(sig)));
const fail = (field: string, message: string) => new WorkshopInputError(field, message);
const round3 = (x: number) => Math.round(x * 1000) / 1000;
const smallestMetric = (need: number) => METRIC_SIZES_MM2.find((a) => a >= need * (1 - EPS));
const AWG_THIN_FIRST = [...AWG_GAUGES].sort((a, b) => b - a);
const smallestAwg = (need: number) => AWG_THIN_FIRST.find((g) => awgAreaMm2(g) >= need * (1 - EPS)) ?? null;

// ---------------------------------------------------------------------------------------------
// The bike's worst real states

const CONTINUOUS_STATES: readonly Partial<SwitchState>[] = [
  { engine: "running", lights: "on", beam: "high", brake: "pressed", indicators: "left", gear: "in-gear" },
  { engine: "running", lights: "on", beam: "low", brake: "pressed", indicators: "right", gear: "in-gear" },
  { engine: "stopped", lights: "on", beam: "high", brake: "pressed", indicators: "left", gear: "neutral", points: "closed" },
  { engine: "stopped", lights: "on", beam: "low", brake: "pressed", indicators: "right", gear: "neutral", points: "closed" },
  { engine: "stopped", main: "park", lights: "off" },
];
const MOMENTARY_STATES: readonly Partial<SwitchState>[] = [
  { engine: "cranking", start: "pressed", lights: "on", beam: "low", gear: "neutral" },
  { engine: "running", horn: "pressed", lights: "on", beam: "high", brake: "pressed", indicators: "left", gear: "in-gear" },
];

interface Currents {
  continuous: number;
  momentary: number;
  peak: number;
  /** Per state, in CONTINUOUS_STATES then MOMENTARY_STATES order: average current, A. */
  byState: number[];
}

function worstCurrents(net: Network, ids: Iterable<string>, without: ReadonlySet<string>): Map<string, Currents> {
  const out = new Map<string, Currents>();
  const list = [...ids];
  for (const id of list) out.set(id, { continuous: 0, momentary: 0, peak: 0, byState: [] });
  const take = (sol: Solution, momentary: boolean) => {
    for (const id of list) {
      const c = out.get(id)!;
      const avg = Math.max(Math.abs(sol.current(id)), sol.ac(id));
      const peak = Math.max(Math.abs(sol.peak(id)), sol.ac(id));
      if (momentary) c.momentary = Math.max(c.momentary, avg);
      else c.continuous = Math.max(c.continuous, avg);
      c.peak = Math.max(c.peak, peak);
      c.byState.push(avg);
    }
  };
  for (const s of CONTINUOUS_STATES) take(solve(net, { ...RIDING_POSITIONS, ...s } as SwitchState, { without }), false);
  for (const s of MOMENTARY_STATES) take(solve(net, { ...RIDING_POSITIONS, ...s } as SwitchState, { without }), true);
  return out;
}

// The whole loom's currents depend only on the network: solved once per network (the service keeps one per family).
const fullCache = new WeakMap<Network, Map<string, Currents>>();
function fullLoomCurrents(net: Network, ids: string[]): Map<string, Currents> {
  let m = fullCache.get(net);
  if (!m) fullCache.set(net, (m = worstCurrents(net, ids, new Set())));
  return m;
}

/** The states whose currents a circuit's drop is judged in: cranking for the starter, the horn pressed for the horn, the continuous ones for the rest. */
function statesOf(c: PlannerCircuit): number[] {
  const n = CONTINUOUS_STATES.length;
  if (c.system === "starting") return [n];
  if (/horn/.test(c.slug)) return [n + 1];
  return CONTINUOUS_STATES.map((_, i) => i);
}

// ---------------------------------------------------------------------------------------------
// Validation

function checkInput(input: PlannerInput) {
  if (input === null || typeof input !== "object") throw fail("input", "must be an object");
  if (!Array.isArray(input.circuits)) throw fail("circuits", "must be a list of circuits");
  if (!Array.isArray(input.wires)) throw fail("wires", "must be a list of wires");
  if (!Array.isArray(input.keep) || input.keep.length === 0) throw fail("keep", "choose at least one circuit to keep");
  const slugs = new Set(input.circuits.map((c) => c.slug));
  for (const slug of input.keep) {
    if (typeof slug !== "string" || !slugs.has(slug)) throw fail("keep", `"${String(slug)}" is not a circuit of this family; use one of ${[...slugs].join(", ")}`);
  }
  if (input.scheme !== "factory" && input.scheme !== "simple") throw fail("scheme", 'use "factory" or "simple"');
  if (!COLOUR_SYSTEM_IDS.includes(input.notation)) throw fail("notation", `use one of ${COLOUR_SYSTEM_IDS.join(", ")}`);
  const tempC = input.tempC ?? 20;
  try {
    copperTempFactor(tempC);
  } catch (e) {
    if (e instanceof WorkshopInputError) throw fail("tempC", e.message.replace(/^tempC: /, ""));
    throw e;
  }
  const wireIds = new Set(input.wires.map((w) => w.id));
  const lengths = input.lengthsM ?? {};
  if (lengths === null || typeof lengths !== "object" || Array.isArray(lengths)) throw fail("lengthsM", "must map wire ids to metres");
  for (const [id, v] of Object.entries(lengths)) {
    const field = `lengthsM.${id}`;
    if (!wireIds.has(id)) throw fail(field, `there is no wire "${id}" in this family`);
    if (typeof v !== "number" || !Number.isFinite(v)) throw fail(field, "must be a number of metres");
    if (v <= 0 || v > MAX_RUN_M) throw fail(field, `must be more than 0 and at most ${MAX_RUN_M} m, got ${v}`);
  }
  return { tempC, lengths };
}

/** Build the cut list. Returns {ok:false,error:{field,message}} for unknown circuits, empty keep, bad lengths. */
export function planLoom(input: PlannerInput): { ok: true; plan: PlanResult } | { ok: false; error: { field: string; message: string } } {
  try {
    return { ok: true, plan: buildPlan(input) };
  } catch (e) {
    if (e instanceof WorkshopInputError) {
      const prefix = `${e.field}: `;
      return { ok: false, error: { field: e.field, message: e.message.startsWith(prefix) ? e.message.slice(prefix.length) : e.message } };
    }
    throw e;
  }
}

// ---------------------------------------------------------------------------------------------
// Topology: each circuit's wires (supply or return side), the fuses and contacts on its supply path, and the nets

interface Topology {
  /** Per circuit: wires on the supply side (battery first) and on the return side, fuses and contacts on its supply path. */
  circuits: Map<string, { supply: string[]; ret: string[]; fuses: string[]; contacts: string[]; supplyOrder: string[] }>;
  netOf: Map<string, string>;
  earthNets: Set<string>;
  senseNodes: Set<string>;
}

function topology(input: PlannerInput): Topology {
  const graph = new LoomGraph([...input.network.elements]);
  const byId = new Map(input.network.elements.map((e) => [e.id, e]));
  const circuits: Topology["circuits"] = new Map();
  for (const c of input.circuits) {
    const sw = resolveSwitches(c.switches);
    const state = sw.ok ? sw.value : RIDING_POSITIONS;
    const entry = { supply: [] as string[], ret: [] as string[], fuses: [] as string[], contacts: [] as string[], supplyOrder: [] as string[] };
    for (const id of c.loads) {
      const load = byId.get(id);
      if (!load) continue;
      const loop = graph.loop(c.from, load, c.to, state);
      if (!loop) continue;
      for (const e of loop.supply.edges) {
        if (!entry.supplyOrder.includes(e.id)) entry.supplyOrder.push(e.id);
        if (e.kind === "wire" && !entry.supply.includes(e.id)) entry.supply.push(e.id);
        if (e.kind === "fuse" && !entry.fuses.includes(e.id)) entry.fuses.push(e.id);
        if (e.kind === "contact" && !entry.contacts.includes(e.id)) entry.contacts.push(e.id);
      }
      for (const e of loop.ret.edges) if (e.kind === "wire" && !entry.ret.includes(e.id)) entry.ret.push(e.id);
    }
    circuits.set(c.slug, entry);
  }
  // Nets: pins joined by wires and mated terminals (and so through splices), never through a switch, fuse or load.
  const parent = new Map<string, string>();
  const find = (n: string): string => { let r = n; while (parent.has(r) && parent.get(r) !== r) r = parent.get(r)!; return r; };
  const union = (a: string, b: string) => { for (const n of [a, b]) if (!parent.has(n)) parent.set(n, n); const ra = find(a), rb = find(b); if (ra !== rb) parent.set(ra, rb); };
  for (const e of input.network.elements) if (e.kind === "wire" || e.kind === "mate") union(e.a, e.b);
  const netOf = new Map<string, string>();
  for (const w of input.wires) { const e = byId.get(w.id); if (e) netOf.set(w.id, find(e.a)); }
  const earthPost = input.network.earth === "positive" ? input.network.plus : input.network.minus;
  const earthNets = new Set([find(earthPost), ...(input.frameEarth ? [find(input.frameEarth)] : [])]);
  const senseNodes = new Set<string>();
  for (const e of input.network.elements) if (e.kind === "sense" || (e.kind === "winding" && /pickup|pulser/i.test(`${e.label ?? ""}`))) { senseNodes.add(find(e.a)); senseNodes.add(find(e.b)); }
  return { circuits, netOf, earthNets, senseNodes };
}

// ---------------------------------------------------------------------------------------------
// Planning

function buildPlan(input: PlannerInput): PlanResult {
  const { tempC, lengths } = checkInput(input);
  const systemV = input.network.systemV;
  const keep = new Set(input.keep);
  const kept = input.circuits.filter((c) => keep.has(c.slug));
  const dropped = input.circuits.filter((c) => !keep.has(c.slug)).map(({ slug, name }) => ({ slug, name }));
  const keptLoads = new Set(kept.flatMap((c) => c.loads));
  const without = new Set(input.circuits.flatMap((c) => c.loads).filter((id) => !keptLoads.has(id)));
  const topo = topology(input);
  const warnings: string[] = [];

  // The wires the kept circuits pass, each with the circuits that use it.
  const rowCircuits = new Map<string, string[]>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    for (const id of [...t.supply, ...t.ret]) rowCircuits.set(id, [...(rowCircuits.get(id) ?? []), c.slug]);
  }
  const wires = input.wires.filter((w) => rowCircuits.has(w.id));
  const fuseIds = new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.fuses));
  const contactIds = new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.contacts));
  const cur = worstCurrents(input.network, [...wires.map((w) => w.id), ...fuseIds, ...contactIds], without);
  const full = fullLoomCurrents(input.network, input.wires.map((w) => w.id));

  // Lengths and roles.
  let assumed = 0;
  const rows: CutRow[] = wires.map((w) => {
    const c = cur.get(w.id)!;
    const net = topo.netOf.get(w.id) ?? w.id;
    const currentA = Math.max(c.continuous, c.momentary);
    const earth = topo.earthNets.has(net);
    const role: WireRole = earth ? "earth" : currentA < NO_CURRENT_A && c.peak < NO_CURRENT_A && topo.senseNodes.has(net) ? "signal" : "power";
    let lengthM: number;
    let lengthSource: CutRow["lengthSource"];
    const notes: string[] = [];
    if (lengths[w.id] !== undefined) { lengthM = lengths[w.id]; lengthSource = "builder"; }
    else if (typeof w.defaultLengthM === "number" && Number.isFinite(w.defaultLengthM) && w.defaultLengthM > 0) { lengthM = w.defaultLengthM; lengthSource = "family default"; }
    else { lengthM = ASSUMED_RUN_M; lengthSource = "assumed"; assumed++; notes.push(`Length assumed ${ASSUMED_RUN_M} m: measure the run and enter it.`); }
    if (role === "power" && currentA < NO_CURRENT_A) notes.push("Carries no current in any state the planner checks: check what it feeds before you leave it out or cut it thin.");
    return {
      wire: w.id, from: w.from, to: w.to, net, colour: "", colours: [], lengthM, lengthSource, currentA, continuousA: c.continuous, peakA: Math.max(c.peak, currentA),
      momentary: c.continuous < NO_CURRENT_A && c.momentary >= NO_CURRENT_A, role, circuits: rowCircuits.get(w.id)!, sizeMm2: 0, awg: null, dropV: 0, dropPct: 0,
      decidedBy: "minimum", fittings: [parseFitting(w.fromFitting).words, parseFitting(w.toFitting).words], notes,
    };
  });
  const rowById = new Map(rows.map((r) => [r.wire, r]));
  const wireById = new Map(input.wires.map((w) => [w.id, w]));

  // Sizing. A circuit's drop budget is shared among its wires so that the copper is least: area ∝ √I (Lagrange), every
  // wire at least what its own share needs; rounding up to standard sizes only lowers the drops.
  const k = (CLASS5_WORST_OHM_MM2_PER_KM / 1000) * copperTempFactor(tempC); // Ω·mm²/m, class 5, at temperature
  const needDrop = new Map<string, number>();
  const budgets = new Map<string, { pct: number; basis: string }>();
  const circuitAmps = new Map<string, (id: string) => number>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    // In the states this circuit works in: the starter's wires while cranking, the rest with everything continuous on.
    const states = statesOf(c);
    const amps = (id: string) => Math.max(...states.map((i) => cur.get(id)!.byState[i] ?? 0));
    const ws = [...t.supply, ...t.ret].map((id) => rowById.get(id)!).filter((r) => r.role !== "signal" && amps(r.wire) >= NO_CURRENT_A);
    const budget = circuitDropPct(c);
    budgets.set(c.slug, budget);
    circuitAmps.set(c.slug, amps);
    const B = (systemV * budget.pct) / 100;
    const S = ws.reduce((s, r) => s + r.lengthM * Math.sqrt(amps(r.wire)), 0);
    for (const r of ws) needDrop.set(r.wire, Math.max(needDrop.get(r.wire) ?? 0, (k * Math.sqrt(amps(r.wire)) * S) / B));
  }
  for (const r of rows) {
    if (r.role === "signal") {
      r.sizeMm2 = MIN_PRACTICAL_MM2; r.awg = smallestAwg(MIN_PRACTICAL_MM2); r.decidedBy = "minimum";
      r.notes.push(`Signal wire (no load current in any state): the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice).`);
      continue;
    }
    const drop = needDrop.get(r.wire) ?? 0;
    const amp = r.momentary ? r.currentA / SHORT_TERM_A_PER_MM2 : r.continuousA / AMPACITY_A_PER_MM2;
    const need = Math.max(drop, amp, MIN_PRACTICAL_MM2);
    const size = smallestMetric(need);
    if (size === undefined) throw fail("keep", `wire ${r.wire} (${r.from} → ${r.to}) needs ${fmt(need)} mm², more than the largest size offered: split the load or shorten the run`);
    r.sizeMm2 = size;
    r.awg = smallestAwg(need);
    r.decidedBy = need === MIN_PRACTICAL_MM2 && drop < MIN_PRACTICAL_MM2 && amp < MIN_PRACTICAL_MM2 ? "minimum" : amp >= drop ? "ampacity" : "voltage-drop";
    if (r.decidedBy === "ampacity") r.notes.push(r.momentary
      ? `Carries ${fmt(r.currentA)} A only while a button is held: sized by the short-term ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb.`
      : `Decided by the ampacity rule of thumb (${AMPACITY_A_PER_MM2} A/mm² continuous, German automotive practice), not a standard.`);
    if (r.decidedBy === "minimum") r.notes.push(`Raised to the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice).`);
    const w = wireById.get(r.wire)!;
    const fullA = full.get(r.wire)!;
    if (w.factorySizeMm2 !== null && w.factorySizeMm2 > r.sizeMm2 + EPS) {
      if (Math.max(fullA.continuous, fullA.momentary) <= r.currentA * 1.02) {
        // Dropping circuits took nothing off this wire: never cut it thinner than the factory did.
        r.sizeMm2 = w.factorySizeMm2;
        r.awg = smallestAwg(w.factorySizeMm2);
        r.decidedBy = "factory";
        r.notes.push(`Kept at the factory's ${w.factorySizeMm2} mm²: it carries as much as it did in the full loom.`);
      } else {
        r.notes.push(`Thinner than the factory's ${w.factorySizeMm2} mm²: with the dropped circuits gone it carries ${fmt(r.currentA)} A instead of ${fmt(Math.max(fullA.continuous, fullA.momentary))} A.`);
      }
    }
    if (r.role === "power" && /stator|phase|alternator/i.test(`${r.from} ${r.to}`)) r.notes.push(`Stator lead: carries the alternator's output (AC) at rpm, ${fmt(r.currentA)} A (common practice).`);
  }
  const setDrop = (r: CutRow) => {
    r.dropV = r.currentA > 0 ? r.currentA * strandedResistance(r.sizeMm2, r.lengthM, tempC) : 0;
    r.dropPct = (r.dropV / systemV) * 100;
  };

  // Fuses, after the sizes: a fuse must not exceed what the wires it protects stand short-term.
  const fuses = planFuses(input, kept, topo, rows, rowById, cur, warnings);
  rows.forEach(setDrop);

  // Each kept circuit's total drop against its target (what the budget promised).
  const circuitDrops: CircuitDrop[] = kept.map((c) => {
    const t = topo.circuits.get(c.slug)!;
    const amps = circuitAmps.get(c.slug)!;
    const dropV = [...t.supply, ...t.ret].reduce((s, id) => { const r = rowById.get(id); return s + (r ? amps(id) * strandedResistance(r.sizeMm2, r.lengthM, tempC) : 0); }, 0);
    const b = budgets.get(c.slug)!;
    return { circuit: c.slug, name: c.name, dropV: round3(dropV), budgetV: round3((systemV * b.pct) / 100), budgetPct: b.pct, basis: b.basis };
  });
  for (const d of circuitDrops) if (d.dropV > d.budgetV + 1e-6) warnings.push(`${d.name}: its wires drop ${d.dropV} V, over its ${d.budgetV} V target.`);

  // Unfused live wires: what protects them is the builder's routing.
  for (const r of rows) {
    if (r.role !== "power" || fuses.some((f) => f.protects.includes(r.wire))) continue;
    const supplySide = kept.some((c) => topo.circuits.get(c.slug)!.supply.includes(r.wire));
    if (supplySide) r.notes.push("Unfused: keep it short, sleeved and clear of sharp edges; fit the main fuse as close to the battery as you can.");
  }
  // Every wire's terminals against what it carries.
  for (const r of rows) {
    for (const [i, f] of [wireById.get(r.wire)!.fromFitting, wireById.get(r.wire)!.toFitting].entries()) {
      const fit = parseFitting(f);
      if (fit.ratingA !== null && r.continuousA > fit.ratingA) r.notes.push(`Its ${i === 0 ? "first" : "second"} end's ${fit.words} terminal is rated about ${fit.ratingA} A, less than the ${fmt(r.continuousA)} A it carries: use a larger terminal (${FITTING_SOURCE}).`);
    }
  }

  const legend = colourRows(rows, topo, input, kept);
  const byGauge: Record<string, number> = {};
  for (const r of [...rows].sort((a, b) => a.sizeMm2 - b.sizeMm2)) byGauge[String(r.sizeMm2)] = round3((byGauge[String(r.sizeMm2)] ?? 0) + r.lengthM);
  const totals = { wires: rows.length, lengthM: round3(rows.reduce((s, r) => s + r.lengthM, 0)), byGauge };
  const parts = partsList(rows, fuses, input);
  const assumptions = [
    `System ${systemV} V, conductor temperature ${fmt(tempC)} °C${input.tempC === undefined ? " (the default; copper's resistance rises 0.393 %/°C, so choose a higher temperature for a hot run)" : ""}.`,
    "Currents from the loom's electrics in its worst real states: charging at rpm with the lights, brake and an indicator on; standing with the ignition on and the points closed; cranking; the horn pressed. Dropped circuits draw nothing.",
    "Conductors: stranded automotive cable, IEC 60228 class 5 maximum resistance (19.5 mΩ/m at 1 mm²), at the conductor temperature.",
    "Drop targets hold for each circuit as a whole, supply and return wires together: 3 % for ignition, charging and the headlamp, 5 % while cranking, 10 % for the rest.",
    `Ampacity: at most ${AMPACITY_A_PER_MM2} A/mm² continuous and ${SHORT_TERM_A_PER_MM2} A/mm² for the seconds a button is held (rules of thumb of German automotive practice, not a standard). No wire thinner than ${MIN_PRACTICAL_MM2} mm² (common practice).`,
    `Fuses: at least ${FUSE_MARGIN} × the continuous current behind them (common practice), a momentary load within ${FUSE_MOMENTARY_FACTOR} × the rating (from memory), never above what the thinnest wire behind them stands short-term, and never above the factory's rating unless every terminal and switch contact behind it is rated for more.`,
    `Terminals: ${FITTING_SOURCE}.`,
    ...(assumed > 0 ? [`${assumed} wire${assumed === 1 ? " has" : "s have"} no entered or family length: ${ASSUMED_RUN_M} m assumed.`] : []),
    input.scheme === "factory" ? "Colours: the factory's." : `Colours: Loomlore's simple scheme: ${SIMPLE_SCHEME.join("; ")}.`,
  ];
  const ignored = Object.keys(lengths).filter((id) => !rowCircuits.has(id));
  if (ignored.length > 0) assumptions.push(`Lengths entered for ${ignored.join(", ")} are unused: no kept circuit passes ${ignored.length === 1 ? "that wire" : "those wires"}.`);
  return { rows, fuses, circuitDrops, legend, parts, dropped, totals, assumptions, warnings };
}

function planFuses(
  input: PlannerInput, kept: PlannerCircuit[], topo: Topology, rows: CutRow[], rowById: Map<string, CutRow>, cur: Map<string, Currents>, warnings: string[],
): FuseRow[] {
  const byId = new Map<string, Element>(input.network.elements.map((e) => [e.id, e]));
  // A wire is protected by the nearest fuse before it on the supply path of every kept circuit that uses it.
  const protector = new Map<string, string | null>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    let last: string | null = null;
    for (const id of t.supplyOrder) {
      if (t.fuses.includes(id)) last = id;
      if (rowById.has(id)) {
        const had = protector.get(id);
        protector.set(id, had === undefined ? last : had === last ? last : null);
      }
    }
  }
  const out: FuseRow[] = [];
  for (const id of new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.fuses))) {
    const el = byId.get(id)!;
    const name = input.names[id] ?? "fuse";
    const factoryA = el.ratingA ?? 0;
    const c = cur.get(id)!;
    const circuits = kept.filter((k) => topo.circuits.get(k.slug)!.fuses.includes(id)).map((k) => k.slug);
    const protects = rows.filter((r) => protector.get(r.wire) === id && r.role === "power").map((r) => r.wire);
    const contacts = [...new Set(kept.filter((k) => circuits.includes(k.slug)).flatMap((k) => {
      const t = topo.circuits.get(k.slug)!;
      return t.contacts.filter((x) => t.supplyOrder.indexOf(x) > t.supplyOrder.indexOf(id));
    }))];
    const need = FUSE_MARGIN * c.continuous;
    const momentaryNeed = Math.max(c.momentary, c.peak) / FUSE_MOMENTARY_FACTOR;
    const candidate = FUSE_RATINGS_A.find((r) => r >= Math.max(need, momentaryNeed) * (1 - EPS)) ?? FUSE_RATINGS_A.at(-1)!;
    const parts: string[] = [`Continuous ${fmt(c.continuous)} A behind it; ${FUSE_MARGIN} × that is ${fmt(need)} A.`];
    if (c.momentary > c.continuous) parts.push(`Momentary ${fmt(c.momentary)} A (a button held): within ${FUSE_MOMENTARY_FACTOR} × the rating for the seconds it lasts.`);
    const fuseWarnings: string[] = [];
    // What stands behind the fuse: the terminals of the wires it protects and the switch contacts on its path, each with
    // the current it carries itself. The trunk (what carries most of the fuse's current) sees whatever the fuse lets through.
    const behind: { what: string; ratingA: number; amps: number }[] = [];
    const seen = new Set<string>();
    for (const wid of protects) {
      const w = input.wires.find((x) => x.id === wid)!;
      const r = rowById.get(wid)!;
      for (const f of [w.fromFitting, w.toFitting]) {
        const fit = parseFitting(f);
        const what = `the ${fit.words} terminal${w.from.includes(":") ? ` at ${(f === w.fromFitting ? w.from : w.to)}` : ""}`;
        if (fit.ratingA !== null && !seen.has(what)) { seen.add(what); behind.push({ what, ratingA: fit.ratingA, amps: r.continuousA }); }
      }
    }
    for (const x of contacts) {
      const p = byId.get(x)?.params as { contactA?: number } | null | undefined;
      if (p?.contactA) behind.push({ what: input.names[x] ?? "a switch contact", ratingA: p.contactA, amps: cur.get(x)?.continuous ?? 0 });
    }
    const trunk = behind.filter((b) => b.amps >= 0.8 * c.continuous);
    let ratingA: number;
    let raised = false;
    if (candidate <= factoryA || factoryA === 0) {
      ratingA = candidate;
      parts.push(factoryA === 0 ? `${ratingA} A suits the kept circuits.` : ratingA < factoryA ? `${ratingA} A is enough for the kept circuits: smaller than the factory's ${factoryA} A (which also fed circuits now dropped), so it protects them better.` : `The factory's ${factoryA} A suits the kept circuits.`);
    } else {
      const weak = trunk.filter((b) => b.ratingA < candidate);
      if (weak.length === 0) {
        ratingA = candidate;
        raised = true;
        parts.push(`Raised above the factory's ${factoryA} A because the kept circuits draw ${fmt(c.continuous)} A continuous; what carries its whole current is rated for ${candidate} A or more (${trunk.map((b) => `${b.what} ≈ ${b.ratingA} A`).join("; ") || "no terminal or contact recorded"}).`);
      } else {
        ratingA = factoryA;
        const w = `"${name}": the kept circuits draw ${fmt(c.continuous)} A continuous, more than its factory ${factoryA} A suits (${FUSE_MARGIN} × ${fmt(c.continuous)} = ${fmt(need)} A). Not raised: ${weak.map((b) => `${b.what} (≈ ${b.ratingA} A)`).join(", ")} carries all of it and would then be the weakest part. Split the feed across a second fuse, or switch the heavy load through a relay.`;
        fuseWarnings.push(w);
        warnings.push(w);
      }
    }
    for (const b of behind) {
      if (b.amps > b.ratingA) fuseWarnings.push(`${b.what} carries ${fmt(b.amps)} A, more than the ≈ ${b.ratingA} A it is rated for (${FITTING_SOURCE}): fit a larger part or a relay.`);
    }
    // The fuse protects the wire: no wire behind it may be thinner than the fuse stands short-term; grow it if so.
    for (const wid of protects) {
      const r = rowById.get(wid)!;
      if (SHORT_TERM_A_PER_MM2 * r.sizeMm2 >= ratingA * (1 - EPS)) continue;
      const size = smallestMetric(ratingA / SHORT_TERM_A_PER_MM2)!;
      r.notes.push(`Upsized from ${r.sizeMm2} to ${size} mm² so the ${ratingA} A fuse "${name}" protects it (${SHORT_TERM_A_PER_MM2} A/mm² short-term, rule of thumb).`);
      r.sizeMm2 = size;
      const g = smallestAwg(size);
      if (g !== null && (r.awg === null || awgAreaMm2(g) > awgAreaMm2(r.awg))) r.awg = g;
      r.decidedBy = "fuse";
    }
    for (const wid of protects) rowById.get(wid)!.notes.push(`Protected by fuse "${name}" (${ratingA} A).`);
    out.push({ id, name, circuits, factoryA, ratingA, continuousA: c.continuous, peakA: Math.max(c.peak, c.momentary), raised, protects, basis: parts.join(" "), warnings: fuseWarnings });
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Colours

/** How to say what a net carries, for the legend. */
function netMeaning(net: string, rows: CutRow[], input: PlannerInput): string {
  const mine = rows.filter((r) => r.net === net);
  const circuits = [...new Set(mine.flatMap((r) => r.circuits))].map((s) => input.circuits.find((c) => c.slug === s)?.name ?? s);
  return `${mine.map((r) => `${r.from} → ${r.to}`).join("; ")} (${circuits.join(", ")})`;
}

function groupOf(net: string, rows: CutRow[], topo: Topology, input: PlannerInput, kept: PlannerCircuit[]): keyof typeof GROUP_BASE | "earth" {
  if (topo.earthNets.has(net)) return "earth";
  const mine = rows.filter((r) => r.net === net);
  if (mine.every((r) => r.role === "signal")) return "signal";
  const circuits = kept.filter((c) => mine.some((r) => r.circuits.includes(c.slug)));
  const systems = new Set(circuits.map((c) => c.system));
  const live = input.network.earth === "positive" ? input.network.minus : input.network.plus;
  const liveNet = topo.netOf.get(input.wires.find((w) => { const e = input.network.elements.find((x) => x.id === w.id); return e && (e.a === live || e.b === live); })?.id ?? "");
  if (net === liveNet) return "feed";
  if (systems.has("charging")) return "charging";
  // Joined to the live post through fuses only (no switch): still an unswitched feed.
  const fed = circuits.filter((c) => c.from === live);
  const onlyFuses = fed.length > 0 && fed.every((c) => {
    const t = topo.circuits.get(c.slug)!;
    const at = t.supplyOrder.findIndex((id) => mine.some((r) => r.wire === id));
    return at >= 0 && t.supplyOrder.slice(0, at).every((id) => !t.contacts.includes(id) && !input.network.elements.find((e) => e.id === id && e.kind !== "wire" && e.kind !== "mate" && e.kind !== "fuse"));
  });
  if (onlyFuses) return "feed";
  const returnSide = circuits.length > 0 && circuits.every((c) => topo.circuits.get(c.slug)!.ret.some((id) => mine.some((r) => r.wire === id)));
  if (systems.size > 1) return "switched";
  const only = [...systems][0];
  if (only === "ignition") return returnSide ? "negative" : "switched";
  if (only === "starting") return "starting";
  if (only === "lighting") return "lighting";
  if (only === "signals") return "signals";
  if (only === "instruments") return "instruments";
  return "other";
}

function colourRows(rows: CutRow[], topo: Topology, input: PlannerInput, kept: PlannerCircuit[]): LegendRow[] {
  const legend = new Map<string, LegendRow>();
  const write = (colours: ColourName[]) => {
    const t = encodeColour(colours[0], colours.slice(1), input.notation);
    return t ?? encodeColour(colours[0], colours.slice(1), "en") ?? colours.join("/");
  };
  if (input.scheme === "factory") {
    for (const r of rows) {
      const w = input.wires.find((x) => x.id === r.wire)!;
      r.colours = [...w.colours];
      r.colour = w.code;
      if (!w.colours.length) r.notes.push("Factory colour not recorded.");
      const row = legend.get(r.colour) ?? { colour: r.colour, colours: r.colours, nets: [], meaning: "" };
      if (!row.nets.includes(r.net)) row.nets.push(r.net);
      legend.set(r.colour, row);
    }
    for (const row of legend.values()) row.meaning = row.nets.map((n) => netMeaning(n, rows, input)).join(" | ");
    return [...legend.values()];
  }
  // Simple scheme: one colour per net, never shared, never black unless earth; base + at most one tracer.
  // First the live feed, then in the order the cut list meets them (battery outwards).
  const nets = [...new Set(rows.map((r) => r.net))];
  const used = new Set<string>(); // written codes (IEC writes R/W and W/R alike, so the written form must differ too)
  const taken = new Set<string>();
  const ok = (v: ColourName[]) => new Set(v).size === v.length && !(v.includes("green") && v.includes("yellow")) && !(v.length === 1 && v[0] === "black");
  const assign = new Map<string, ColourName[]>();
  const earthColours: ColourName[] = ["black"];
  const groups = new Map<string, string>(nets.map((n) => [n, groupOf(n, rows, topo, input, kept)]));
  for (const n of nets) {
    const g = groups.get(n)!;
    if (g === "earth") { assign.set(n, earthColours); continue; }
    const base = GROUP_BASE[g];
    const options: ColourName[][] = [[base], ...TRACERS.map((t) => [base, t] as ColourName[])];
    // When a group runs out, any free pair that keeps the rules.
    for (const b of Object.values(GROUP_BASE)) for (const t of TRACERS) options.push([b, t]);
    const pick = options.find((v) => ok(v) && !taken.has(v.join("/")) && !used.has(write(v)));
    if (!pick) throw fail("keep", "more nets than the simple scheme has colours for: use the factory colours");
    taken.add(pick.join("/"));
    used.add(write(pick));
    assign.set(n, pick);
  }
  for (const r of rows) {
    r.colours = assign.get(r.net)!;
    r.colour = write(r.colours);
    const row = legend.get(r.colour) ?? { colour: r.colour, colours: r.colours, nets: [], meaning: "" };
    if (!row.nets.includes(r.net)) row.nets.push(r.net);
    legend.set(r.colour, row);
  }
  for (const row of legend.values()) {
    row.meaning = row.colours.length === 1 && row.colours[0] === "black" ? "earth" : row.nets.map((n) => netMeaning(n, rows, input)).join(" | ");
  }
  return [...legend.values()];
}

// ---------------------------------------------------------------------------------------------
// Parts

function partsList(rows: CutRow[], fuses: FuseRow[], input: PlannerInput): PartRow[] {
  const parts: PartRow[] = [];
  const wire = new Map<string, number>();
  for (const r of rows) wire.set(`${r.sizeMm2} mm² ${r.colour}`, (wire.get(`${r.sizeMm2} mm² ${r.colour}`) ?? 0) + r.lengthM);
  for (const [item, m] of [...wire].sort()) parts.push({ kind: "wire", item, quantity: round3(m * (1 + CUTTING_ALLOWANCE)), unit: "m", notes: `${round3(m)} m plus ${CUTTING_ALLOWANCE * 100} % for cutting (common practice)` });
  const ratings = new Map<number, number>();
  for (const f of fuses) ratings.set(f.ratingA, (ratings.get(f.ratingA) ?? 0) + 1);
  for (const [a, n] of [...ratings].sort((x, y) => x[0] - y[0])) parts.push({ kind: "fuse", item: `${a} A fuse and holder`, quantity: n, unit: "pcs", notes: "plus a spare of each rating" });
  const ends = new Map<string, number>();
  let splices = 0;
  for (const r of rows) {
    const w = input.wires.find((x) => x.id === r.wire)!;
    for (const f of [w.fromFitting, w.toFitting]) {
      const fit = parseFitting(f);
      if (fit.family === "splice") splices++;
      else if (fit.family !== "unknown") ends.set(fit.words, (ends.get(fit.words) ?? 0) + 1);
    }
  }
  for (const [item, n] of [...ends].sort()) parts.push({ kind: "terminal", item: `${item} terminal`, quantity: n, unit: "pcs", notes: "one per wire end, crimped with the die for the wire's size" });
  if (splices) parts.push({ kind: "splice", item: "crimped splice with heat-shrink", quantity: new Set(rows.filter((r) => [input.wires.find((x) => x.id === r.wire)!.fromFitting, input.wires.find((x) => x.id === r.wire)!.toFitting].some((f) => parseFitting(f).family === "splice")).map((r) => r.net)).size, unit: "pcs", notes: "one per splice point" });
  return parts;
}

// ---------------------------------------------------------------------------------------------
// CSV

const CSV_HEADER = ["wire", "from", "to", "colour", "colours", "length_m", "length_source", "current_a", "continuous_a", "peak_a", "role", "circuits",
  "size_mm2", "awg", "drop_v", "drop_pct", "decided_by", "notes"] as const;

function csvCell(v: string | number | null): string {
  const s = v === null ? "" : String(v);
  // A leading =, +, -, @, tab or CR would make a spreadsheet run the cell as a formula.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

const num = (x: number, decimals: number) => String(Number(x.toFixed(decimals)));

/** The cut list as CSV (header row; RFC 4180 quoting; formula-looking cells defused). */
export function cutListCsv(plan: PlanResult): string {
  const lines = [CSV_HEADER.join(",")];
  for (const r of plan.rows) {
    lines.push([
      r.wire, r.from, r.to, r.colour, r.colours.join("/"), num(r.lengthM, 3), r.lengthSource, num(r.currentA, 2), num(r.continuousA, 2), num(r.peakA, 2), r.role,
      r.circuits.join("; "), num(r.sizeMm2, 2), r.awg === null ? null : awgLabel(r.awg).replace(" AWG", ""), num(r.dropV, 3), num(r.dropPct, 2), r.decidedBy, r.notes.join(" "),
    ].map(csvCell).join(","));
  }
  return lines.join("\r\n") + "\r\n";
}
