/** The compact form the demo families are written in; `build.ts` expands it into loom-graph rows. */
import type { Latch } from "../../../app/domain/connector-face.ts";
import type { LinkParams } from "../../../app/domain/electrics.ts";

/** Switch ids shared by every family (app/domain/loom-graph.ts SWITCH_POSITIONS); "engine" and "points" are the engine's state. */
export type SwitchId = "main" | "kill" | "start" | "lights" | "brake" | "beam" | "indicators" | "horn" | "gear" | "engine" | "points";
export type LinkKind =
  | "contact" // a switch contact: conducts only in the given positions
  | "fuse"
  | "transistor" // the ignition unit's output stage: conducts when triggered
  | "winding" // a coil winding: a load
  | "load" // electronics, a motor
  | "lamp"
  | "sense" // a high-impedance input (pickup sensing)
  | "breaker" // contact-breaker points: open or closed with the engine stopped, switching while it turns
  | "source"; // the battery itself

/** A pin reference: "component.terminal" for a bare terminal, "pairKey:cavity" for the component side of a pair. */
export type PinRef = string;

export interface LinkSpec {
  from: PinRef;
  to: PinRef;
  kind: LinkKind;
  label: string; // unique within the component; circuits name links as "componentKey.label"
  switch?: SwitchId;
  positions?: string[];
  ratingA?: number;
  /** The electrical model (watts, ohms, amps, role in the engine's states …); omitted: the kind's defaults. */
  params?: LinkParams;
}

export interface ComponentSpec {
  key: string;
  kind: string; // battery, main-switch, fuse, kill-switch, ignition-unit, ignition-coil, pickup-coil, lamp, splice, frame-earth …
  name: string;
  system: string | null;
  location: string;
  terminals?: { label: string; terminal?: string; fitting?: string }[]; // bare terminals (posts, spades, studs); fitting e.g. "ring M6"
  links?: LinkSpec[];
}

export interface NetSpec {
  code: string; // wire colour as the maker writes it
  circuit: string; // what it carries, in words
  hub?: PinRef; // bare terminal every wire of the net runs to (battery post, frame earth stud); else a splice is made
  terminals?: PinRef[]; // bare terminals on this net
  lengthMm?: number; // default run length for the loom planner
  sizeMm2?: number;
  /** Heavier leads of a hub net: the size (mm²) of the wire from the hub to these terminals (a battery's earth lead and
   * the engine's earth strap carry the starter's current back, so they are sized like the starter cable). */
  leadsMm2?: Partial<Record<PinRef, number>>;
}

export interface PairSpec {
  key: string;
  name: string; // e.g. "Ignition unit"
  system: string;
  owner: string; // component key owning the component side (body-mounted socket or pigtail)
  ownerGender: "plug" | "socket";
  ownerWhere: string; // "on the unit", "on the switch pigtail"
  location: string;
  housing: string; // generic housing description, e.g. "6-way 2.8 mm flat-blade"
  rows: number;
  cols: number;
  missing?: [number, number][];
  pin1?: string;
  latch: Latch;
  pins: { cavity: string; net: string; terminal?: string }[]; // cavity labels follow the grid order "1".."n"
  specs?: SpecSpec[];
  notes?: string;
}

/** A spec value of a card: measurable under the conditions it states. */
export interface SpecSpec {
  name: string;
  min: number;
  /** null: no upper limit (an insulation test that must read open). */
  max: number | null;
  unit: string;
  between: [string, string];
  atC?: number;
  source: string;
  /** When and how it can be measured: ignition, engine, what is unplugged, meter range. */
  conditions: string;
  kind?: "resistance" | "insulation" | "regulated-voltage" | "ac-output" | "gap" | "dwell" | "capacitance";
  material?: "copper" | "carbon" | "other";
  side?: "owner" | "loom";
}

export interface CircuitSpec {
  slug: string;
  name: string;
  system: string;
  from: PinRef;
  to: PinRef;
  via: string[]; // "componentKey.linkLabel"
  switches: Partial<Record<SwitchId, string>>; // its working positions, "engine" (and "points") included where it matters
}

export interface FamilySpec {
  slug: string;
  name: string;
  modelRange: string;
  yearFrom: number;
  yearTo: number;
  engine: string;
  displacementCc: number;
  cylinders: number;
  firingOrder: string;
  crankDeg: number | null;
  ignition: string;
  systemVoltage: 6 | 12;
  earth: "negative" | "positive";
  blurb: string;
  systems: string[];
  components: ComponentSpec[];
  nets: Record<string, NetSpec>;
  pairs: PairSpec[];
  circuits: CircuitSpec[];
}

export interface MakeSpec {
  slug: string;
  name: string;
  colourSystem: "jis" | "din" | "bs" | "en";
  /** How the make writes colours within its notation (app/domain/colours house styles). */
  houseStyle: string;
  blurb: string;
  families: FamilySpec[];
}
