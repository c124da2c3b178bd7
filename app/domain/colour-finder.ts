/**
 * The colour finder: the plug is gone and some cut wires are left. Given the colours seen on
 * them (any notation, any order), rank the library's connectors by how well each explains them,
 * with the optimal wire → cavity assignment (Hungarian algorithm, `munkres` package) per connector.
 *
 * Pure TypeScript, no I/O: POST /api/v1/colour-finder builds the index once from the library and
 * calls findConnectors per request; the { ok, error } results carry the API's error shape.
 *
 * Which reading of a typed code: each connector is compared using the code read in its own family's notation and
 * its make's house style (a rider who copied the codes off that family's diagram wrote them that way), when every
 * typed code reads there; otherwise, and for connectors with no notation, every plausible reading is tried. English
 * words are English everywhere. Each match says which reading it used (`readAs`).
 *
 * Speed (10 000+ connectors per query): every distinct pin colour in the library is interned once
 * at build time, so a query first fills a small wires × distinct-colours cost table; each connector
 * then gets a cheap lower bound (each wire's cheapest pin, ignoring that two wires cannot share a
 * cavity), connectors are visited best bound first, and munkres runs only while a connector's
 * bound can still beat the current k-th best. A connector's bound is never below its true score,
 * so the ranking is the same as running munkres on every connector (a unit test checks this).
 */

import { munkres } from "munkres";
import {
  COLOUR_NAMES,
  COLOUR_SYSTEM_IDS,
  JIS_HOUSE_ORDER,
  decodeColour,
  describeColour,
  houseStyleOf,
  isEnglishColourWords,
  type ColourName,
  type ColourSystemId,
  type HouseStyleId,
} from "./colours";

// ---- Public types ---------------------------------------------------------------------------

export interface FinderPin {
  cavity: string;
  /** The pin's colour as the card writes it (family notation), e.g. "W/R"; null if the card has none. */
  code: string | null;
  /** Base first, decoded in the family's notation; [] if the cavity has no wire. */
  colours: ColourName[];
}

export interface FinderConnector {
  slug: string;
  name: string;
  /** Family slug. */
  family: string;
  familyName?: string;
  /** Electrical system the connector belongs to (ignition, lighting, charging …). */
  system: string;
  gender: "plug" | "socket";
  pins: FinderPin[];
  /** The family's notation; typed codes are read in it (and in houseStyle) for this connector. Absent: every reading. */
  notation?: ColourSystemId;
  /** The make's house style within that notation; null or absent: the notation's usual reading (every house for jis). */
  houseStyle?: HouseStyleId | null;
}

export interface FinderQuery {
  /** Colours seen on the cut wires, one code per wire, any notation and order. 1 … MAX_WIRES. */
  wires: string[];
  /** Only connectors with exactly this many cavities. */
  pinCount?: number;
  gender?: "plug" | "socket";
  /** Family slug: a filter (default) or, with familyMode "boost", a FAMILY_BOOST bonus. */
  family?: string;
  familyMode?: "filter" | "boost";
  system?: string;
  /** How the wires are written; "auto" (default) tries every notation and keeps the cheapest reading. */
  notation?: ColourSystemId | "auto";
  /** Candidates returned, default DEFAULT_LIMIT, at most MAX_LIMIT (larger values are clamped). */
  limit?: number;
}

export type WireQuality = "exact" | "tracer-missing" | "faded" | "none";

/** Where a reading of a typed code comes from: a notation and, where it has several, the house table. */
export interface ReadingOrigin {
  system: ColourSystemId;
  houseStyle: HouseStyleId | null;
}

/** The reading of a typed code that a match used: its origin, the colours base first, and in words. */
export interface WireReading extends ReadingOrigin {
  colours: ColourName[];
  words: string;
}

export interface FinderMatch {
  /** The wire as typed. */
  wire: string;
  /** Cavity the wire is assigned to; null when the card has no partner for it. */
  cavity: string | null;
  /** That cavity's colour as the card writes it; null with cavity null. */
  pinColour: string | null;
  quality: WireQuality;
  /** 0 (exact) … 1 (no partner on the card); see FINDER_COSTS. */
  cost: number;
  /** The reading of the typed code that explains the pin best (base first); [] with cavity null. */
  reading: ColourName[];
  /** That reading with where it comes from (notation, house); null with cavity null. */
  readAs: WireReading | null;
}

export interface FinderCandidate {
  connector: { slug: string; name: string; family: string; familyName?: string };
  /** 0 … 1: 1 − mean wire cost, less the unexplained-pin penalty, plus the family boost. */
  score: number;
  /** One per seen wire, in the order given. */
  matches: FinderMatch[];
}

