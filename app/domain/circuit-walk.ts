/**
 * The circuit walk: probe points along a family's circuit, what each should read in a given state of the bike (switch
 * positions, engine stopped, cranking or running, points open or closed), and where the fault lies from the readings a
 * rider enters.
 *
 * Expected readings come from the loom's electrics (electrics.ts): the voltage each pin sits at, whether current flows
 * through each stretch (a poor contact only shows a drop under load), and which pins swing with a switching element
 * (no steady reading there). The diagnosis compares the drop between consecutive points with the drop the healthy loom
 * would show: more than ≈ 0.2 V per contact under load is a high resistance there (common practice), a point that
 * loses all its voltage is an open, and a point pulled to earth (or fed) where the loom says it should not be is a short.
 */
import { batteryWindow, posts, solve, type BatteryWindow, type EngineState, type Network, type Solution } from "./electrics";
import type { GraphEdge, LoomGraph, SwitchState } from "./loom-graph";

/** What the walk needs to know about a node of the graph. */
export interface WalkNode {
  id: string;
  kind: "loom" | "component" | "terminal" | "splice";
  connector: string | null; // slug, for connector cavities
  connectorName: string | null;
  cavity: string; // cavity label, or the terminal's label for bare terminals
  code: string | null;
  componentName: string | null;
}

export interface WalkCircuit {
  slug: string;
  name: string;
  from: string;
  to: string;
  loads: GraphEdge[];
  powered: boolean; // from the battery's live post; otherwise a passive loop measured with an ohmmeter
}

export interface Expect {
  quantity: "voltage" | "continuity" | "resistance";
  min: number | null;
  max: number | null;
  unit: string;
  /** The healthy loom's value (volts to the earth post), for a steady voltage. */
  nominal?: number | null;
  /** false: the pin swings with a switching element in this state; a DC meter shows no steady value. */
  steady?: boolean;
  note?: string | null;
}

export interface ProbePoint {
  step: number;
  node: string;
  connector: string | null;
  connectorName: string | null;
  cavity: string;
  colour: string | null;
  label: string;
  side: "supply" | "return";
  after: number | null; // the previous point on this point's own path (null for the first)
  before: number | null; // the next point on this point's own path towards the end (null for the last)
  elementsBefore: string[]; // what lies between `after` and this point
  expect: Expect;
  how: string;
  /** How the pin gets its voltage in this state (powered walks). */
  via?: "live" | "earth" | "load" | "none";
}

/** What lies between two consecutive probe points. */
export interface Segment {
  from: number;
  to: number;
  elements: string[];
  /** Graph edge ids of those elements, and their kinds. */
  edges: string[];
  kinds: string[];
  /** Contacts, fuses, mated terminals and switching elements: each may lose ≈ 0.2 V under load (common practice). */
  contacts: number;
  /** A load lies between: its drop is the work it does, not a fault. */
  hasLoad: boolean;
  /** Current flows through this stretch in this state (more than 50 mA). */
  loaded: boolean;
  /** The drop allowed here beyond the healthy loom's, V. */
  allowedV: number;
  /** An element between is open in this state (a switch off, the points open, a unit's output off): the drop across it is expected. */
  open: boolean;
}

export interface Walk {
  circuit: { slug: string; name: string; powered: boolean };
  switches: SwitchState;
  probePoints: ProbePoint[];
  segments: Segment[];
  loadSteps: [number, number][];
  loadNames: string[];
  /** Powered walks: the meter's reference and the battery's window in this state. */
  reference: { post: "+" | "-"; earth: "negative" | "positive"; words: string } | null;
  battery: BatteryWindow | null;
  /** Current flows through the circuit's load(s) in this state. */
  loaded: boolean;
  /** Things the rider should know about this state: assumptions, what cannot be seen, how to get the state. */
  notes: string[];
}

/** Allowed loss across one closed contact or joint under load, V (common practice). */
export const CONTACT_DROP_V = 0.2;
/** Allowed loss over a whole circuit's supply (or earth) side under load, V (common practice). */
export const CIRCUIT_DROP_V = 0.5;
/** A loss of more than this share of the battery's voltage across one stretch is taken as an open, not a high resistance. */
const OPEN_SHARE = 0.3;
/** A stretch carrying less than this is taken as unloaded, A. */
const LOADED_A = 0.05;
/** A meter's own noise and the last digit: what an unloaded stretch may differ by, V. */
const NOISE_V = 0.1;

