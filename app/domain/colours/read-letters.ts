// The letter-code readers: Japanese-style houses, IEC 60757, the German abbreviations and the older British code.

import { HOUSE_STYLES, type HouseStyleId } from "./house-styles";
import { IEC_CODES, type ColourName } from "./names";
import { mapOf, miss, rule, segmentsOf, splitRun, type Mode, type Outcome, type Token } from "./read-core";
import { BS_CODES, DIN_CODES, SYSTEM_NAMES } from "./systems";

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

export function readJis(s: string, mode: Mode, house: HouseStyleId): Outcome {
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

export function readIec(s: string, mode: Mode): Outcome {
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
    const mixed = segs.find((g) => g.text !== g.text.toUpperCase() && g.text !== g.text.toLowerCase()) ?? segs[0]!; // mixed case was seen, so there is a segment
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
    const t = tokens[i]!; // i < tokens.length
    if (t.code === "GN" && tokens[i + 1]?.code === "YE") {
      merged.push({ code: "GNYE", colour: "green-yellow", at: t.at, end: tokens[i + 1]!.end });
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
  const tableOrder = positions.every((p, i) => i === 0 || p > positions[i - 1]!);
  return { ok: true, colours: tokens.map((t) => t.colour), lower, tableOrder };
}

// ---- German abbreviations -------------------------------------------------------------------

const DIN_MAP = mapOf(DIN_CODES);

// Case-insensitive: DIN 47002 wrote sw/rt, DIN 72551-7 writes SWRT and BLGN, people type Bl.
// gnge/GNGE is always the one green-yellow code of DIN 47002, never green with a yellow stripe.
export function readDin(s: string): Outcome {
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

export function readBs(s: string, mode: Mode): Outcome {
  const colours: ColourName[] = [];
  for (const seg of segmentsOf(s)) {
    for (let i = 0; i < seg.text.length; i++) {
      const ch = seg.text[i]!; // i < seg.text.length
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
