// Bench sheet: measured resistances (pickup coils, coil windings, plug caps, a wire run) against the
// card's range. The card gives the range at 20 °C, but a winding measured warm reads high (copper rises
// 0.393 %/°C), so a copper reading is brought back to 20 °C before the verdict; carbon caps, suppressors,
// HT leads, resistors and lamp filaments (tungsten) are not (REFERENCE-FACTS 5.1). A spec may have no upper
// limit (an insulation test that must read open), and a meter's "OL" is an open circuit: above every number.
// Pure TypeScript: POST /api/v1/bench and the bench page both call `benchSheet`.
// Bad input throws a `WorkshopInputError` naming the field (e.g. "readings[2].measured").

import { SPEC_MATERIALS, isSpecMaterial, type SpecMaterial } from "./specs";
import { COPPER_ALPHA_20C, WorkshopInputError, checkTemp, copperTempFactor } from "./wire-size";

export type Verdict = "in_range" | "low" | "high";

/** An ohmmeter's over-limit reading: the circuit is open (taken as +∞, never written as a number). */
export const OVER_LIMIT = "OL";
export type Measured = number | typeof OVER_LIMIT;

export interface BenchReading {
  name: string;
  /** Spec at 20 °C, in `unit`, inclusive. */
  min: number;
  /** null: no upper limit (an insulation test that must read open); never omitted. */
  max: number | null;
  unit: string;
  /** What the meter shows, or "OL" when it reads over its limit (open circuit). */
  measured: Measured;
  /** Temperature of the part when measured; omitted → taken as 20 °C (and said so in the steps). */
  tempC?: number | null;
  /** The part's conductor; omitted → decided from the name (see `defaultMaterial`). Only copper is corrected. */
  material?: SpecMaterial | null;
  /** API v1's flag: true ≡ material "copper", false ≡ "other". Kept for older callers. */
  copper?: boolean | null;
}

/** How the material was settled: given by the caller, read from the reading's name, or the fallback for an unknown name. */
export type MaterialBy = "given" | "name" | "fallback";

