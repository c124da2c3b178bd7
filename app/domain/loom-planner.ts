// Loom planner: the cut list of a minimal loom built from a family's circuits. The builder keeps
// some circuits (ignition, charging, one headlamp …) and gets each wire's run, colour, current, size
// and the fuses. Pure TypeScript: the planner service feeds it from the database, the printable page
// renders `PlanResult`, and `cutListCsv` is the download.
//
// All the electrical arithmetic is wire-size.ts's (`wireSize`, `conductorResistance`): this module only
// decides what current, length and drop target each wire gets, and picks sizes from its lists.
// Bad input comes back as {ok:false, error:{field, message}} (the API's 400), never as a throw.

import { COLOUR_SYSTEM_IDS, encodeColour, type ColourName, type ColourSystemId } from "./colours";
import {
  SHORT_TERM_A_PER_MM2,
  AMPACITY_A_PER_MM2,
  AWG_GAUGES,
  CIRCUIT_KINDS,
  FUSE_MARGIN,
  FUSE_RATINGS_A,
  METRIC_SIZES_MM2,
  WorkshopInputError,
  awgAreaMm2,
  awgLabel,
  conductorResistance,
  copperTempFactor,
  defaultDropPct,
  wireSize,
  type CircuitKind,
} from "./wire-size";

/** One wire of the family's loom, as the planner service reads it from the database. */
export interface PlannerWire {
  id: string;
  /** Endpoint, ideally "connector:cavity"; the text before the first ":" is taken as the connector (for telling colours apart). */
  from: string;
  to: string;
  /** The factory's colour code as printed in the family's notation. */
  code: string;
  /** Decoded factory colour, base first. */
  colours: ColourName[];
  defaultLengthM: number | null;
  factorySizeMm2: number | null;
  /** Part of the earth return. */
  earth: boolean;
  feed: "battery" | "switched" | "signal" | "earth" | "load";
}

/** One circuit of the family; a solenoid's control side should be its own circuit, or its wires would carry the cranking current. */
export interface PlannerCircuit {
  slug: string;
  name: string;
  system: "ignition" | "charging" | "starting" | "lighting" | "signals" | "instruments" | string;
  /** Nominal current of its load(s), rule of thumb (see nominalLoadA). */
  loadA: number;
  /** How loadA was reached, e.g. "60 W headlamp at 12 V ≈ 5 A". */
  loadBasis: string;
  /** Ids of the wires current passes in this circuit, supply and return. */
  wires: string[];
  /** The factory fuse on its supply path nearest the load, if any. */
  fuse: { name: string; ratingA: number } | null;
  /** Every factory fuse on its supply path, battery first (the main fuse feeds every circuit behind it). Defaults to [fuse]. */
  fusesOnPath?: { name: string; ratingA: number }[];
}

/** What the builder asks for: the family's circuits and wires, the circuits to keep, and how to colour and measure. */
export interface PlannerInput {
  circuits: PlannerCircuit[];
  wires: PlannerWire[];
  /** Circuit slugs to keep. */
  keep: string[];
  /** factory: the family's own colours; simple: Loomlore's minimal scheme (see SIMPLE_SCHEME). */
  scheme: "factory" | "simple";
  /** How to write colours in the cut list (the family's own for factory). */
  notation: ColourSystemId;
  /** Builder-entered run lengths by wire id; they override the family defaults. */
  lengthsM?: Record<string, number>;
  /** Default 12. */
  systemV?: number;
  /** Conductor temperature for sizing, default 20 °C. */
  tempC?: number;
}

/** One row of the cut list: a wire to cut, colour, size and why. */
export interface CutRow {
  wire: string;
  from: string;
  to: string;
  colour: string;
  colours: ColourName[];
  lengthM: number;
  lengthSource: "builder" | "family default" | "assumed";
  currentA: number;
  circuits: string[];
  maxDropPct: number;
  sizeMm2: number;
  awg: number | null;
  dropV: number;
  dropPct: number;
  decidedBy: "voltage-drop" | "ampacity" | "minimum";
  notes: string[];
}

/** One fuse of the minimal loom: the circuits behind it, its re-checked rating and the wires it protects. */
export interface FuseRow {
  circuits: string[];
  ratingA: number;
  /** Wire ids. */
  protects: string[];
  basis: string;
}

/** The planned loom: cut list, fuses, the circuits left out, totals and every assumption made. */
export interface PlanResult {
  rows: CutRow[];
  fuses: FuseRow[];
  dropped: { slug: string; name: string }[];
  /** byGauge: metres per size, keyed by the size in mm² as a string ("0.5", "1.25"). */
  totals: { wires: number; lengthM: number; byGauge: Record<string, number> };
  assumptions: string[];
}

