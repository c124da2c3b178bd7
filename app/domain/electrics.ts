/**
 * The loom's electrics in a given state: which way the current goes, how much each wire carries and what a meter reads
 * at each pin, with the engine stopped, cranking or running and the switches where they are. Ohm's and Kirchhoff's laws
 * on the loom graph (modified nodal analysis), nothing else:
 *
 * - Every element behaves according to the state: a contact is open or closed, the points are open or closed with the
 *   engine stopped and switch while it turns, a transistor ignition unit switches its coils off at rest (the demo's do),
 *   the charging output delivers its current only at rpm, a lamp is a resistor of V²/P.
 * - Pins joined by conductors (wires, mated terminals, closed contacts, fuses) are first merged into one node and the
 *   loads solved between those; then the current through every conductor follows from Kirchhoff's current law inside
 *   each merged node, with the wires' own resistance (stranded cable, IEC 60228 class 5), which gives the drops too.
 * - A switching element (points, an ignition unit's output, a flasher) is solved closed and open: the closed solution is
 *   the peak, the duty-weighted one what a wire carries on average and what a DC meter shows; a pin whose voltage swings
 *   between the two is not a steady test point.
 *
 * Pure TypeScript: the circuit walk, the diagnosis and the loom planner all read the same solution.
 */
import type { EdgeKind, GraphEdge, SwitchState } from "./loom-graph";
import { strandedOhmsPerM } from "./wire-size";

export type EngineState = "stopped" | "cranking" | "running";
export const ENGINE_STATES: readonly EngineState[] = ["stopped", "cranking", "running"];
export type PointsState = "closed" | "open";

/** The electrical model of one component link; omitted fields take the kind's defaults. */
export interface LinkParams {
  /** Lamp rating in W at the family's system voltage (a lamp is a resistor of V²/P). */
  watts?: number;
  /** Resistance of a winding or resistive load, Ω (otherwise the card's spec between the link's cavities). */
  ohms?: number;
  /** Current drawn at the system voltage, A (electronic units, motors, horns): a resistor of V/I. */
  amps?: number;
  /** Draws only while a button is held (horn, starter relay coil, starter motor): never counted as continuous. */
  momentary?: boolean;
  /** Fraction of the time a switching element conducts (the points' or a unit's dwell, a flasher's on-time). */
  duty?: number;
  /** What the element does in the engine's states (see `behaviour`). */
  role?: "ignition-output" | "charging-output" | "stator" | "exciter" | "field-drive" | "charge-lamp-driver" | "flasher";
  /** An ignition unit's output with the engine stopped: "off" (switched off at rest) or "on" (holds the coil on). */
  atRest?: "off" | "on";
  /** Charging output at rpm, A: what the charging output delivers and each stator lead carries (AC). */
  outputA?: number;
  /** A switch contact's rating, A. */
  contactA?: number;
}

/** One element of the network: a graph edge with its electrical model. */
export interface Element extends GraphEdge {
  params?: LinkParams | null;
  /** Resistance in Ω: a wire's conductor (from its size and length), or a load's from its card spec. */
  ohms?: number | null;
  /** A fuse's rating, A. */
  ratingA?: number | null;
}

/** A family's loom as a network. */
export interface Network {
  elements: readonly Element[];
  systemV: 6 | 12;
  earth: "negative" | "positive";
  /** Battery posts (node ids). */
  plus: string;
  minus: string;
  /** The family's regulated-voltage spec (at the battery, charging at rpm), if the card gives one. */
  regulated?: { min: number; max: number } | null;
}

/** The state the bike is in: switch positions with the engine's state and the points (see loom-graph SWITCH_POSITIONS). */
export type OperatingState = SwitchState;

/** Node ids of the live and the earth post. */
export function posts(net: Network): { live: string; earth: string } {
  return net.earth === "positive" ? { live: net.minus, earth: net.plus } : { live: net.plus, earth: net.minus };
}

export interface BatteryWindow {
  /** Taken for the expected readings. */
  nominal: number;
  min: number;
  max: number;
  /** In words, with sources. */
  basis: string;
}

/**
 * What a healthy battery reads at its posts in each engine state, scaled by the number of cells (6 V: 3, 12 V: 6):
 * resting 12.6 V fully charged, 12.2 V half charged (REFERENCE-FACTS §5, published); while cranking at least 9.6 V
 * (common practice); charging at rpm 13.5–14.5 V (common practice) or the family's regulated-voltage spec.
 */
