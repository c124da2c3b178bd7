/**
 * Text handling of the search stand-in: how field text and queries are cut into terms, and how matches are marked in
 * `_formatted` (highlight and crop). Pure functions, no I/O.
 *
 * Terms: text is cut at white space and at punctuation that never belongs to a code (`, ; : ( ) [ ] { } " ! ? < > |`).
 * Each piece is kept whole, lower-cased and without accents ("W/R" → "w/r", "31b", "87a", "kill-switch", "B+"), and when
 * it holds inner punctuation its letter/digit runs are indexed as well ("w/r" → "w", "r"; "kill-switch" → "kill",
 * "switch"). So a rider's "W/R", "ws/rt", "BLGN" or "31b" finds the field that contains exactly that code first, and the
 * words of a hyphenated or slashed term are still found one by one.
 */

/** Characters that always separate terms. */
const HARD_SEPARATORS = /[\s,;:()[\]{}"!?<>|]+/u;
const ALNUM_RUN = /[\p{L}\p{N}]+/gu;
const HAS_ALNUM = /[\p{L}\p{N}]/u;

/** Lower case, accents removed (NFKD + drop combining marks): how every term is compared. */
export function normalize(s: string): string {
  return s.normalize("NFKD").replace(/\p{M}/gu, "").toLowerCase();
}

/** Trim what is punctuation around a piece rather than part of it: quotes, full stops, commas at either end. */
function trimPiece(piece: string): string {
  return piece.replace(/^['`´‘’.]+/u, "").replace(/['`´‘’.]+$/u, "");
}

/** The parts of one piece: its letter/digit runs (empty when the piece is a single run). */
function partsOf(piece: string): string[] {
  const runs = piece.match(ALNUM_RUN) ?? [];
  return runs.length === 1 && runs[0] === piece ? [] : runs;
}

/** Index-time tokenizer: every whole piece plus its parts, normalized. */
export function tokenizeForIndex(text: string): string[] {
  const out: string[] = [];
  for (const raw of text.split(HARD_SEPARATORS)) {
    const piece = normalize(trimPiece(raw));
    if (!piece || !HAS_ALNUM.test(piece)) continue;
    out.push(piece);
    for (const p of partsOf(piece)) out.push(p);
  }
  return out;
}

/** Marks a whole short term in the prefix index (never part of normalized text): "b" + EXACT_MARK is the term "b" itself. */
export const EXACT_MARK = "\u0000";

/**
 * What the stand-in's prefix index holds for some index terms: each term's first 1…max characters (by code point),
 * and a term no longer than that also whole, marked with EXACT_MARK. So a short last word finds every term it begins
 * and, apart, the terms it is.
 */
export function prefixIndexTerms(terms: string[], max: number): string[] {
  const out: string[] = [];
  for (const term of terms) {
    const chars = [...term];
    let prefix = "";
    for (let i = 0; i < Math.min(max, chars.length); i++) out.push((prefix += chars[i]));
    if (chars.length <= max) out.push(term + EXACT_MARK);
  }
  return out;
}

/** One word of a query: the whole piece and (when it holds punctuation) its parts. */
export interface QueryWord {
  term: string;
  parts: string[];
}

export interface ParsedQuery {
  /** Words to match (phrase words included), in query order. */
  words: QueryWord[];
  /** Phrases ("…" in the query): each must appear as consecutive terms in one field. */
  phrases: string[][];
  /** Negated words (`-word`): documents holding the term are excluded. */
  excluded: string[];
}

function wordsOf(text: string): QueryWord[] {
  const out: QueryWord[] = [];
  for (const raw of text.split(HARD_SEPARATORS)) {
    const term = normalize(trimPiece(raw));
    if (!term || !HAS_ALNUM.test(term)) continue;
    out.push({ term, parts: partsOf(term) });
  }
  return out;
}

/**
 * Parse `q` the way the service reads it: words, "quoted phrases" (matched as consecutive words) and `-word` exclusions.
 */
export function parseQuery(q: string): ParsedQuery {
  const parsed: ParsedQuery = { words: [], phrases: [], excluded: [] };
  let rest = q;
  // -"phrase" and "phrase"
  rest = rest.replace(/(^|\s)(-?)"([^"]*)"?/g, (_m, lead: string, neg: string, inner: string) => {
    const words = wordsOf(inner);
    if (neg) parsed.excluded.push(...words.map((w) => w.term));
    else if (words.length > 0) {
      parsed.phrases.push(words.map((w) => w.term));
      parsed.words.push(...words);
    }
    return `${lead} `;
  });
  for (const raw of rest.split(/\s+/)) {
    if (raw.length > 1 && raw.startsWith("-") && HAS_ALNUM.test(raw[1])) {
      parsed.excluded.push(...wordsOf(raw.slice(1)).map((w) => w.term));
    } else parsed.words.push(...wordsOf(raw));
  }
  return parsed;
}

/** Does the normalized term sequence of `text` contain `phrase` as consecutive pieces (or parts)? */
export function containsPhrase(text: string, phrase: string[]): boolean {
  const seq: string[][] = [];
  for (const raw of text.split(HARD_SEPARATORS)) {
    const piece = normalize(trimPiece(raw));
    if (!piece || !HAS_ALNUM.test(piece)) continue;
    // a piece with parts counts as its parts in sequence ("kill-switch" holds the phrase "kill switch")
    const parts = partsOf(piece);
    if (parts.length) for (const p of parts) seq.push([p, piece]);
    else seq.push([piece]);
  }
  outer: for (let i = 0; i + phrase.length <= seq.length; i++) {
    for (let j = 0; j < phrase.length; j++) if (!seq[i + j].includes(phrase[j])) continue outer;
    return true;
  }
  return false;
}

/** What a hit matched: its document terms (exact, prefix or typo matches) and the query terms behind them. */
export interface MatchInfo {
  /** Document terms that matched (normalized). */
  terms: Set<string>;
  /** Query terms (normalized) — used to mark only the typed prefix of a prefix match. */
  queryTerms: string[];
  /** Short query words matched through the prefix index: any document term they begin is a match. */
  prefixes?: string[];
}

interface Span {
  start: number;
  end: number;
}

/** The [start, end) spans of `text` to mark for a hit. */
function matchSpans(text: string, match: MatchInfo): Span[] {
  const spans: Span[] = [];
  const re = /[^\s,;:()[\]{}"!?<>|]+/gu;
  const prefixes = match.prefixes ?? [];
  const matched = (term: string) => match.terms.has(term) || prefixes.some((p) => term.startsWith(p));
  const prefixOf = (docTerm: string, surfaceLength: number): number => {
    // a query term the document term merely starts with marks only that prefix (as the service does);
    // an exact or typo match marks the whole term
    if (match.queryTerms.includes(docTerm)) return surfaceLength;
    const q = match.queryTerms.filter((t) => docTerm.startsWith(t)).sort((a, b) => b.length - a.length)[0];
    return q && q.length < docTerm.length && docTerm.length === surfaceLength ? q.length : surfaceLength;
  };
  for (let m = re.exec(text); m; m = re.exec(text)) {
    const rawStart = m.index;
    const raw = m[0];
    const trimmed = trimPiece(raw);
    const offset = raw.indexOf(trimmed);
    const start = rawStart + Math.max(offset, 0);
    const piece = normalize(trimmed);
    if (!piece) continue;
    if (matched(piece)) {
      spans.push({ start, end: start + prefixOf(piece, trimmed.length) });
      continue;
    }
    for (const part of trimmed.matchAll(ALNUM_RUN)) {
      const p = normalize(part[0]);
      if (matched(p)) {
        const s = start + (part.index ?? 0);
        spans.push({ start: s, end: s + prefixOf(p, part[0].length) });
      }
    }
  }
  return spans;
}

/** Wrap the matched terms of `text` in pre/post tags. */
export function highlight(text: string, match: MatchInfo, preTag: string, postTag: string): string {
  const spans = matchSpans(text, match);
  if (spans.length === 0) return text;
  let out = "";
  let at = 0;
  for (const s of spans) {
    if (s.start < at) continue;
    out += text.slice(at, s.start) + preTag + text.slice(s.start, s.end) + postTag;
    at = s.end;
  }
  return out + text.slice(at);
}

/**
 * Crop `text` to about `cropLength` words around the first match, marking the cut ends with `marker` (the service's
 * attributesToCrop / cropLength / cropMarker, default 10 words and "…").
 */
export function crop(text: string, match: MatchInfo, cropLength: number, marker: string): string {
  const words: Span[] = [];
  for (const m of text.matchAll(/\S+/gu)) words.push({ start: m.index ?? 0, end: (m.index ?? 0) + m[0].length });
  if (words.length <= cropLength) return text;
  const first = matchSpans(text, match)[0];
  let centre = 0;
  if (first)
    centre = Math.max(
      0,
      words.findIndex((w) => w.end > first.start),
    );
  let from = Math.max(0, centre - Math.floor((cropLength - 1) / 2));
  if (!first) from = 0;
  from = Math.min(from, words.length - cropLength);
  const to = from + cropLength;
  const body = text.slice(words[from].start, words[to - 1].end);
  return `${from > 0 ? marker : ""}${body}${to < words.length ? marker : ""}`;
}
