/**
 * Publishing a proposal onto the live card, as rules over rows already read: which pins are kept, added or removed (by
 * cavity), which wires and far-end pins take a corrected colour, which loom-side cavities are rewired. The result is a
 * plan of changes the service applies inside the publishing transaction. Pure: no framework, no database.
 *
 * The rules work through the proposal's rows in order, each on the state the rows before it left (a rewire of row 1 is
 * a wire row 2's recolouring can follow), just as the writes did one by one when they were queries.
 */
import type { ProposedPin } from "./submissions";

export interface PlanPin {
  id: number;
  connectorId: number | null;
  cavity: string;
  colourCode: string | null;
  circuit: string;
  terminal: string | null;
  position: number;
}
export interface PlanWire {
  id: number;
  fromPinId: number;
  toPinId: number;
  colourCode: string;
}
export interface PlanConnector {
  id: number;
  slug: string;
  matesWithId: number | null;
}
type Far = { connector: string; cavity: string } | null;

export interface PublishInput {
  /** The card being published, with its mate as it is now set. */
  card: { id: number; componentId: number | null };
  /** Every pin, wire and card of the family (wires and mates stay inside a family: the loom check says so). */
  pins: PlanPin[];
  wires: PlanWire[];
  connectors: PlanConnector[];
  /** Circuits and component links that start or end on the card's pins. */
  circuits: { name: string; fromPinId: number; toPinId: number }[];
  componentLinks: { fromPinId: number; toPinId: number }[];
  /** The proposal's pin rows, in order, and where each cavity went on the published card (by cavity; none for a new card). */
  rows: ProposedPin[];
  goesToBefore: Map<string, Far>;
}

type PinFields = Pick<PlanPin, "colourCode" | "circuit" | "terminal" | "position">;
/** A pin or wire end that is created by the plan: `ref` is a negative stand-in for the id the database gives it. */
export interface PublishPlan {
  deleteWires: number[];
  deletePins: number[];
  updatePins: { id: number; changes: Partial<PinFields> }[];
  createPins: ({ ref: number; cavity: string } & PinFields)[];
  wireColours: { id: number; colourCode: string }[];
  /** fromPinId / toPinId may be a created pin's `ref`. */
  createWires: { fromPinId: number; toPinId: number; colourCode: string }[];
  /** Other cards whose pins took a corrected colour (each gets a revision of its own), in the order they were reached. */
  touched: number[];
}

/** Why a proposal cannot be published onto the loom as it stands (the service answers 409 with the message). */
export class PublishConflict extends Error {}

const FIELDS = ["colourCode", "circuit", "terminal", "position"] as const;