export function batteryWindow(systemV: 6 | 12, engine: EngineState, regulated?: { min: number; max: number } | null): BatteryWindow {
  const k = systemV / 12;
  const v = (x: number) => Math.round(x * k * 100) / 100;
  if (engine === "running") {
    if (regulated) {
      return { nominal: (regulated.min + regulated.max) / 2, min: regulated.min, max: regulated.max, basis: `charging at rpm: the family's regulated-voltage spec, ${regulated.min}–${regulated.max} V at the battery` };
    }
    return { nominal: v(14), min: v(13.5), max: v(14.5), basis: `charging at rpm: ${v(13.5)}–${v(14.5)} V at the battery (common practice for lead-acid, ${k === 1 ? "12" : "6"} V)` };
  }
  if (engine === "cranking") {
    return { nominal: v(10.5), min: v(9.6), max: v(12.7), basis: `cranking: at least ${v(9.6)} V at the battery with a healthy battery and starter (common practice)` };
  }
  return { nominal: v(12.6), min: v(12.2), max: v(13.2), basis: `engine stopped: ${v(12.6)} V fully charged, ${v(12.2)} V half charged (resting voltage of a flooded lead-acid battery); below that, charge it before testing` };
}

type Behaviour =
  | { t: "open" }
  | { t: "conductor"; ohms: number }
  | { t: "switching"; ohms: number; duty: number }
  | { t: "resistor"; ohms: number }
  /**
   * Pushes current through the element from a to b (it leaves the element at b): `amps` short-circuit, with a shunt of
   * `ohms` inside, so the output delivers its rated current at the battery's voltage and rises to a finite voltage
   * (not infinity) when nothing takes it.
   */
  | { t: "current"; amps: number; ohms: number }
  /** Holds V(a) − V(b) = volts. */
  | { t: "voltage"; volts: number }
  /** An AC winding delivering `amps` (RMS) into the leads it is joined to. */
  | { t: "ac"; amps: number };

/** Nominal resistances of healthy conductors, Ω: enough to tell the current's share, far below any allowed drop. */
const CONDUCTOR_OHMS: Partial<Record<EdgeKind, number>> = { mate: 0.002, contact: 0.005, fuse: 0.005, breaker: 0.01, transistor: 0.1 };
/**
 * A closed contact's resistance. A heavy contact (a starter relay's, rated for its current) is built to lose about 0.1 V at
 * that current (common practice: a healthy closed contact drops ≤ 0.1–0.2 V under full load), so it is less than a
 * switch contact's 5 mΩ; a rating the data does not give leaves the 5 mΩ.
 */
export function contactOhms(ratedA: number | undefined): number {
  const base = CONDUCTOR_OHMS.contact!;
  return ratedA !== undefined && ratedA > 0 ? Math.min(base, 0.1 / ratedA) : base;
}
/** A wire whose size or length the library does not know: 1 m of 0.75 mm² class 5 cable. */
const DEFAULT_WIRE_OHMS = strandedOhmsPerM(0.75) * 1;
const DEFAULT_DUTY = { breaker: 0.6, "ignition-output": 0.5, flasher: 0.5, "field-drive": 0.6 } as const;

const loadOhms = (e: Element, systemV: number, fallback: number): number => {
  const p = e.params ?? {};
  if (p.ohms !== undefined && p.ohms > 0) return p.ohms;
  if (p.watts !== undefined && p.watts > 0) return (systemV * systemV) / p.watts;
  if (p.amps !== undefined && p.amps > 0) return systemV / p.amps;
  if (e.ohms !== undefined && e.ohms !== null && e.ohms > 0) return e.ohms;
  return fallback;
};