const CONTACT_KINDS = new Set(["contact", "fuse", "mate", "breaker", "transistor"]);
const LOAD_KINDS = new Set(["winding", "load", "lamp", "sense", "source"]);

const isPoint = (n: WalkNode | undefined) => !!n && (n.kind === "loom" || n.kind === "terminal");
const round2 = (x: number) => Math.round(x * 100) / 100;

/** Lay out the probe points: every loom-side cavity and bare terminal along each load's loop, in the order the current passes them. */
function layout(graph: LoomGraph, nodes: Map<string, WalkNode>, circuit: WalkCircuit, switches: SwitchState, describe: (e: GraphEdge) => string) {
  const points: ProbePoint[] = [];
  const stepOf = new Map<string, number>();
  const loadSteps: [number, number][] = [];
  const segments: { from: number; to: number; elements: string[]; edges: GraphEdge[] }[] = [];
  for (const load of circuit.loads) {
    // Lay the loop out in the circuit's working positions, so the walk exists even with a switch open.
    const loop = graph.loop(circuit.from, load, circuit.to, workingPositions(graph, circuit, load, switches));
    if (!loop) return null;
    const seq: { node: string; edge: GraphEdge | null; side: "supply" | "return" }[] = [
      ...loop.supply.nodes.map((n, i) => ({ node: n, edge: i === 0 ? null : loop.supply.edges[i - 1], side: "supply" as const })),
      ...loop.ret.nodes.map((n, i) => ({ node: n, edge: i === 0 ? load : loop.ret.edges[i - 1], side: "return" as const })),
    ];
    let prev: number | null = null;
    let between: GraphEdge[] = [];
    let loadIn: number | null = null;
    let pastLoad = false;
    for (const { node, edge, side } of seq) {
      if (edge) between.push(edge);
      if (side === "return" && !pastLoad) pastLoad = true;
      const info = nodes.get(node);
      if (!isPoint(info)) continue;
      let step = stepOf.get(node);
      if (step === undefined) {
        step = points.length + 1;
        stepOf.set(node, step);
        points.push({
          step, node, connector: info!.connector, connectorName: info!.connectorName, cavity: info!.cavity, colour: info!.code,
          label: info!.connector ? `${info!.connectorName}, cavity ${info!.cavity}` : `${info!.componentName}, terminal ${info!.cavity}`,
          side, after: prev, before: null, elementsBefore: between.map(describe), expect: { quantity: "voltage", min: null, max: null, unit: "V" }, how: "",
        });
      }
      if (prev !== null && prev !== step) {
        if (points[prev - 1].before === null) points[prev - 1].before = step;
        if (!segments.some((x) => x.from === prev && x.to === step)) segments.push({ from: prev, to: step, elements: between.map(describe), edges: between });
      }
      if (side === "supply") loadIn = step;
      else if (loadIn !== null && pastLoad && !loadSteps.some(([a]) => a === loadIn)) loadSteps.push([loadIn, step]);
      prev = step;
      between = [];
    }
  }
  return { points, segments, loadSteps };
}

/** Switch positions in which the loop through `load` closes: the rider's own where they work, else the first that does. */
function workingPositions(graph: LoomGraph, circuit: WalkCircuit, load: GraphEdge, given: SwitchState): SwitchState {
  if (graph.loop(circuit.from, load, circuit.to, given)) return given;
  const options: Record<string, string[]> = {
    main: ["on", "park"], kill: ["run"], start: ["pressed", "released"], lights: ["on", "off"], brake: ["pressed", "released"],
    beam: ["low", "high"], indicators: ["left", "right", "off"], horn: ["pressed", "released"], gear: ["neutral", "in-gear"],
    engine: ["stopped", "cranking", "running"], points: ["closed", "open"],
  };
  let combos: SwitchState[] = [{ ...given }];
  for (const id of Object.keys(given) as (keyof SwitchState)[]) {
    const next: SwitchState[] = [];
    for (const c of combos) for (const pos of options[id] ?? [c[id]]) next.push({ ...c, [id]: pos });
    combos = next.length > 4096 ? next.slice(0, 4096) : next;
  }
  return combos.find((c) => graph.loop(circuit.from, load, circuit.to, c)) ?? given;
}

/**
 * The walk of one circuit in one state. Powered circuits are read with a voltmeter to the earth post, from the loom's
 * solved electrics; passive loops (pickups, stators, the field) with an ohmmeter, from the card's specs.
 */