/** Thinnest wire the planner cuts, mm²: below it a crimped wire breaks under vibration (common practice), whatever its current. */
export const MIN_PRACTICAL_MM2 = 0.5;
/** Longest run a builder may enter, m: nothing on a motorcycle is further apart, so more is a typing slip. */
export const MAX_RUN_M = 10;
/** Run length taken when neither the builder nor the family gives one, m. */
export const ASSUMED_RUN_M = 1.0;
/** A starting circuit drawing at least this much is the starter motor itself (cranking, rule of thumb 100–150 A); nothing else on the loom comes close. */
export const CRANKING_MIN_A = 50;
/** Short-term current per mm² (wire-size.ts): what a starter cable may carry for the seconds it cranks. */
export { SHORT_TERM_A_PER_MM2 };
/** The nominal voltage nominalLoadA divides by (REFERENCE-FACTS §5: 6 cells ≈ 12 V). */
export const NOMINAL_V = 12;

// Floating point: 7.5 A / 5 A/mm² must select 1.5 mm², not 2, when the quotient lands a hair above.
const EPS = 1e-9;

const fmt = (x: number, sig = 3) => String(Number(x.toPrecision(sig)));

const fail = (field: string, message: string) => new WorkshopInputError(field, message);

function smallestMetric(needMm2: number): number | undefined {
  return METRIC_SIZES_MM2.find((a) => a >= needMm2 * (1 - EPS));
}

const AWG_THIN_FIRST = [...AWG_GAUGES].sort((a, b) => b - a);
function smallestAwg(needMm2: number): number | null {
  return AWG_THIN_FIRST.find((g) => awgAreaMm2(g) >= needMm2 * (1 - EPS)) ?? null;
}

// wire-size knows only its own circuit kinds; "instruments" and anything new count as "other" (10 %).
function kindOf(system: string): CircuitKind {
  return (CIRCUIT_KINDS as readonly string[]).includes(system) ? (system as CircuitKind) : "other";
}

const isEarth = (w: PlannerWire) => w.earth === true || w.feed === "earth";
const isCranking = (c: PlannerCircuit) => c.system === "starting" && c.loadA >= CRANKING_MIN_A;

// ---------------------------------------------------------------------------------------------
// Sizing

interface Sized {
  sizeMm2: number;
  awg: number | null;
  dropV: number;
  decidedBy: CutRow["decidedBy"];
  notes: string[];
}

function sizeWire(currentA: number, lengthM: number, systemV: number, maxDropPct: number, tempC: number, cranking: boolean): Sized {
  if (currentA <= 0) {
    // wireSize needs a current; a pickup's few mA drop nothing worth computing.
    return {
      sizeMm2: MIN_PRACTICAL_MM2,
      awg: smallestAwg(MIN_PRACTICAL_MM2),
      dropV: 0,
      decidedBy: "minimum",
      notes: [`Signal wire (no load current): the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice).`],
    };
  }
  // roundTrip false: each wire is a row of its own and its return is another row (or the frame),
  // so its own one-way length is the whole of its conductor.
  const ws = wireSize({ currentA, lengthM, systemV, maxDropPct, roundTrip: false, tempC });
  const notes: string[] = [];
  let sizeMm2: number;
  let awg: number | null;
  let decidedBy: CutRow["decidedBy"];
  if (cranking) {
    // Cranking lasts seconds: the continuous 5 A/mm² rule would ask for 35 mm² at 150 A, so the cable is
    // sized for the drop while cranking, with the short-term 10 A/mm² rule of thumb as the floor.
    const need = Math.max(ws.minAreaMm2, currentA / SHORT_TERM_A_PER_MM2);
    const size = smallestMetric(need);
    if (size === undefined) throw fail("currentA", `the starter cable needs ${fmt(need)} mm², more than the largest size offered`);
    sizeMm2 = size;
    awg = smallestAwg(need);
    decidedBy = size > smallestMetric(ws.minAreaMm2)! ? "ampacity" : "voltage-drop";
    notes.push(
      `Starter cable: sized for the voltage drop while cranking (${fmt(currentA)} A, rule of thumb) and the short-term ` +
        `${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb, not for continuous ampacity; starter cables are usually unfused.`,
    );
  } else {
    sizeMm2 = ws.metric.sizeMm2;
    awg = ws.awg.gauge;
    decidedBy = ws.metric.decidedBy;
  }
  if (sizeMm2 < MIN_PRACTICAL_MM2 - EPS) {
    sizeMm2 = MIN_PRACTICAL_MM2;
    decidedBy = "minimum";
    notes.push(`Raised to the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice); ${fmt(ws.metric.sizeMm2)} mm² would carry it.`);
  }
  if (awg === null || awgAreaMm2(awg) < MIN_PRACTICAL_MM2 - EPS) awg = smallestAwg(MIN_PRACTICAL_MM2);
  if (decidedBy === "ampacity" && !cranking) notes.push(`Decided by the ampacity rule of thumb (${AMPACITY_A_PER_MM2} A/mm² continuous), not a standard.`);
  const dropV = sizeMm2 === ws.metric.sizeMm2 ? ws.metric.dropV : currentA * conductorResistance(sizeMm2, lengthM, tempC);
  return { sizeMm2, awg, dropV, decidedBy, notes };
}