export interface FinderError {
  code: "unknown_colour" | "bad_request";
  message: string;
  field: string;
}

export type FinderResult =
  | {
      ok: true;
      candidates: FinderCandidate[];
      /** How much work the query took: connectors past the filters, and how many needed munkres. */
      stats: { considered: number; assigned: number };
    }
  | { ok: false; error: FinderError };

// ---- Costs ----------------------------------------------------------------------------------

/**
 * Cost of explaining one seen wire by one cavity (0 best … 1 worst). The order is the point:
 * a missing tracer (tracers are thin and wear off) is likelier than a faded base, which is
 * likelier than a different wire; a wire the card has no cavity for costs most.
 */
export const FINDER_COSTS = Object.freeze({
  /** Base and tracers as on the card. */
  exact: 0,
  /** Seen base-only (or fewer tracers) where the card has a tracer: the stripe wore off or is hidden. */
  tracerMissing: 0.25,
  /** Seen a tracer the card lacks: treated like tracer-missing (quality "tracer-missing") but dearer. */
  extraTracer: 0.3,
  /** Base confusable per FADING_PAIRS (tracers equal), or base equal and a tracer confusable. */
  faded: 0.35,
  /** Base and a tracer both confusable. */
  fadedBoth: 0.4,
  /** Base confusable and the card's tracer not seen. */
  fadedTracerMissing: 0.5,
  /** Base confusable and a tracer seen that the card lacks. */
  fadedExtraTracer: 0.55,
  /** Base equal but a tracer of a different, non-confusable colour (quality "none"). */
  wrongTracer: 0.7,
  /** Base confusable and a tracer of a different colour (quality "none"). */
  fadedWrongTracer: 0.8,
  /** Bases neither equal nor confusable (quality "none"). */
  wrongBase: 0.9,
  /** No cavity for the wire: more wires than cavities, or only an empty cavity left. The most. */
  noCavity: 1,
});

/**
 * Ranking penalty per wired cavity that no seen wire explains, so that three wires fit a
 * 3-cavity connector better than an 8-cavity one with the same colours. Counted for at most
 * UNUSED_PIN_PENALTY_MAX pins (0.05 in all): wires get lost, so the penalty only separates
 * near-equal colour matches (one missing tracer among six wires already costs 0.25 / 6 ≈ 0.042).
 */
export const UNUSED_PIN_PENALTY = 0.005;
export const UNUSED_PIN_PENALTY_MAX = 10;
/** Score bonus for the user's family with familyMode "boost". */
export const FAMILY_BOOST = 0.05;
export const DEFAULT_LIMIT = 10;
export const MAX_LIMIT = 50;
export const MAX_WIRES = 40;

/**
 * Colours that old insulation, dirt and a dim garage make look alike. Common practice (what
 * rewirers report; no standard lists these): white yellows and greys, light shades darken or
 * fade into their parent colour, red fades to orange or pink, brown shades run together.
 * The relation is symmetric (each pair is read both ways) and not transitive.
 */
export const FADING_PAIRS: readonly (readonly [ColourName, ColourName])[] = Object.freeze([
  ["white", "grey"],
  ["light green", "green"],
  ["chocolate", "brown"],
  ["sky blue", "blue"],
  ["light blue", "blue"],
  ["light blue", "sky blue"],
  ["yellow", "white"], // yellowed insulation
  ["orange", "red"],
  ["pink", "red"], // the weakest pair: a red that has bleached in the sun
  ["dark green", "green"],
  ["tan", "brown"],
  ["silver", "grey"],
  ["gold", "yellow"],
] as const);

// ---- Colour lookup tables (built once) ------------------------------------------------------

const N = COLOUR_NAMES.length;
/** Index N stands for anything that is not a colour word (unchecked JSON): it matches nothing. */
const UNKNOWN = N;
const COLOUR_INDEX = new Map<string, number>(COLOUR_NAMES.map((name, i) => [name, i]));
const GREEN = COLOUR_INDEX.get("green")!;
const YELLOW = COLOUR_INDEX.get("yellow")!;
const GREEN_YELLOW = COLOUR_INDEX.get("green-yellow")!;