export function walkCircuit(
  graph: LoomGraph,
  nodes: Map<string, WalkNode>,
  circuit: WalkCircuit,
  state: SwitchState,
  net: Network | null,
  describe: (e: GraphEdge) => string,
  loadSpec: (load: GraphEdge) => { min: number; max: number; unit: string } | null,
): Walk | null {
  const laid = layout(graph, nodes, circuit, state, describe);
  if (!laid) return null;
  const { points, loadSteps } = laid;
  const notes: string[] = [];
  if (!circuit.powered || !net) {
    const ref = points[0];
    for (const p of points) {
      if (p === ref) {
        p.expect = { quantity: "continuity", min: 0, max: 0, unit: "Ω" };
        p.how = `Ignition off and the connectors of this loop unplugged from their units. Put one ohmmeter lead on ${p.label}${p.colour ? ` (${p.colour})` : ""} and keep it there.`;
        continue;
      }
      const beyondLoad = loadSteps.some(([, out]) => p.step >= out);
      const spec = beyondLoad ? circuit.loads.map(loadSpec).find(Boolean) ?? null : null;
      // A metre or two of loom adds well under 1 Ω: the winding's range plus that allowance.
      p.expect = beyondLoad
        ? spec ? { quantity: "resistance", min: spec.min, max: spec.max + 1, unit: spec.unit } : { quantity: "continuity", min: 0, max: null, unit: "Ω" }
        : { quantity: "continuity", min: 0, max: 1, unit: "Ω" };
      p.how = `Other lead on ${p.label}${p.colour ? ` (${p.colour})` : ""}, from the wire side.`;
    }
    const segments = laid.segments.map((s) => ({ ...s, edges: s.edges.map((e) => e.id), kinds: s.edges.map((e) => e.kind), contacts: contactsIn(s.edges), hasLoad: s.edges.some((e) => LOAD_KINDS.has(e.kind)), loaded: false, allowedV: 0, open: false }));
    notes.push("Measured with an ohmmeter, ignition off: the loop's ends are unplugged from the units they feed, so nothing else in the loom adds to the reading.");
    return { circuit: { slug: circuit.slug, name: circuit.name, powered: false }, switches: state, probePoints: points, segments, loadSteps, loadNames: circuit.loads.map(describe), reference: null, battery: null, loaded: false, notes };
  }

  const sol = solve(net, state);
  const engine = state.engine as EngineState;
  const window = sol.window;
  const sign = net.earth === "positive" ? -1 : 1;
  const loadedLoad = circuit.loads.some((l) => Math.abs(sol.current(l.id)) > LOADED_A || Math.abs(sol.peak(l.id)) > LOADED_A);
  const segments: Segment[] = laid.segments.map((s) => {
    const contacts = contactsIn(s.edges);
    const loaded = s.edges.some((e) => Math.abs(sol.current(e.id)) > LOADED_A || Math.abs(sol.peak(e.id)) > LOADED_A);
    return {
      from: s.from, to: s.to, elements: s.elements, edges: s.edges.map((e) => e.id), kinds: s.edges.map((e) => e.kind), contacts,
      hasLoad: s.edges.some((e) => LOAD_KINDS.has(e.kind)), loaded,
      allowedV: loaded ? Math.min(CIRCUIT_DROP_V, CONTACT_DROP_V * Math.max(1, contacts)) : NOISE_V,
      open: s.edges.some((e) => sol.behaviourOf(e.id) === "open"),
    };
  });
  const segTo = new Map(segments.map((s) => [`${s.from}>${s.to}`, s]));
  // Allowed cumulative drop from the live post to a supply point, and from a return point to the earth post.
  const fromLive = new Map<number, number>();
  const toEarth = new Map<number, number>();
  for (const p of points) {
    if (p.side !== "supply") continue;
    const s = p.after !== null ? segTo.get(`${p.after}>${p.step}`) : undefined;
    fromLive.set(p.step, Math.min(CIRCUIT_DROP_V, (p.after !== null ? fromLive.get(p.after) ?? 0 : 0) + (s && s.loaded && !s.hasLoad ? s.allowedV : 0)));
  }
  for (const p of [...points].reverse()) {
    if (p.side !== "return") continue;
    const s = p.before !== null ? segTo.get(`${p.step}>${p.before}`) : undefined;
    toEarth.set(p.step, Math.min(CIRCUIT_DROP_V, (p.before !== null ? toEarth.get(p.before) ?? 0 : 0) + (s && s.loaded && !s.hasLoad ? s.allowedV : 0)));
  }
  const { earth } = posts(net);
  const refWords = net.earth === "positive"
    ? "black lead on the battery's + post: this bike is positive earth, so the + post is the earth and live points read negative"
    : "black lead on the battery's − post (the earth)";
  for (const p of points) {
    const e = sol.reading(p.node);
    p.via = sol.via(p.node);
    if (sol.switching.has(p.node)) {
      p.expect = {
        quantity: "voltage", min: null, max: null, unit: "V", nominal: null, steady: false,
        note: engine === "stopped"
          ? "Switches on and off in this state: no steady reading."
          : "Switches with every spark: no steady reading, and primary spikes of a few hundred volts. Do not probe it while the engine turns.",
      };
      p.how = `Not a test point while the engine turns. Measure it with the engine stopped instead.`;
      continue;
    }
    const m = sign * e; // magnitude on the live side
    const r = m / sol.batteryV;
    const below = p.side === "supply" ? Math.max(fromLive.get(p.step) ?? 0, NOISE_V) : NOISE_V;
    const above = p.side === "return" ? Math.max(toEarth.get(p.step) ?? 0, NOISE_V) : NOISE_V;
    // A return-side pin may sit a little below the battery − post (the charging current flows out through its earth), so no clamp at 0.
    const lo = Math.min(r * window.min, r * window.max) - below;
    const hi = Math.max(r * window.min, r * window.max) + above;
    const [min, max] = sign > 0 ? [round2(lo), round2(hi)] : [round2(-hi), round2(-lo)];
    p.expect = { quantity: "voltage", min, max, unit: "V", nominal: round2(e), steady: true, note: viaNote(p.via, r) };
    p.how = p.node === earth
      ? "This is the meter's reference, the earth post: it reads 0 V by definition. Check that the lead's clip is tight and clean."
      : p.connector
        ? `Back-probe ${p.connectorName}, cavity ${p.cavity}${p.colour ? ` (${p.colour})` : ""}, from the wire side with the connector mated; ${refWords}.`
        : `Red lead on ${p.label}${p.colour ? ` (${p.colour} wire)` : ""}; ${refWords}.`;
  }
  notes.push(`Battery: ${window.basis}.`);
  notes.push(stateWords(state, engine));
  if (!loadedLoad) {
    notes.push("In these positions no current flows through this circuit's load, so a poor contact shows no drop: a point reads battery voltage right up to an open. To find a high resistance, choose positions that switch the load on.");
  }
  const hasPoints = net.elements.some((x) => x.kind === "breaker");
  if (hasPoints && engine === "stopped") {
    notes.push(state.points === "open"
      ? "Points assumed open: turn the engine by hand (in gear, rear wheel; or on the crank nut) until the points open. The coil's negative then reads battery voltage through its primary."
      : "Points assumed closed: turn the engine by hand until the points close. The coil's current flows, so the coil's negative reads near 0 V; switch off when done, as a coil left on with the points closed gets hot.");
  }
  const restingUnit = net.elements.some((x) => x.params?.role === "ignition-output" && x.params?.atRest !== "on");
  if (restingUnit && engine === "stopped" && circuit.loads.some((l) => /primary/.test(l.label ?? "")))
    notes.push("This family's ignition unit switches its coils off at rest: with the engine stopped each coil's negative reads battery voltage. That is healthy, not a fault.");
  return {
    circuit: { slug: circuit.slug, name: circuit.name, powered: true },
    switches: state, probePoints: points, segments, loadSteps, loadNames: circuit.loads.map(describe),
    reference: { post: net.earth === "positive" ? "+" : "-", earth: net.earth, words: refWords }, battery: window, loaded: loadedLoad, notes,
  };
}