// ---------------------------------------------------------------------------------------------
// Colours

/** Loomlore's simple scheme, for the page and the assumptions: one line per rule, applied top to bottom. */
export const SIMPLE_SCHEME: readonly string[] = Object.freeze([
  "earth: black (every earth, even several in one connector: they are one node)",
  "pickup and other signal wires: violet, then grey",
  "charging: red/yellow (stator and other generator leads yellow)",
  "battery feed (unswitched): red",
  "ignition: switched feed white, coil negatives white/black",
  "starting: yellow/red",
  "lighting: headlamp blue, tail brown, brake green, other lighting feeds red/white",
  "indicators (signals): orange; instruments: pink; other systems: brown/white",
  "a switched feed shared by several systems: red/white",
  "where two wires in one connector would look alike, a tracer is added (green, blue, violet …)",
]);

// Tracers added to keep wires apart; green and yellow never meet (IEC 60757 keeps GNYE for the protective earth).
const TRACER_CYCLE: readonly ColourName[] = ["green", "blue", "violet", "orange", "grey", "pink", "brown", "white", "black", "yellow", "red"];

// Lamps recognised by name; brake first, because a wire that touches a brake switch is the brake wire.
const LAMPS: readonly (readonly [RegExp, ColourName[]])[] = [
  [/brake|stop/i, ["green"]],
  [/tail|rear|number|plate|park|position/i, ["brown"]],
  [/head|beam|\bdip|\bhigh\b|\blow\b/i, ["blue"]],
];

function lampColour(text: string): ColourName[] | null {
  for (const [re, colours] of LAMPS) if (re.test(text)) return [...colours];
  return null;
}

function lampColours(text: string): Set<string> {
  return new Set(LAMPS.filter(([re]) => re.test(text)).map(([, c]) => c.join("/")));
}

/** The colours the simple scheme would give a wire, most wanted first (before keeping connectors apart). */
function schemeCandidates(w: PlannerWire, cs: PlannerCircuit[]): ColourName[][] {
  if (isEarth(w)) return [["black"]];
  if (w.feed === "signal") return [["violet"], ["grey"]];
  const systems = new Set(cs.map((c) => c.system));
  const only = systems.size === 1 ? [...systems][0] : null;
  if (only === "charging") return w.feed === "load" ? [["yellow"]] : [["red", "yellow"]];
  if (w.feed === "battery") return [["red"]];
  switch (only) {
    case "ignition":
      return w.feed === "load" ? [["white", "black"]] : [["white"]];
    case "starting":
      return [["yellow", "red"]];
    case "lighting": {
      const own = lampColour(`${w.from} ${w.to}`);
      if (own) return [own];
      const kinds = lampColours(cs.map((c) => `${c.slug} ${c.name}`).join(" "));
      if (kinds.size === 1) return [[...kinds][0].split("/") as ColourName[]];
      return [["red", "white"]];
    }
    case "signals":
      return [["orange"]];
    case "instruments":
      return [["pink"]];
    case null:
      return [["red", "white"]];
    default:
      return [["brown", "white"]];
  }
}

function variants(candidates: ColourName[][]): ColourName[][] {
  const out = [...candidates];
  const ok = (v: ColourName[]) => new Set(v).size === v.length && !(v.includes("green") && v.includes("yellow"));
  const base = candidates[0];
  for (const t of TRACER_CYCLE) if (base.length < 3 && ok([...base, t])) out.push([...base, t]);
  if (base.length === 1) for (const t1 of TRACER_CYCLE) for (const t2 of TRACER_CYCLE) if (ok([...base, t1, t2])) out.push([...base, t1, t2]);
  return out;
}

/** "main-6p:3" → "main-6p": the part before the first ":" names the connector (or the component). */
function connectorOf(endpoint: string): string {
  return String(endpoint).split(":")[0].trim().toLowerCase();
}

function writeColour(colours: ColourName[], notation: ColourSystemId): { text: string; note: string | null } {
  if (colours.length === 0) return { text: "", note: "Factory colour not recorded." };
  const written = encodeColour(colours[0], colours.slice(1), notation);
  if (written !== null) return { text: written, note: null };
  const en = encodeColour(colours[0], colours.slice(1), "en");
  return { text: en ?? colours.join("/"), note: `No ${notation} code for ${colours.join("/")}: written in English.` };
}

// ---------------------------------------------------------------------------------------------
// Validation

