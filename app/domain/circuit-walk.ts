/**
 * The circuit walk: probe points along a family's circuit, what each should read in given switch positions,
 * and where the fault lies from the readings a rider enters. Kirchhoff and Ohm only: with no current flowing,
 * a node takes the potential of whatever it is joined to; a series circuit loses its voltage across the open
 * element, so the fault lies between the last point that reads right and the first that reads wrong.
 */
import { LoomGraph, type GraphEdge, type SwitchState } from "./loom-graph";

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
  powered: boolean; // from the battery positive; otherwise a passive loop measured with an ohmmeter
}

export interface Expect { quantity: "voltage" | "continuity" | "resistance"; min: number | null; max: number | null; unit: string }

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
}

export interface Walk {
  circuit: { slug: string; name: string; powered: boolean };
  switches: SwitchState;
  probePoints: ProbePoint[];
  /** What lies between consecutive points of each loop, including loops that rejoin points already listed. */
  segments: { from: number; to: number; elements: string[] }[];
  loadSteps: [number, number][];
  loadNames: string[];
}

/** Nominal battery voltage at rest (12.6 V fully charged, flooded lead-acid: REFERENCE-FACTS §5). */
export const BATTERY_V = 12.6;
const HIGH: Expect = { quantity: "voltage", min: 11.5, max: 13.2, unit: "V" };
const LOW: Expect = { quantity: "voltage", min: 0, max: 0.5, unit: "V" };
const EITHER: Expect = { quantity: "voltage", min: 0, max: 13.2, unit: "V" };

type Potential = "high" | "low" | "unknown";

/** The potential of every node with no current drawn by the meter: high (battery +), low (battery −) or unknown. */
export function potentials(graph: LoomGraph, plus: string, minus: string, switches: SwitchState) {
  const reach = (start: string, withLoads: boolean, stopAt?: (n: string) => boolean) => {
    const seen = new Set([start]);
    const queue = [start];
    for (let i = 0; i < queue.length; i++) {
      // A node tied to either battery post fixes the potential: look no further through it.
      if (stopAt && i > 0 && stopAt(queue[i])) continue;
      for (const e of graph.at(queue[i])) {
        if (e.kind === "source") continue;
        if (!withLoads && !graph.conductsEdge(e, switches)) continue;
        if (withLoads && e.switchId && e.positions && !e.positions.includes(switches[e.switchId as keyof SwitchState])) continue;
        const n = e.a === queue[i] ? e.b : e.a;
        if (!seen.has(n)) { seen.add(n); queue.push(n); }
      }
    }
    return seen;
  };
  const hi = reach(plus, false);
  const lo = reach(minus, false);
  const cache = new Map<string, Potential>();
  return (node: string): Potential => {
    if (hi.has(node)) return lo.has(node) ? "unknown" : "high";
    if (lo.has(node)) return "low";
    let p = cache.get(node);
    if (!p) {
      // Floating: joined only through loads. Whatever side it reaches sets it; both sides make a divider.
      const around = reach(node, true, (n) => hi.has(n) || lo.has(n));
      const toHi = [...around].some((n) => hi.has(n));
      const toLo = [...around].some((n) => lo.has(n));
      p = toHi && !toLo ? "high" : toLo && !toHi ? "low" : "unknown";
      cache.set(node, p);
    }
    return p;
  };
}

/** The reading a meter shows at a node (volts to battery −) for a potential. */
export function voltageFor(p: Potential): number {
  return p === "high" ? BATTERY_V : 0;
}

const isPoint = (n: WalkNode | undefined) => !!n && (n.kind === "loom" || n.kind === "terminal");

/**
 * Lay out the probe points of a circuit: every loom-side connector cavity and bare terminal along each load's loop,
 * in the order the current passes them, merging loops that share points (parallel loads on one feed).
 */