function contactsIn(edges: GraphEdge[]) {
  return edges.filter((e) => CONTACT_KINDS.has(e.kind)).length;
}

function viaNote(via: string | undefined, r: number): string | null {
  if (via === "load") return r > 0.5 ? "Fed through a load with no current flowing: battery voltage, but only through the load." : r < 0.05 ? null : "Between two loads: a share of battery voltage.";
  if (via === "none") return "Joined to nothing in these positions: a meter reads near 0 V, or wanders.";
  return null;
}

function stateWords(state: SwitchState, engine: EngineState): string {
  switch (engine) {
    case "cranking":
      return "Engine cranking: gearbox in neutral, bike on its stand, hands, leads and hair clear; a helper presses the start button while you read. Connect the meter first, with the ignition off.";
    case "running":
      return "Engine running (about 5000 rpm for the charging figures), on the stand in neutral, in a ventilated space: connect the meter before starting. Never disconnect the battery while it runs.";
    default:
      return `Engine stopped. Connect the meter with the ignition off, then switch on (main switch ${state.main}) and read.`;
  }
}

// ---------------------------------------------------------------------------------------------------------------------
// Diagnosis

export interface Reading { step: number; value: number }
export type FaultKind = "open" | "high_resistance" | "short";
export interface Fault { between: [number, number]; kind: FaultKind; likely: string[]; reason: string }
export interface Diagnosis {
  fault: Fault | null;
  next: number | null;
  checked: { step: number; value: number; expect: Expect; ok: boolean | null }[];
  /** The battery's own reading against its window in this state (powered walks, when the live post was measured). */
  battery: { verdict: "ok" | "low" | "high"; reading: number; min: number; max: number; message: string } | null;
  notes: string[];
}