function checkInput(input: PlannerInput) {
  if (input === null || typeof input !== "object") throw fail("input", "must be an object");
  if (!Array.isArray(input.circuits)) throw fail("circuits", "must be a list of circuits");
  if (!Array.isArray(input.wires)) throw fail("wires", "must be a list of wires");
  if (!Array.isArray(input.keep) || input.keep.length === 0) throw fail("keep", "choose at least one circuit to keep");
  const slugs = new Set(input.circuits.map((c) => c.slug));
  for (const slug of input.keep) {
    if (typeof slug !== "string" || !slugs.has(slug)) {
      throw fail("keep", `"${String(slug)}" is not a circuit of this family; use one of ${[...slugs].join(", ")}`);
    }
  }
  if (input.scheme !== "factory" && input.scheme !== "simple") throw fail("scheme", 'use "factory" or "simple"');
  if (!COLOUR_SYSTEM_IDS.includes(input.notation)) throw fail("notation", `use one of ${COLOUR_SYSTEM_IDS.join(", ")}`);
  const systemV = input.systemV ?? 12;
  if (typeof systemV !== "number" || !Number.isFinite(systemV) || systemV <= 0) throw fail("systemV", "must be a positive number of volts");
  const tempC = input.tempC ?? 20;
  try {
    copperTempFactor(tempC); // wire-size's own range check
  } catch (e) {
    if (e instanceof WorkshopInputError) throw fail("tempC", e.message.replace(/^tempC: /, ""));
    throw e;
  }
  const wireIds = new Set(input.wires.map((w) => w.id));
  const lengths = input.lengthsM ?? {};
  if (lengths === null || typeof lengths !== "object" || Array.isArray(lengths)) throw fail("lengthsM", "must map wire ids to metres");
  for (const [id, v] of Object.entries(lengths)) {
    const field = `lengthsM.${id}`;
    if (!wireIds.has(id)) throw fail(field, `there is no wire "${id}" in this family`);
    if (typeof v !== "number" || !Number.isFinite(v)) throw fail(field, "must be a number of metres");
    if (v <= 0 || v > MAX_RUN_M) throw fail(field, `must be more than 0 and at most ${MAX_RUN_M} m, got ${v}`);
  }
  const keep = new Set(input.keep);
  for (const c of input.circuits) {
    if (!keep.has(c.slug)) continue; // a dropped circuit's data cannot spoil the plan
    if (typeof c.loadA !== "number" || !Number.isFinite(c.loadA) || c.loadA < 0) throw fail(`circuits.${c.slug}.loadA`, "must be a current of 0 A or more");
    if (!Array.isArray(c.wires)) throw fail(`circuits.${c.slug}.wires`, "must be a list of wire ids");
    const missing = c.wires.find((id) => !wireIds.has(id));
    if (missing !== undefined) throw fail(`circuits.${c.slug}.wires`, `wire "${missing}" is not in the family's wires`);
  }
  return { systemV, tempC, lengths };
}

// ---------------------------------------------------------------------------------------------
// Planning

/** Build the cut list. Returns {ok:false,error:{field,message}} for unknown circuits, empty keep, bad lengths. */
export function planLoom(input: PlannerInput): { ok: true; plan: PlanResult } | { ok: false; error: { field: string; message: string } } {
  try {
    return { ok: true, plan: buildPlan(input) };
  } catch (e) {
    if (e instanceof WorkshopInputError) {
      const prefix = `${e.field}: `;
      return { ok: false, error: { field: e.field, message: e.message.startsWith(prefix) ? e.message.slice(prefix.length) : e.message } };
    }
    throw e;
  }
}