/** How one element behaves in a state (before any fault). */
export function behaviour(e: Element, state: OperatingState, net: Network, batteryV: number): Behaviour {
  const p = e.params ?? {};
  const engine = state.engine as EngineState;
  const turning = engine !== "stopped";
  const closedBySwitch = !e.switchId || !e.positions || e.positions.includes(state[e.switchId as keyof OperatingState]);
  switch (e.kind) {
    case "wire":
      return { t: "conductor", ohms: e.ohms && e.ohms > 0 ? e.ohms : DEFAULT_WIRE_OHMS };
    case "mate":
    case "fuse":
      return { t: "conductor", ohms: CONDUCTOR_OHMS[e.kind]! };
    case "contact":
      return closedBySwitch ? { t: "conductor", ohms: contactOhms(p.contactA) } : { t: "open" };
    case "breaker":
      if (!turning) return state.points === "open" ? { t: "open" } : { t: "conductor", ohms: CONDUCTOR_OHMS.breaker! };
      return { t: "switching", ohms: CONDUCTOR_OHMS.breaker!, duty: p.duty ?? DEFAULT_DUTY.breaker };
    case "transistor": {
      const ohms = CONDUCTOR_OHMS.transistor!;
      if (!closedBySwitch) return { t: "open" };
      switch (p.role) {
        case "ignition-output":
          if (!turning) return p.atRest === "on" ? { t: "conductor", ohms } : { t: "open" };
          return { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY["ignition-output"] };
        case "charge-lamp-driver":
          return engine === "running" ? { t: "open" } : { t: "conductor", ohms };
        case "field-drive":
          return engine === "running" ? { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY["field-drive"] } : { t: "conductor", ohms };
        case "flasher":
          return { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY.flasher };
        default:
          return { t: "conductor", ohms };
      }
    }
    case "winding":
      if (p.role === "stator") return engine === "running" ? { t: "ac", amps: p.outputA ?? 0 } : { t: "resistor", ohms: loadOhms(e, net.systemV, 0.5) };
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, 3 * (net.systemV / 12) ** 2) } : { t: "open" };
    case "lamp":
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, (net.systemV * net.systemV) / 5) } : { t: "open" };
    case "load":
      if (p.role === "charging-output") {
        if (engine !== "running" || !p.outputA) return { t: "open" };
        // A current source with a parallel resistance: rated output at the battery's voltage, three times the system voltage with nothing connected.
        const vMax = 3 * net.systemV;
        const isc = (p.outputA * vMax) / Math.max(1, vMax - batteryV);
        return { t: "current", amps: isc, ohms: vMax / isc };
      }
      if (p.role === "exciter") return engine === "running" ? { t: "voltage", volts: batteryV } : { t: "open" };
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, net.systemV / 1) } : { t: "open" };
    case "sense":
      return { t: "open" };
    case "source":
      return { t: "voltage", volts: batteryV };
  }
}

/** A fault injected for tests and for "what would I read if …": an element opened, given a resistance, or a pin shorted to the earth post. */
export type Fault = { t: "open" } | { t: "resistance"; ohms: number } | { t: "short-to-earth" };

export interface SolveOptions {
  /** Battery EMF for the solve; default the state's nominal (`batteryWindow`). */
  batteryV?: number;
  /** Load links taken out (circuits the planner drops): they draw nothing. */
  without?: ReadonlySet<string>;
  /** Faults by element id; for "short-to-earth" the key is a node id. */
  faults?: ReadonlyMap<string, Fault>;
}

/** The network in one state. Voltages are to the battery − post; `reading` is what a meter shows with its black lead on the earth post. */
export interface Solution {
  state: OperatingState;
  batteryV: number;
  window: BatteryWindow;
  /** Average (DC meter) voltage of a node to the battery − post. */
  volts(node: string): number;
  /** What a DC meter reads at a node with its black lead on the earth post (negative on a positive-earth bike's live side). */
  reading(node: string): number;
  /** Average current through an element, a → b, A (what heats a wire). */
  current(id: string): number;
  /** Current at the worst instant (every switching element closed), a → b, A. */
  peak(id: string): number;
  /** AC current (RMS) through an element from a stator winding, A. */
  ac(id: string): number;
  /** Nodes whose voltage swings with a switching element: no steady reading there. */
  switching: ReadonlySet<string>;
  /** How a node gets its voltage: joined by conductors to the live post, to the earth post, only through loads, or to nothing. */
  via(node: string): "live" | "earth" | "load" | "none";
  /** Elements that conduct in this state (for "is this path loaded"). */
  behaviourOf(id: string): Behaviour["t"];
}

const GMIN = 1e-9; // S, from every node to the reference: floating nodes settle instead of making the matrix singular (as in SPICE)