export function walkCircuit(
  graph: LoomGraph,
  nodes: Map<string, WalkNode>,
  circuit: WalkCircuit,
  switches: SwitchState,
  describe: (e: GraphEdge) => string,
  loadSpec: (load: GraphEdge) => { min: number; max: number; unit: string } | null,
): Walk | null {
  const closed = { ...switches };
  const points: ProbePoint[] = [];
  const stepOf = new Map<string, number>();
  const loadSteps: [number, number][] = [];
  const segments: Walk["segments"] = [];
  const potential = circuit.powered ? potentials(graph, circuit.from, circuit.to, switches) : null;
  for (const load of circuit.loads) {
    // Lay the loop out in the circuit's working positions, so the walk exists even with a switch open.
    const loop = graph.loop(circuit.from, load, circuit.to, workingPositions(graph, circuit, load, closed));
    if (!loop) return null;
    const seq: { node: string; edge: GraphEdge | null; side: "supply" | "return" }[] = [
      ...loop.supply.nodes.map((n, i) => ({ node: n, edge: i === 0 ? null : loop.supply.edges[i - 1], side: "supply" as const })),
      ...loop.ret.nodes.map((n, i) => ({ node: n, edge: i === 0 ? load : loop.ret.edges[i - 1], side: "return" as const })),
    ];
    let prev: number | null = null;
    let between: string[] = [];
    let loadIn: number | null = null;
    let pastLoad = false;
    for (const { node, edge, side } of seq) {
      if (edge) between.push(describe(edge));
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
          side, after: prev, before: null, elementsBefore: between, expect: LOW, how: "",
        });
      }
      if (prev !== null && prev !== step) {
        if (points[prev - 1].before === null) points[prev - 1].before = step;
        if (!segments.some((x) => x.from === prev && x.to === step)) segments.push({ from: prev, to: step, elements: between });
      }
      if (side === "supply") loadIn = step;
      else if (loadIn !== null && pastLoad && !loadSteps.some(([a]) => a === loadIn)) loadSteps.push([loadIn, step]);
      prev = step;
      between = [];
    }
  }
  // Expectations and instructions.
  const ref = points[0];
  for (const p of points) {
    if (circuit.powered) {
      const pot = potential!(p.node);
      p.expect = pot === "high" ? HIGH : pot === "low" ? LOW : EITHER;
      p.how = p.connector
        ? `Connector mated: back-probe ${p.connectorName}, cavity ${p.cavity}${p.colour ? ` (${p.colour})` : ""}, from the wire side; black lead on the battery − post.`
        : `Red lead on ${p.label}${p.colour ? ` (${p.colour} wire)` : ""}; black lead on the battery − post.`;
      if (p.node === circuit.to) p.how = "This is the meter's reference, the battery − post: it reads 0 V by definition. Check the lead is tight and clean.";
    } else if (p === ref) {
      p.expect = { quantity: "continuity", min: 0, max: 0, unit: "Ω" };
      p.how = `Ignition off and the connectors of this loop unplugged. Put one ohmmeter lead on ${p.label}${p.colour ? ` (${p.colour})` : ""} and keep it there.`;
    } else {
      const beyondLoad = loadSteps.some(([, out]) => p.step >= out);
      const spec = beyondLoad ? circuit.loads.map(loadSpec).find(Boolean) ?? null : null;
      // A metre or two of loom adds well under 1 Ω: the winding's range plus that allowance.
      p.expect = beyondLoad
        ? spec ? { quantity: "resistance", min: spec.min, max: spec.max + 1, unit: spec.unit } : { quantity: "continuity", min: 0, max: null, unit: "Ω" }
        : { quantity: "continuity", min: 0, max: 1, unit: "Ω" };
      p.how = `Other lead on ${p.label}${p.colour ? ` (${p.colour})` : ""}, from the wire side.`;
    }
  }
  return {
    circuit: { slug: circuit.slug, name: circuit.name, powered: circuit.powered },
    switches, probePoints: points, segments, loadSteps, loadNames: circuit.loads.map(describe),
  };
}

/** Switch positions in which the loop through `load` closes: the rider's own where they work, else the first that does. */
function workingPositions(graph: LoomGraph, circuit: WalkCircuit, load: GraphEdge, given: SwitchState): SwitchState {
  if (graph.loop(circuit.from, load, circuit.to, given)) return given;
  const ids = Object.keys(given) as (keyof SwitchState)[];
  const options: Record<string, string[]> = { main: ["on", "park"], kill: ["run"], start: ["pressed", "released"], lights: ["on", "off"], brake: ["pressed", "released"] };
  const combos: SwitchState[] = [{ ...given }];
  for (const id of ids) {
    const next: SwitchState[] = [];
    for (const c of combos) for (const pos of options[id] ?? [c[id]]) next.push({ ...c, [id]: pos });
    combos.splice(0, combos.length, ...next);
  }
  return combos.find((c) => graph.loop(circuit.from, load, circuit.to, c)) ?? given;
}