function buildPlan(input: PlannerInput): PlanResult {
  const { systemV, tempC, lengths } = checkInput(input);
  const keep = new Set(input.keep);
  const kept = input.circuits.filter((c) => keep.has(c.slug));
  const dropped = input.circuits.filter((c) => !keep.has(c.slug)).map(({ slug, name }) => ({ slug, name }));

  // Kirchhoff's current law: a wire shared by several kept circuits carries all their currents.
  const byWire = new Map<string, PlannerCircuit[]>();
  for (const c of kept) {
    for (const id of new Set(c.wires)) {
      const list = byWire.get(id);
      if (list) list.push(c);
      else byWire.set(id, [c]);
    }
  }

  const rows: CutRow[] = [];
  const rowCircuits = new Map<string, PlannerCircuit[]>();
  let assumed = 0;
  for (const w of input.wires) {
    const cs = byWire.get(w.id);
    if (!cs || rowCircuits.has(w.id)) continue;
    rowCircuits.set(w.id, cs);
    const currentA = cs.reduce((sum, c) => sum + c.loadA, 0);
    const maxDropPct = Math.min(...cs.map((c) => defaultDropPct(kindOf(c.system))));
    const notes: string[] = [];
    let lengthM: number;
    let lengthSource: CutRow["lengthSource"];
    if (lengths[w.id] !== undefined) {
      lengthM = lengths[w.id];
      lengthSource = "builder";
    } else if (typeof w.defaultLengthM === "number" && Number.isFinite(w.defaultLengthM) && w.defaultLengthM > 0) {
      lengthM = w.defaultLengthM;
      lengthSource = "family default";
    } else {
      lengthM = ASSUMED_RUN_M;
      lengthSource = "assumed";
      assumed++;
      notes.push(`Length assumed ${ASSUMED_RUN_M} m: measure the run and enter it.`);
    }
    let sized: Sized;
    try {
      sized = sizeWire(currentA, lengthM, systemV, maxDropPct, tempC, cs.some(isCranking));
    } catch (e) {
      if (!(e instanceof WorkshopInputError)) throw e;
      // Name what the builder can change: this run's length, or the circuits that load it.
      const field = e.field === "lengthM" ? `lengthsM.${w.id}` : "keep";
      throw fail(field, `wire ${w.id} (${w.from} → ${w.to}): ${e.message.replace(/^\w+: /, "")}`);
    }
    notes.push(...sized.notes);
    if (w.factorySizeMm2 !== null && w.factorySizeMm2 > sized.sizeMm2 + EPS) {
      notes.push(`Thinner than the factory's ${w.factorySizeMm2} mm²: sized for the kept circuits only.`);
    }
    rows.push({
      wire: w.id,
      from: w.from,
      to: w.to,
      colour: "",
      colours: [],
      lengthM,
      lengthSource,
      currentA,
      circuits: cs.map((c) => c.slug),
      maxDropPct,
      sizeMm2: sized.sizeMm2,
      awg: sized.awg,
      dropV: sized.dropV,
      dropPct: (sized.dropV / systemV) * 100,
      decidedBy: sized.decidedBy,
      notes,
    });
  }

  const wiresById = new Map(input.wires.map((w) => [w.id, w]));
  colourRows(rows, wiresById, rowCircuits, input.scheme, input.notation);
  const fuses = planFuses(input.circuits, kept, rows, wiresById, tempC, systemV);

  const byGauge: Record<string, number> = {};
  for (const r of [...rows].sort((a, b) => a.sizeMm2 - b.sizeMm2)) byGauge[String(r.sizeMm2)] = round3((byGauge[String(r.sizeMm2)] ?? 0) + r.lengthM);
  const totals = { wires: rows.length, lengthM: round3(rows.reduce((s, r) => s + r.lengthM, 0)), byGauge };

  const assumptions = [
    `Conductor temperature ${fmt(tempC)} °C${input.tempC === undefined ? " (the default; copper's resistance rises 0.393 %/°C, so choose a higher temperature for a hot run)" : ""}; system ${fmt(systemV)} V${input.systemV === undefined ? " (the default)" : ""}.`,
    "Each wire is sized on its own length: its return is another row of the list or the frame. The drop target applies to each wire; a circuit's total drop is the sum of its wires' drops.",
    "Drop targets: 3 % for ignition and charging, 10 % for the rest (ABYC critical / non-critical); a shared wire takes the strictest of its circuits.",
    `Ampacity: at most ${AMPACITY_A_PER_MM2} A/mm² continuous, a rule of thumb of German automotive practice, not a standard.`,
    `No wire thinner than ${MIN_PRACTICAL_MM2} mm², for mechanical strength (common practice).`,
    `Fuses: the smallest standard rating at or above ${FUSE_MARGIN} × the current behind it (common practice), and no more than the thinnest wire it protects stands short-term by the ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb.`,
    ...kept.map((c) => `Load of ${c.name}: ${fmt(c.loadA)} A${c.loadBasis ? ` — ${c.loadBasis}` : ""}.`),
  ];
  if (kept.some(isCranking)) {
    assumptions.push(`Starter cables: sized for the cranking drop with the short-term ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb, not continuous ampacity; usually unfused.`);
  }
  if (assumed > 0) assumptions.push(`${assumed} wire${assumed === 1 ? " has" : "s have"} no entered or family length: ${ASSUMED_RUN_M} m assumed.`);
  const ignored = Object.keys(lengths).filter((id) => !rowCircuits.has(id));
  if (ignored.length > 0) assumptions.push(`Lengths entered for ${ignored.join(", ")} are unused: no kept circuit passes ${ignored.length === 1 ? "that wire" : "those wires"}.`);
  assumptions.push(
    input.scheme === "factory"
      ? `Colours: the factory's, written in ${NOTATION_WORDS[input.notation]}.`
      : `Colours: Loomlore's simple scheme, written in ${NOTATION_WORDS[input.notation]}: ${SIMPLE_SCHEME.join("; ")}.`,
  );

  return { rows, fuses, dropped, totals, assumptions };
}

const round3 = (x: number) => Math.round(x * 1000) / 1000;

const NOTATION_WORDS: Record<ColourSystemId, string> = {
  jis: "Japanese-style letter codes", iec: "IEC 60757 codes", din: "DIN abbreviations", bs: "the older British letter code", en: "English names",
};

