// Reading a wire-colour code in one notation, or guessing the notation and saying what else it
// could mean. Never throws: every failure is an "unknown_colour" result naming the part not understood.

import { describeColour } from "./describe";
import { HOUSE_STYLES, JIS_HOUSE_ORDER, houseStyleOf, isHouseStyleId, type HouseStyle, type HouseStyleId } from "./house-styles";
import { COLOUR_SYSTEM_IDS, IEC_CODES, iecCode, iecCombination, type ColourName, type ColourSystemId } from "./names";
import { BS_CODES, DIN_CODES, EN_CODES, EN_COLOUR_WORDS, SYSTEM_NAMES, type CodeEntry } from "./systems";

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

type Mode = "strict" | "liberal";
interface Read {
  ok: true;
  colours: ColourName[];
  // IEC only: how it was written, which tells auto-detection how IEC-like it looks.
  lower?: boolean;
  tableOrder?: boolean;
}
interface Miss {
  ok: false;
  part: string;
  /** Offset of `part` in the normalised input: how far the reader got before failing. */
  at: number;
  message?: string;
  /** Every code was known but a rule of the notation was broken: the best explanation to give. */
  rule?: boolean;
}
type Outcome = Read | Miss;

interface Segment {
  text: string;
  at: number;
}

// Liberal on separators: the trade writes W/R, W-R, W R, W.R, W_R and WR for the same wire.
const SEGMENT = /[^/\\|,._\s\-\u2010-\u2015]+/g;

function segmentsOf(s: string): Segment[] {
  return [...s.matchAll(SEGMENT)].map((m) => ({ text: m[0], at: m.index ?? 0 }));
}

const miss = (part: string, at: number, message?: string): Miss => ({ ok: false, part, at, message });
const rule = (part: string, at: number, message: string): Miss => ({ ok: false, part, at, message, rule: true });

const mapOf = (rows: readonly CodeEntry[], key: (code: string) => string = (c) => c) =>
  new Map(rows.map(({ code, colour }) => [key(code), colour]));

interface Token {
  code: string;
  colour: ColourName;
  at: number;
  end: number;
}

// Splits run-together codes ("swrt", "RDWH") into known codes, longest first with backtracking,
// so "gnge" is one code but "orge" still splits into or + ge.
function splitRun(
  text: string,
  table: ReadonlyMap<string, ColourName>,
  maxLen: number,
  offset: number,
): { ok: true; tokens: Token[] } | { ok: false; failAt: number } {
  const dead = new Set<number>();
  let farthest = 0;
  const walk = (i: number): Token[] | null => {
    if (i === text.length) return [];
    if (dead.has(i)) return null;
    farthest = Math.max(farthest, i);
    for (let len = Math.min(maxLen, text.length - i); len >= 1; len--) {
      const code = text.slice(i, i + len);
      const colour = table.get(code);
      if (colour === undefined) continue;
      const rest = walk(i + len);
      if (rest) return [{ code, colour, at: offset + i, end: offset + i + len }, ...rest];
    }
    dead.add(i);
    return null;
  };
  const tokens = walk(0);
  return tokens ? { ok: true, tokens } : { ok: false, failAt: farthest };
}

// ---- Japanese-style letter codes, one house at a time -----------------------------------------

interface JisTables {
  exact: ReadonlyMap<string, ColourName>;
  lower: ReadonlyMap<string, ColourName>;
  maxLen: number;
  /** Upper-case pairs (jis-caps): runs split into known pairs instead of "a capital starts each code". */
  pairs: boolean;
}

const JIS_TABLES = new Map<HouseStyleId, JisTables>(
  HOUSE_STYLES.filter((h) => h.notation === "jis").map((h) => [
    h.id,
    {
      exact: mapOf(h.codes),
      lower: mapOf(h.codes, (c) => c.toLowerCase()),
      maxLen: Math.max(...h.codes.map((c) => c.code.length)),
      pairs: h.codes.every((c) => /^[A-Z]+$/.test(c.code)),
    },
  ]),
);