export interface Reading { step: number; value: number }
export interface Diagnosis {
  fault: { between: [number, number]; likely: string[]; reason: string } | null;
  next: number | null;
  checked: { step: number; value: number; expect: Expect; ok: boolean }[];
}

const inRange = (e: Expect, v: number) => (e.min === null || v >= e.min) && (e.max === null || v <= e.max);

/** Say between which two probe points the fault lies and which point to measure next to halve the search. */
export function diagnose(walk: Walk, readings: Reading[]): Diagnosis {
  const pts = walk.probePoints;
  const byStep = new Map(pts.map((p) => [p.step, p]));
  const values = new Map(readings.map((r) => [r.step, r.value]));
  const checked = [...values].sort(([a], [b]) => a - b).map(([step, value]) => {
    const p = byStep.get(step)!;
    return { step, value, expect: p.expect, ok: inRange(p.expect, value) };
  });
  const ok = (s: number) => { const v = values.get(s); return v === undefined ? undefined : inRange(byStep.get(s)!.expect, v); };
  const between = (a: number, b: number) => walk.segments.find((x) => x.from === a && x.to === b)?.elements ?? [];
  const fault = (a: number, b: number, reason: string): Diagnosis["fault"] => {
    const likely = between(a, b);
    return { between: [Math.min(a, b), Math.max(a, b)], likely: [...new Set(likely.length ? likely : [byStep.get(b)!.label])], reason };
  };

  let found: Diagnosis["fault"] = null;
  if (walk.circuit.powered) {
    // Supply side: a point that should have battery voltage and does not, just after one that does: the open lies between.
    const badSupply = pts.filter((p) => p.side === "supply" && p.expect === HIGH && ok(p.step) === false);
    const supplyEdge = badSupply.find((p) => p.after !== null && ok(p.after) === true);
    // Return side: a point that should sit at 0 V floats at battery voltage above an open towards earth.
    const badReturn = pts.filter((p) => p.side === "return" && p.expect === LOW && ok(p.step) === false);
    const returnEdge = badReturn.find((p) => p.before !== null && ok(p.before) === true);
    if (badSupply.length && badSupply[0].after === null) {
      found = { between: [badSupply[0].step, badSupply[0].step], likely: ["the battery itself: flat or failed (charge it, then test again)"], reason: "The battery does not show its voltage." };
    } else if (supplyEdge) {
      found = fault(supplyEdge.after!, supplyEdge.step, `Voltage is present at step ${supplyEdge.after} but missing at step ${supplyEdge.step}: the circuit is open between them.`);
    } else if (returnEdge) {
      found = fault(returnEdge.step, returnEdge.before!, `Step ${returnEdge.step} floats at battery voltage while step ${returnEdge.before} is at 0 V: the return path is open between them.`);
    } else if (checked.length === pts.length && checked.every((c) => c.ok) && walk.loadSteps.length) {
      // Every voltage right yet nothing works: with no current flowing, an open load shows no drop. Suspect the load.
      const [a, b] = walk.loadSteps[0];
      const likely = [...new Set(walk.loadSteps.flatMap(([x, y]) => between(x, y)))];
      const where = walk.loadSteps.map(([x, y]) => `${x}–${y}`).join(", ");
      found = { between: [a, b], likely, reason: `Every point reads as it should, so no current is flowing to show the drop: measure each load and its terminals with the ohmmeter (steps ${where}).` };
    }
  } else {
    const bad = pts.find((p) => ok(p.step) === false);
    if (bad && bad.after !== null && ok(bad.after) !== false) {
      found = fault(bad.after, bad.step, `The reading is right up to step ${bad.after} and wrong at step ${bad.step}.`);
    }
  }

  // Halve the search: between the last good and the first bad measured point, or over what is left unmeasured.
  const measured = checked.map((c) => c.step);
  const lo = found ? found.between[0] : Math.max(0, ...checked.filter((c) => c.ok).map((c) => c.step));
  const hi = found ? found.between[1] : Math.min(pts.length + 1, ...checked.filter((c) => !c.ok).map((c) => c.step));
  const open = pts.filter((p) => p.step > lo && p.step < hi && !measured.includes(p.step)).map((p) => p.step);
  const next = open.length ? open[Math.floor((open.length - 1) / 2)] : null;
  return { fault: found, next, checked };
}
