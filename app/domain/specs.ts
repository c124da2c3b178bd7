/**
 * The words of a card's spec values, shared by the card page, the contribution editor, the review diff and the bench
 * sheet: what a spec measures (its kind), what the measured part is made of (whether copper's temperature correction
 * applies) and how its range reads when it has no upper limit. Pure TypeScript.
 */

/** What a spec value measures; the database's `spec_values.kind` holds one of these. */
export const SPEC_KINDS = ["resistance", "insulation", "regulated-voltage", "ac-output", "gap", "dwell", "capacitance"] as const;
export type SpecKind = (typeof SPEC_KINDS)[number];

/** Our words for each kind, as a reader of the card sees them. */
export const SPEC_KIND_LABELS: Readonly<Record<SpecKind, string>> = Object.freeze({
  resistance: "resistance",
  insulation: "insulation (must read open)",
  "regulated-voltage": "regulated voltage",
  "ac-output": "AC output",
  gap: "gap",
  dwell: "dwell",
  capacitance: "capacitance",
});

/**
 * The conductor of a measured part. Only copper is corrected to 20 °C with IEC 60028's α: a carbon resistor cap,
 * suppressor or HT lead and a lamp's tungsten filament are not (REFERENCE-FACTS 5.1, "copper temperature correction").
 */
export const SPEC_MATERIALS = ["copper", "carbon", "other"] as const;
export type SpecMaterial = (typeof SPEC_MATERIALS)[number];

export const SPEC_MATERIAL_LABELS: Readonly<Record<SpecMaterial, string>> = Object.freeze({
  copper: "copper (winding or wire)",
  carbon: "carbon (cap, suppressor, HT lead)",
  other: "other (lamp, resistor, not corrected)",
});

export function isSpecKind(v: unknown): v is SpecKind {
  return typeof v === "string" && (SPEC_KINDS as readonly string[]).includes(v);
}

export function isSpecMaterial(v: unknown): v is SpecMaterial {
  return typeof v === "string" && (SPEC_MATERIALS as readonly string[]).includes(v);
}

/** A spec's kind as stored, or "resistance" for an empty or unknown one (cards written before kinds existed). */
export function specKindOf(v: unknown): SpecKind {
  return isSpecKind(v) ? v : "resistance";
}

/**
 * A spec's range in words: "400–600 Ω", or, when it has no upper limit, "≥ 1 MΩ (open: no upper limit)" — an insulation
 * test that must read open, where a meter's OL is a pass.
 */
export function specRangeText(min: number, max: number | null, unit: string): string {
  if (max === null) return `≥ ${min} ${unit} (open: no upper limit)`;
  return `${min}–${max} ${unit}`;
}

/**
 * Points a spec may be measured against that are not cavities of the card's own housing: the frame or crankcase
 * ("earth"), a coil's HT tower or towers and the plug cap's terminal (or a pair's two caps). A spec's `between` names a
 * cavity of the layout or one of these.
 */
export const SPEC_OFF_CARD_POINTS = ["earth", "HT", "HT A", "HT B", "cap", "cap A", "cap B"] as const;

export function isOffCardPoint(v: string): boolean {
  return (SPEC_OFF_CARD_POINTS as readonly string[]).includes(v);
}

/**
 * The lead-in that every spec's conditions share, up to a clause break (": " or ". "), and what is left of each.
 * A printed card states the shared set-up once above its table, and each row keeps only its own part.
 * `shared` is null when fewer than two specs carry conditions or they have no lead-in in common.
 */
export function splitSharedConditions(conditions: readonly (string | null | undefined)[]): { shared: string | null; rest: string[] } {
  const texts = conditions.map((c) => (c ?? "").trim());
  const none = { shared: null, rest: texts };
  if (texts.length < 2 || texts.some((t) => t === "")) return none;
  let common = texts[0]!; // at least two texts, checked above
  for (const t of texts.slice(1)) {
    let i = 0;
    while (i < common.length && i < t.length && common[i] === t[i]) i++;
    common = common.slice(0, i);
  }
  const cut = Math.max(common.lastIndexOf(": "), common.lastIndexOf(". "));
  if (cut <= 0) return none;
  const shared = common.slice(0, cut).trim();
  const rest = texts.map((t) => t.slice(cut + 2).trim());
  if (rest.some((r) => r === "")) return none;
  return { shared, rest: rest.map((r) => r.charAt(0).toUpperCase() + r.slice(1)) };
}
