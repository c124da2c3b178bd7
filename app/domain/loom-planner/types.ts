// The loom planner's public shapes: what the service passes in and the plan that comes back.

import type { ColourName, ColourSystemId } from "../colours";
import type { Network } from "../electrics";

/** One wire of the family's loom, as the planner service reads it. */
export interface PlannerWire {
  /** The wire's element id in the network. */
  id: string;
  from: string;
  to: string;
  /** Fittings at its two ends ("2.8 mm flat-blade", "ring M6", "splice"), null when unknown. */
  fromFitting: string | null;
  toFitting: string | null;
  /** The factory's colour code as printed in the family's notation, and its decoded colours (base first). */
  code: string;
  colours: ColourName[];
  defaultLengthM: number | null;
  factorySizeMm2: number | null;
}

/** One circuit of the family: its load links and the positions it works in. */
export interface PlannerCircuit {
  slug: string;
  name: string;
  system: string;
  from: string;
  to: string;
  loads: string[];
  switches: Record<string, string>;
}

/** What the builder asks for: the family's network, circuits and wires, the circuits to keep, and how to colour and measure. */
export interface PlannerInput {
  network: Network;
  circuits: PlannerCircuit[];
  wires: PlannerWire[];
  /** Readable names of elements (fuses, switch contacts) by element id. */
  names: Record<string, string>;
  /** The frame earth point's node, if the loom has one: the earth net is the net joined to it or to the earth post. */
  frameEarth: string | null;
  keep: string[];
  /** factory: the family's own colours; simple: Loomlore's scheme (SIMPLE_SCHEME). */
  scheme: "factory" | "simple";
  /** How to write colours (the family's own notation for factory). */
  notation: ColourSystemId;
  lengthsM?: Record<string, number>;
  tempC?: number;
}

export type WireRole = "power" | "earth" | "signal";

/** One row of the cut list. */
export interface CutRow {
  wire: string;
  from: string;
  to: string;
  /** The net it belongs to: wires joined through splices and mated terminals share one. */
  net: string;
  colour: string;
  colours: ColourName[];
  lengthM: number;
  lengthSource: "builder" | "family default" | "assumed";
  /** Current in its worst real state (charging at rpm, cranking, lights on), A. */
  currentA: number;
  /** Worst current outside the moments a button is held (horn, start), A: what heats it steadily. */
  continuousA: number;
  /** Worst instant: every switching element closed at once, A. */
  peakA: number;
  /** Carries current only while a button is held (starter cable, horn wire). */
  momentary: boolean;
  role: WireRole;
  circuits: string[];
  sizeMm2: number;
  awg: number | null;
  dropV: number;
  dropPct: number;
  decidedBy: "voltage-drop" | "ampacity" | "minimum" | "fuse" | "factory";
  fittings: [string, string];
  notes: string[];
}

/** One fuse of the planned loom. */
export interface FuseRow {
  id: string;
  name: string;
  circuits: string[];
  factoryA: number;
  ratingA: number;
  continuousA: number;
  peakA: number;
  /** The rating went above the factory's (only with every part behind it checked). */
  raised: boolean;
  /** Wire ids it protects. */
  protects: string[];
  basis: string;
  warnings: string[];
}

export interface CircuitDrop {
  circuit: string;
  name: string;
  dropV: number;
  budgetV: number;
  budgetPct: number;
  basis: string;
}
export interface LegendRow {
  colour: string;
  colours: ColourName[];
  nets: string[];
  meaning: string;
}
export interface PartRow {
  kind: "wire" | "fuse" | "terminal" | "splice";
  item: string;
  quantity: number;
  unit: string;
  notes: string;
}

/** The planned loom. */
export interface PlanResult {
  rows: CutRow[];
  fuses: FuseRow[];
  circuitDrops: CircuitDrop[];
  legend: LegendRow[];
  parts: PartRow[];
  dropped: { slug: string; name: string }[];
  /** byGauge: metres per size, keyed by the size in mm² as a string ("0.5", "1.25"). */
  totals: { wires: number; lengthM: number; byGauge: Record<string, number> };
  assumptions: string[];
  warnings: string[];
}
