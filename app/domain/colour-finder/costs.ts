// The colour finder's costs: how dear it is to explain one seen wire by one cavity, and the tables that make that cheap.

import { COLOUR_NAMES, type ColourName } from "../colours";
import type { WireQuality } from "./types";

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
export const SCALE = 1000;
const milli = (c: number) => Math.round(c * SCALE);
export const NO_CAVITY = milli(FINDER_COSTS.noCavity);
const WRONG_BASE = milli(FINDER_COSTS.wrongBase);

const Q_EXACT = 0;
const Q_TRACER = 1;
const Q_FADED = 2;
export const Q_NONE = 3;
export const QUALITIES: readonly WireQuality[] = ["exact", "tracer-missing", "faded", "none"];

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
const COMBINED_QUALITY = Uint8Array.from(
  [
    [Q_EXACT, Q_FADED, Q_TRACER, Q_TRACER, Q_NONE],
    [Q_FADED, Q_FADED, Q_FADED, Q_FADED, Q_NONE],
  ].flat(),
);

/**
 * Colour indices of a wire, base first. The protective-earth colour green-yellow is compared as
 * green with a yellow tracer, so a card's GNYE and a typed G/Y find each other.
 */
export function toIndices(colours: readonly string[]): number[] {
  const out: number[] = [];
  for (const c of colours) {
    const i = indexOf(c);
    if (i === GREEN_YELLOW) out.push(GREEN, YELLOW);
    else out.push(i);
  }
  return out;
}

// Exported as a live binding: costIndices writes it, the ranking reads it right after each call.
export let lastQuality = Q_NONE;
// Scratch for tracer pairing (a wire has a handful of tracers at most): no allocation per pair.
const usedSeen = new Uint8Array(64);
const usedPin = new Uint8Array(64);

/** Cost in thousandths of explaining `seen` by `pin` (both from toIndices); sets lastQuality. */
export function costIndices(seen: readonly number[], pin: readonly number[]): number {
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