const SAME = 0;
const CONFUSABLE = 1;
const DIFFERENT = 2;
/** RELATION[a * (N + 1) + b]: SAME, CONFUSABLE (FADING_PAIRS, both ways) or DIFFERENT. */
const RELATION = (() => {
  const rel = new Uint8Array((N + 1) * (N + 1)).fill(DIFFERENT);
  for (let i = 0; i < N; i++) rel[i * (N + 1) + i] = SAME;
  for (const [a, b] of FADING_PAIRS) {
    const i = COLOUR_INDEX.get(a)!;
    const j = COLOUR_INDEX.get(b)!;
    rel[i * (N + 1) + j] = CONFUSABLE;
    rel[j * (N + 1) + i] = CONFUSABLE;
  }
  return rel;
})();

/** True when the two colours are confusable per FADING_PAIRS (not when they are equal). */
export function areConfusable(a: ColourName, b: ColourName): boolean {
  return RELATION[indexOf(a) * (N + 1) + indexOf(b)] === CONFUSABLE;
}

function indexOf(name: string): number {
  return COLOUR_INDEX.get(name) ?? UNKNOWN;
}

// Integer costs (thousandths) inside: munkres compares sums for equality, which floats would spoil.
const SCALE = 1000;
const milli = (c: number) => Math.round(c * SCALE);
const NO_CAVITY = milli(FINDER_COSTS.noCavity);
const WRONG_BASE = milli(FINDER_COSTS.wrongBase);

const Q_EXACT = 0;
const Q_TRACER = 1;
const Q_FADED = 2;
const Q_NONE = 3;
const QUALITIES: readonly WireQuality[] = ["exact", "tracer-missing", "faded", "none"];

// Tracer states, from the comparison of the seen tracers with the card's.
const T_EXACT = 0;
const T_FADED = 1;
const T_MISSING = 2;
const T_EXTRA = 3;
const T_WRONG = 4;
/** COMBINED[baseState * 5 + tracerState]: cost (thousandths) and quality; base DIFFERENT is WRONG_BASE. */
const COMBINED_COST = Int32Array.from(
  [
    [FINDER_COSTS.exact, FINDER_COSTS.faded, FINDER_COSTS.tracerMissing, FINDER_COSTS.extraTracer, FINDER_COSTS.wrongTracer],
    [FINDER_COSTS.faded, FINDER_COSTS.fadedBoth, FINDER_COSTS.fadedTracerMissing, FINDER_COSTS.fadedExtraTracer, FINDER_COSTS.fadedWrongTracer],
  ]
    .flat()
    .map(milli),
);
const COMBINED_QUALITY = Uint8Array.from([
  [Q_EXACT, Q_FADED, Q_TRACER, Q_TRACER, Q_NONE],
  [Q_FADED, Q_FADED, Q_FADED, Q_FADED, Q_NONE],
].flat());

/**
 * Colour indices of a wire, base first. The protective-earth colour green-yellow is compared as
 * green with a yellow tracer, so a card's GNYE and a typed G/Y find each other.
 */
function toIndices(colours: readonly string[]): number[] {
  const out: number[] = [];
  for (const c of colours) {
    const i = indexOf(c);
    if (i === GREEN_YELLOW) out.push(GREEN, YELLOW);
    else out.push(i);
  }
  return out;
}

let lastQuality = Q_NONE;
// Scratch for tracer pairing (a wire has a handful of tracers at most): no allocation per pair.
const usedSeen = new Uint8Array(64);
const usedPin = new Uint8Array(64);

/** Cost in thousandths of explaining `seen` by `pin` (both from toIndices); sets lastQuality. */
function costIndices(seen: readonly number[], pin: readonly number[]): number {
  if (pin.length === 0 || seen.length === 0) {
    lastQuality = Q_NONE;
    return NO_CAVITY;
  }
  const base = RELATION[seen[0] * (N + 1) + pin[0]];
  if (base === DIFFERENT) {
    lastQuality = Q_NONE;
    return WRONG_BASE;
  }
  const ns = Math.min(seen.length - 1, 63);
  const np = Math.min(pin.length - 1, 63);
  usedSeen.fill(0, 0, ns);
  usedPin.fill(0, 0, np);
  // Pair tracers: equal colours first, then confusable ones; what is left over is missing,
  // extra, or (left over on both sides) a wrong tracer. The worst problem sets the cost.
  let faded = false;
  let leftSeen = ns;
  let leftPin = np;
  for (let pass = SAME; pass <= CONFUSABLE; pass++) {
    for (let i = 0; i < ns; i++) {
      if (usedSeen[i]) continue;
      for (let j = 0; j < np; j++) {
        if (usedPin[j] || RELATION[seen[i + 1] * (N + 1) + pin[j + 1]] !== pass) continue;
        usedSeen[i] = 1;
        usedPin[j] = 1;
        leftSeen--;
        leftPin--;
        if (pass === CONFUSABLE) faded = true;
        break;
      }
    }
  }
  const wrong = Math.min(leftSeen, leftPin);
  const row = base * 5;
  let worst = T_EXACT;
  if (faded && COMBINED_COST[row + T_FADED] > COMBINED_COST[row + worst]) worst = T_FADED;
  if (wrong > 0 && COMBINED_COST[row + T_WRONG] > COMBINED_COST[row + worst]) worst = T_WRONG;
  if (leftPin > wrong && COMBINED_COST[row + T_MISSING] > COMBINED_COST[row + worst]) worst = T_MISSING;
  if (leftSeen > wrong && COMBINED_COST[row + T_EXTRA] > COMBINED_COST[row + worst]) worst = T_EXTRA;
  lastQuality = COMBINED_QUALITY[row + worst];
  return COMBINED_COST[row + worst];
}

