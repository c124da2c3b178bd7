// Wire sizing for low-voltage DC circuits on old motorcycles: copper resistance from IEC 60028,
// metric sizes (ISO 6722-1 plus the Japanese harness sizes) and AWG from the ASTM B258 formula.
// Pure TypeScript: POST /api/v1/wire-size and the wire-size page both call `wireSize`.
//
// Validation: every function here THROWS a `WorkshopInputError` (a RangeError naming the offending
// field) rather than returning an error object, like the rest of app/domain; the API route maps it to 400.
//
// AWG only: an "SAE 12" cable (SAE J1128) carries less copper than 12 AWG (ABYC's example: 5 833 CM
// against 6 500 CM), so nothing here converts an SAE gauge as if it were AWG; the page must say so.

/** A bad input to a workshop computation: a RangeError that names the field, so the API can answer 400 with it. */
export class WorkshopInputError extends RangeError {
  readonly field: string;
  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = "WorkshopInputError";
    this.field = field;
  }
}

/** Resistivity of standard annealed copper at 20 °C, Ω·mm²/m (IEC 60028, = 1/58, 100 % IACS). */
export const COPPER_RESISTIVITY_20C = 0.017241;
/** Temperature coefficient of copper's resistance at 20 °C, per °C (IEC 60028 / IACS). */
export const COPPER_ALPHA_20C = 0.00393;
/** Continuous current per mm² of copper: a rule of thumb of German automotive practice, not a standard. */
export const AMPACITY_A_PER_MM2 = 5;
/** Short-term current density a wire stands, A/mm² (rule of thumb, German automotive practice): the fuse's limit. */
export const SHORT_TERM_A_PER_MM2 = 10;
/** Fuse margin over the continuous current: common practice, so a fuse doesn't blow at normal load. */
export const FUSE_MARGIN = 1.25;
/** Standard blade and glass fuse ratings, A. */
export const FUSE_RATINGS_A: readonly number[] = [3, 5, 7.5, 10, 15, 20, 25, 30, 40];

/**
 * IEC 60228 class 5 (flexible, plain copper) maximum conductor resistance at 20 °C, Ω/km, by nominal size in mm²: the
 * cable a loom is made of, stranded, not solid copper (REFERENCE-FACTS 3.2, two published copies agree). 25–50 mm² from
 * memory (the same standard's table).
 */
export const IEC_60228_CLASS5_OHM_PER_KM: Readonly<Record<string, number>> = Object.freeze({
  "0.5": 39.0,
  "0.75": 26.0,
  "1": 19.5,
  "1.5": 13.3,
  "2.5": 7.98,
  "4": 4.95,
  "6": 3.3,
  "10": 1.91,
  "16": 1.21,
  "25": 0.78,
  "35": 0.554,
  "50": 0.386,
});
/** The largest resistance × area product of the class 5 table, Ω·mm²/km: used for sizes the table has no row for (0.3, 0.35, 0.85, 1.25, 2, 3, 5, 8 mm²), so they are never taken as better than the table. */
export const CLASS5_WORST_OHM_MM2_PER_KM = Math.max(...Object.entries(IEC_60228_CLASS5_OHM_PER_KM).map(([a, r]) => Number(a) * r));

/** Stranded automotive cable's resistance per metre at 20 °C, Ω/m: IEC 60228 class 5 maximum, or the table's worst R·A for sizes it lacks. */
export function strandedOhmsPerM(areaMm2: number): number {
  const a = positive("areaMm2", areaMm2);
  const row = IEC_60228_CLASS5_OHM_PER_KM[String(a)];
  return (row ?? CLASS5_WORST_OHM_MM2_PER_KM / a) / 1000;
}

/** Resistance in Ω of a run of stranded cable (IEC 60228 class 5 maximum) at a temperature (IEC 60028 α). */
export function strandedResistance(areaMm2: number, lengthM: number, tempC = 20): number {
  return strandedOhmsPerM(areaMm2) * positive("lengthM", lengthM) * copperTempFactor(tempC);
}

/** ISO 6722-1 nominal cross-sections, mm². */
export const ISO_6722_SIZES_MM2: readonly number[] = [0.35, 0.5, 0.75, 1, 1.5, 2.5, 4, 6, 10, 16, 25, 35, 50];
/** Nominal sizes of Japanese harnesses of the 1970s–80s (JIS C 3406 AV wire; the list is workshop knowledge, not a published table), mm². */
export const JAPANESE_SIZES_MM2: readonly number[] = [0.3, 0.85, 1.25, 2, 3, 5, 8];
/** Both series merged into one ascending list, because a rewire may use either kind of cable, mm². */
export const METRIC_SIZES_MM2: readonly number[] = [...new Set([...ISO_6722_SIZES_MM2, ...JAPANESE_SIZES_MM2])].sort((a, b) => a - b);
/** The AWG sizes offered, 0 (= 1/0, 53.5 mm²) to 24 (0.205 mm²): that spans the metric list, which is all a motorcycle loom uses. */
export const AWG_GAUGES: readonly number[] = Array.from({ length: 25 }, (_, i) => i);

