// Solving the network in one state: every switching element solved closed and open, averaged by its duty.

import { behaviour, type Behaviour } from "./behaviour";
import { batteryWindow, posts, type BatteryWindow, type Element, type EngineState, type Network, type OperatingState } from "./network";
import { solveTopology } from "./nodal";

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
  const variants = switchingIdx.map((i) => ({ i, duty: (elements[i]!.b as { duty: number }).duty, sol: solveTopology(fix(new Set([i])), net) }));
  const allClosed = switchingIdx.length > 1 ? solveTopology(fix(new Set(switchingIdx)), net) : (variants[0]?.sol ?? open);

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
    state,
    batteryV,
    window,
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