/** Cost of explaining a seen wire (one reading, base first) by a pin's colours: 0 exact … 1 no match (see FINDER_COSTS). */
export function wireCost(seen: ColourName[], pin: ColourName[]): { cost: number; quality: WireQuality } {
  const cost = costIndices(toIndices(seen), toIndices(pin));
  return { cost: cost / SCALE, quality: QUALITIES[lastQuality] };
}

// ---- Reading the typed wires ----------------------------------------------------------------

/** Base-first readings of one decoded code: IEC 60757 names colours without a base, so each colour is tried as the base. */
function readingsOf(colours: ColourName[], hasBase: boolean): ColourName[][] {
  if (hasBase || colours.length < 2) return [colours];
  return colours.map((base, i) => [base, ...colours.filter((_, j) => j !== i)]);
}

const BLUE: ColourName = "blue";
const LIGHT_BLUE: ColourName = "light blue";
const MAX_SHADES = 4;

/**
 * IEC 60757's BU row is "blue (incl. light blue)" (REFERENCE-FACTS 1.1), so an IEC BU may be a
 * light-blue wire: both shades are readings. Yields the decoded colours and each variant.
 */
function iecShades(colours: ColourName[], system: ColourSystemId): ColourName[][] {
  const out: ColourName[][] = [colours];
  if (system !== "iec") return out;
  // Capped: "BUBUBU…" must not multiply into thousands of readings.
  for (let i = 0; i < colours.length && out.length < MAX_SHADES; i++) {
    if (colours[i] !== BLUE) continue;
    for (const v of [...out]) out.push(v.map((c, j) => (j === i ? LIGHT_BLUE : c)));
  }
  return out;
}

type ReadError = { code: "unknown_colour"; message: string; field: string };

/** One way of decoding a typed code: a notation, and for jis a house (every jis house is one way). */
type Reader = { system: ColourSystemId | "auto"; houseStyle: HouseStyleId | null };

function readersFor(notation: ColourSystemId | "auto", houseStyle: HouseStyleId | null): Reader[] {
  if (houseStyle) return [{ system: houseStyleOf(houseStyle)!.notation, houseStyle }];
  const bySystem = (system: ColourSystemId): Reader[] =>
    system === "jis" ? JIS_HOUSE_ORDER.map((h) => ({ system, houseStyle: h })) : [{ system, houseStyle: null }];
  return notation === "auto" ? [{ system: "auto", houseStyle: null }, ...COLOUR_SYSTEM_IDS.flatMap(bySystem)] : bySystem(notation);
}

/**
 * Read each typed wire in every plausible notation ("auto" first, each Japanese-style house on its own), or in one
 * notation, or in one house style; a wire of English colour words is read as English only. Unknown codes → error naming
 * the wire. `origins[w][r]` says where `readings[w][r]` comes from.
 */