/** Solve the network in a state. */
export function solve(net: Network, state: OperatingState, opts: SolveOptions = {}): Solution {
  const window = batteryWindow(net.systemV, state.engine as EngineState, net.regulated);
  const batteryV = opts.batteryV ?? window.nominal;
  const faults = opts.faults ?? new Map<string, Fault>();
  const elements: { e: Element; b: Behaviour }[] = [];
  for (const e of net.elements) {
    let b = behaviour(e, state, net, batteryV);
    if (opts.without?.has(e.id) && (b.t === "resistor" || b.t === "current" || b.t === "ac")) b = { t: "open" };
    const f = faults.get(e.id);
    if (f?.t === "open") b = { t: "open" };
    else if (f?.t === "resistance") {
      if (b.t === "conductor" || b.t === "switching" || b.t === "resistor") b = { ...b, ohms: b.ohms + f.ohms };
    }
    elements.push({ e, b });
  }
  const { earth } = posts(net);
  for (const [node, f] of faults) {
    if (f.t === "short-to-earth") elements.push({ e: { id: `short:${node}`, a: node, b: earth, kind: "wire" }, b: { t: "conductor", ohms: 0.01 } });
  }
  const switchingIdx = elements.map((x, i) => (x.b.t === "switching" ? i : -1)).filter((i) => i >= 0);
  const fix = (closed: ReadonlySet<number>) =>
    elements.map((x, i) => {
      if (x.b.t !== "switching") return x;
      return { e: x.e, b: closed.has(i) ? ({ t: "conductor", ohms: x.b.ohms } as Behaviour) : ({ t: "open" } as Behaviour) };
    });
  const open = solveTopology(fix(new Set()), net);
  const variants = switchingIdx.map((i) => ({ i, duty: (elements[i].b as { duty: number }).duty, sol: solveTopology(fix(new Set([i])), net) }));
  const allClosed = switchingIdx.length > 1 ? solveTopology(fix(new Set(switchingIdx)), net) : variants[0]?.sol ?? open;

  const avgV = (n: string) => variants.reduce((v, k) => v + k.duty * ((k.sol.V.get(n) ?? 0) - (open.V.get(n) ?? 0)), open.V.get(n) ?? 0);
  const avgI = (id: string) => variants.reduce((v, k) => v + k.duty * ((k.sol.I.get(id) ?? 0) - (open.I.get(id) ?? 0)), open.I.get(id) ?? 0);
  const swing = 0.05 * net.systemV;
  const switching = new Set<string>();
  for (const n of open.V.keys()) {
    if (variants.some((k) => Math.abs((k.sol.V.get(n) ?? 0) - (open.V.get(n) ?? 0)) > swing)) switching.add(n);
  }
  const earthV = () => open.V.get(earth) ?? 0;
  const byId = new Map(elements.map((x) => [x.e.id, x.b.t]));
  return {
    state, batteryV, window,
    volts: avgV,
    reading: (n) => avgV(n) - earthV(),
    current: avgI,
    peak: (id) => {
      const c = allClosed.I.get(id) ?? 0;
      const o = open.I.get(id) ?? 0;
      return Math.abs(c) >= Math.abs(o) ? c : o;
    },
    ac: (id) => Math.max(open.ac.get(id) ?? 0, ...variants.map((k) => k.sol.ac.get(id) ?? 0)),
    switching,
    via: (n) => open.via.get(n) ?? "none",
    behaviourOf: (id) => byId.get(id) ?? "open",
  };
}

interface TopologySolution {
  V: Map<string, number>;
  I: Map<string, number>;
  ac: Map<string, number>;
  via: Map<string, "live" | "earth" | "load" | "none">;
}