export function planPublish(input: PublishInput): PublishPlan {
  const { card } = input;
  // Working copies: the input rows are left as they were read.
  const pins = new Map(input.pins.map((p) => [p.id, { ...p }]));
  const wires = new Map(input.wires.map((w) => [w.id, { ...w }]));
  const connectors = new Map(input.connectors.map((c) => [c.id, c]));
  const bySlug = new Map(input.connectors.map((c) => [c.slug, c]));
  let nextRef = -1;
  const newPin = (fields: Omit<PlanPin, "id">) => {
    const p = { id: nextRef--, ...fields };
    pins.set(p.id, p);
    return p;
  };
  const wiresOf = (pinId: number) => [...wires.values()].filter((w) => w.fromPinId === pinId || w.toPinId === pinId);
  const farEnd = (w: PlanWire, pinId: number) => pins.get(w.fromPinId === pinId ? w.toPinId : w.fromPinId);

  // Pins, matched by cavity so wires and circuits keep their ends.
  const existing = input.pins.filter((x) => x.connectorId === card.id);
  const byCavity = new Map(existing.map((x) => [x.cavity, x]));
  const keep = new Set(input.rows.map((x) => x.cavity));
  const deletePins: number[] = [];
  for (const gone of existing.filter((x) => !keep.has(x.cavity))) {
    const ends = (l: { fromPinId: number; toPinId: number }) => l.fromPinId === gone.id || l.toPinId === gone.id;
    const circuit = input.circuits.find(ends);
    if (circuit) throw new PublishConflict(`Cavity ${gone.cavity} starts or ends the circuit “${circuit.name}”, so its row cannot be taken out.`);
    if (input.componentLinks.some(ends)) throw new PublishConflict(`Cavity ${gone.cavity} leads into its component, so its row cannot be taken out.`);
    for (const w of wiresOf(gone.id)) wires.delete(w.id);
    pins.delete(gone.id);
    deletePins.push(gone.id);
  }

  /** Change a wire's colour code along the wire and across mated cavities (not through splices or components). */
  const recolour = (start: PlanPin, from: string, to: string): Set<number> => {
    const seen = new Set<number>([start.id]);
    const queue = [start];
    const reached = new Set<number>();
    const follow = (other: PlanPin) => {
      seen.add(other.id);
      other.colourCode = to;
      queue.push(other);
    };
    while (queue.length) {
      const pin = queue.shift()!;
      if (pin.connectorId) reached.add(pin.connectorId);
      for (const w of wiresOf(pin.id)) {
        if (w.colourCode === from) w.colourCode = to;
        const other = farEnd(w, pin.id);
        if (other && !seen.has(other.id) && other.connectorId && other.colourCode === from) follow(other);
      }
      const mateId = pin.connectorId ? connectors.get(pin.connectorId)?.matesWithId : null;
      const matePin = mateId ? [...pins.values()].find((x) => x.connectorId === mateId && x.cavity === pin.cavity) : undefined;
      if (matePin && !seen.has(matePin.id) && matePin.colourCode === from) follow(matePin);
    }
    return reached;
  };

  /** Point a loom-side cavity's wire at a new far end (or none): its direct wires to connector cavities are replaced. */
  const rewire = (pin: PlanPin, colour: string | null, goesTo: Far) => {
    for (const w of wiresOf(pin.id)) if (farEnd(w, pin.id)?.connectorId) wires.delete(w.id);
    if (!goesTo) return;
    const target = bySlug.get(goesTo.connector);
    const end = target ? [...pins.values()].find((x) => x.connectorId === target.id && x.cavity === goesTo.cavity) : undefined;
    if (!end) throw new PublishConflict(`${goesTo.connector} cavity ${goesTo.cavity} has no pin for the wire to end on.`);
    const w = { id: nextRef--, fromPinId: pin.id, toPinId: end.id, colourCode: colour ?? end.colourCode ?? "" };
    wires.set(w.id, w);
  };

  const touched = new Set<number>();
  for (const [position, row] of input.rows.entries()) {
    const loaded = byCavity.get(row.cavity);
    const values: PinFields = { colourCode: row.code, circuit: row.circuit, terminal: row.terminal, position };
    let pin: PlanPin;
    if (loaded) {
      // A field is written where the row differs from the pin as the card was read (what the contributor edited), so a
      // colour an earlier row's correction carried onto this pin stays when this row leaves the colour as it was.
      pin = pins.get(loaded.id)!;
      for (const k of FIELDS) if (values[k] !== loaded[k]) (pin[k] as PinFields[typeof k]) = values[k];
    } else pin = newPin({ connectorId: card.id, cavity: row.cavity, ...values });
    const oldCode = loaded?.colourCode ?? null;
    // One physical wire carries one colour: a corrected code follows the wire to its other end and across the mate.
    if (oldCode && row.code && oldCode !== row.code) for (const id of recolour(pin, oldCode, row.code)) touched.add(id);
    const was = input.goesToBefore.get(row.cavity) ?? null;
    const same = (was?.connector ?? null) === (row.goesTo?.connector ?? null) && (was?.cavity ?? null) === (row.goesTo?.cavity ?? null);
    if (!card.componentId && !same) rewire(pin, row.code, row.goesTo);
  }
  touched.delete(card.id);

  // The plan: what differs between the rows as read and as the rules left them.
  const readPins = new Map(input.pins.map((p) => [p.id, p]));
  const updatePins: PublishPlan["updatePins"] = [];
  const createPins: PublishPlan["createPins"] = [];
  for (const p of pins.values()) {
    if (p.id < 0) {
      createPins.push({ ref: p.id, cavity: p.cavity, colourCode: p.colourCode, circuit: p.circuit, terminal: p.terminal, position: p.position });
      continue;
    }
    const before = readPins.get(p.id)!;
    const changes: Partial<PinFields> = {};
    for (const k of FIELDS) if (p[k] !== before[k]) (changes[k] as PinFields[typeof k]) = p[k];
    if (Object.keys(changes).length) updatePins.push({ id: p.id, changes });
  }
  const wireColours: PublishPlan["wireColours"] = [];
  const createWires: PublishPlan["createWires"] = [];
  const readWires = new Map(input.wires.map((w) => [w.id, w]));
  for (const w of wires.values()) {
    if (w.id < 0) createWires.push({ fromPinId: w.fromPinId, toPinId: w.toPinId, colourCode: w.colourCode });
    else if (w.colourCode !== readWires.get(w.id)!.colourCode) wireColours.push({ id: w.id, colourCode: w.colourCode });
  }
  return {
    deleteWires: input.wires.filter((w) => !wires.has(w.id)).map((w) => w.id),
    deletePins,
    updatePins,
    createPins,
    wireColours,
    createWires,
    touched: [...touched],
  };
}
