// Reading a wire-colour code in one notation, or guessing the notation and saying what else it
// could mean. Never throws: every failure is an "unknown_colour" result naming the part not understood.

import { describeColour } from "./describe";
import { HOUSE_STYLES, JIS_HOUSE_ORDER, houseStyleOf, isHouseStyleId, type HouseStyle, type HouseStyleId } from "./house-styles";
import { COLOUR_SYSTEM_IDS, iecCode, iecCombination, type ColourName, type ColourSystemId } from "./names";
import type { Miss, Mode, Outcome, Read } from "./read-core";
import { isEnglishColourWords, readEn } from "./read-english";
import { readBs, readDin, readIec, readJis } from "./read-letters";
import { SYSTEM_NAMES } from "./systems";

export { isEnglishColourWords };

/** One colour of a wire with its IEC 60757 code (null where the standard has none). */
export interface ColourPart {
  name: ColourName;
  iec: string | null;
}

/** Another plausible reading of the code: another system's, or (for jis) another house's. */
export interface Ambiguity {
  system: ColourSystemId;
  /** Only on jis readings: the Japanese-style house that reads it this way. */
  houseStyle?: HouseStyleId;
  /** describeColour() of the reading in that system, e.g. "black with white tracer", "blue". */
  reading: string;
}

/** Something the rider should know about the wire whatever it decodes to. */
export interface DecodeWarning {
  code: "green_yellow_reserved";
  message: string;
}

/** A decoded code: base and tracers (none for IEC input, which has no base), all colours, and the IEC 60757 designation in table order. */
export interface DecodedColour {
  input: string;
  system: ColourSystemId;
  /** The house table that read it (for jis, which house); null for IEC 60757, which is one standard. */
  houseStyle: HouseStyleId | null;
  base: ColourPart | null;
  tracers: ColourPart[];
  colours: ColourName[];
  iec: string | null;
  ambiguities: Ambiguity[];
  warnings: DecodeWarning[];
}

/** How to read: `houseStyle` reads in that house's table (and its notation) only, so nothing is ambiguous. */
export interface DecodeOptions {
  /** A HouseStyleId; "" or null means none (the notation's usual reading, every house for jis). */
  houseStyle?: string | null;
}

/** Success, or an error: unknown_colour naming the part not understood, bad_request for a bad option (naming it in `field`). */
export type DecodeResult =
  | { ok: true; value: DecodedColour }
  | { ok: false; error: { code: "unknown_colour" | "bad_request"; message: string; part: string; field?: "system" | "houseStyle" } };

// One wire colour is a handful of letters; anything longer is a paste accident, not a code.
const MAX_INPUT = 80;

// ---- Green and yellow -----------------------------------------------------------------------

// IEC 60445 (REFERENCE-FACTS 5 [published]) keeps green-and-yellow for the protective conductor, and IEC 60757 clause
// 5.1 (REFERENCE-FACTS 1.1) combines GN and YE only for that purpose. Only base + tracer of exactly those two counts:
// a red wire with green and yellow tracers is not a green-and-yellow wire.
function isGreenYellow(colours: readonly ColourName[], hasBase: boolean): boolean {
  if (colours.includes("green-yellow")) return true;
  if (!hasBase) return false;
  const [base, ...tracers] = colours;
  return (base === "green" && tracers.includes("yellow")) || (base === "yellow" && tracers.includes("green"));
}

const GREEN_YELLOW_ADVICE =
  "green and yellow together are kept for the protective (earth) conductor (IEC 60445), so a green/yellow wire that is not an earth " +
  "should be treated with suspicion: trace it or measure it and re-identify it before you rely on its colour.";

interface Listed {
  label: string;
  colours: ColourName[];
  hasBase: boolean;
  reading: string;
}

// One warning, on the reading given or else on the first other reading that is green-and-yellow: the rider should
// hear about the earth colour even when the likelier reading is something else.
function warningsFor(chosen: { colours: ColourName[]; hasBase: boolean }, others: readonly Listed[]): DecodeWarning[] {
  if (isGreenYellow(chosen.colours, chosen.hasBase)) {
    return [{ code: "green_yellow_reserved", message: `This wire is green and yellow: ${GREEN_YELLOW_ADVICE}` }];
  }
  const other = others.find((o) => isGreenYellow(o.colours, o.hasBase));
  if (!other) return [];
  return [{ code: "green_yellow_reserved", message: `Read as ${other.label}, this code is ${other.reading}: ${GREEN_YELLOW_ADVICE}` }];
}

// ---- Putting it together --------------------------------------------------------------------

function read(system: ColourSystemId, s: string, mode: Mode, house: HouseStyleId = "jis-letters"): Outcome {
  switch (system) {
    case "jis":
      return readJis(s, mode, house);
    case "iec":
      return readIec(s, mode);
    case "din":
      return readDin(s);
    case "bs":
      return readBs(s, mode);
    case "en":
      return readEn(s);
  }
}

const part = (name: ColourName): ColourPart => ({ name, iec: iecCode(name) });