/** One solve with every element's behaviour fixed (no switching left). */
function solveTopology(elements: readonly { e: Element; b: Behaviour }[], net: Network): TopologySolution {
  // 1. Merge pins joined by conductors.
  const parent = new Map<string, string>();
  const find = (n: string): string => {
    let r = n;
    for (let p = parent.get(r); p !== undefined && p !== r; p = parent.get(r)) r = p;
    for (let y = n, p = parent.get(y); p !== undefined && p !== r; y = p, p = parent.get(y)) parent.set(y, r);
    return r;
  };
  const touch = (n: string) => { if (!parent.has(n)) parent.set(n, n); };
  for (const { e } of elements) { touch(e.a); touch(e.b); }
  touch(net.plus); touch(net.minus);
  for (const { e, b } of elements) if (b.t === "conductor") { const ra = find(e.a), rb = find(e.b); if (ra !== rb) parent.set(ra, rb); }

  const ref = find(net.minus);
  const supers: string[] = [];
  const index = new Map<string, number>();
  for (const n of parent.keys()) {
    const r = find(n);
    if (r !== ref && !index.has(r)) { index.set(r, supers.length); supers.push(r); }
  }
  const sources = elements.filter(({ b }) => b.t === "voltage");
  const size = supers.length + sources.length;
  const A = new Float64Array(size * size);
  const z = new Float64Array(size);
  const at = (r: string) => (r === ref ? -1 : index.get(r)!);
  const stampG = (a: number, b: number, g: number) => {
    if (a >= 0) A[a * size + a] += g;
    if (b >= 0) A[b * size + b] += g;
    if (a >= 0 && b >= 0) { A[a * size + b] -= g; A[b * size + a] -= g; }
  };
  for (let i = 0; i < supers.length; i++) A[i * size + i] += GMIN;
  for (const { e, b } of elements) {
    const sa = at(find(e.a)), sb = at(find(e.b));
    if (b.t === "resistor" && sa !== sb) stampG(sa, sb, 1 / b.ohms);
    if (b.t === "current") { if (sa >= 0) z[sa] -= b.amps; if (sb >= 0) z[sb] += b.amps; if (sa !== sb) stampG(sa, sb, 1 / b.ohms); }
  }
  sources.forEach(({ e, b }, k) => {
    const row = supers.length + k;
    const sa = at(find(e.a)), sb = at(find(e.b));
    // MNA: the source's current j flows from a through the source to b (so it leaves node a's KCL).
    if (sa >= 0) { A[sa * size + row] += 1; A[row * size + sa] += 1; }
    if (sb >= 0) { A[sb * size + row] -= 1; A[row * size + sb] -= 1; }
    z[row] = (b as { volts: number }).volts;
  });
  const x = solveDense(A, z, size);
  const superV = (r: string) => (r === ref ? 0 : x[index.get(r)!]);

  // 2. Currents through the loads and sources, and what each injects into its pins.
  const I = new Map<string, number>();
  const ac = new Map<string, number>();
  const inject = new Map<string, number>();
  const add = (n: string, v: number) => inject.set(n, (inject.get(n) ?? 0) + v);
  sources.forEach(({ e }, k) => {
    const j = x[supers.length + k];
    I.set(e.id, j);
    add(e.a, -j); add(e.b, j);
  });
  for (const { e, b } of elements) {
    let i = 0;
    if (b.t === "resistor") i = (superV(find(e.a)) - superV(find(e.b))) / b.ohms;
    else if (b.t === "current") i = b.amps - (superV(find(e.b)) - superV(find(e.a))) / b.ohms;
    else continue;
    I.set(e.id, i);
    add(e.a, -i); add(e.b, i);
  }

  // 3. Inside each merged node: the conductors' currents (Kirchhoff's current law) and drops, from the wires' resistance.
  const members = new Map<string, string[]>();
  for (const n of parent.keys()) { const r = find(n); (members.get(r) ?? members.set(r, []).get(r)!).push(n); }
  const conductorsOf = new Map<string, { e: Element; ohms: number }[]>();
  for (const { e, b } of elements) if (b.t === "conductor") { const r = find(e.a); (conductorsOf.get(r) ?? conductorsOf.set(r, []).get(r)!).push({ e, ohms: b.ohms }); }
  const sourceNodes = new Set(sources.flatMap(({ e }) => [e.a, e.b]));
  const V = new Map<string, number>();
  for (const [r, nodes] of members) {
    const base = superV(r);
    const conds = conductorsOf.get(r) ?? [];
    if (nodes.length === 1 || conds.length === 0) { for (const n of nodes) V.set(n, base); continue; }
    // The merged node's voltage is the solved one at a source's terminal (the battery post), else where most current enters.
    const anchor = nodes.includes(net.minus) ? net.minus : nodes.find((n) => sourceNodes.has(n))
      ?? nodes.reduce((m, n) => (Math.abs(inject.get(n) ?? 0) > Math.abs(inject.get(m) ?? 0) ? n : m), nodes[0]);
    const phi = conductorPotentials(nodes, conds, inject, anchor);
    for (const n of nodes) V.set(n, base + (phi.get(n) ?? 0));
    for (const { e, ohms } of conds) I.set(e.id, ((phi.get(e.a) ?? 0) - (phi.get(e.b) ?? 0)) / ohms);
  }

  // 4. AC from active stator windings: every conductor of the leads joined to the winding carries its current.
  for (const { e, b } of elements) {
    if (b.t !== "ac" || b.amps <= 0) continue;
    for (const r of new Set([find(e.a), find(e.b)])) {
      for (const { e: c } of conductorsOf.get(r) ?? []) ac.set(c.id, Math.max(ac.get(c.id) ?? 0, b.amps));
    }
    ac.set(e.id, b.amps);
  }

  // 5. How each node gets its voltage.
  const live = find(net.earth === "positive" ? net.minus : net.plus);
  const earthRoot = find(net.earth === "positive" ? net.plus : net.minus);
  const touchesLoad = new Set<string>();
  for (const { e, b } of elements) if (b.t === "resistor" || b.t === "voltage" || b.t === "current") { touchesLoad.add(find(e.a)); touchesLoad.add(find(e.b)); }
  const via = new Map<string, "live" | "earth" | "load" | "none">();
  for (const n of parent.keys()) {
    const r = find(n);
    via.set(n, r === live ? "live" : r === earthRoot ? "earth" : touchesLoad.has(r) ? "load" : "none");
  }
  return { V, I, ac, via };
}

