// Bench sheet: measured resistances (pickup coils, coil windings, plug caps, a wire run) against the
// card's range. The card gives the range at 20 °C, but a winding measured warm reads high (copper rises
// 0.393 %/°C), so a copper reading is brought back to 20 °C before the verdict; carbon and resistor
// parts are not. Pure TypeScript: POST /api/v1/bench and the bench page both call `benchSheet`.
// Bad input throws a `WorkshopInputError` naming the field (e.g. "readings[2].measured").

import { COPPER_ALPHA_20C, WorkshopInputError, checkTemp, copperTempFactor } from "./wire-size";

export type Verdict = "in_range" | "low" | "high";

export interface BenchReading {
  name: string;
  /** Spec at 20 °C, in `unit`, inclusive. */
  min: number;
  max: number;
  unit: string;
  measured: number;
  /** Temperature of the part when measured; omitted → taken as 20 °C (and said so in the steps). */
  tempC?: number | null;
  /** A copper winding or wire; omitted → true for resistances in ohms, false for anything else. */
  copper?: boolean | null;
}

export interface BenchResult {
  name: string;
  /** Ohm units normalised to their symbol (Ω, kΩ, mΩ, MΩ); any other unit as given. */
  unit: string;
  min: number;
  max: number;
  measured: number;
  tempC: number;
  copper: boolean;
  /** Multiply the measured value by this to get the value at 20 °C: 1 / (1 + α·(t − 20)) for copper, 1 otherwise (IEC 60228's Kt convention). */
  correctionFactor: number;
  at20C: number;
  verdict: Verdict;
  /** The arithmetic, in words and numbers, for the sheet. */
  steps: string[];
}

export const MAX_READINGS = 200;

const PREFIXES: Record<string, string> = { "": "", k: "k", K: "k", m: "m", M: "M", kilo: "k", milli: "m", mega: "M" };

/** The ohm unit's symbol ("Ω", "kΩ", "mΩ", "MΩ") for a spelling such as "ohm", "kohms", "kΩ" or "Ω" (U+2126); null if not a resistance. */
export function resistanceUnit(unit: string): string | null {
  // NFKC folds the ohm sign U+2126 into Ω U+03A9; m/M stay case-sensitive (milli vs mega), k/K do not.
  const u = unit.normalize("NFKC").replace(/\s+/g, "");
  const m = /^(k|K|m|M|kilo|milli|mega)?(?:Ω|[oO]hms?|OHMS?)$/.exec(u);
  if (m) return `${PREFIXES[m[1] ?? ""]}Ω`;
  if (/^(?:kil|meg)ohms?$/i.test(u)) return `${u[0].toLowerCase() === "k" ? "k" : "M"}Ω`; // "kilohm", "megohm"
  return null;
}

/** Factor that brings a copper resistance measured at tempC to 20 °C: 1 / (1 + 0.00393·(t − 20)) (IEC 60028 α). */
export function copperCorrectionFactor(tempC: number): number {
  return 1 / copperTempFactor(tempC);
}

/** A copper resistance measured at tempC, as it would read at 20 °C: R20 = R / (1 + α·(t − 20)). */
export function copperAt20C(measured: number, tempC: number): number {
  return measured / copperTempFactor(tempC);
}

function finite(field: string, v: unknown): number {
  if (typeof v !== "number" || !Number.isFinite(v)) throw new WorkshopInputError(field, "must be a finite number");
  return v;
}

// Printed numbers: the sheet shows the arithmetic, so use a real minus sign and enough digits to follow it.
function num(x: number, sig = 4): string {
  const r = Math.abs(x) >= 10 ** sig ? Math.round(x) : Number(x.toPrecision(sig));
  return String(r).replace(/^-/, "−");
}
function exact(x: number): string {
  return String(Number(x.toFixed(8))).replace(/^-/, "−");
}