export function readWires(
  wires: string[],
  notation: ColourSystemId | "auto" = "auto",
  options: { houseStyle?: HouseStyleId | null } = {},
): { ok: true; readings: ColourName[][][]; origins: ReadingOrigin[][] } | { ok: false; error: ReadError } {
  if (notation !== "auto" && !(COLOUR_SYSTEM_IDS as readonly string[]).includes(notation)) {
    return {
      ok: false,
      error: {
        code: "unknown_colour",
        message: `"${String(notation)}" is not a colour notation; use auto or one of ${COLOUR_SYSTEM_IDS.join(", ")}`,
        field: "notation",
      },
    };
  }
  const house = houseStyleOf(options.houseStyle);
  const readers = readersFor(house ? house.notation : notation, house?.id ?? null);
  const readings: ColourName[][][] = [];
  const origins: ReadingOrigin[][] = [];
  for (let w = 0; w < wires.length; w++) {
    const wire = wires[w];
    const label = `Wire ${w + 1} (${JSON.stringify(typeof wire === "string" ? wire : String(wire))})`;
    if (typeof wire !== "string") {
      return { ok: false, error: { code: "unknown_colour", message: `${label} is not a colour code; send each wire as text such as "W/R"`, field: `wires.${w}` } };
    }
    const mine: ColourName[][] = [];
    const from: ReadingOrigin[] = [];
    const keys = new Set<string>();
    let firstError: string | null = null;
    // "brown" is the colour brown in every family's notation: a rider describing the wire, not copying a code.
    for (const reader of isEnglishColourWords(wire) ? [{ system: "en" as const, houseStyle: null }] : readers) {
      const r = decodeColour(wire, reader.system, { houseStyle: reader.houseStyle });
      if (!r.ok) {
        firstError ??= r.error.message;
        continue;
      }
      const origin = { system: r.value.system, houseStyle: r.value.houseStyle };
      for (const reading of iecShades(r.value.colours, r.value.system).flatMap((cs) => readingsOf(cs, r.value.base !== null))) {
        const key = reading.join("/");
        if (keys.has(key)) continue;
        keys.add(key);
        mine.push(reading);
        from.push(origin);
      }
    }
    if (mine.length === 0) {
      return { ok: false, error: { code: "unknown_colour", message: `${label}: ${firstError ?? "not a colour code"}`, field: `wires.${w}` } };
    }
    readings.push(mine);
    origins.push(from);
  }
  return { ok: true, readings, origins };
}

// ---- The index ------------------------------------------------------------------------------

/** Precomputed, reusable data for findConnectors. Treat as opaque; build it once per library version. */
export interface FinderIndex {
  readonly size: number;
  /** @internal The connectors, as given. */
  readonly connectors: readonly FinderConnector[];
  /** @internal Distinct pin colours (toIndices form); 0 is the empty cavity. */
  readonly combos: readonly (readonly number[])[];
  /** @internal Pins of connector c are pinCombo[pinStart[c] … pinStart[c + 1]). */
  readonly pinStart: Int32Array;
  readonly pinCombo: Int32Array;
  /** @internal Cavities with a wire, per connector. */
  readonly wired: Int32Array;
  readonly familyOf: Int32Array;
  readonly systemOf: Int32Array;
  /** @internal 0 plug, 1 socket. */
  readonly genderOf: Uint8Array;
  readonly familyIds: ReadonlyMap<string, number>;
  readonly systemIds: ReadonlyMap<string, number>;
  /** @internal The ways connectors read typed codes (notation + house); 0 is "every reading". */
  readonly contexts: readonly ({ notation: ColourSystemId; houseStyle: HouseStyleId | null } | null)[];
  /** @internal Context per connector. */
  readonly contextOf: Uint16Array;
  /** @internal Per-query scratch, reused (findConnectors is synchronous). */
  readonly scratch: { cand: Int32Array; bound: Float64Array; order: Int32Array };
}

const keyOf = (s: string) => s.trim().toLowerCase();

// A house of another notation than the connector's is ignored, as for a make (houseFor in the colours module).
function contextKey(con: FinderConnector): { notation: ColourSystemId; houseStyle: HouseStyleId | null } | null {
  const house = houseStyleOf(con.houseStyle);
  const notation = con.notation && (COLOUR_SYSTEM_IDS as readonly string[]).includes(con.notation) ? con.notation : house?.notation;
  if (!notation) return null;
  return { notation, houseStyle: house && house.notation === notation ? house.id : null };
}