function build(input: string, system: ColourSystemId, house: HouseStyleId | null, colours: ColourName[]): DecodedColour {
  const isIec = system === "iec";
  return {
    input,
    system,
    houseStyle: house,
    base: isIec ? null : part(colours[0]!), // a read is never empty: every reader misses on no colours
    tracers: isIec ? [] : colours.slice(1).map(part),
    colours: [...colours],
    iec: iecCombination(colours),
    ambiguities: [],
    warnings: [],
  };
}

// The one table each notation other than jis reads with; IEC 60757 is a standard, not a house.
const HOUSE_OF: Record<Exclude<ColourSystemId, "jis">, HouseStyleId | null> = { iec: null, din: "din", bs: "bs", en: "en" };

interface Candidate {
  system: ColourSystemId;
  house: HouseStyleId | null;
  outcome: Read;
}

function candidates(input: string, mode: Mode, systems: readonly ColourSystemId[] = COLOUR_SYSTEM_IDS): Candidate[] {
  const out: Candidate[] = [];
  for (const system of systems) {
    const houses = system === "jis" ? JIS_HOUSE_ORDER : [HOUSE_OF[system]];
    for (const house of houses) {
      const outcome = read(system, input, mode, house ?? undefined);
      if (outcome.ok) out.push({ system, house, outcome });
    }
  }
  return out;
}

const labelOf = (c: { system: ColourSystemId; house: HouseStyleId | null }) => (c.system === "jis" ? `${c.system} (${c.house})` : c.system);

/**
 * The chosen reading with the others as ambiguities. A jis house is listed only when it reads the code differently
 * from every jis reading already given: most codes (W/R) read the same in every house, and saying so four times
 * tells the rider nothing. Other systems are listed even when they agree, so a page can say "same in bs".
 */
function withAmbiguities(input: string, [best, ...others]: Candidate[]): DecodedColour {
  // Callers pass what they found only when they found something.
  if (best === undefined) throw new Error("withAmbiguities needs at least one reading");
  const value = build(input, best.system, best.house, best.outcome.colours);
  const jisShown = new Set<string>(best.system === "jis" ? [best.outcome.colours.join("/")] : []);
  const listed: Listed[] = [];
  for (const c of others) {
    if (c.system === "jis") {
      const key = c.outcome.colours.join("/");
      if (jisShown.has(key)) continue;
      jisShown.add(key);
    }
    const reading = describeColour(build(input, c.system, c.house, c.outcome.colours));
    value.ambiguities.push(c.system === "jis" ? { system: c.system, houseStyle: c.house!, reading } : { system: c.system, reading });
    listed.push({ label: labelOf(c), colours: c.outcome.colours, hasBase: c.system !== "iec", reading });
  }
  value.warnings = warningsFor({ colours: value.colours, hasBase: value.base !== null }, listed);
  return value;
}

// Equal colour counts are broken by how typical the input is of each notation (API.md example:
// W/R is Japanese first). Fewer colours wins before that: "BR" as one brown code is likelier
// than black with a red tracer, "LG" as light green likelier than blue with a green tracer.
const PRIORITY: Record<ColourSystemId, number> = { jis: 5, iec: 4, din: 3, bs: 2, en: 1 };
// The Japanese-style houses other than jis-letters are less usual (REFERENCE-FACTS 5 [from memory]): at equal colour
// count they come after every notation's usual reading, so "Bl" stays DIN 47002 blue [published] before a house's black.
const OTHER_HOUSE_PRIORITY = 0.5;

function likelihood(c: Candidate): number {
  let score = c.system === "jis" && c.house !== "jis-letters" ? OTHER_HOUSE_PRIORITY : PRIORITY[c.system];
  // Lower-case two-letter codes are far more often DIN 47002 than IEC's permitted lower case,
  // and IEC writes combinations in table order, so "RDBN" is DIN 72551-7 red with a brown stripe.
  if (c.system === "iec" && c.outcome.lower) score -= 2;
  if (c.system === "iec" && c.outcome.tableOrder === false) score -= 3;
  return score;
}

type Failure = Extract<DecodeResult, { ok: false }>;
const fail = (message: string, part: string): Failure => ({
  ok: false,
  error: { code: "unknown_colour", message, part },
});
const badOption = (message: string, field: "system" | "houseStyle", part: string): Failure => ({
  ok: false,
  error: { code: "bad_request", message, part, field },
});

function english(input: string): DecodeResult {
  const outcome = readEn(input) as Read;
  const value = build(input, "en", "en", outcome.colours);
  value.warnings = warningsFor({ colours: value.colours, hasBase: true }, []);
  return { ok: true, value };
}

const notEnglish = (input: string, where: string): Failure =>
  fail(
    `"${input}" is English colour words; Loomlore never reads a whole English word letter by letter in ${where}. Decode it as English (en) or let Loomlore work it out (auto)`,
    input,
  );