function colourRows(
  rows: CutRow[],
  wiresById: Map<string, PlannerWire>,
  rowCircuits: Map<string, PlannerCircuit[]>,
  scheme: PlannerInput["scheme"],
  notation: ColourSystemId,
) {
  // Per connector, the colours already given (both the colour list and the written code: IEC writes
  // red/white and white/red alike as RDWH, so the written form must differ too).
  const used = new Map<string, Set<string>>();
  const taken = (conns: string[], keys: string[]) => conns.some((c) => keys.some((k) => used.get(c)?.has(k)));
  for (const row of rows) {
    const w = wiresById.get(row.wire)!;
    let colours: ColourName[];
    if (scheme === "factory") colours = [...(w.colours ?? [])];
    else {
      const candidates = schemeCandidates(w, rowCircuits.get(row.wire)!);
      colours = candidates[0];
      if (!isEarth(w)) {
        const conns = [...new Set([connectorOf(w.from), connectorOf(w.to)])];
        const keysOf = (v: ColourName[]) => [v.join("/"), writeColour(v, notation).text];
        const pick = variants(candidates).find((v) => !taken(conns, keysOf(v)));
        if (pick) colours = pick;
        else row.notes.push("Looks like another wire in the same connector: sleeve or tag it.");
        for (const c of conns) {
          const set = used.get(c) ?? new Set<string>();
          for (const k of keysOf(colours)) set.add(k);
          used.set(c, set);
        }
      }
    }
    const { text, note } = writeColour(colours, notation);
    row.colours = colours;
    row.colour = text;
    if (note) row.notes.push(note);
  }
}

function planFuses(
  all: PlannerCircuit[],
  kept: PlannerCircuit[],
  rows: CutRow[],
  wiresById: Map<string, PlannerWire>,
  tempC: number,
  systemV: number,
): FuseRow[] {
  const pathOf = (c: PlannerCircuit) => c.fusesOnPath ?? (c.fuse ? [c.fuse] : []);
  // A fuse carries the current of every kept circuit whose supply passes through it, not only of those it is nearest to:
  // the main fuse feeds the lot (Kirchhoff's current law).
  const groups = new Map<string, PlannerCircuit[]>();
  const ratingOf = new Map<string, number>();
  for (const c of kept) {
    for (const f of pathOf(c)) {
      ratingOf.set(f.name, f.ratingA);
      const list = groups.get(f.name);
      if (list) list.push(c);
      else groups.set(f.name, [c]);
    }
  }
  // A wire is protected by the nearest fuse that every circuit using it (in the factory loom) passes through.
  const protector = (wire: string): string | null => {
    const paths = all.filter((c) => Array.isArray(c.wires) && c.wires.includes(wire)).map(pathOf);
    if (!paths.length || paths.some((p) => p.length === 0)) return null;
    const common = paths[0].filter((f) => paths.every((p) => p.some((x) => x.name === f.name)));
    return common.at(-1)?.name ?? null;
  };
  const fuses: FuseRow[] = [];
  for (const [name, cs] of groups) {
    // Earth returns and signal wires are not on a fuse's supply path: a short to the frame bypasses them.
    const protectedRows = rows.filter((r) => {
      const w = wiresById.get(r.wire)!;
      if (isEarth(w) || w.feed === "signal") return false;
      return protector(r.wire) === name;
    });
    const currentA = cs.reduce((s, c) => s + c.loadA, 0);
    const needA = FUSE_MARGIN * currentA;
    const factory = ratingOf.get(name)!;
    const candidate = FUSE_RATINGS_A.find((r) => r >= needA * (1 - EPS));
    const parts: string[] = [
      `"${name}": kept circuits draw ${fmt(currentA)} A; ${FUSE_MARGIN} × ${fmt(currentA)} A = ${fmt(needA)} A (common practice).`,
    ];
    let ratingA: number;
    if (candidate === undefined) {
      ratingA = factory;
      parts.push(`No standard rating reaches ${fmt(needA)} A (the largest is ${FUSE_RATINGS_A[FUSE_RATINGS_A.length - 1]} A): the factory's ${factory} A is listed unchanged; split the load.`);
    } else {
      ratingA = candidate;
      parts.push(`${candidate} A is the smallest standard rating at or above it.`);
      if (protectedRows.length === 0) {
        parts.push("No wire is on this fuse alone, so none was checked against it.");
      } else {
        const thinnest = protectedRows.reduce((a, b) => (b.sizeMm2 < a.sizeMm2 ? b : a));
        const thinnestMm2 = thinnest.sizeMm2; // before any upsizing below
        const limitA = SHORT_TERM_A_PER_MM2 * thinnestMm2;
        if (candidate > limitA * (1 + EPS)) {
          // The fuse protects the wire: rather than a fuse the wire cannot carry, the wire grows to the fuse.
          const needMm2 = candidate / SHORT_TERM_A_PER_MM2;
          const size = smallestMetric(needMm2)!;
          const grown: string[] = [];
          for (const r of protectedRows) {
            if (SHORT_TERM_A_PER_MM2 * r.sizeMm2 >= candidate * (1 - EPS)) continue;
            const from = r.sizeMm2;
            r.sizeMm2 = size;
            const g = smallestAwg(needMm2);
            if (g !== null && (r.awg === null || awgAreaMm2(g) > awgAreaMm2(r.awg))) r.awg = g;
            r.dropV = r.currentA > 0 ? r.currentA * conductorResistance(size, r.lengthM, tempC) : 0;
            r.dropPct = (r.dropV / systemV) * 100;
            r.decidedBy = "ampacity";
            r.notes.push(`Upsized from ${from} to ${size} mm² so the ${candidate} A fuse "${name}" protects it (${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb).`);
            grown.push(r.wire);
          }
          parts.push(
            `The thinnest wire it protects (${thinnest.wire}, ${fmt(thinnestMm2)} mm²) carries only ${fmt(limitA)} A by the ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb, ` +
              `so ${grown.join(", ")} ${grown.length === 1 ? "is" : "are"} upsized to ${size} mm² (or split these circuits across smaller fuses).`,
          );
        } else {
          parts.push(`The thinnest wire it protects (${thinnest.wire}, ${fmt(thinnestMm2)} mm²) carries ${fmt(limitA)} A by the ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb.`);
        }
      }
    }
    for (const r of protectedRows) r.notes.push(`Protected by fuse "${name}" (${ratingA} A).`);
    if (factory !== ratingA) {
      parts.push(`Warning: the factory fitted ${factory} A; ${ratingA} A suits the kept circuits${factory > ratingA ? " (the factory's also fed circuits now dropped, or was generous)" : ""}.`);
    }
    fuses.push({ circuits: cs.map((c) => c.slug), ratingA, protects: protectedRows.map((r) => r.wire), basis: parts.join(" ") });
  }
  return fuses;
}