/** Build a reusable index (precompute per-connector data) so repeated queries over 10k connectors are fast. */
export function buildFinderIndex(connectors: FinderConnector[]): FinderIndex {
  const n = connectors.length;
  const comboIds = new Map<string, number>([["", 0]]);
  const combos: number[][] = [[]];
  let totalPins = 0;
  for (const c of connectors) totalPins += c.pins.length;
  const pinStart = new Int32Array(n + 1);
  const pinCombo = new Int32Array(totalPins);
  const wired = new Int32Array(n);
  const familyOf = new Int32Array(n);
  const systemOf = new Int32Array(n);
  const genderOf = new Uint8Array(n);
  const familyIds = new Map<string, number>();
  const systemIds = new Map<string, number>();
  const contextOf = new Uint16Array(n);
  const contextIds = new Map<string, number>([["", 0]]);
  const contexts: FinderIndex["contexts"][number][] = [null];
  const intern = (map: Map<string, number>, s: string) => {
    const k = keyOf(s);
    let id = map.get(k);
    if (id === undefined) map.set(k, (id = map.size));
    return id;
  };
  let p = 0;
  for (let c = 0; c < n; c++) {
    const con = connectors[c];
    pinStart[c] = p;
    for (const pin of con.pins) {
      const idx = toIndices(pin.colours ?? []);
      const key = idx.join(",");
      let id = comboIds.get(key);
      if (id === undefined) {
        id = combos.length;
        comboIds.set(key, id);
        combos.push(idx);
      }
      pinCombo[p++] = id;
      if (id !== 0) wired[c]++;
    }
    familyOf[c] = intern(familyIds, con.family);
    systemOf[c] = intern(systemIds, con.system);
    genderOf[c] = con.gender === "socket" ? 1 : 0;
    const ctx = contextKey(con);
    if (ctx) {
      const key = `${ctx.notation}/${ctx.houseStyle ?? ""}`;
      let id = contextIds.get(key);
      if (id === undefined) {
        contextIds.set(key, (id = contexts.length));
        contexts.push(ctx);
      }
      contextOf[c] = id;
    }
  }
  pinStart[n] = p;
  return {
    size: n,
    connectors,
    combos,
    pinStart,
    pinCombo,
    wired,
    familyOf,
    systemOf,
    genderOf,
    familyIds,
    systemIds,
    contexts,
    contextOf,
    scratch: { cand: new Int32Array(n), bound: new Float64Array(n), order: new Int32Array(n) },
  };
}

// ---- Ranking --------------------------------------------------------------------------------

const bad = (message: string, field: string): FinderResult => ({ ok: false, error: { code: "bad_request", message, field } });

const penalty = (unused: number) => UNUSED_PIN_PENALTY * Math.min(Math.max(unused, 0), UNUSED_PIN_PENALTY_MAX);

interface Ranked {
  c: number;
  key: number;
  unused: number;
  /** Pin offset (within the connector) per wire, or -1 for no partner. */
  assign: Int32Array;
}

const BINS = 1024;