const inRange = (e: Expect, v: number) => (e.min === null || v >= e.min) && (e.max === null || v <= e.max);

/** Say between which two probe points the fault lies, what kind it is, and which point to measure next to halve the search. */
export function diagnose(walk: Walk, readings: Reading[]): Diagnosis {
  const pts = walk.probePoints;
  const byStep = new Map(pts.map((p) => [p.step, p]));
  const values = new Map(readings.map((r) => [r.step, r.value]));
  const notes: string[] = [];
  const checked = [...values].sort(([a], [b]) => a - b).map(([step, value]) => {
    const p = byStep.get(step)!;
    return { step, value, expect: p.expect, ok: p.expect.steady === false ? null : inRange(p.expect, value) };
  });
  const between = (a: number, b: number) => walk.segments.find((x) => x.from === a && x.to === b)?.elements ?? [];
  const fault = (a: number, b: number, kind: FaultKind, reason: string, extra: string[] = []): Fault => {
    const likely = between(a, b);
    return { between: [Math.min(a, b), Math.max(a, b)], kind, likely: [...new Set([...(likely.length ? likely : [byStep.get(b)!.label]), ...extra])], reason };
  };
  let found: Fault | null = null;
  let battery: Diagnosis["battery"] = null;

  if (walk.circuit.powered && walk.battery) {
    const positive = walk.reference?.earth === "positive";
    // On a positive-earth bike live points read negative; a rider who typed them without the sign (or swapped the leads) gets the same verdict.
    const typedPositive = positive && [...values.values()].filter((v) => Math.abs(v) > 1).every((v) => v > 0) && [...values.values()].some((v) => Math.abs(v) > 1);
    if (typedPositive) notes.push("Positive earth: the readings were typed without their minus sign (or with the leads swapped); they were read as magnitudes.");
    const mag = (v: number) => (positive && !typedPositive ? -v : v);
    const M = new Map([...values].map(([s, v]) => [s, mag(v)]));
    const nominalMag = (p: ProbePoint) => (positive ? -1 : 1) * (p.expect.nominal ?? 0);
    const live = pts[0];
    const w = walk.battery;
    const vNominal = w.nominal;
    const vb = M.get(live.step);
    if (vb !== undefined) {
      const verdict = vb < w.min - 0.05 ? "low" : vb > w.max + 0.05 ? "high" : "ok";
      battery = {
        verdict, reading: vb, min: w.min, max: w.max,
        message: verdict === "ok" ? `The battery reads ${vb} V: within ${w.min}–${w.max} V for this state.`
          : verdict === "low" ? lowBattery(w, vb) : `The battery reads ${vb} V, above ${w.max} V: ${w.basis.startsWith("charging") ? "the regulator is not holding the voltage down (overcharging boils a battery and blows bulbs)" : "a surface charge from recent charging; let it rest, or switch the headlamp on for a minute"}.`,
      };
    }
    const scale = (vb !== undefined && vb > 1 ? vb : vNominal) / vNominal;
    const vRef = vb !== undefined && vb > 1 ? vb : vNominal;
    const ex = (p: ProbePoint) => nominalMag(p) * scale;
    const steady = (p: ProbePoint) => p.expect.steady !== false;
    if (vb !== undefined && vb < 1) {
      found = { between: [live.step, live.step], kind: "open", likely: ["the battery, or the meter's leads: the battery post shows no voltage (check the leads, then the battery and its connections)"], reason: "The live post reads no voltage, so nothing on this circuit can." };
    }
    // Walk each stretch in step order; the first that does not behave as the healthy loom would is the fault.
    for (const s of [...walk.segments].sort((x, y) => x.to - y.to || x.from - y.from)) {
      if (found) break;
      const a = byStep.get(s.from)!, b = byStep.get(s.to)!;
      const ma = M.get(a.step), mb = M.get(b.step);
      if (ma === undefined || mb === undefined || !steady(a) || !steady(b)) continue;
      const side = b.side === "supply" ? "supply" : a.side === "return" ? "return" : "across";
      // Past an element that is open in this state a return-side point has nothing to hold it to earth: what it reads is
      // decided further on. Only on the supply side does voltage past an open switch mean something feeds it.
      if (s.open && side !== "supply") continue;
      if (s.hasLoad) {
        // Across a load: its drop is expected. What is not: a pin fed only through the load pulled down to earth.
        if (ex(b) > 0.5 * vRef && b.via === "load" && mb < 0.1 * vRef && ma > 0.5 * vRef) {
          found = fault(b.step, b.before ?? b.step, "short", `Step ${b.step} should sit at battery voltage through the load (nothing switched to earth beyond it) but reads ${mb} V: something joins it to earth.`,
            ["a wire chafed through to the frame, a shorted condenser, or a switch stuck closed beyond this point"]);
        }
        continue;
      }
      const expDrop = ex(a) - ex(b);
      const dev = (ma - mb) - expDrop;
      if (side === "supply" && ex(b) < 0.1 * vRef && mb > 0.5 * vRef) {
        found = fault(a.step, b.step, "short", `Step ${b.step} should have no voltage in these positions (an open switch lies before it) but reads ${mb} V: it is being fed from somewhere.`,
          ["contacts welded or bridged in the switch, or this wire touching a live feed"]);
      } else if ((Math.abs(expDrop) < 0.05 ? Math.abs(dev) : Math.sign(expDrop) * dev) > s.allowedV + 1e-9) {
        // Only a loss beyond the healthy one is a fault here: less loss than expected means less current, i.e. a fault further on.
        // An open takes (nearly) the whole voltage across it, no current flowing to drop any elsewhere; a high resistance a part.
        if (Math.abs(ma - mb) > OPEN_SHARE * vRef) {
          const fuse = s.kinds.includes("fuse");
          const reason = side === "return"
            ? `Step ${a.step} floats up to ${ma} V while step ${b.step} is at ${mb} V: the return path is open between them, so no current flows.`
            : mb > ma
              ? `Step ${b.step} rises to ${mb} V while step ${a.step} reads ${ma} V: the current cannot get through between them (open), so the source's voltage climbs.`
              : `Voltage is present at step ${a.step} (${ma} V) but gone at step ${b.step} (${mb} V): the circuit is open between them.`;
          found = fault(a.step, b.step, "open", reason, fuse ? ["if the fuse has blown, something beyond it shorts to earth: find it before fitting a new fuse"] : []);
        } else if (s.loaded) {
          found = fault(a.step, b.step, "high_resistance",
            `${round2(Math.abs(ma - mb))} V is lost between step ${a.step} and step ${b.step} where the healthy loom loses ${round2(Math.abs(expDrop))} V; up to ${round2(s.allowedV)} V is allowed there (≈ ${CONTACT_DROP_V} V per contact under load, common practice): a high resistance between them.`,
            ["a corroded, loose or burnt terminal, a dirty switch contact or a fuse holder that has lost its grip",
              ...(side === "return" ? ["or an open earth here, with the current finding its way back through another lamp's filament (other lamps glow faintly)"] : [])]);
        }
      }
    }
    if (!found) {
      // Over the whole supply side, the drop to the load may not exceed the circuit's allowance even if no one stretch does.
      for (const [lin] of walk.loadSteps) {
        const p = byStep.get(lin)!;
        const mp = M.get(lin);
        if (mp === undefined || vb === undefined || !steady(p) || !walk.loaded) continue;
        const lost = (vb - mp) - (vNominal * scale - ex(p));
        if (lost > CIRCUIT_DROP_V) {
          const stretches = walk.segments.filter((s) => s.to <= lin && M.has(s.from) && M.has(s.to) && !s.hasLoad);
          const worst = stretches.reduce((m, s) => ((M.get(s.from)! - M.get(s.to)!) > (M.get(m.from)! - M.get(m.to)!) ? s : m), stretches[0]);
          if (worst) found = fault(worst.from, worst.to, "high_resistance", `The load's supply terminal (step ${lin}) is ${round2(lost)} V below where it should be: more than the ${CIRCUIT_DROP_V} V a whole supply side may lose. The biggest loss is between step ${worst.from} and step ${worst.to}.`);
        }
      }
    }
    const measuredAll = pts.every((p) => !steady(p) || values.has(p.step));
    if (!found && measuredAll && checked.every((c) => c.ok !== false) && walk.loadSteps.length && walk.loaded) {
      // Every voltage right and every drop within limits: the loom delivers; what is left is the load and its own terminals.
      const [a, b] = walk.loadSteps[0];
      // What lies next to a point that cannot be read steadily (a flasher's output) is as unproven as the load.
      const unproven = walk.segments.filter((s) => [s.from, s.to].some((n) => !steady(byStep.get(n)!))).flatMap((s) => s.elements);
      const likely = [...new Set([...walk.loadSteps.flatMap(([x, y]) => between(x, y)), ...unproven])];
      found = { between: [a, b], kind: "open", likely, reason: `Every point reads as it should, so the loom delivers: if the load still does not work, it is the load itself or its terminals (steps ${walk.loadSteps.map(([x, y]) => `${x}–${y}`).join(", ")}). Check it on the bench.` };
      notes.push("This verdict assumes the load does not work; if it does, there is no fault on this circuit.");
    }
  } else {
    const bad = pts.find((p) => values.has(p.step) && !inRange(p.expect, values.get(p.step)!));
    if (bad && bad.after !== null && (values.get(bad.after) === undefined || inRange(byStep.get(bad.after)!.expect, values.get(bad.after)!))) {
      const v = values.get(bad.step)!;
      const e = bad.expect;
      const kind: FaultKind = !Number.isFinite(v) || v > 1e6 ? "open" : e.min !== null && v < e.min ? "short" : "high_resistance";
      const words = kind === "open" ? "reads open" : kind === "short" ? `reads ${v} ${e.unit}, below ${e.min} ${e.unit}: turns or leads shorted together` : `reads ${v} ${e.unit}, above ${e.max} ${e.unit}: a high resistance`;
      found = fault(bad.after, bad.step, kind, `The reading is right up to step ${bad.after}; step ${bad.step} ${words}.`);
    }
  }

  // Halve the search: between the last good and the first bad measured point, or over what is left unmeasured.
  const measured = checked.map((c) => c.step);
  const probeable = pts.filter((p) => p.expect.steady !== false);
  const lo = found ? found.between[0] : Math.max(0, ...checked.filter((c) => c.ok === true).map((c) => c.step));
  const hi = found ? found.between[1] : Math.min(pts.length + 1, ...checked.filter((c) => c.ok === false).map((c) => c.step));
  const open = probeable.filter((p) => p.step > lo && p.step < hi && !measured.includes(p.step)).map((p) => p.step);
  const rest = probeable.filter((p) => !measured.includes(p.step)).map((p) => p.step);
  const next = open.length ? open[Math.floor((open.length - 1) / 2)] : !found && rest.length && measured.length === 0 ? rest[Math.floor((rest.length - 1) / 2)] : null;
  return { fault: found, next, checked, battery, notes };
}

function lowBattery(w: BatteryWindow, vb: number): string {
  if (w.basis.startsWith("charging")) return `The battery reads ${vb} V at rpm, below ${w.min} V: the charging system is not keeping up. Walk the charging circuit and check the stator's output.`;
  if (w.basis.startsWith("cranking")) return `The battery falls to ${vb} V while cranking, below ${w.min} V: a weak or discharged battery, or a starter drawing too much. Charge the battery and test again.`;
  return `The battery reads ${vb} V, below ${w.min} V: it is less than half charged. Charge it before testing, as low readings everywhere would follow from it.`;
}

/** The readings a meter would show on this walk for a given solution (tests and "what should I see"): steady points only. */
export function readingsFrom(walk: Walk, sol: Solution): Reading[] {
  return walk.probePoints.filter((p) => p.expect.steady !== false).map((p) => ({ step: p.step, value: round2(sol.reading(p.node)) }));
}

export { batteryWindow };