/** Lowest and highest conductor temperatures accepted, °C (ISO 6722-1's hottest cable class is 250 °C). */
export const TEMP_RANGE_C = { min: -50, max: 250 } as const;

export type CircuitKind = "ignition" | "charging" | "lighting" | "signals" | "horn" | "starting" | "accessory" | "other";
export const CIRCUIT_KINDS: readonly CircuitKind[] = ["ignition", "charging", "lighting", "signals", "horn", "starting", "accessory", "other"];

/** Allowed voltage drop in % of system voltage: ABYC's 3 % for critical circuits (here ignition and charging), 10 % for the rest. */
export function defaultDropPct(circuitKind: CircuitKind): number {
  if (!CIRCUIT_KINDS.includes(circuitKind)) throw new WorkshopInputError("circuitKind", `use one of ${CIRCUIT_KINDS.join(", ")}`);
  return circuitKind === "ignition" || circuitKind === "charging" ? 3 : 10;
}

/** AWG diameter in mm by the ASTM B258 formula; m/0 sizes are n = 1 − m (4/0 → −3). */
export function awgDiameterMm(n: number): number {
  if (!Number.isInteger(n) || n < -3 || n > 40) throw new WorkshopInputError("gauge", `an AWG gauge is a whole number from -3 (4/0) to 40, got ${n}`);
  return 0.127 * 92 ** ((36 - n) / 39);
}

/** AWG cross-section in mm², A = π/4 · d² (ASTM B258 diameter, solid round). */
export function awgAreaMm2(n: number): number {
  const d = awgDiameterMm(n);
  return (Math.PI / 4) * d * d;
}

/** How the trade writes a gauge: 12 → "12 AWG", 0 → "1/0 AWG", −3 → "4/0 AWG". */
export function awgLabel(n: number): string {
  return n <= 0 ? `${1 - n}/0 AWG` : `${n} AWG`;
}

/** A temperature within the range the computations accept, or a WorkshopInputError naming the field. */
export function checkTemp(field: string, tempC: unknown): number {
  if (typeof tempC !== "number" || !Number.isFinite(tempC)) throw new WorkshopInputError(field, "must be a finite number of °C");
  if (tempC < TEMP_RANGE_C.min || tempC > TEMP_RANGE_C.max) {
    throw new WorkshopInputError(field, `must be between ${TEMP_RANGE_C.min} and ${TEMP_RANGE_C.max} °C, got ${tempC}`);
  }
  return tempC;
}

function positive(field: string, v: unknown): number {
  if (typeof v !== "number" || !Number.isFinite(v)) throw new WorkshopInputError(field, "must be a finite number");
  if (v <= 0) throw new WorkshopInputError(field, `must be greater than 0, got ${v}`);
  return v;
}

/** Resistance ratio R(t)/R(20 °C) of copper, 1 + α·(t − 20) with IEC 60028's α. */
export function copperTempFactor(tempC: number): number {
  checkTemp("tempC", tempC);
  return 1 + COPPER_ALPHA_20C * (tempC - 20);
}

/** Copper resistivity at a temperature, Ω·mm²/m: ρ(t) = ρ20 · (1 + α·(t − 20)) (IEC 60028). */
export function copperResistivity(tempC: number): number {
  return COPPER_RESISTIVITY_20C * copperTempFactor(tempC);
}

/** Resistance in Ω of a copper conductor of this cross-section (mm²) and conductor length (m) at a temperature. */
export function conductorResistance(areaMm2: number, lengthM: number, tempC = 20): number {
  return (copperResistivity(tempC) * positive("lengthM", lengthM)) / positive("areaMm2", areaMm2);
}

export interface WireSizeInput {
  currentA: number;
  /** One-way length of the run, m. */
  lengthM: number;
  systemV?: number;
  /** Allowed drop, % of systemV; omitted → defaultDropPct(circuitKind), or 3 % when no kind is given. */
  maxDropPct?: number;
  circuitKind?: CircuitKind;
  /** true: the return is a wire of the same size (conductor = 2 × lengthM); false: it returns through the frame. */
  roundTrip?: boolean;
  tempC?: number;
}

