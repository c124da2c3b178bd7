// What each probe point should read in one state: from the solved electrics for powered circuits, the card's specs for passive loops.

import { posts, solve, type EngineState, type Network } from "../electrics";
import type { GraphEdge, LoomGraph, SwitchState } from "../loom-graph";
import { layout } from "./layout";
import { CIRCUIT_DROP_V, CONTACT_DROP_V, CONTACT_KINDS, LOADED_A, LOAD_KINDS, NOISE_V, round2 } from "./limits";
import type { Segment, Walk, WalkCircuit, WalkNode } from "./types";

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
      const spec = beyondLoad ? (circuit.loads.map(loadSpec).find(Boolean) ?? null) : null;
      // A metre or two of loom adds well under 1 Ω: the winding's range plus that allowance.
      p.expect = beyondLoad
        ? spec
          ? { quantity: "resistance", min: spec.min, max: spec.max + 1, unit: spec.unit }
          : { quantity: "continuity", min: 0, max: null, unit: "Ω" }
        : { quantity: "continuity", min: 0, max: 1, unit: "Ω" };
      p.how = `Other lead on ${p.label}${p.colour ? ` (${p.colour})` : ""}, from the wire side.`;
    }
    const segments = laid.segments.map((s) => ({
      ...s,
      edges: s.edges.map((e) => e.id),
      kinds: s.edges.map((e) => e.kind),
      contacts: contactsIn(s.edges),
      hasLoad: s.edges.some((e) => LOAD_KINDS.has(e.kind)),
      loaded: false,
      allowedV: 0,
      open: false,
    }));
    notes.push(
      "Measured with an ohmmeter, ignition off: the loop's ends are unplugged from the units they feed, so nothing else in the loom adds to the reading.",
    );
    return {
      circuit: { slug: circuit.slug, name: circuit.name, powered: false },
      switches: state,
      probePoints: points,
      segments,
      loadSteps,
      loadNames: circuit.loads.map(describe),
      reference: null,
      battery: null,
      loaded: false,
      notes,
    };
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
      from: s.from,
      to: s.to,
      elements: s.elements,
      edges: s.edges.map((e) => e.id),
      kinds: s.edges.map((e) => e.kind),
      contacts,
      hasLoad: s.edges.some((e) => LOAD_KINDS.has(e.kind)),
      loaded,
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
    fromLive.set(p.step, Math.min(CIRCUIT_DROP_V, (p.after !== null ? (fromLive.get(p.after) ?? 0) : 0) + (s && s.loaded && !s.hasLoad ? s.allowedV : 0)));
  }
  for (const p of [...points].reverse()) {
    if (p.side !== "return") continue;
    const s = p.before !== null ? segTo.get(`${p.step}>${p.before}`) : undefined;
    toEarth.set(p.step, Math.min(CIRCUIT_DROP_V, (p.before !== null ? (toEarth.get(p.before) ?? 0) : 0) + (s && s.loaded && !s.hasLoad ? s.allowedV : 0)));
  }
  const { earth } = posts(net);
  const refWords =
    net.earth === "positive"
      ? "black lead on the battery's + post: this bike is positive earth, so the + post is the earth and live points read negative"
      : "black lead on the battery's − post (the earth)";
  for (const p of points) {
    const e = sol.reading(p.node);
    p.via = sol.via(p.node);
    if (sol.switching.has(p.node)) {
      p.expect = {
        quantity: "voltage",
        min: null,
        max: null,
        unit: "V",
        nominal: null,
        steady: false,
        note:
          engine === "stopped"
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
    p.how =
      p.node === earth
        ? "This is the meter's reference, the earth post: it reads 0 V by definition. Check that the lead's clip is tight and clean."
        : p.connector
          ? `Back-probe ${p.connectorName}, cavity ${p.cavity}${p.colour ? ` (${p.colour})` : ""}, from the wire side with the connector mated; ${refWords}.`
          : `Red lead on ${p.label}${p.colour ? ` (${p.colour} wire)` : ""}; ${refWords}.`;
  }
  notes.push(`Battery: ${window.basis}.`);
  notes.push(stateWords(state, engine));
  if (!loadedLoad) {
    notes.push(
      "In these positions no current flows through this circuit's load, so a poor contact shows no drop: a point reads battery voltage right up to an open. To find a high resistance, choose positions that switch the load on.",
    );
  }
  const hasPoints = net.elements.some((x) => x.kind === "breaker");
  if (hasPoints && engine === "stopped") {
    notes.push(
      state.points === "open"
        ? "Points assumed open: turn the engine by hand (in gear, rear wheel; or on the crank nut) until the points open. The coil's negative then reads battery voltage through its primary."
        : "Points assumed closed: turn the engine by hand until the points close. The coil's current flows, so the coil's negative reads near 0 V; switch off when done, as a coil left on with the points closed gets hot.",
    );
  }
  const restingUnit = net.elements.some((x) => x.params?.role === "ignition-output" && x.params?.atRest !== "on");
  if (restingUnit && engine === "stopped" && circuit.loads.some((l) => /primary/.test(l.label ?? "")))
    notes.push(
      "This family's ignition unit switches its coils off at rest: with the engine stopped each coil's negative reads battery voltage. That is healthy, not a fault.",
    );
  return {
    circuit: { slug: circuit.slug, name: circuit.name, powered: true },
    switches: state,
    probePoints: points,
    segments,
    loadSteps,
    loadNames: circuit.loads.map(describe),
    reference: { post: net.earth === "positive" ? "+" : "-", earth: net.earth, words: refWords },
    battery: window,
    loaded: loadedLoad,
    notes,
  };
}

function contactsIn(edges: GraphEdge[]) {
  return edges.filter((e) => CONTACT_KINDS.has(e.kind)).length;
}

function viaNote(via: string | undefined, r: number): string | null {
  if (via === "load")
    return r > 0.5
      ? "Fed through a load with no current flowing: battery voltage, but only through the load."
      : r < 0.05
        ? null
        : "Between two loads: a share of battery voltage.";
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