// ---------------------------------------------------------------------------------------------
// CSV

const CSV_HEADER = [
  "wire",
  "from",
  "to",
  "colour",
  "colours",
  "length_m",
  "length_source",
  "current_a",
  "circuits",
  "max_drop_pct",
  "size_mm2",
  "awg",
  "drop_v",
  "drop_pct",
  "decided_by",
  "notes",
] as const;

function csvCell(v: string | number | null): string {
  const s = v === null ? "" : String(v);
  // A leading =, +, -, @, tab or CR would make a spreadsheet run the cell as a formula.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

const num = (x: number, decimals: number) => String(Number(x.toFixed(decimals)));

/** The cut list as CSV (header row; RFC 4180 quoting; formula-looking cells defused). */
export function cutListCsv(plan: PlanResult): string {
  const lines = [CSV_HEADER.join(",")];
  for (const r of plan.rows) {
    const cells: (string | number | null)[] = [
      r.wire,
      r.from,
      r.to,
      r.colour,
      r.colours.join("/"),
      num(r.lengthM, 3),
      r.lengthSource,
      num(r.currentA, 2),
      r.circuits.join("; "),
      num(r.maxDropPct, 2),
      num(r.sizeMm2, 2),
      r.awg === null ? null : awgLabel(r.awg).replace(" AWG", ""),
      num(r.dropV, 3),
      num(r.dropPct, 2),
      r.decidedBy,
      r.notes.join(" "),
    ];
    lines.push(cells.map(csvCell).join(","));
  }
  // RFC 4180: CRLF line breaks, and the last record ends with one too.
  return lines.join("\r\n") + "\r\n";
}

// ---------------------------------------------------------------------------------------------
// Nominal loads

interface LoadKind {
  match: RegExp;
  what: string;
  /** Per item, W: lamps. */
  watts?: number;
  /** Per item, Ω: coils. */
  ohms?: number;
  /** Per item, A, where neither W nor Ω says it. */
  amps?: number;
  source: string;
}

// Checked top to bottom, so "starter relay" is a solenoid before it is a starter. Figures are the
// trade's rules of thumb [from memory / common practice], stated in each basis.
const LOAD_KINDS: readonly LoadKind[] = [
  { match: /pick-?up|pulser|sensor|signal generator|trigger/i, what: "pickup", amps: 0, source: "a few mA, taken as 0" },
  { match: /solenoid|starter relay|start relay/i, what: "starter solenoid coil", ohms: 3, source: "a solenoid coil of ≈ 3 Ω" },
  { match: /starter|starting motor|cranking/i, what: "starter motor", amps: 150, source: "cranking ≈ 100–150 A; the upper end taken" },
  { match: /\bcoil/i, what: "ignition coil primary", ohms: 3, source: "coil primary ≈ 3 Ω while it is switched on (the dwell lowers the average)" },
  { match: /relay/i, what: "relay coil", ohms: 85, source: "a mini relay coil of ≈ 85 Ω" },
  { match: /igniter|ignition unit|\bcdi\b|control unit|ignition module/i, what: "electronic ignition unit", amps: 1, source: "≈ 1 A for the unit itself" },
  { match: /alternator|generator|dynamo|stator|charging|regulator|rectifier/i, what: "charging output", watts: 180, source: "a 150–200 W alternator of the era" },
  { match: /horn/i, what: "horn", amps: 4, source: "a motorcycle horn draws ≈ 2–5 A" },
  { match: /instrument|warning|pilot|tell-?tale|gauge|meter|neutral|indicator lamp/i, what: "instrument or warning lamp", watts: 3, source: "≈ 3 W bulbs" },
  { match: /indicator|turn|flasher|winker|blinker/i, what: "indicator lamp", watts: 21, source: "21 W lamps" },
  { match: /brake|stop/i, what: "brake lamp", watts: 21, source: "a 21 W filament" },
  { match: /tail|number|plate|park|position/i, what: "tail lamp", watts: 5, source: "a 5 W filament" },
  { match: /head/i, what: "headlamp", watts: 60, source: "a 60 W filament, typical of 12 V bikes" },
  { match: /lamp|bulb|light/i, what: "lamp", source: "give its wattage" },
];

const NUM = String.raw`(\d+(?:[.,]\d+)?)`;
const COUNT = String.raw`(?:(\d+)\s*[×x*]\s*)?`;
const parseNum = (s: string) => Number(s.replace(",", "."));

// Throws a WorkshopInputError ("kind" or "label"), like the rest of app/domain, when no rule fits.
/** The nominal current of a load by kind, rule of thumb: lamp wattage/12 V, coil primary ≈ 4 A each at 3 Ω …; exported for the service. */
export function nominalLoadA(kind: string, label: string): { amps: number; basis: string } {
  const k = String(kind ?? "").trim();
  const l = String(label ?? "");
  const text = `${k} ${l}`;
  // An explicit current on the label beats every rule of thumb.
  const amps = new RegExp(String.raw`${COUNT}${NUM}\s*(m?)A\b`).exec(l);
  if (amps) {
    const n = amps[1] ? Number(amps[1]) : 1;
    const a = n * parseNum(amps[2]) * (amps[3] ? 0.001 : 1);
    return { amps: a, basis: `${l.trim()}: ${fmt(a)} A as stated` };
  }
  const watts = new RegExp(String.raw`${COUNT}${NUM}((?:\s*/\s*\d+(?:[.,]\d+)?)*)\s*W\b`, "i").exec(l);
  const ohms = new RegExp(String.raw`${COUNT}${NUM}\s*(?:Ω|ohms?\b)`, "i").exec(l);
  const known = LOAD_KINDS.find((d) => d.match.test(k)) ?? LOAD_KINDS.find((d) => d.match.test(text));
  const rule = "(rule of thumb)";
  if (watts) {
    // A twin-filament lamp (60/55 W) burns one filament per circuit: the larger is the worst case.
    const each = Math.max(parseNum(watts[2]), ...(watts[3] ? watts[3].split("/").filter((s) => s.trim()).map(parseNum) : []));
    const n = watts[1] ? Number(watts[1]) : 1;
    const a = (n * each) / NOMINAL_V;
    const what = known?.what ?? "load";
    return { amps: a, basis: `${n > 1 ? `${n} × ` : ""}${fmt(each)} W ${what} at ${NOMINAL_V} V ≈ ${fmt(a)} A ${rule}` };
  }
  if (ohms) {
    const n = ohms[1] ? Number(ohms[1]) : 1;
    const r = parseNum(ohms[2]);
    if (r <= 0) throw fail("label", `a resistance must be more than 0 Ω, got ${ohms[2]}`);
    const a = (n * NOMINAL_V) / r;
    return { amps: a, basis: `${n > 1 ? `${n} × ` : ""}${known?.what ?? "load"} of ${fmt(r)} Ω at ${NOMINAL_V} V ≈ ${fmt(a)} A ${rule}` };
  }
  if (!known) throw fail("kind", `no rule of thumb for "${k}": give its current (A), wattage (W) or resistance (Ω) in the label`);
  const count = /(\d+)\s*(?:[×x*]|coils\b|lamps\b|bulbs\b|horns\b)/i.exec(l);
  const n = count ? Number(count[1]) : 1;
  const many = n > 1 ? `${n} × ` : "";
  if (known.watts !== undefined) {
    const a = (n * known.watts) / NOMINAL_V;
    return { amps: a, basis: `${many}${known.what}, ${known.source}: ${many}${known.watts} W at ${NOMINAL_V} V ≈ ${fmt(a)} A ${rule}` };
  }
  if (known.ohms !== undefined) {
    const a = (n * NOMINAL_V) / known.ohms;
    return { amps: a, basis: `${many}${known.what}, ${known.source}: ${NOMINAL_V} V / ${known.ohms} Ω ≈ ${fmt(NOMINAL_V / known.ohms)} A each, ${fmt(a)} A ${rule}` };
  }
  if (known.amps !== undefined) {
    const a = n * known.amps;
    return { amps: a, basis: `${many}${known.what}: ${known.source}, ${fmt(a)} A ${rule}` };
  }
  throw fail("label", `a ${known.what} needs its wattage in the label, e.g. "21 W"`);
}