export type Constraint = "voltage-drop" | "ampacity";

export interface BasisEntry {
  quantity: string;
  value: number;
  unit: string;
  source: string;
}

export interface WireSizeResult {
  /** Smallest cross-section keeping the drop within maxDropPct of systemV at tempC, mm². */
  minAreaMm2: number;
  /** Smallest cross-section by the 5 A/mm² rule of thumb, mm². */
  ampacityMinAreaMm2: number;
  /** Which of the two bounds above is the larger. */
  decidedBy: Constraint;
  conductorLengthM: number;
  allowedDropV: number;
  maxDropPct: number;
  metric: { sizeMm2: number; series: "ISO 6722-1" | "Japanese"; dropV: number; dropPct: number; decidedBy: Constraint };
  awg: { gauge: number; label: string; areaMm2: number; dropV: number; dropPct: number; decidedBy: Constraint };
  /** Smallest standard fuse ≥ 1.25 × current; null only past the largest standard rating (see warnings). */
  fuseA: number | null;
  warnings: string[];
  basis: BasisEntry[];
}

// Floating point: 20 A / 5 A/mm² must select 4 mm², not 6, when the quotient lands a hair above 4.
const EPS = 1e-9;

function fmt(x: number, sig = 4): string {
  return String(Number(x.toPrecision(sig)));
}

function smallestAtLeast<T>(items: readonly T[], area: (t: T) => number, need: number): T | undefined {
  return items.find((t) => area(t) >= need * (1 - EPS));
}

const AWG_BY_AREA = [...AWG_GAUGES].sort((a, b) => b - a); // thinnest first

