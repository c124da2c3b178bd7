// Wasted-spark pairing: which cylinders can share a double-ended coil. A pair works only when its two
// cylinders reach top dead centre together, one on compression and one on exhaust, i.e. 360° apart in
// the 720° cycle. The pairs come from the companion-cylinder method (write the firing order, put the
// second half under the first, read the columns; Halderman), which is valid only when the columns it
// gives really are 360° apart: an even number of cylinders firing evenly, or intervals that say so.
// Pure TypeScript: the family page's ignition panel calls `wastedSparkPairs`.
// Malformed input throws a `WorkshopInputError` naming the field.

import { WorkshopInputError } from "./wire-size";

export type EngineLayout = "single" | "inline" | "parallel-twin" | "flat-twin" | "v-twin" | "v" | "flat";
export const ENGINE_LAYOUTS: readonly EngineLayout[] = ["single", "inline", "parallel-twin", "flat-twin", "v-twin", "v", "flat"];

export interface WastedSparkOptions {
  cylinders: number;
  layout: EngineLayout;
  /**
   * Angle between the crank throws (crankpins), degrees, 0–360. For a parallel twin this is the
   * trade's name: 360 (or 0) = throws together, a "360° twin"; 180 = a "180° twin"; 270 = a "270° twin".
   * A flat twin's throws are 180° apart (the default); a V-twin's default is 0 (one shared crankpin);
   * an inline engine's default is the even-firing crank, 720/cylinders (180 for a flat-plane four).
   * Not used for V or flat engines of more than two cylinders: give `intervalsDeg` for those if uneven.
   */
  crankDeg?: number | null;
  /** Angle between the cylinder banks of a V-twin, degrees; needed only when its crankpins are offset. */
  bankDeg?: number | null;
  /** Firing intervals in crank degrees, one per cylinder in firing order, summing to 720; overrides the geometry. */
  intervalsDeg?: readonly number[] | null;
}

export type WastedSparkStatus = "suitable" | "not-suitable" | "not-applicable" | "undetermined";

export interface WastedSparkResult {
  suitable: boolean;
  status: WastedSparkStatus;
  /** Coil pairs, normalised: each pair ascending, pairs ordered by their first cylinder; empty unless suitable. */
  pairs: [number, number][];
  /** The companion-cylinder columns as read off, in firing order (empty for a single or an odd count). */
  columns: [number, number][];
  /** The firing intervals used, degrees, in firing order from the first cylinder listed; null when unknown. */
  intervalsDeg: number[] | null;
  reason: string;
  method: string;
}

const METHOD =
  "Companion-cylinder method (Halderman): write the firing order, put the second half under the first, read the columns; " +
  "valid only when each column's cylinders fire 360° apart.";

/** Parse "1-2-4-3", "1 2 4 3" or "1,3,4,2" into cylinder numbers; rejects repeats, gaps and a count other than `cylinders`. */
export function parseFiringOrder(firingOrder: string, cylinders: number): number[] {
  if (typeof firingOrder !== "string" || firingOrder.trim() === "") throw new WorkshopInputError("firingOrder", "must be a firing order such as 1-2-4-3");
  const tokens = firingOrder.trim().split(/\s*[-–,]\s*|\s+/);
  if (tokens.some((t) => !/^[1-9][0-9]?$/.test(t))) {
    throw new WorkshopInputError("firingOrder", `"${firingOrder}" is not a firing order: write cylinder numbers separated by "-", "," or spaces, e.g. 1-2-4-3`);
  }
  const order = tokens.map(Number);
  const seen = new Set<number>();
  for (const c of order) {
    if (seen.has(c)) throw new WorkshopInputError("firingOrder", `cylinder ${c} appears twice in "${firingOrder}"`);
    seen.add(c);
  }
  if (order.length !== cylinders) {
    throw new WorkshopInputError("firingOrder", `"${firingOrder}" lists ${order.length} cylinders, the engine has ${cylinders}`);
  }
  for (let c = 1; c <= cylinders; c++) {
    if (!seen.has(c)) throw new WorkshopInputError("firingOrder", `cylinder ${c} is missing from "${firingOrder}" (cylinders are numbered 1 to ${cylinders})`);
  }
  return order;
}

function angle(field: string, v: unknown, max: number): number {
  if (typeof v !== "number" || !Number.isFinite(v) || v < 0 || v > max) throw new WorkshopInputError(field, `must be a number of degrees from 0 to ${max}`);
  return v;
}

const mod360 = (x: number) => ((x % 360) + 360) % 360;
const near = (a: number, b: number) => Math.abs(a - b) < 1e-6;
const dash = (xs: number[]) => xs.map((x) => String(Number(x.toFixed(3)))).join("–");

