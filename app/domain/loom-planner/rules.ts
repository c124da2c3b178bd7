// The loom planner's fixed figures (each with where it comes from) and the small helpers every part of the plan uses.

import { AWG_GAUGES, METRIC_SIZES_MM2, WorkshopInputError, awgAreaMm2 } from "../wire-size";

/** Thinnest wire the planner cuts, mm²: thinner crimped wire breaks under vibration (common practice), whatever its current. */
export const MIN_PRACTICAL_MM2 = 0.5;
/** Longest run a builder may enter, m: nothing on a motorcycle is further apart, so more is a typing slip. */
export const MAX_RUN_M = 10;
/** Run length taken when neither the builder nor the family gives one, m. */
export const ASSUMED_RUN_M = 1.0;
/** Extra wire bought for stripping, routing and mistakes (common practice). */
export const CUTTING_ALLOWANCE = 0.1;
/** A blade fuse holds about 135 % of its rating for minutes before it opens (from memory, the usual blade-fuse curve): a momentary load may reach it. */
export const FUSE_MOMENTARY_FACTOR = 1.35;
/** A wire carrying less than this in every state is taken as carrying none, A. */
export const NO_CURRENT_A = 0.05;

/** Drop targets for a whole circuit (supply and return wires together), % of the system voltage. */
export function circuitDropPct(c: { system: string; slug: string; loads: string[] }): { pct: number; basis: string } {
  if (c.system === "ignition" || c.system === "charging") return { pct: 3, basis: "3 % for ignition and charging (ABYC's figure for critical circuits)" };
  if (/headlamp/.test(c.slug)) return { pct: 3, basis: "3 % for the headlamp: a lamp at 90 % of its voltage gives only about 70 % of its light (from memory)" };
  if (c.system === "starting") return { pct: 5, basis: "5 % while cranking: the ignition must still fire on what is left (common practice)" };
  return { pct: 10, basis: "10 % for the rest (ABYC's figure for non-critical circuits)" };
}

export const EPS = 1e-9;
export const fmt = (x: number, sig = 3) => String(Number(x.toPrecision(sig)));
export const fail = (field: string, message: string) => new WorkshopInputError(field, message);
export const round3 = (x: number) => Math.round(x * 1000) / 1000;
export const smallestMetric = (need: number) => METRIC_SIZES_MM2.find((a) => a >= need * (1 - EPS));
const AWG_THIN_FIRST = [...AWG_GAUGES].sort((a, b) => b - a);
export const smallestAwg = (need: number) => AWG_THIN_FIRST.find((g) => awgAreaMm2(g) >= need * (1 - EPS)) ?? null;
