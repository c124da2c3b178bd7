// Loom planner: the cut list of a minimal loom built from a family's circuits. The builder keeps some circuits
// (ignition, charging, one headlamp …) and gets each wire's run, colour, current, size and the fuses, with the parts to
// buy. Pure TypeScript: the planner service feeds it the family's network from the database.
//
// What a wire carries comes from the loom's electrics (electrics.ts), solved in the bike's worst real states — charging
// at rpm with the lights on, cranking, the horn pressed — with the dropped circuits' loads taken out. So a stator lead
// carries the alternator's output, each coil's negative its own coil's current, and only pickups and sensors are signal
// wires. The drop target holds for each circuit as a whole; conductors are stranded cable (IEC 60228 class 5).
// Bad input comes back as {ok:false, error:{field, message}} (the API's 400), never as a throw.
//
// The one entry point (import from "~/domain/loom-planner"); the parts live in loom-planner/, one job each.

export type { CircuitDrop, CutRow, FuseRow, LegendRow, PartRow, PlanResult, PlannerCircuit, PlannerInput, PlannerWire, WireRole } from "./loom-planner/types";
export { ASSUMED_RUN_M, CUTTING_ALLOWANCE, FUSE_MOMENTARY_FACTOR, MAX_RUN_M, MIN_PRACTICAL_MM2, circuitDropPct } from "./loom-planner/rules";
export { SIMPLE_SCHEME } from "./loom-planner/colours";
export { planLoom } from "./loom-planner/plan";
export { cutListCsv } from "./loom-planner/csv";