/** Potentials inside one merged node, relative to its anchor, from the currents injected at its pins (Laplacian solve). */
function conductorPotentials(nodes: string[], conds: { e: Element; ohms: number }[], inject: Map<string, number>, anchor: string): Map<string, number> {
  const others = nodes.filter((n) => n !== anchor);
  const idx = new Map(others.map((n, i) => [n, i]));
  const m = others.length;
  const phi = new Map<string, number>([[anchor, 0]]);
  if (m === 0) return phi;
  const L = new Float64Array(m * m);
  const rhs = new Float64Array(m);
  for (const { e, ohms } of conds) {
    const g = 1 / ohms;
    const a = idx.get(e.a) ?? -1, b = idx.get(e.b) ?? -1;
    if (a >= 0) L[a * m + a] += g;
    if (b >= 0) L[b * m + b] += g;
    if (a >= 0 && b >= 0) { L[a * m + b] -= g; L[b * m + a] -= g; }
  }
  // A conductor-joined node is connected by construction; the injections sum to the anchor's share.
  for (const [n, i] of idx) { rhs[i] = inject.get(n) ?? 0; L[i * m + i] += 1e-12; }
  const sol = solveDense(L, rhs, m);
  for (const [n, i] of idx) phi.set(n, sol[i]);
  return phi;
}

/** Gaussian elimination with partial pivoting; A is n×n row-major and is overwritten. */
function solveDense(A: Float64Array, b: Float64Array, n: number): Float64Array {
  const x = Float64Array.from(b);
  for (let col = 0; col < n; col++) {
    let piv = col;
    let best = Math.abs(A[col * n + col]);
    for (let r = col + 1; r < n; r++) {
      const v = Math.abs(A[r * n + col]);
      if (v > best) { best = v; piv = r; }
    }
    if (best === 0) continue;
    if (piv !== col) {
      for (let c = col; c < n; c++) { const t = A[col * n + c]; A[col * n + c] = A[piv * n + c]; A[piv * n + c] = t; }
      const t = x[col]; x[col] = x[piv]; x[piv] = t;
    }
    const d = A[col * n + col];
    for (let r = col + 1; r < n; r++) {
      const f = A[r * n + col] / d;
      if (f === 0) continue;
      for (let c = col; c < n; c++) A[r * n + c] -= f * A[col * n + c];
      x[r] -= f * x[col];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = x[r];
    for (let c = r + 1; c < n; c++) s -= A[r * n + c] * x[c];
    const d = A[r * n + r];
    x[r] = d === 0 ? 0 : s / d;
  }
  return x;
}
