// Laying out a circuit's probe points along each load's loop, in switch positions where the loop closes.

import type { GraphEdge, LoomGraph, SwitchState } from "../loom-graph";
import type { ProbePoint, WalkCircuit, WalkNode } from "./types";

const isPoint = (n: WalkNode | undefined) => !!n && (n.kind === "loom" || n.kind === "terminal");

/** Lay out the probe points: every loom-side cavity and bare terminal along each load's loop, in the order the current passes them. */
export function layout(graph: LoomGraph, nodes: Map<string, WalkNode>, circuit: WalkCircuit, switches: SwitchState, describe: (e: GraphEdge) => string) {
  const points: ProbePoint[] = [];
  const stepOf = new Map<string, number>();
  const loadSteps: [number, number][] = [];
  const segments: { from: number; to: number; elements: string[]; edges: GraphEdge[] }[] = [];
  for (const load of circuit.loads) {
    // Lay the loop out in the circuit's working positions, so the walk exists even with a switch open.
    const loop = graph.loop(circuit.from, load, circuit.to, workingPositions(graph, circuit, load, switches));
    if (!loop) return null;
    // A path has one edge fewer than nodes: edges[i - 1] is in range for i ≥ 1.
    const seq: { node: string; edge: GraphEdge | null; side: "supply" | "return" }[] = [
      ...loop.supply.nodes.map((n, i) => ({ node: n, edge: i === 0 ? null : loop.supply.edges[i - 1]!, side: "supply" as const })),
      ...loop.ret.nodes.map((n, i) => ({ node: n, edge: i === 0 ? load : loop.ret.edges[i - 1]!, side: "return" as const })),
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
          step,
          node,
          connector: info!.connector,
          connectorName: info!.connectorName,
          cavity: info!.cavity,
          colour: info!.code,
          label: info!.connector ? `${info!.connectorName}, cavity ${info!.cavity}` : `${info!.componentName}, terminal ${info!.cavity}`,
          side,
          after: prev,
          before: null,
          elementsBefore: between.map(describe),
          expect: { quantity: "voltage", min: null, max: null, unit: "V" },
          how: "",
        });
      }
      if (prev !== null && prev !== step) {
        // Step n is points[n - 1]: every step was pushed with step = points.length + 1.
        if (points[prev - 1]!.before === null) points[prev - 1]!.before = step;
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
    main: ["on", "park"],
    kill: ["run"],
    start: ["pressed", "released"],
    lights: ["on", "off"],
    brake: ["pressed", "released"],
    beam: ["low", "high"],
    indicators: ["left", "right", "off"],
    horn: ["pressed", "released"],
    gear: ["neutral", "in-gear"],
    engine: ["stopped", "cranking", "running"],
    points: ["closed", "open"],
  };
  let combos: SwitchState[] = [{ ...given }];
  for (const id of Object.keys(given) as (keyof SwitchState)[]) {
    const next: SwitchState[] = [];
    for (const c of combos) for (const pos of options[id] ?? [c[id]]) next.push({ ...c, [id]: pos });
    combos = next.length > 4096 ? next.slice(0, 4096) : next;
  }
  return combos.find((c) => graph.loop(circuit.from, load, circuit.to, c)) ?? given;
}