/** Rank the connectors for a query: optimal wire→cavity assignment per connector, best first. */
export function findConnectors(index: FinderIndex, query: FinderQuery): FinderResult {
  if (!query || typeof query !== "object") return bad("Send a JSON object with a wires list", "");
  const { wires } = query;
  if (!Array.isArray(wires) || wires.length === 0) {
    return bad('List the colours seen on the cut wires, one code per wire, e.g. ["W/R", "B"]', "wires");
  }
  if (wires.length > MAX_WIRES) return bad(`At most ${MAX_WIRES} wires at a time; ${wires.length} were sent`, "wires");
  if (query.pinCount !== undefined && (!Number.isInteger(query.pinCount) || query.pinCount < 1)) {
    return bad("pinCount must be a whole number of cavities, 1 or more", "pinCount");
  }
  if (query.gender !== undefined && query.gender !== "plug" && query.gender !== "socket") {
    return bad('gender must be "plug" or "socket"', "gender");
  }
  if (query.familyMode !== undefined && query.familyMode !== "filter" && query.familyMode !== "boost") {
    return bad('familyMode must be "filter" or "boost"', "familyMode");
  }
  if (query.limit !== undefined && (!Number.isInteger(query.limit) || query.limit < 1)) {
    return bad(`limit must be a whole number from 1 to ${MAX_LIMIT}`, "limit");
  }
  if (query.notation !== undefined && query.notation !== "auto" && !(COLOUR_SYSTEM_IDS as readonly string[]).includes(query.notation)) {
    return bad(`notation must be auto or one of ${COLOUR_SYSTEM_IDS.join(", ")}`, "notation");
  }
  const limit = Math.min(query.limit ?? DEFAULT_LIMIT, MAX_LIMIT);
  const explicit = query.notation !== undefined && query.notation !== "auto";
  const every = readWires(wires, query.notation ?? "auto");
  if (!every.ok) return every;
  // One set of readings per way of reading; a connector whose notation (and house) does not read every typed code
  // keeps to every reading (set 0): the rider did not copy its diagram. A notation named in the query reads for all.
  const sets = [every];
  const setOf = new Int32Array(index.contexts.length);
  if (!explicit) {
    for (let x = 1; x < index.contexts.length; x++) {
      const ctx = index.contexts[x]!;
      const own = readWires(wires, ctx.notation, { houseStyle: ctx.houseStyle });
      if (!own.ok) continue;
      setOf[x] = sets.length;
      sets.push(own);
    }
  }

  const W = wires.length;
  const nC = index.combos.length;
  const TABLE = W * nC;

  // Cost of each wire against each distinct pin colour of the library, cheapest reading, one table per set of
  // readings; laid out colour-major (cell k * W + w) so a pin's W costs sit side by side for the bound loop.
  const cost = new Int32Array(sets.length * TABLE);
  const quality = new Uint8Array(sets.length * TABLE);
  const readingOf = new Uint16Array(sets.length * TABLE);
  for (let t = 0; t < sets.length; t++) {
    const readings = sets[t].readings.map((rs) => rs.map(toIndices));
    const off = t * TABLE;
    for (let w = 0; w < W; w++) {
      cost[off + w] = NO_CAVITY;
      quality[off + w] = Q_NONE;
      for (let k = 1; k < nC; k++) {
        const pin = index.combos[k];
        const cell = off + k * W + w;
        let best = Infinity;
        for (let r = 0; r < readings[w].length; r++) {
          const c = costIndices(readings[w][r], pin);
          if (c < best) {
            best = c;
            quality[cell] = lastQuality;
            readingOf[cell] = r;
          }
        }
        cost[cell] = best;
      }
    }
  }
  const { contextOf } = index;

  // Filters.
  const familyKey = query.family ? keyOf(query.family) : "";
  const familyId = familyKey ? (index.familyIds.get(familyKey) ?? -2) : -1;
  const boostMode = query.familyMode === "boost";
  const systemId = query.system ? (index.systemIds.get(keyOf(query.system)) ?? -2) : -1;
  const genderId = query.gender === undefined ? -1 : query.gender === "socket" ? 1 : 0;
  const pinCount = query.pinCount ?? -1;

  // Pass 1: lower bound on each connector's total cost → upper bound on its ranking key.
  const { pinStart, pinCombo, wired } = index;
  const { cand, bound, order } = index.scratch;
  const mins = new Int32Array(W);
  let m = 0;
  let hi = -Infinity;
  let lo = Infinity;
  for (let c = 0; c < index.size; c++) {
    const start = pinStart[c];
    const P = pinStart[c + 1] - start;
    if (pinCount >= 0 && P !== pinCount) continue;
    if (genderId >= 0 && index.genderOf[c] !== genderId) continue;
    if (systemId !== -1 && index.systemOf[c] !== systemId) continue;
    if (familyId !== -1 && !boostMode && index.familyOf[c] !== familyId) continue;
    mins.fill(NO_CAVITY);
    const off = setOf[contextOf[c]] * TABLE;
    for (let p = start; p < start + P; p++) {
      const cell = off + pinCombo[p] * W;
      for (let w = 0; w < W; w++) {
        const v = cost[cell + w];
        if (v < mins[w]) mins[w] = v;
      }
    }
    let lb = 0;
    for (let w = 0; w < W; w++) lb += mins[w];
    if (W > P) lb = boundWithTooFewPins(mins, W, P);
    const boost = boostMode && index.familyOf[c] === familyId ? FAMILY_BOOST : 0;
    const ub = 1 - lb / (SCALE * W) - penalty(wired[c] - W) + boost;
    cand[m] = c;
    bound[m] = ub;
    m++;
    if (ub > hi) hi = ub;
    if (ub < lo) lo = ub;
  }

  if (m === 0) return { ok: true, candidates: [], stats: { considered: 0, assigned: 0 } };

  // Pass 2: bucket the candidates by bound, best first (counting sort, no comparisons).
  const span = hi - lo || 1;
  const binOf = (ub: number) => Math.min(BINS - 1, Math.floor(((hi - ub) / span) * BINS));
  const starts = new Int32Array(BINS + 1);
  for (let i = 0; i < m; i++) starts[binOf(bound[i]) + 1]++;
  for (let b = 0; b < BINS; b++) starts[b + 1] += starts[b];
  const fill = starts.slice(0, BINS);
  for (let i = 0; i < m; i++) order[fill[binOf(bound[i])]++] = i;

  // Pass 3: exact optimal assignment while a bound can still reach the top `limit`.
  const top: Ranked[] = [];
  const slugOf = (c: number) => index.connectors[c].slug;
  const better = (a: Ranked, b: Ranked) =>
    a.key !== b.key ? a.key > b.key : a.unused !== b.unused ? a.unused < b.unused : slugOf(a.c) < slugOf(b.c);
  const matrices = new Map<number, number[][]>();
  let assigned = 0;
  for (let b = 0; b < BINS; b++) {
    const threshold = top.length < limit ? -Infinity : top[top.length - 1].key;
    // Everything from this bin on is bounded by its top edge (a hair of slack for rounding).
    if (hi - (b * span) / BINS < threshold - 1e-9) break;
    for (let o = starts[b]; o < starts[b + 1]; o++) {
      const i = order[o];
      const t = top.length < limit ? -Infinity : top[top.length - 1].key;
      if (bound[i] < t) continue;
      const c = cand[i];
      const ranked = assign(index, c, W, cost, setOf[contextOf[c]] * TABLE, matrices);
      assigned++;
      ranked.key += boostMode && index.familyOf[c] === familyId ? FAMILY_BOOST : 0;
      if (top.length === limit && !better(ranked, top[top.length - 1])) continue;
      let at = top.length === limit ? limit - 1 : top.length;
      top[at] = ranked;
      while (at > 0 && better(top[at], top[at - 1])) {
        [top[at - 1], top[at]] = [top[at], top[at - 1]];
        at--;
      }
    }
  }

  const candidates = top.map((r): FinderCandidate => {
    const con = index.connectors[r.c];
    const start = pinStart[r.c];
    const t = setOf[contextOf[r.c]];
    const matches = wires.map((wire, w): FinderMatch => {
      const p = r.assign[w];
      const k = p < 0 ? 0 : pinCombo[start + p];
      if (k === 0) return { wire, cavity: null, pinColour: null, quality: "none", cost: FINDER_COSTS.noCavity, reading: [], readAs: null };
      const pin = con.pins[p];
      const cell = t * TABLE + k * W + w;
      const colours = sets[t].readings[w][readingOf[cell]];
      return {
        wire,
        cavity: pin.cavity,
        pinColour: pin.code ?? pin.colours.join("/"),
        quality: QUALITIES[quality[cell]],
        cost: cost[cell] / SCALE,
        reading: [...colours],
        readAs: { ...sets[t].origins[w][readingOf[cell]], colours: [...colours], words: wordsOf(colours) },
      };
    });
    const connector: FinderCandidate["connector"] = { slug: con.slug, name: con.name, family: con.family };
    if (con.familyName !== undefined) connector.familyName = con.familyName;
    return { connector, score: Math.round(Math.min(1, Math.max(0, r.key)) * 10_000) / 10_000, matches };
  });
  return { ok: true, candidates, stats: { considered: m, assigned } };
}