export interface BenchResult {
  name: string;
  /** Ohm units normalised to their symbol (Ω, kΩ, mΩ, MΩ); any other unit as given. */
  unit: string;
  min: number;
  max: number | null;
  measured: Measured;
  tempC: number;
  /** Whether copper's correction was applied (material "copper"). */
  copper: boolean;
  material: SpecMaterial;
  materialBy: MaterialBy;
  /** Multiply the measured value by this to get the value at 20 °C: 1 / (1 + α·(t − 20)) for copper, 1 otherwise (IEC 60228's Kt convention). */
  correctionFactor: number;
  at20C: Measured;
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
  if (/^(?:kil|meg)ohms?$/i.test(u)) return `${u[0]!.toLowerCase() === "k" ? "k" : "M"}Ω`; // "kilohm", "megohm"
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

// Words in a reading's name that say what the part is. Checked in this order: a name that mentions a cap or a lamp
// as well as a coil ("secondary through both caps") is a reading through a non-copper part, and correcting the whole
// with copper's α would be wrong. "Lead" alone is left out: stator leads and earth leads are copper; only an HT (plug,
// spark, ignition) lead is taken as a carbon-cored suppression lead. "Resistance" is not "resistor".
const LAMP = /\b(?:lamps?|bulbs?|filaments?|headlamps?|headlights?|tail ?lights?)\b/;
const INSULATION = /\b(?:insulation|leakage|to (?:earth|frame|ground|chassis))\b/;
const CARBON = /\b(?:caps?|suppressors?|suppression|carbon|(?:ht|high[- ]tension|plug|spark|ignition) leads?)\b/;
const RESISTOR = /\b(?:resistors?|ballast)\b/;
const COPPER =
  /\b(?:windings?|coils?|primar(?:y|ies)|secondar(?:y|ies)|stators?|pick-?ups?|pick ups?|pulsers?|field|rotors?|armatures?|solenoids?|wires?|wiring|cables?|straps?|loom|harness|runs?)\b/;

/** The material a reading is taken to be when none is given, from its name and spec, with the reason in words. */
export function defaultMaterial(
  name: string,
  spec: { ohms: boolean; open: boolean },
): { material: SpecMaterial; by: Exclude<MaterialBy, "given">; why: string } {
  if (!spec.ohms) return { material: "other", by: "fallback", why: "Not a resistance, so no material applies." };
  const n = name.normalize("NFKC").toLowerCase();
  const alsoWinding = COPPER.test(n)
    ? " The name also names a winding: a reading through a non-copper part is not corrected as a whole; measure the winding on its own for a corrected figure."
    : "";
  if (LAMP.test(n)) {
    return {
      material: "other",
      by: "name",
      why: `Material not given: other, from the name. A lamp filament is tungsten, not copper: never corrected with copper's α.${alsoWinding}`,
    };
  }
  if (spec.open || INSULATION.test(n)) {
    return {
      material: "other",
      by: spec.open ? "fallback" : "name",
      why: "Material not given: other. An insulation (open-circuit) test measures the insulation, not a copper winding's resistance, so it is not corrected.",
    };
  }
  if (CARBON.test(n)) {
    return { material: "carbon", by: "name", why: `Material not given: carbon, from the name (a resistor cap, suppressor or HT lead).${alsoWinding}` };
  }
  if (RESISTOR.test(n)) {
    return { material: "other", by: "name", why: `Material not given: other, from the name (a resistor, not a copper winding).${alsoWinding}` };
  }
  if (COPPER.test(n)) {
    return { material: "copper", by: "name", why: "Material not given: copper, from the name (a winding, coil, stator, pickup or wire)." };
  }
  return {
    material: "copper",
    by: "fallback",
    why: "Material not given and not recognised from the name: taken as copper, the default for a resistance in ohms. Choose carbon or other if it is not a winding or wire.",
  };
}

function measuredValue(field: string, v: unknown): Measured {
  if (v === OVER_LIMIT) return OVER_LIMIT;
  if (typeof v !== "number" || !Number.isFinite(v)) throw new WorkshopInputError(field, `must be a finite number, or "${OVER_LIMIT}" for an open circuit`);
  return v;
}

/** The material the caller asked for (material, or API v1's copper flag), or null when neither was given. */
function givenMaterial(reading: BenchReading, field: string): { material: SpecMaterial; via: "material" | "copper" } | null {
  const { material, copper } = reading;
  if (copper !== undefined && copper !== null && typeof copper !== "boolean") throw new WorkshopInputError(`${field}.copper`, "must be true or false");
  if (material !== undefined && material !== null && !isSpecMaterial(material)) {
    throw new WorkshopInputError(`${field}.material`, `must be one of ${SPEC_MATERIALS.join(", ")}`);
  }
  const fromFlag = copper === true ? "copper" : copper === false ? "other" : null;
  if (material && copper !== undefined && copper !== null && (material === "copper") !== copper) {
    throw new WorkshopInputError(`${field}.material`, `“${material}” disagrees with copper: ${copper}; give one of them`);
  }
  if (material) return { material, via: "material" };
  return fromFlag ? { material: fromFlag, via: "copper" } : null;
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
  if (reading.max === undefined) throw new WorkshopInputError(`${field}.max`, "must be a number, or null for a spec with no upper limit");
  const max = reading.max === null ? null : finite(`${field}.max`, reading.max);
  const measured = measuredValue(`${field}.measured`, reading.measured);
  if (max !== null && min > max) throw new WorkshopInputError(`${field}.min`, `must not exceed max (${min} > ${max})`);
  if (ohms) {
    if (min < 0) throw new WorkshopInputError(`${field}.min`, "a resistance cannot be negative");
    if (measured !== OVER_LIMIT && measured < 0) throw new WorkshopInputError(`${field}.measured`, "a resistance cannot be negative");
  }
  const tempGiven = reading.tempC !== undefined && reading.tempC !== null;
  const tempC = tempGiven ? checkTemp(`${field}.tempC`, reading.tempC) : 20;

  const given = givenMaterial(reading, field);
  const chosen = given ? { material: given.material, by: "given" as const, why: "" } : defaultMaterial(name, { ohms: ohms !== null, open: max === null });
  const material = chosen.material;
  const copper = material === "copper";
  if (copper && !ohms) {
    throw new WorkshopInputError(`${field}.${given?.via ?? "material"}`, `the copper correction applies to resistances in ohms, not ${unit}`);
  }

  const steps: string[] = [];
  if (!tempGiven) steps.push("No temperature given: taken as measured at 20 °C.");
  if (chosen.why && ohms) steps.push(chosen.why);
  let at20C: Measured = measured;
  let correctionFactor = 1;
  if (measured === OVER_LIMIT) {
    steps.push(
      `The meter reads ${OVER_LIMIT} (over its limit): an open circuit, higher than any number${copper ? "; no temperature correction changes that" : ""}.`,
    );
  } else if (copper) {
    const divisor = 1 + COPPER_ALPHA_20C * (tempC - 20);
    correctionFactor = 1 / divisor;
    at20C = measured / divisor;
    steps.push(`Copper winding: corrected to 20 °C with α = ${COPPER_ALPHA_20C} /°C (IEC 60028 / IACS).`);
    steps.push(`R20 = R / (1 + ${COPPER_ALPHA_20C} × (${exact(tempC)} − 20)) = ${exact(measured)} / ${exact(divisor)} = ${num(at20C)} ${unit}`);
  } else {
    steps.push(
      !ohms
        ? `Not a resistance: no temperature correction, ${exact(measured)} ${unit} is compared as read.`
        : material === "carbon"
          ? `Carbon (resistor cap, suppressor or HT lead), not a copper winding: no temperature correction, R20 = R = ${exact(measured)} ${unit}.`
          : `Not a copper winding (a lamp filament, resistor or insulation): no temperature correction, R20 = R = ${exact(measured)} ${unit}.`,
    );
  }

  // A reading exactly on a boundary must not flip because the correction left it a hair off.
  const tol = 1e-9 * Math.max(Math.abs(min), Math.abs(max ?? 0), Number.MIN_VALUE);
  const value = at20C === OVER_LIMIT ? Number.POSITIVE_INFINITY : at20C;
  const verdict: Verdict = value < min - tol ? "low" : max !== null && value > max + tol ? "high" : "in_range";
  const range = max === null ? `at least ${exact(min)} ${unit} (no upper limit)` : `${exact(min)}–${exact(max)} ${unit}`;
  const shown = at20C === OVER_LIMIT ? `${OVER_LIMIT} (open circuit)` : `${num(at20C)} ${unit}`;
  steps.push(
    verdict === "low"
      ? `Low: ${shown} is below the minimum of ${range} (spec at 20 °C).`
      : verdict === "high"
        ? `High: ${shown} is above the maximum of ${range} (spec at 20 °C).`
        : max === null
          ? `In range: ${shown} is at or above the minimum of ${exact(min)} ${unit}; the spec has no upper limit (it must read open).`
          : `In range: ${shown} is within ${range} (spec at 20 °C, limits included).`,
  );

  return { name: name.trim(), unit, min, max, measured, tempC, copper, material, materialBy: chosen.by, correctionFactor, at20C, verdict, steps };
}

/** Every reading on a bench sheet checked (see `benchReading`); errors name the reading, e.g. "readings[1].max". */
export function benchSheet(readings: readonly BenchReading[]): { results: BenchResult[] } {
  if (!Array.isArray(readings) || readings.length === 0) throw new WorkshopInputError("readings", "must be a non-empty list");
  if (readings.length > MAX_READINGS) throw new WorkshopInputError("readings", `at most ${MAX_READINGS} readings per sheet`);
  return { results: readings.map((r, i) => benchReading(r, `readings[${i}]`)) };
}