// A twin's second cylinder reaches TDC (bank + throw offset) degrees after the first, and again 360°
// later; the cam picks one of the two as its firing TDC. Designers pick the more even one, so do we.
function twinIntervals(bankDeg: number, crankDeg: number): number[] {
  const d = mod360(bankDeg + crankDeg);
  if (near(d, 0) || near(d, 360)) return [360, 360];
  return d >= 180 ? [d, 720 - d] : [360 + d, 360 - d];
}

/** Wasted-spark coil pairs from the firing order by the companion-cylinder method, with whether the engine suits it and why. */
export function wastedSparkPairs(firingOrder: string, opts: WastedSparkOptions): WastedSparkResult {
  if (opts === null || typeof opts !== "object") throw new WorkshopInputError("opts", "must be an object");
  const { cylinders, layout } = opts;
  if (!Number.isInteger(cylinders) || cylinders < 1 || cylinders > 16) throw new WorkshopInputError("cylinders", "must be a whole number from 1 to 16");
  if (!ENGINE_LAYOUTS.includes(layout)) throw new WorkshopInputError("layout", `use one of ${ENGINE_LAYOUTS.join(", ")}`);
  const twinLayout = layout === "parallel-twin" || layout === "flat-twin" || layout === "v-twin";
  if (layout === "single" && cylinders !== 1) throw new WorkshopInputError("cylinders", `a single has 1 cylinder, not ${cylinders}`);
  if (twinLayout && cylinders !== 2) throw new WorkshopInputError("cylinders", `a ${layout} has 2 cylinders, not ${cylinders}`);
  const order = parseFiringOrder(firingOrder, cylinders);
  const crankDeg = opts.crankDeg ?? null;
  const bankDeg = opts.bankDeg ?? null;
  if (crankDeg !== null) angle("crankDeg", crankDeg, 360);
  if (bankDeg !== null && (angle("bankDeg", bankDeg, 180) === 0 || bankDeg === 180)) {
    throw new WorkshopInputError("bankDeg", "a V's bank angle lies between 0 and 180° (0 is a parallel twin, 180 a flat twin)");
  }
  const given = opts.intervalsDeg ?? null;
  if (given !== null && crankDeg !== null) throw new WorkshopInputError("intervalsDeg", "give either intervalsDeg or crankDeg, not both");
  const shown = order.join("-");

  if (cylinders === 1) {
    return {
      suitable: false,
      status: "not-applicable",
      pairs: [],
      columns: [],
      intervalsDeg: [720],
      reason: "Single cylinder: wasted-spark pairing does not apply, there is no companion cylinder to share a coil with.",
      method: "None: pairing needs at least two cylinders.",
    };
  }
  if (cylinders % 2 === 1) {
    return {
      suitable: false,
      status: "not-suitable",
      pairs: [],
      columns: [],
      intervalsDeg: given ? [...given] : null,
      reason: `${cylinders} cylinders: an odd count cannot be split into pairs 360° apart, so wasted spark is not suitable; each cylinder needs its own coil.`,
      method: `${METHOD} ${shown} has no second half of equal length.`,
    };
  }

  const half = cylinders / 2;
  const columns: [number, number][] = order.slice(0, half).map((c, i) => [c, order[i + half]!]); // i < half and order has 2 × half cylinders
  const layoutRows = `${order.slice(0, half).join(" ")} / ${order.slice(half).join(" ")}`;
  const method = `${METHOD} ${shown} → ${layoutRows} → ${columns.map(([a, b]) => `${a}&${b}`).join(", ")}.`;

  // Firing intervals: given, or from the geometry where the layout fixes them.
  let intervals: number[] | null;
  let note = "";
  if (given !== null) {
    if (!Array.isArray(given) || given.length !== cylinders || given.some((x) => typeof x !== "number" || !Number.isFinite(x) || x <= 0)) {
      throw new WorkshopInputError("intervalsDeg", `must be ${cylinders} positive numbers of degrees, one per cylinder in firing order`);
    }
    if (
      !near(
        given.reduce((s, x) => s + x, 0),
        720,
      )
    )
      throw new WorkshopInputError("intervalsDeg", "must add up to 720° (one four-stroke cycle)");
    intervals = [...given];
  } else if (cylinders === 2) {
    const kind = layout === "v" ? "v-twin" : layout === "flat" ? "flat-twin" : layout === "inline" ? "parallel-twin" : layout;
    if (kind === "parallel-twin") {
      if (crankDeg === null) {
        return {
          suitable: false,
          status: "undetermined",
          pairs: [],
          columns,
          intervalsDeg: null,
          reason: "Parallel twin with the crank not given: a 360° twin can share one double-ended coil, a 180° or 270° twin cannot. Give crankDeg.",
          method,
        };
      }
      intervals = twinIntervals(0, crankDeg);
      note = `${near(mod360(crankDeg), 0) ? 360 : crankDeg}° parallel twin`;
    } else if (kind === "flat-twin") {
      intervals = twinIntervals(180, crankDeg ?? 180);
      note = `Flat twin (opposed cylinders, throws ${crankDeg ?? 180}° apart)`;
    } else {
      const pin = crankDeg ?? 0;
      if (near(mod360(pin), 0)) {
        // One shared crankpin: the second TDC comes one bank angle after the first, never 360° later.
        if (bankDeg === null) {
          return {
            suitable: false,
            status: "not-suitable",
            pairs: [],
            columns,
            intervalsDeg: null,
            reason:
              "V-twin on one shared crankpin: the cylinders fire a bank angle apart (e.g. 315–405 on a 45° V), never 360° apart, so each cylinder needs its own trigger and coil.",
            method,
          };
        }
      } else if (bankDeg === null) {
        return {
          suitable: false,
          status: "undetermined",
          pairs: [],
          columns,
          intervalsDeg: null,
          reason: "V-twin with offset crankpins: give bankDeg (or intervalsDeg) to tell whether the cylinders fire 360° apart.",
          method,
        };
      }
      intervals = twinIntervals(bankDeg ?? 0, pin);
      note = `${bankDeg}° V-twin${near(mod360(pin), 0) ? " on one shared crankpin" : ` with crankpins ${pin}° apart`}`;
    }
  } else if (layout === "inline") {
    const even = 720 / cylinders;
    if (crankDeg !== null && !near(crankDeg, even)) {
      return {
        suitable: false,
        status: "not-suitable",
        pairs: [],
        columns,
        intervalsDeg: null,
        reason: `Inline ${cylinders} with throws ${crankDeg}° apart: not the even-firing crank (${even}°), so the columns are not 360° apart; give intervalsDeg if you know they are.`,
        method,
      };
    }
    intervals = Array.from({ length: cylinders }, () => even);
    note = crankDeg === null ? `Inline ${cylinders}, even-firing crank assumed (throws ${even}° apart)` : `Inline ${cylinders}, throws ${even}° apart`;
  } else {
    if (crankDeg !== null) {
      throw new WorkshopInputError(
        "crankDeg",
        `crankDeg alone does not fix the firing intervals of a ${cylinders}-cylinder ${layout} engine; give intervalsDeg instead`,
      );
    }
    intervals = Array.from({ length: cylinders }, () => 720 / cylinders);
    note = `${cylinders}-cylinder ${layout === "v" ? "V" : "flat"} engine, even firing assumed (every ${720 / cylinders}°; give intervalsDeg if uneven)`;
  }

  // The test that makes the columns real pairs: each column's cylinders fire 360° apart.
  const at: number[] = [0];
  // at and intervals have one entry per cylinder; i + half < cylinders.
  for (let i = 1; i < cylinders; i++) at.push(at[i - 1]! + intervals[i - 1]!);
  const off = columns.map((_, i) => at[i + half]! - at[i]!);
  const ok = off.every((d) => near(d, 360));
  // Twins are named by their intervals smallest first ("180–540"); longer engines read in firing order.
  const iv = dash(cylinders === 2 ? [...intervals].sort((a, b) => a - b) : intervals);
  const lead = note ? `${note}: ` : "";

  if (!ok) {
    const bad = columns.map(([a, b], i) => `${a}&${b} ${Number(off[i]!.toFixed(3))}°`).join(", ");
    const twinWords =
      cylinders === 2
        ? ` The pistons never reach top dead centre together, so one coil firing both plugs would spark the other cylinder ${near(off[0]!, 180) || near(off[0]!, 540) ? "at bottom dead centre" : "away from top dead centre"}; each cylinder needs its own trigger and coil.`
        : " Each cylinder (or each truly 360°-apart pair) needs its own trigger and coil.";
    return {
      suitable: false,
      status: "not-suitable",
      pairs: [],
      columns,
      intervalsDeg: intervals,
      reason: `${lead}firing intervals ${iv}, so the companion columns are not 360° apart (${bad}).${twinWords}`,
      method,
    };
  }
  const pairs = columns.map(([a, b]) => (a < b ? [a, b] : [b, a]) as [number, number]).sort((p, q) => p[0] - q[0]);
  const coils =
    pairs.length === 1
      ? "one double-ended coil fires both plugs every revolution"
      : `${pairs.length} double-ended coils, each firing its pair every revolution`;
  return {
    suitable: true,
    status: "suitable",
    pairs,
    columns,
    intervalsDeg: intervals,
    reason: `${lead}firing intervals ${iv}, each column's cylinders fire 360° apart (one on compression, its companion on exhaust), so ${coils}.`,
    method,
  };
}
