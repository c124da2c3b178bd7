// What every notation's reader shares: the outcome of one reading, the segments of a typed code, and the run splitter.

import type { ColourName } from "./names";
import type { CodeEntry } from "./systems";

export type Mode = "strict" | "liberal";
export interface Read {
  ok: true;
  colours: ColourName[];
  // IEC only: how it was written, which tells auto-detection how IEC-like it looks.
  lower?: boolean;
  tableOrder?: boolean;
}
export interface Miss {
  ok: false;
  part: string;
  /** Offset of `part` in the normalised input: how far the reader got before failing. */
  at: number;
  message?: string;
  /** Every code was known but a rule of the notation was broken: the best explanation to give. */
  rule?: boolean;
}
export type Outcome = Read | Miss;

interface Segment {
  text: string;
  at: number;
}

// Liberal on separators: the trade writes W/R, W-R, W R, W.R, W_R and WR for the same wire.
const SEGMENT = /[^/\\|,._\s\-\u2010-\u2015]+/g;

export function segmentsOf(s: string): Segment[] {
  return [...s.matchAll(SEGMENT)].map((m) => ({ text: m[0], at: m.index ?? 0 }));
}

export const miss = (part: string, at: number, message?: string): Miss => ({ ok: false, part, at, message });
export const rule = (part: string, at: number, message: string): Miss => ({ ok: false, part, at, message, rule: true });

export const mapOf = (rows: readonly CodeEntry[], key: (code: string) => string = (c) => c) => new Map(rows.map(({ code, colour }) => [key(code), colour]));

export interface Token {
  code: string;
  colour: ColourName;
  at: number;
  end: number;
}

// Splits run-together codes ("swrt", "RDWH") into known codes, longest first with backtracking,
// so "gnge" is one code but "orge" still splits into or + ge.
export function splitRun(
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
