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
import { batteryWindow } from "./electrics";

// The one entry point (import from "~/domain/circuit-walk"); the parts live in circuit-walk/, one job each.

export type { Expect, ProbePoint, Segment, Walk, WalkCircuit, WalkNode } from "./circuit-walk/types";
export { CIRCUIT_DROP_V, CONTACT_DROP_V } from "./circuit-walk/limits";
export { walkCircuit } from "./circuit-walk/walk";
export { diagnose, readingsFrom, type Diagnosis, type Fault, type FaultKind, type Reading } from "./circuit-walk/diagnose";

export { batteryWindow };
