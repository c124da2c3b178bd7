// House styles: how one maker writes colours within its notation. Japanese-style letter codes are not one
// convention (REFERENCE-FACTS 5, "Japanese-style house styles" [from memory]): the same "Bl" is black in one
// house and blue in another, so a make names its house and decoding follows it.

import type { ColourName, ColourSystemId } from "./names";
import { BS_CODES, DIN_CODES, EN_CODES, JIS_CODES, type CodeEntry } from "./systems";

/** Every house style Loomlore knows; a make's `houseStyle` is one of these (or "" for none). */
export type HouseStyleId = "jis-letters" | "jis-bl-black" | "jis-bl-blue" | "jis-caps" | "din" | "bs" | "en";

/** A maker's way of writing colours: the notation it belongs to and its own code table. */
export interface HouseStyle {
  id: HouseStyleId;
  /** The notation the house writes in; a make's house must belong to the make's notation. */
  notation: ColourSystemId;
  name: string;
  /** Where the table comes from, as the pages show it. */
  source: string;
  codes: readonly CodeEntry[];
}

const entries = (pairs: readonly (readonly [string, ColourName])[]): readonly CodeEntry[] =>
  Object.freeze(pairs.map(([code, colour]) => Object.freeze({ code, colour })));

// The shared rows of the mixed-case Japanese-style houses: REFERENCE-FACTS 1.3 without B, L and Lb, the three
// letters the other houses spend differently.
const JIS_COMMON: readonly (readonly [string, ColourName])[] = JIS_CODES.filter(({ code }) => code !== "B" && code !== "L" && code !== "Lb").map(
  ({ code, colour }) => [code, colour] as const,
);

// REFERENCE-FACTS 5 [from memory]: "one writes Bl black, Bu blue". B and L are dropped, since a house that spends
// Bl on black writes neither B nor L; Lb stays light blue as in 1.3 (our decision: nothing in the house clashes with it).
const JIS_BL_BLACK = entries([["Bl", "black"], ["Bu", "blue"], ["Lb", "light blue"], ...JIS_COMMON]);

// REFERENCE-FACTS 5 [from memory]: "another Bl blue, Lbl light blue"; B stays black as in 1.3. L and Lb are
// dropped: this house spends Bl and Lbl on those colours.
const JIS_BL_BLUE = entries([["B", "black"], ["Bl", "blue"], ["Lbl", "light blue"], ...JIS_COMMON]);

// REFERENCE-FACTS 5 [from memory]: "upper-case pairs BK BL LB PU GY OR". The other pairs (BR, RD, YE, GN, WH, PK, LG)
// are our judgement of how that house writes the rest [from memory]. Every code is two letters, so a run such as
// "BKWH" splits one way only; single letters would make "GY" both grey and green with yellow.
// PU is purple, which our colour words (like IEC 60757 VT) call violet.
const JIS_CAPS = entries([
  ["BK", "black"],
  ["BR", "brown"],
  ["RD", "red"],
  ["OR", "orange"],
  ["YE", "yellow"],
  ["GN", "green"],
  ["BL", "blue"],
  ["PU", "violet"],
  ["GY", "grey"],
  ["WH", "white"],
  ["PK", "pink"],
  ["LB", "light blue"],
  ["LG", "light green"],
]);

const LIST: HouseStyle[] = [
  {
    id: "jis-letters",
    notation: "jis",
    name: "Japanese-style letters (B black, L blue, Lb light blue)",
    source: "REFERENCE-FACTS 1.3 [from memory]",
    codes: JIS_CODES,
  },
  {
    id: "jis-bl-black",
    notation: "jis",
    name: "Japanese-style letters with Bl black, Bu blue",
    source: "REFERENCE-FACTS 5, house styles [from memory]",
    codes: JIS_BL_BLACK,
  },
  {
    id: "jis-bl-blue",
    notation: "jis",
    name: "Japanese-style letters with Bl blue, Lbl light blue",
    source: "REFERENCE-FACTS 5, house styles [from memory]",
    codes: JIS_BL_BLUE,
  },
  {
    id: "jis-caps",
    notation: "jis",
    name: "Japanese-style upper-case pairs (BK, BL, LB, PU, GY, OR)",
    source: "REFERENCE-FACTS 5, house styles [from memory]; pairs beyond those six our judgement [from memory]",
    codes: JIS_CAPS,
  },
  { id: "din", notation: "din", name: "German abbreviations", source: "REFERENCE-FACTS 1.2", codes: DIN_CODES },
  { id: "bs", notation: "bs", name: "the older British letter code", source: "REFERENCE-FACTS 1.5 [from memory]", codes: BS_CODES },
  { id: "en", notation: "en", name: "English names and workshop abbreviations", source: "common practice", codes: EN_CODES },
];
/** Every house style, the Japanese-style ones in the order a code is tried without a house (most common first). */
export const HOUSE_STYLES: readonly HouseStyle[] = Object.freeze(LIST.map((h) => Object.freeze(h)));

/** Every house style id, in HOUSE_STYLES order. */
export const HOUSE_STYLE_IDS: readonly HouseStyleId[] = Object.freeze(HOUSE_STYLES.map((h) => h.id));

/**
 * The Japanese-style houses in the order "jis" without a house tries them. jis-letters first: it is the convention
 * REFERENCE-FACTS 1.3 describes and the one Loomlore has always read. The others follow the order the trade note lists
 * them (REFERENCE-FACTS 5); no count of diagrams says which is commoner [from memory], so the order is only a fixed tie-break.
 */
export const JIS_HOUSE_ORDER: readonly HouseStyleId[] = Object.freeze(HOUSE_STYLES.filter((h) => h.notation === "jis").map((h) => h.id));

const BY_ID = new Map<string, HouseStyle>(HOUSE_STYLES.map((h) => [h.id, h]));

/** True when `value` names a house style Loomlore knows. */
export function isHouseStyleId(value: unknown): value is HouseStyleId {
  return typeof value === "string" && BY_ID.has(value);
}

/** The house style with this id, or null (unknown ids, and "" which means "the notation's usual reading"). */
export function houseStyleOf(id: string | null | undefined): HouseStyle | null {
  return (id && BY_ID.get(id)) || null;
}

/** The house styles of each notation with their code tables, for the /colours page and GET /api/v1/colours/systems. */
export function houseStyles(notation?: ColourSystemId): { id: HouseStyleId; notation: ColourSystemId; name: string; source: string; codes: CodeEntry[] }[] {
  return HOUSE_STYLES.filter((h) => notation === undefined || h.notation === notation).map((h) => ({
    id: h.id,
    notation: h.notation,
    name: h.name,
    source: h.source,
    codes: h.codes.map(({ code, colour }) => ({ code, colour })),
  }));
}

/**
 * The house a family's codes are read in: its make's house when that belongs to the family's notation, else null
 * (the notation's usual reading). An unknown id or a house of another notation is ignored rather than trusted.
 */
export function houseFor(notation: string, houseStyle: string | null | undefined): HouseStyleId | null {
  const house = houseStyleOf(houseStyle);
  return house && house.notation === notation ? house.id : null;
}