/**
 * With more wires than cavities at most P wires get one: the P cheapest minima plus NO_CAVITY for
 * the rest. Sorts `mins` in place (insertion sort: W ≤ MAX_WIRES, and no allocation in the loop).
 */
function boundWithTooFewPins(mins: Int32Array, W: number, P: number): number {
  for (let i = 1; i < W; i++) {
    const v = mins[i];
    let j = i - 1;
    while (j >= 0 && mins[j] > v) {
      mins[j + 1] = mins[j];
      j--;
    }
    mins[j + 1] = v;
  }
  let lb = 0;
  for (let w = 0; w < W; w++) lb += w < P ? mins[w] : NO_CAVITY;
  return lb;
}

// A reading is base first even where it came from IEC (readingsOf chose the base), so it is worded as base and tracers.
function wordsOf(colours: readonly ColourName[]): string {
  const [base, ...tracers] = colours;
  return describeColour({ base: { name: base, iec: null }, tracers: tracers.map((name) => ({ name, iec: null })), colours: [...colours] });
}

/** Optimal assignment of the W wires to connector c's cavities (munkres on the W × P matrix of cost table `off`). */
function assign(index: FinderIndex, c: number, W: number, cost: Int32Array, off: number, matrices: Map<number, number[][]>): Ranked {
  const start = index.pinStart[c];
  const P = index.pinStart[c + 1] - start;
  const out = new Int32Array(W).fill(-1);
  let total = 0;
  let explained = 0;
  if (P > 0) {
    let matrix = matrices.get(P);
    if (!matrix) {
      matrix = Array.from({ length: W }, () => new Array<number>(P).fill(0));
      matrices.set(P, matrix);
    }
    for (let w = 0; w < W; w++) {
      const row = matrix[w];
      for (let p = 0; p < P; p++) row[p] = cost[off + index.pinCombo[start + p] * W + w];
    }
    for (const [w, p] of munkres(matrix)) out[w] = p;
  }
  for (let w = 0; w < W; w++) {
    const p = out[w];
    if (p < 0 || index.pinCombo[start + p] === 0) {
      out[w] = -1;
      total += NO_CAVITY;
    } else {
      total += cost[off + index.pinCombo[start + p] * W + w];
      explained++;
    }
  }
  const unused = index.wired[c] - explained;
  return { c, key: 1 - total / (SCALE * W) - penalty(unused), unused, assign: out };
}
