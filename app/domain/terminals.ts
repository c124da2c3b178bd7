/**
 * Terminal fittings and what current they carry: a fuse is only as good as the smallest terminal behind it. Ratings are
 * typical makers' figures for tin-plated brass terminals at room temperature, from memory (no single published table):
 * check the datasheet of the part you buy. Pure TypeScript.
 */

export type FittingFamily = "flat-blade" | "bullet" | "ring" | "pin" | "splice" | "unknown";

export interface Fitting {
  family: FittingFamily;
  /** Blade width or bullet diameter, mm; ring stud size (M5 → 5). */
  sizeMm: number | null;
  /** Continuous current it is usually rated for, A; null when unknown. */
  ratingA: number | null;
  /** As the trade writes it, e.g. "2.8 mm flat-blade". */
  words: string;
}

// From memory: typical continuous ratings (20 °C ambient) of the common automotive terminal sizes.
const BLADE_A: readonly [number, number][] = [
  [1.5, 5],
  [2.3, 8],
  [2.8, 15],
  [4.8, 20],
  [6.3, 25],
  [9.5, 40],
];
const BULLET_A: readonly [number, number][] = [
  [3.5, 15],
  [4.7, 20],
  [5, 20],
];
/** Source words for every rating here. */
export const FITTING_SOURCE = "typical maker ratings for tin-plated brass terminals at 20 °C ambient, from memory: check the datasheet of the part you fit";

const near = (table: readonly [number, number][], size: number) => table.find(([s]) => Math.abs(s - size) < 0.15)?.[1] ?? null;

/** Read a fitting from a housing or terminal description: "6-way 2.8 mm flat-blade", "ring M6", "4.7 mm bullet", "in-line holder, 6.3 mm flat-blade". */
export function parseFitting(text: string | null | undefined): Fitting {
  const t = String(text ?? "").toLowerCase();
  if (!t.trim()) return { family: "unknown", sizeMm: null, ratingA: null, words: "not recorded" };
  if (/splice/.test(t)) return { family: "splice", sizeMm: null, ratingA: null, words: "splice" };
  const ring = /ring\s*m(\d+)/.exec(t);
  if (ring) return { family: "ring", sizeMm: Number(ring[1]), ratingA: 60, words: `ring M${ring[1]}` };
  const size = /(\d+(?:\.\d+)?)\s*mm/.exec(t);
  const mm = size ? Number(size[1]) : null;
  if (/bullet/.test(t)) return { family: "bullet", sizeMm: mm, ratingA: mm === null ? null : near(BULLET_A, mm), words: `${mm ?? "?"} mm bullet` };
  if (/blade|spade/.test(t)) return { family: "flat-blade", sizeMm: mm, ratingA: mm === null ? null : near(BLADE_A, mm), words: `${mm ?? "?"} mm flat-blade` };
  if (/pin/.test(t)) return { family: "pin", sizeMm: mm, ratingA: 5, words: `${mm ?? "?"} mm pin` };
  return { family: "unknown", sizeMm: mm, ratingA: null, words: String(text).trim() };
}