/** Smallest metric and AWG sizes for a run: voltage drop at temperature and the ampacity rule of thumb, plus a fuse. */
export function wireSize(input: WireSizeInput): WireSizeResult {
  if (input === null || typeof input !== "object") throw new WorkshopInputError("input", "must be an object");
  const currentA = positive("currentA", input.currentA);
  const lengthM = positive("lengthM", input.lengthM);
  const systemV = positive("systemV", input.systemV ?? 12);
  if (input.circuitKind !== undefined) defaultDropPct(input.circuitKind); // validates the kind
  const dropDefaulted = input.maxDropPct === undefined;
  const maxDropPct = positive("maxDropPct", input.maxDropPct ?? (input.circuitKind ? defaultDropPct(input.circuitKind) : 3));
  if (maxDropPct >= 100) throw new WorkshopInputError("maxDropPct", `must be below 100 %, got ${maxDropPct}`);
  const roundTrip = input.roundTrip ?? true;
  if (typeof roundTrip !== "boolean") throw new WorkshopInputError("roundTrip", "must be true or false");
  const tempC = checkTemp("tempC", input.tempC ?? 20);

  const rho = copperResistivity(tempC);
  const conductorLengthM = roundTrip ? 2 * lengthM : lengthM;
  const allowedDropV = (systemV * maxDropPct) / 100;
  // ΔU = I·ρ·L/A  →  A = I·ρ·L/ΔU
  const minAreaMm2 = (currentA * rho * conductorLengthM) / allowedDropV;
  const ampacityMinAreaMm2 = currentA / AMPACITY_A_PER_MM2;
  const need = Math.max(minAreaMm2, ampacityMinAreaMm2);
  const decidedBy: Constraint = ampacityMinAreaMm2 > minAreaMm2 ? "ampacity" : "voltage-drop";
  const dropAt = (area: number) => (currentA * rho * conductorLengthM) / area;

  const tooBig = (largest: string) => {
    const field = decidedBy === "ampacity" ? "currentA" : "lengthM";
    return new WorkshopInputError(field, `the run needs ${fmt(need)} mm², more than the largest size offered (${largest}); split the load or shorten the run`);
  };

  const id = (a: number) => a;
  const mSize = smallestAtLeast(METRIC_SIZES_MM2, id, need);
  if (mSize === undefined) throw tooBig(`${METRIC_SIZES_MM2[METRIC_SIZES_MM2.length - 1]} mm²`);
  const mByDrop = smallestAtLeast(METRIC_SIZES_MM2, id, minAreaMm2)!;
  const mDrop = dropAt(mSize);
  const metric = {
    sizeMm2: mSize,
    series: ISO_6722_SIZES_MM2.includes(mSize) ? ("ISO 6722-1" as const) : ("Japanese" as const),
    dropV: mDrop,
    dropPct: (mDrop / systemV) * 100,
    decidedBy: (mSize > mByDrop ? "ampacity" : "voltage-drop") as Constraint,
  };

  const gauge = smallestAtLeast(AWG_BY_AREA, awgAreaMm2, need);
  if (gauge === undefined) throw tooBig(awgLabel(AWG_BY_AREA[AWG_BY_AREA.length - 1]!));
  const gByDrop = smallestAtLeast(AWG_BY_AREA, awgAreaMm2, minAreaMm2)!;
  const gArea = awgAreaMm2(gauge);
  const gDrop = dropAt(gArea);
  const awg = {
    gauge,
    label: awgLabel(gauge),
    areaMm2: gArea,
    dropV: gDrop,
    dropPct: (gDrop / systemV) * 100,
    decidedBy: (gauge < gByDrop ? "ampacity" : "voltage-drop") as Constraint,
  };

  // The fuse protects the wire: it carries up to its rating until it opens, so it may not exceed what the thinner of
  // the two chosen wires stands short-term (10 A/mm², the trade's short-term figure beside the 5 A/mm² continuous one).
  const warnings: string[] = [];
  const minFuseA = FUSE_MARGIN * currentA;
  const wireLimitA = SHORT_TERM_A_PER_MM2 * Math.min(metric.sizeMm2, awg.areaMm2);
  const candidate = FUSE_RATINGS_A.find((r) => r >= minFuseA * (1 - EPS));
  let fuseA: number | null = null;
  if (candidate === undefined) {
    warnings.push(
      `No standard blade or glass fuse is rated ${fmt(minFuseA)} A (1.25 × ${fmt(currentA)} A) or more; the largest is ${FUSE_RATINGS_A[FUSE_RATINGS_A.length - 1]} A. Split the load.`,
    );
  } else if (candidate > wireLimitA * (1 + EPS)) {
    warnings.push(
      `The ${candidate} A fuse (the smallest at or above 1.25 × ${fmt(currentA)} A) is more than ${metric.sizeMm2} mm² / ${awg.label} stands short-term ` +
        `(${fmt(wireLimitA)} A at 10 A/mm², rule of thumb): use the next size up.`,
    );
    fuseA = candidate;
  } else {
    fuseA = candidate;
  }

  const basis: BasisEntry[] = [
    { quantity: "copper resistivity at 20 °C", value: COPPER_RESISTIVITY_20C, unit: "Ω·mm²/m", source: "IEC 60028 (IACS, annealed copper)" },
    { quantity: "temperature coefficient α", value: COPPER_ALPHA_20C, unit: "/°C", source: "IEC 60028 / IACS" },
    { quantity: `copper resistivity at the conductor temperature, ${fmt(tempC)} °C`, value: rho, unit: "Ω·mm²/m", source: "ρ(t) = ρ20·(1 + α·(t − 20))" },
    {
      quantity: "conductor length",
      value: conductorLengthM,
      unit: "m",
      source: roundTrip ? "2 × lengthM: the return is a wire of the same size" : "lengthM: the return is through the frame",
    },
    {
      quantity: "allowed voltage drop",
      value: allowedDropV,
      unit: "V",
      source: `${fmt(maxDropPct)} % of ${fmt(systemV)} V${dropDefaulted ? " (default: ABYC 3 % for critical circuits, 10 % for the rest)" : ""}`,
    },
    { quantity: "continuous current density", value: AMPACITY_A_PER_MM2, unit: "A/mm²", source: "rule of thumb (German automotive practice), not a standard" },
    { quantity: "fuse margin", value: FUSE_MARGIN, unit: "× current", source: "common practice: fuse ≥ 1.25 × continuous current" },
    {
      quantity: "short-term current density (fuse limit)",
      value: SHORT_TERM_A_PER_MM2,
      unit: "A/mm²",
      source: "rule of thumb (German automotive practice): the fuse must not exceed what the wire stands short-term",
    },
    {
      quantity: "metric size",
      value: metric.sizeMm2,
      unit: "mm²",
      source: "ISO 6722-1 series merged with the Japanese harness sizes 0.3, 0.85, 1.25, 2, 3, 5, 8 mm²",
    },
    {
      quantity: "AWG size",
      value: awg.areaMm2,
      unit: "mm²",
      source: "ASTM B258: d = 0.127 mm × 92^((36 − n)/39), A = π/4·d². AWG only: SAE J1128 gauges carry less copper and are not AWG",
    },
  ];

  return {
    minAreaMm2,
    ampacityMinAreaMm2,
    decidedBy,
    conductorLengthM,
    allowedDropV,
    maxDropPct,
    metric,
    awg,
    fuseA,
    warnings,
    basis,
  };
}
