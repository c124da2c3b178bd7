// The fixed colour vocabulary every notation is decoded into, its IEC 60757 codes and the
// swatches the face view paints with. Pure TypeScript: pages, API routes and the colour finder share it.

/** The notations Loomlore reads and writes. */
export type ColourSystemId = "jis" | "iec" | "din" | "bs" | "en";

/** Every notation, in the order the /colours page lists them. */
export const COLOUR_SYSTEM_IDS: readonly ColourSystemId[] = Object.freeze(["jis", "iec", "din", "bs", "en"] as const);

/** Lowercase English colour words used in `base`, `tracers` and `colours` (API.md "Colour words"). */
export type ColourName =
  | "black"
  | "brown"
  | "red"
  | "orange"
  | "yellow"
  | "green"
  | "blue"
  | "violet"
  | "grey"
  | "white"
  | "pink"
  | "turquoise"
  | "gold"
  | "silver"
  | "light green"
  | "dark green"
  | "light blue"
  | "sky blue"
  | "chocolate"
  | "tan"
  | "green-yellow";

// No "purple": the British P and the English word both mean the colour IEC 60757 calls violet (VT).
/** Every colour word, the IEC 60757 colours first in table order, then the trade's extra shades. */
export const COLOUR_NAMES: readonly ColourName[] = Object.freeze([
  "black",
  "brown",
  "red",
  "orange",
  "yellow",
  "green",
  "blue",
  "violet",
  "grey",
  "white",
  "pink",
  "gold",
  "turquoise",
  "silver",
  "green-yellow",
  "light green",
  "dark green",
  "light blue",
  "sky blue",
  "chocolate",
  "tan",
] as const);

// IEC 60757 Table 1, top to bottom. Combined codes are joined in this order, never base-first.
const IEC_TABLE: readonly (readonly [string, ColourName])[] = [
  ["BK", "black"],
  ["BN", "brown"],
  ["RD", "red"],
  ["OG", "orange"],
  ["YE", "yellow"],
  ["GN", "green"],
  ["BU", "blue"],
  ["VT", "violet"],
  ["GY", "grey"],
  ["WH", "white"],
  ["PK", "pink"],
  ["GD", "gold"],
  ["TQ", "turquoise"],
  ["SR", "silver"],
  ["GNYE", "green-yellow"],
];

/** IEC 60757 Table 1 as {code, colour}, in the standard's order (BK first, GNYE last). */
export const IEC_CODES: readonly { code: string; colour: ColourName }[] = Object.freeze(IEC_TABLE.map(([code, colour]) => Object.freeze({ code, colour })));

const IEC_POSITION = new Map(IEC_TABLE.map(([code], i) => [code, i]));
const IEC_BY_NAME = new Map<ColourName, string>(IEC_TABLE.map(([code, colour]) => [colour, code]));
// The table's BU row reads "blue (incl. light blue)" (REFERENCE-FACTS 1.1, GOST copy of IEC 757), so a
// light-blue wire is BU. Sky blue, light/dark green, chocolate and tan have no row and stay null (API.md).
IEC_BY_NAME.set("light blue", "BU");

const NAMES = new Set<string>(COLOUR_NAMES);

/** True when `value` is one of the fixed colour words. */
export function isColourName(value: unknown): value is ColourName {
  return typeof value === "string" && NAMES.has(value);
}

/** IEC 60757 two-letter code of a colour (light blue → "BU", as the standard's blue row includes it), or null where the table has none. */
export function iecCode(name: ColourName): string | null {
  return IEC_BY_NAME.get(name) ?? null;
}

/** IEC 60757 designation of a set of colours: codes joined in table order, each once, green and yellow only as GNYE; null if any colour has no code. */
export function iecCombination(colours: readonly ColourName[]): string | null {
  if (colours.length === 0) return null;
  const parts = new Set<string>();
  for (const colour of colours) {
    const code = iecCode(colour);
    if (code === null) return null;
    // Split GNYE so that "green-yellow + green" does not come out as GNGNYE.
    if (code === "GNYE") {
      parts.add("GN");
      parts.add("YE");
    } else parts.add(code);
  }
  // IEC 60757 clause 5.1: green and yellow may appear together only as the one code GNYE.
  if (parts.has("GN") && parts.has("YE")) {
    parts.delete("GN");
    parts.delete("YE");
    parts.add("GNYE");
  }
  return [...parts].sort((a, b) => IEC_POSITION.get(a)! - IEC_POSITION.get(b)!).join("");
}

// Our own palette: muted enough to sit calmly on a card, distinct enough to tell neighbours apart
// in a face view. The code is always printed beside the swatch, so colour is never the only cue.
const SWATCH_HEX: Record<ColourName, string> = {
  black: "#1e1e1e",
  brown: "#7b4a26",
  red: "#c4302b",
  orange: "#e07b24",
  yellow: "#f0cb35",
  green: "#2a7d43",
  blue: "#2d5fae",
  violet: "#7a4fa3",
  grey: "#8d8d8d",
  white: "#f6f5ef",
  pink: "#eea4bd",
  turquoise: "#2aaeb0",
  gold: "#c49b2a",
  silver: "#bfc3c8",
  "light green": "#9dd37f",
  "dark green": "#1c5530",
  "light blue": "#8fc3ea",
  "sky blue": "#5fb2e3",
  chocolate: "#4d2e1a",
  tan: "#d1b38b",
  // One swatch cannot show two colours; the face view draws the yellow stripe itself.
  "green-yellow": "#8fb93a",
};

const DARK_INK = "#111111";
const LIGHT_INK = "#ffffff";

// WCAG 2 relative luminance and contrast ratio: picks whichever ink reads better on the swatch.
function luminance(hex: string): number {
  const channel = (i: number) => {
    const c = parseInt(hex.slice(i, i + 2), 16) / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5);
}

/** WCAG 2 contrast ratio of two "#rrggbb" colours (1 to 21). */
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05); // the sorted pair of two luminances
}

const SWATCHES = new Map<ColourName, { hex: string; ink: string }>(
  COLOUR_NAMES.map((name) => {
    const hex = SWATCH_HEX[name];
    const ink = contrastRatio(hex, DARK_INK) >= contrastRatio(hex, LIGHT_INK) ? DARK_INK : LIGHT_INK;
    return [name, Object.freeze({ hex, ink })];
  }),
);

/** Display colour for drawing swatches and face views ("#rrggbb") and the text colour that reads best on it. */
export function swatch(name: ColourName): { hex: string; ink: string } {
  // Unknown names (e.g. from unchecked JSON) get a neutral grey rather than a crash.
  return SWATCHES.get(name) ?? { hex: SWATCH_HEX.grey, ink: DARK_INK };
}
