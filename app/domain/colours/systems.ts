// The code tables of each notation and the writer that turns base + tracers back into one.
// In every table the first code listed for a colour is the one encodeColour writes.

import { COLOUR_SYSTEM_IDS, IEC_CODES, iecCombination, isColourName, type ColourName, type ColourSystemId } from "./names";

export interface CodeEntry {
  code: string;
  colour: ColourName;
}

const entries = (pairs: readonly (readonly [string, ColourName])[]): readonly CodeEntry[] =>
  Object.freeze(pairs.map(([code, colour]) => Object.freeze({ code, colour })));

// REFERENCE-FACTS 1.3 [from memory]: JIS C 3406 / JASO D 611 heritage. Case matters: a capital starts a code.
export const JIS_CODES = entries([
  ["B", "black"],
  ["Br", "brown"],
  ["Ch", "chocolate"],
  ["Dg", "dark green"],
  ["G", "green"],
  ["Gr", "grey"],
  ["Gy", "grey"],
  ["L", "blue"],
  ["Lb", "light blue"],
  ["Lg", "light green"],
  ["O", "orange"],
  ["P", "pink"],
  ["R", "red"],
  ["Sb", "sky blue"],
  ["V", "violet"],
  ["W", "white"],
  ["Y", "yellow"],
]);

// REFERENCE-FACTS 1.2: DIN 47002 (withdrawn 2002) lower case, the older variants of German
// automotive literature [common practice], and RD/BN that DIN 72551-7:2014 writes in its examples
// (RDBN, RDOR). Read case-insensitively, so SW, Bl, GNBL are covered by these rows too.
export const DIN_CODES = entries([
  ["sw", "black"],
  ["br", "brown"],
  ["rt", "red"],
  ["or", "orange"],
  ["ge", "yellow"],
  ["gn", "green"],
  ["bl", "blue"],
  ["vi", "violet"],
  ["gr", "grey"],
  ["ws", "white"],
  ["rs", "pink"],
  ["tk", "turquoise"],
  ["gnge", "green-yellow"],
  ["hbl", "light blue"],
  ["hb", "light blue"],
  ["ro", "red"],
  ["li", "violet"],
  ["vio", "violet"],
  ["org", "orange"],
  ["rd", "red"],
  ["bn", "brown"],
]);

// REFERENCE-FACTS 1.5 [from memory]: the older British letter code. P is purple, which our
// vocabulary (like IEC's VT) calls violet; S is slate, i.e. grey; L never stands alone.
export const BS_CODES = entries([
  ["B", "black"],
  ["U", "blue"],
  ["N", "brown"],
  ["G", "green"],
  ["P", "violet"],
  ["R", "red"],
  ["W", "white"],
  ["Y", "yellow"],
  ["K", "pink"],
  ["O", "orange"],
  ["S", "grey"],
  ["LG", "light green"],
]);

// Workshop English [common practice]. "bl" = black and "gr" = green are the shorthand readings
// REFERENCE-FACTS 1.5 warns about; the abbreviation comes first so encodeColour writes "wht/red".
export const EN_CODES = entries([
  ["blk", "black"],
  ["black", "black"],
  ["bk", "black"],
  ["bl", "black"],
  ["brn", "brown"],
  ["brown", "brown"],
  ["red", "red"],
  ["rd", "red"],
  ["org", "orange"],
  ["orange", "orange"],
  ["yel", "yellow"],
  ["yellow", "yellow"],
  ["ylw", "yellow"],
  ["grn", "green"],
  ["green", "green"],
  ["gr", "green"],
  ["blu", "blue"],
  ["blue", "blue"],
  ["vio", "violet"],
  ["violet", "violet"],
  ["purple", "violet"],
  ["pur", "violet"],
  ["gry", "grey"],
  ["grey", "grey"],
  ["gray", "grey"],
  ["slate", "grey"],
  ["wht", "white"],
  ["white", "white"],
  ["wh", "white"],
  ["pnk", "pink"],
  ["pink", "pink"],
  ["turq", "turquoise"],
  ["turquoise", "turquoise"],
  ["gold", "gold"],
  ["silver", "silver"],
  ["lt grn", "light green"],
  ["light green", "light green"],
  ["dk grn", "dark green"],
  ["dark green", "dark green"],
  ["lt blu", "light blue"],
  ["light blue", "light blue"],
  ["sky blue", "sky blue"],
  ["choc", "chocolate"],
  ["chocolate", "chocolate"],
  ["tan", "tan"],
  ["green-and-yellow", "green-yellow"],
]);

