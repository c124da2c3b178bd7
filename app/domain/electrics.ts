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

// The one entry point (import from "~/domain/electrics"); the parts live in electrics/, one job each.

export {
  ENGINE_STATES,
  batteryWindow,
  posts,
  type BatteryWindow,
  type Element,
  type EngineState,
  type LinkParams,
  type Network,
  type OperatingState,
  type PointsState,
} from "./electrics/network";
export { behaviour, contactOhms } from "./electrics/behaviour";
export { solve, type Fault, type SolveOptions, type Solution } from "./electrics/solve";