/** One reading checked against its range, corrected to 20 °C if it is copper; `field` prefixes error names. */
export function benchReading(reading: BenchReading, field = "reading"): BenchResult {
  if (reading === null || typeof reading !== "object") throw new WorkshopInputError(field, "must be an object");
  const name = reading.name;
  if (typeof name !== "string" || name.trim() === "" || name.length > 200) {
    throw new WorkshopInputError(`${field}.name`, "must be a non-empty text of at most 200 characters");
  }
  if (typeof reading.unit !== "string" || reading.unit.trim() === "") throw new WorkshopInputError(`${field}.unit`, "must be a unit such as Ω or kΩ");
  const ohms = resistanceUnit(reading.unit);
  const unit = ohms ?? reading.unit.trim();
  const min = finite(`${field}.min`, reading.min);
  const max = finite(`${field}.max`, reading.max);
  const measured = finite(`${field}.measured`, reading.measured);
  if (min > max) throw new WorkshopInputError(`${field}.min`, `must not exceed max (${min} > ${max})`);
  if (ohms) {
    if (min < 0) throw new WorkshopInputError(`${field}.min`, "a resistance cannot be negative");
    if (measured < 0) throw new WorkshopInputError(`${field}.measured`, "a resistance cannot be negative");
  }
  const tempGiven = reading.tempC !== undefined && reading.tempC !== null;
  const tempC = tempGiven ? checkTemp(`${field}.tempC`, reading.tempC) : 20;
  if (reading.copper !== undefined && reading.copper !== null && typeof reading.copper !== "boolean") {
    throw new WorkshopInputError(`${field}.copper`, "must be true or false");
  }
  const copper = reading.copper ?? ohms !== null;
  if (copper && !ohms) throw new WorkshopInputError(`${field}.copper`, `the copper correction applies to resistances in ohms, not ${unit}`);

  const steps: string[] = [];
  if (!tempGiven) steps.push("No temperature given: taken as measured at 20 °C.");
  let at20C = measured;
  let correctionFactor = 1;
  if (copper) {
    const divisor = 1 + COPPER_ALPHA_20C * (tempC - 20);
    correctionFactor = 1 / divisor;
    at20C = measured / divisor;
    steps.push(`Copper winding: corrected to 20 °C with α = ${COPPER_ALPHA_20C} /°C (IEC 60028 / IACS).`);
    steps.push(
      `R20 = R / (1 + ${COPPER_ALPHA_20C} × (${exact(tempC)} − 20)) = ${exact(measured)} / ${exact(divisor)} = ${num(at20C)} ${unit}`,
    );
  } else {
    steps.push(
      ohms
        ? `Not a copper winding (e.g. a carbon or resistor part): no temperature correction, R20 = R = ${exact(measured)} ${unit}.`
        : `Not a resistance: no temperature correction, ${exact(measured)} ${unit} is compared as read.`,
    );
  }

  // A reading exactly on a boundary must not flip because the correction left it a hair off.
  const tol = 1e-9 * Math.max(Math.abs(min), Math.abs(max), Number.MIN_VALUE);
  const verdict: Verdict = at20C < min - tol ? "low" : at20C > max + tol ? "high" : "in_range";
  const range = `${exact(min)}–${exact(max)} ${unit}`;
  const shown = `${num(at20C)} ${unit}`;
  steps.push(
    verdict === "low"
      ? `Low: ${shown} is below the minimum of ${range} (spec at 20 °C).`
      : verdict === "high"
        ? `High: ${shown} is above the maximum of ${range} (spec at 20 °C).`
        : `In range: ${shown} is within ${range} (spec at 20 °C, limits included).`,
  );

  return { name: name.trim(), unit, min, max, measured, tempC, copper, correctionFactor, at20C, verdict, steps };
}

/** Every reading on a bench sheet checked (see `benchReading`); errors name the reading, e.g. "readings[1].max". */
export function benchSheet(readings: readonly BenchReading[]): { results: BenchResult[] } {
  if (!Array.isArray(readings) || readings.length === 0) throw new WorkshopInputError("readings", "must be a non-empty list");
  if (readings.length > MAX_READINGS) throw new WorkshopInputError("readings", `at most ${MAX_READINGS} readings per sheet`);
  return { results: readings.map((r, i) => benchReading(r, `readings[${i}]`)) };
}