function decodeAuto(input: string): DecodeResult {
  // Whole English words are English: every other reading would spell them out letter by letter (BROWN as B+R+O+W+N).
  if (isEnglishColourWords(input)) return english(input);
  for (const mode of ["strict", "liberal"] as const) {
    const found = candidates(input, mode);
    if (found.length === 0) continue;
    found.sort((a, b) => a.outcome.colours.length - b.outcome.colours.length || likelihood(b) - likelihood(a));
    return { ok: true, value: withAmbiguities(input, found) };
  }
  // A broken rule (YEGN, "+") explains best; otherwise report where the reader that understood
  // the most gave up.
  const misses = COLOUR_SYSTEM_IDS.map((system) => read(system, input, "liberal") as Miss);
  const broken = misses.find((m) => m.rule);
  if (broken) return fail(broken.message!, broken.part);
  const worst = misses.reduce((a, b) => (b.at > a.at ? b : a));
  const bad = worst.part || input;
  return fail(`"${bad}" is not a colour code in any of the notations Loomlore reads (${COLOUR_SYSTEM_IDS.join(", ")})`, bad);
}

// jis without a house: the houses in JIS_HOUSE_ORDER, the first that reads the code gives the reading (strictly
// written codes before leniently typed ones), and every house that reads it otherwise is an ambiguity. "Bl/W" is then
// black with white (jis-bl-black) and blue with white (jis-bl-blue) rather than refused.
function decodeJis(input: string): DecodeResult {
  for (const mode of ["strict", "liberal"] as const) {
    const found = candidates(input, mode, ["jis"]);
    if (found.length) return { ok: true, value: withAmbiguities(input, found) };
  }
  const misses = JIS_HOUSE_ORDER.map((house) => readJis(input, "liberal", house) as Miss);
  const worst = misses.reduce((a, b) => (b.at > a.at ? b : a));
  return fail(worst.message ?? `"${worst.part}" is not a colour code in ${SYSTEM_NAMES.jis} (jis)`, worst.part);
}

function decodeInHouse(input: string, house: HouseStyle): DecodeResult {
  if (house.notation !== "en" && isEnglishColourWords(input)) return notEnglish(input, `${house.name} (${house.id})`);
  const outcome = read(house.notation, input, "liberal", house.id);
  if (!outcome.ok) {
    return fail(outcome.message ?? `"${outcome.part}" is not a colour code in ${house.name} (${house.id})`, outcome.part);
  }
  const value = build(input, house.notation, house.notation === "iec" ? null : house.id, outcome.colours);
  value.warnings = warningsFor({ colours: value.colours, hasBase: value.base !== null }, []);
  return { ok: true, value };
}

/**
 * Parse a wire-colour code written in `system`, or guess the system with "auto" and list the other plausible readings;
 * with `houseStyle`, read in that house's table only ("auto" or the house's own notation as `system`).
 */
export function decodeColour(input: string, system: ColourSystemId | "auto", options: DecodeOptions = {}): DecodeResult {
  const raw = typeof input === "string" ? input : "";
  const text = raw.normalize("NFKC").trim().replace(/\s+/g, " ");
  const wanted = options?.houseStyle;
  if (wanted !== undefined && wanted !== null && wanted !== "" && !isHouseStyleId(wanted)) {
    return badOption(`"${String(wanted)}" is not a house style; use one of ${HOUSE_STYLES.map((h) => h.id).join(", ")}`, "houseStyle", String(wanted));
  }
  const house = houseStyleOf(wanted);
  if (house && system !== "auto" && system !== house.notation) {
    return badOption(
      `The house style ${house.id} writes ${SYSTEM_NAMES[house.notation]} (${house.notation}), not ${String(system)}; leave the system out or use ${house.notation}`,
      "system",
      String(system),
    );
  }
  if (text === "") return fail("No colour code was given; enter one such as W/R, ws/rt or RDWH", "");
  if (text.length > MAX_INPUT) {
    return fail(`"${text.slice(0, 20)}…" is too long for one wire colour (at most ${MAX_INPUT} characters)`, text);
  }
  if (house) return decodeInHouse(text, house);
  if (system === "auto") return decodeAuto(text);
  if (!(COLOUR_SYSTEM_IDS as readonly string[]).includes(system)) {
    return fail(`"${String(system)}" is not a colour system; use one of auto, ${COLOUR_SYSTEM_IDS.join(", ")}`, String(system));
  }
  if (system !== "en" && isEnglishColourWords(text)) return notEnglish(text, `${SYSTEM_NAMES[system]} (${system})`);
  if (system === "jis") return decodeJis(text);
  const outcome = read(system, text, "liberal");
  if (!outcome.ok) {
    return fail(outcome.message ?? `"${outcome.part}" is not a colour code in ${SYSTEM_NAMES[system]} (${system})`, outcome.part);
  }
  const value = build(text, system, HOUSE_OF[system], outcome.colours);
  value.warnings = warningsFor({ colours: value.colours, hasBase: value.base !== null }, []);
  return { ok: true, value };
}
