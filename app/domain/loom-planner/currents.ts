// What each wire of the loom carries: the network solved in the bike's worst real states.

import { solve, type Network, type Solution } from "../electrics";
import { RIDING_POSITIONS, type SwitchState } from "../loom-graph";
import type { PlannerCircuit } from "./types";

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

export interface Currents {
  continuous: number;
  momentary: number;
  peak: number;
  /** Per state, in CONTINUOUS_STATES then MOMENTARY_STATES order: average current, A. */
  byState: number[];
}

export function worstCurrents(net: Network, ids: Iterable<string>, without: ReadonlySet<string>): Map<string, Currents> {
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
export function fullLoomCurrents(net: Network, ids: string[]): Map<string, Currents> {
  let m = fullCache.get(net);
  if (!m) fullCache.set(net, (m = worstCurrents(net, ids, new Set())));
  return m;
}

/** The states whose currents a circuit's drop is judged in: cranking for the starter, the horn pressed for the horn, the continuous ones for the rest. */
export function statesOf(c: PlannerCircuit): number[] {
  const n = CONTINUOUS_STATES.length;
  if (c.system === "starting") return [n];
  if (/horn/.test(c.slug)) return [n + 1];
  return CONTINUOUS_STATES.map((_, i) => i);
}