/**
 * The whole English colour words of EN_CODES; the other rows are workshop abbreviations (blk, lt grn …). A code made
 * of these words is English whatever else its letters could spell: "brown" is never B+R+O+W+N in the British code.
 */
export const EN_COLOUR_WORDS: readonly string[] = Object.freeze([
  "black",
  "brown",
  "red",
  "orange",
  "yellow",
  "green",
  "blue",
  "violet",
  "purple",
  "grey",
  "gray",
  "slate",
  "white",
  "pink",
  "turquoise",
  "gold",
  "silver",
  "light green",
  "dark green",
  "light blue",
  "sky blue",
  "chocolate",
  "tan",
  "green-and-yellow",
]);

/** Every system's codes; the first row for a colour is the code encodeColour writes. */
export const CODE_TABLES: Record<ColourSystemId, readonly CodeEntry[]> = {
  jis: JIS_CODES,
  iec: IEC_CODES,
  din: DIN_CODES,
  bs: BS_CODES,
  en: EN_CODES,
};

/** Human names of the systems, as error messages and the /colours page say them. */
export const SYSTEM_NAMES: Readonly<Record<ColourSystemId, string>> = Object.freeze({
  jis: "Japanese-style letter codes",
  iec: "IEC 60757 codes",
  din: "German abbreviations (DIN 47002, DIN 72551-7)",
  bs: "the older British letter code",
  en: "English names and workshop abbreviations",
});

// BS writes codes run together ("GW", "LGN"), as the old British diagrams did; that stays
// unambiguous because L only ever begins LG. The others separate with "/".
const JOINER: Record<Exclude<ColourSystemId, "iec">, string> = { jis: "/", din: "/", bs: "", en: "/" };

const PREFERRED: Record<ColourSystemId, Map<ColourName, string>> = Object.fromEntries(
  COLOUR_SYSTEM_IDS.map((id) => {
    const map = new Map<ColourName, string>();
    for (const { code, colour } of CODE_TABLES[id]) if (!map.has(colour)) map.set(colour, code);
    return [id, map];
  }),
) as Record<ColourSystemId, Map<ColourName, string>>;

/** Write a base + tracers colour in a system's notation (jis "W/R", din "ws/rt", bs "WR", en "wht/red", iec table order "RDWH"); null when the system has no code for one of the colours. */
export function encodeColour(base: ColourName, tracers: ColourName[], system: ColourSystemId): string | null {
  const colours = [base, ...(Array.isArray(tracers) ? tracers : [])];
  if (!colours.every(isColourName) || !(system in CODE_TABLES)) return null;
  if (system === "iec") return iecCombination(colours);
  const codes: string[] = [];
  for (const colour of colours) {
    const code = PREFERRED[system].get(colour);
    if (code === undefined) return null;
    codes.push(code);
  }
  return codes.join(JOINER[system]);
}

/** The code tables, for the /colours page and GET /api/v1/colours/systems: every code once, with the colour word it decodes to. */
export function colourSystems(): { id: ColourSystemId; name: string; codes: { code: string; colour: ColourName }[] }[] {
  return COLOUR_SYSTEM_IDS.map((id) => ({
    id,
    name: SYSTEM_NAMES[id],
    codes: CODE_TABLES[id].map(({ code, colour }) => ({ code, colour })),
  }));
}
