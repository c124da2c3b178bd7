// The English reader: colour names and workshop abbreviations, and whether a typed code is English words at all.

import type { ColourName } from "./names";
import { miss, type Outcome } from "./read-core";
import { EN_CODES, EN_COLOUR_WORDS } from "./systems";

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

export function readEn(s: string): Outcome {
  const words: Word[] = [];
  const scan = /([A-Za-z]+\.?|&)|([/\\|,+_\-\u2010-\u2015]+)|(\s+)|(.)/g;
  for (const m of s.matchAll(scan)) {
    const at = m.index ?? 0;
    if (m[4] !== undefined) return miss(m[4], at);
    // words.length is checked first: words[words.length - 1] is the last word.
    if (m[2] !== undefined && words.length && words[words.length - 1]!.at + words[words.length - 1]!.text.length === at) {
      words[words.length - 1]!.slashAfter = m[2].startsWith("/");
    }
    if (m[1] !== undefined) {
      const word = m[1].toLowerCase().replace(/\.$/, "");
      words.push({ text: m[1], word: word === "&" ? "and" : word, at, slashAfter: false });
    }
  }
  const colours: ColourName[] = [];
  for (let i = 0; i < words.length; i++) {
    const w = words[i]!; // i < words.length
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
const WHOLE_WORDS = new Set(EN_COLOUR_WORDS.flatMap((w) => w.split(/[\s-]+/)).filter((w) => !["light", "dark", "sky", "and"].includes(w)));

/** True when the input is English colour words ("brown", "Red w/ White stripe", "black/white"): read only as en, never letter by letter. */
export function isEnglishColourWords(input: string): boolean {
  const text = typeof input === "string" ? input.normalize("NFKC").trim() : "";
  if (!text || !readEn(text).ok) return false;
  return (text.toLowerCase().match(/[a-z]+/g) ?? []).some((w) => WHOLE_WORDS.has(w));
}
