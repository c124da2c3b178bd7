// The circuit walk's public shapes: the graph's nodes and circuits as the walk reads them, and the walk it lays out.

import type { BatteryWindow } from "../electrics";
import type { GraphEdge, SwitchState } from "../loom-graph";

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