function readJis(s: string, mode: Mode, house: HouseStyleId): Outcome {
  const t = JIS_TABLES.get(house)!;
  if (t.pairs) return readJisPairs(s, mode, t);
  const colours: ColourName[] = [];
  for (const seg of segmentsOf(s)) {
    // Lower-case Japanese codes are not how diagrams write them, but a user typing "lg/r" means Lg/R.
    if (mode === "liberal" && /^[a-z]+$/.test(seg.text)) {
      const run = splitRun(seg.text, t.lower, t.maxLen, seg.at);
      if (!run.ok) return miss(seg.text.slice(run.failAt), seg.at + run.failAt);
      colours.push(...run.tokens.map((tok) => tok.colour));
      continue;
    }
    // A capital starts each code and lower-case letters continue it: "BrW" is Br + W, "WR" is W + R.
    let i = 0;
    while (i < seg.text.length) {
      const m = /^[A-Z][a-z]*/.exec(seg.text.slice(i));
      const part = m ? m[0] : (/^[^A-Z]+/.exec(seg.text.slice(i))?.[0] ?? seg.text.slice(i));
      const colour = m ? t.exact.get(part) : undefined;
      if (colour === undefined) return miss(part, seg.at + i);
      colours.push(colour);
      i += part.length;
    }
  }
  return colours.length ? { ok: true, colours } : miss(s, 0);
}

// An upper-case house writes BKWH or BK/WH; typed all in lower case it is still meant (liberal), but "Bl" is the
// mixed-case houses' spelling and never this one's.
function readJisPairs(s: string, mode: Mode, t: JisTables): Outcome {
  const colours: ColourName[] = [];
  for (const seg of segmentsOf(s)) {
    const upper = seg.text === seg.text.toUpperCase();
    const lower = seg.text === seg.text.toLowerCase();
    if (!upper && !(mode === "liberal" && lower)) return miss(seg.text, seg.at);
    const run = splitRun(seg.text.toUpperCase(), t.exact, t.maxLen, seg.at);
    if (!run.ok) return miss(seg.text.slice(run.failAt), seg.at + run.failAt);
    colours.push(...run.tokens.map((tok) => tok.colour));
  }
  return colours.length ? { ok: true, colours } : miss(s, 0);
}

// ---- IEC 60757 ------------------------------------------------------------------------------

const IEC_MAP = mapOf(IEC_CODES);
const IEC_INDEX = new Map(IEC_CODES.map(({ code }, i) => [code, i]));

function readIec(s: string, mode: Mode): Outcome {
  const plus = s.indexOf("+");
  if (plus >= 0) {
    // IEC 60757 (GOST copy) joins the cores of one cable with "+": BK+BK+BN+BU+GNYE. Only when
    // every core reads as IEC is "+" the thing to explain; otherwise the bad core is.
    let at = 0;
    for (const core of s.split("+")) {
      if (core.trim() === "") return miss("+", at === 0 ? plus : at - 1);
      const outcome = readIec(core, mode);
      if (!outcome.ok) return { ...outcome, at: outcome.at + at };
      at += core.length + 1;
    }
    return rule("+", plus, `"+" joins separate cores in IEC 60757 (e.g. BK+BU); enter one wire's colour at a time`);
  }
  const segs = segmentsOf(s);
  const letters = segs.map((g) => g.text).join("");
  const lower = letters === letters.toLowerCase();
  const upper = letters === letters.toUpperCase();
  if (mode === "strict" && !lower && !upper) {
    const mixed = segs.find((g) => g.text !== g.text.toUpperCase() && g.text !== g.text.toLowerCase()) ?? segs[0];
    return miss(mixed.text, mixed.at);
  }
  let tokens: Token[] = [];
  for (const seg of segs) {
    const run = splitRun(seg.text.toUpperCase(), IEC_MAP, 4, seg.at);
    if (!run.ok) return miss(seg.text.slice(run.failAt), seg.at + run.failAt);
    tokens.push(...run.tokens);
  }
  if (tokens.length === 0) return miss(s, 0);

  // "GN/YE" is how GNYE often appears on labels: read it as the one combined code.
  const merged: Token[] = [];
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i];
    if (t.code === "GN" && tokens[i + 1]?.code === "YE") {
      merged.push({ code: "GNYE", colour: "green-yellow", at: t.at, end: tokens[i + 1].end });
      i++;
    } else merged.push(t);
  }
  tokens = merged;
  const gn = tokens.find((t) => t.code === "GN");
  const ye = tokens.find((t) => t.code === "YE");
  if (gn && ye) {
    // IEC 60757 clause 5.1: GN and YE combine only as GNYE. "YEGN" is refused rather than
    // silently reordered, because it usually means a striped wire that is not the earth.
    const from = Math.min(gn.at, ye.at);
    const part = s.slice(from, Math.max(gn.end, ye.end));
    return rule(part, from, `"${part}" is not an IEC 60757 designation: green and yellow are combined only as GNYE (protective earth)`);
  }
  const positions = tokens.map((t) => IEC_INDEX.get(t.code)!);
  const tableOrder = positions.every((p, i) => i === 0 || p > positions[i - 1]);
  return { ok: true, colours: tokens.map((t) => t.colour), lower, tableOrder };
}

// ---- German abbreviations -------------------------------------------------------------------

const DIN_MAP = mapOf(DIN_CODES);

// Case-insensitive: DIN 47002 wrote sw/rt, DIN 72551-7 writes SWRT and BLGN, people type Bl.
// gnge/GNGE is always the one green-yellow code of DIN 47002, never green with a yellow stripe.
function readDin(s: string): Outcome {
  const colours: ColourName[] = [];
  for (const seg of segmentsOf(s)) {
    const run = splitRun(seg.text.toLowerCase(), DIN_MAP, 4, seg.at);
    if (!run.ok) return miss(seg.text.slice(run.failAt), seg.at + run.failAt);
    colours.push(...run.tokens.map((t) => t.colour));
  }
  return colours.length ? { ok: true, colours } : miss(s, 0);
}

// ---- Older British letter code --------------------------------------------------------------

const BS_MAP = mapOf(BS_CODES);

function readBs(s: string, mode: Mode): Outcome {
  const colours: ColourName[] = [];
  for (const seg of segmentsOf(s)) {
    for (let i = 0; i < seg.text.length; i++) {
      const ch = seg.text[i];
      // The code is written in capitals; in auto-detection "Sb" or "Gr" are not British codes.
      if (mode === "strict" && ch !== ch.toUpperCase()) return miss(ch, seg.at + i);
      const up = ch.toUpperCase();
      if (up === "L") {
        // L is only the "light" prefix (LG light green), so it can never stand alone.
        if (seg.text[i + 1]?.toUpperCase() === "G" && (mode === "liberal" || seg.text[i + 1] === "G")) {
          colours.push("light green");
          i++;
          continue;
        }
        return miss(ch, seg.at + i, `"${ch}" is only a prefix meaning "light" in ${SYSTEM_NAMES.bs} (bs), as in LG light green; it is not a colour on its own`);
      }
      const colour = BS_MAP.get(up);
      if (colour === undefined) return miss(ch, seg.at + i);
      colours.push(colour);
    }
  }
  return colours.length ? { ok: true, colours } : miss(s, 0);
}

// ---- English names and workshop abbreviations -----------------------------------------------

const EN_WORDS = new Map<string, ColourName>([
  ...EN_CODES.filter(({ code }) => /^[a-z]+$/.test(code)).map(({ code, colour }) => [code, colour] as const),
  ["blck", "black"],
  ["lightgreen", "light green"],
  ["lightblue", "light blue"],
  ["darkgreen", "dark green"],
  ["skyblue", "sky blue"],
  ["ltgrn", "light green"],
  ["ltblu", "light blue"],
  ["dkgrn", "dark green"],
]);
const GREEN_WORDS = new Set(["green", "grn", "gr"]);
const BLUE_WORDS = new Set(["blue", "blu"]);
const LIGHT_WORDS = new Set(["light", "lt", "lite"]);
const DARK_WORDS = new Set(["dark", "dk"]);
// Words that join or qualify colours without naming one: "Red w/ White stripe", "red with white tracer".
const FILLER = new Set(["with", "and", "stripe", "stripes", "striped", "tracer", "tracers", "trace"]);

interface Word {
  text: string;
  word: string;
  at: number;
  slashAfter: boolean;
}

function readEn(s: string): Outcome {
  const words: Word[] = [];
  const scan = /([A-Za-z]+\.?|&)|([/\\|,+_\-\u2010-\u2015]+)|(\s+)|(.)/g;
  for (const m of s.matchAll(scan)) {
    const at = m.index ?? 0;
    if (m[4] !== undefined) return miss(m[4], at);
    if (m[2] !== undefined && words.length && words[words.length - 1].at + words[words.length - 1].text.length === at) {
      words[words.length - 1].slashAfter = m[2].startsWith("/");
    }
    if (m[1] !== undefined) {
      const word = m[1].toLowerCase().replace(/\.$/, "");
      words.push({ text: m[1], word: word === "&" ? "and" : word, at, slashAfter: false });
    }
  }
  const colours: ColourName[] = [];
  for (let i = 0; i < words.length; i++) {
    const w = words[i];
    const next = words[i + 1];
    const span = (n: Word | undefined) => (n ? s.slice(w.at, n.at + n.text.length) : w.text);
    if (w.word === "w" && w.slashAfter) continue;
    // "green and yellow" is the earth colour's own name (IEC 60757 "green-and-yellow"); other "and"s just join.
    if (GREEN_WORDS.has(w.word) && next?.word === "and" && ["yellow", "yel"].includes(words[i + 2]?.word ?? "")) {
      colours.push("green-yellow");
      i += 2;
      continue;
    }
    if (FILLER.has(w.word)) continue;
    if (LIGHT_WORDS.has(w.word) || DARK_WORDS.has(w.word) || w.word === "sky") {
      const shade: ColourName | undefined = LIGHT_WORDS.has(w.word)
        ? next && GREEN_WORDS.has(next.word)
          ? "light green"
          : next && BLUE_WORDS.has(next.word)
            ? "light blue"
            : undefined
        : DARK_WORDS.has(w.word)
          ? next && GREEN_WORDS.has(next.word)
            ? "dark green"
            : undefined
          : next && BLUE_WORDS.has(next.word)
            ? "sky blue"
            : undefined;
      if (shade === undefined) return miss(span(next), w.at);
      colours.push(shade);
      i++;
      continue;
    }
    const colour = EN_WORDS.get(w.word);
    if (colour === undefined) return miss(w.text, w.at);
    colours.push(colour);
  }
  return colours.length ? { ok: true, colours } : miss(s, 0);
}

// ---- English words --------------------------------------------------------------------------

// Single words that name a colour outright (EN_COLOUR_WORDS split into words, less the shade prefixes).
const WHOLE_WORDS = new Set(
  EN_COLOUR_WORDS.flatMap((w) => w.split(/[\s-]+/)).filter((w) => !["light", "dark", "sky", "and"].includes(w)),
);

/** True when the input is English colour words ("brown", "Red w/ White stripe", "black/white"): read only as en, never letter by letter. */
export function isEnglishColourWords(input: string): boolean {
  const text = typeof input === "string" ? input.normalize("NFKC").trim() : "";
  if (!text || !readEn(text).ok) return false;
  return (text.toLowerCase().match(/[a-z]+/g) ?? []).some((w) => WHOLE_WORDS.has(w));
}

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
    base: isIec ? null : part(colours[0]),
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

const labelOf = (c: { system: ColourSystemId; house: HouseStyleId | null }) =>
  c.system === "jis" ? `${c.system} (${c.house})` : c.system;

/**
 * The chosen reading with the others as ambiguities. A jis house is listed only when it reads the code differently
 * from every jis reading already given: most codes (W/R) read the same in every house, and saying so four times
 * tells the rider nothing. Other systems are listed even when they agree, so a page can say "same in bs".
 */
function withAmbiguities(input: string, [best, ...others]: Candidate[]): DecodedColour {
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
