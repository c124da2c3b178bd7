/**
 * How matches are combined and ordered: one hit as MiniSearch scored it, a candidate of a search, merging two result
 * lists the way MiniSearch merges sub-queries, and the order of two documents on a sortable attribute. Pure, no I/O.
 */
import type { Doc } from "./documents.ts";
import { facetValues } from "./filter.ts";

/** One matching document as MiniSearch scored it (our ids are strings: extractField makes them so). */
export interface Hit {
  id: string;
  score: number;
  terms: string[];
  queryTerms: string[];
}

export interface Candidate {
  key: string;
  /** The document's insertion rank (SearchIndex.rank). */
  rank: number;
  doc: Doc;
  score: number;
  /** What matched (a Set of terms is built only for the hits shown). */
  match: Hit | null;
  /** A short last word matched through the prefix index: every term it begins counts as matched. */
  prefixes?: string[];
}

const union = (a: string[], b: string[] | undefined) => (b?.length ? [...new Set([...a, ...b])] : a);

/**
 * Combine two result lists the way MiniSearch combines sub-queries: OR keeps every document, AND those in both; the
 * scores of a document found by both add up and what matched is joined.
 */
export function mergeHits(combineWith: "AND" | "OR", a: Hit[], b: Hit[]): Hit[] {
  const byId = new Map(a.map((h) => [h.id, h]));
  const out: Hit[] = combineWith === "OR" ? [...a] : [];
  const both = new Map<string, Hit>();
  for (const h of b) {
    const other = byId.get(h.id);
    if (!other) {
      if (combineWith === "OR") out.push(h);
      continue;
    }
    const merged: Hit = {
      id: h.id,
      score: other.score + h.score,
      terms: union(other.terms, h.terms),
      queryTerms: union(other.queryTerms, h.queryTerms),
    };
    both.set(h.id, merged);
    if (combineWith === "AND") out.push(merged);
  }
  return combineWith === "OR" ? out.map((h) => both.get(h.id) ?? h) : out;
}

/**
 * Order of two documents on one sortable attribute, as the service documents it: numbers before strings, strings
 * compared case-insensitively, documents without a value last whatever the direction; an array sorts by its smallest
 * value ascending and its largest descending.
 */
export function compareForSort(a: Doc, b: Doc, attribute: string, desc: boolean): number {
  const key = (doc: Doc): { kind: 0 | 1 | 2; n: number; s: string } => {
    const values = facetValues(doc, attribute).filter((v) => typeof v !== "boolean") as (string | number)[];
    const nums = values.filter((v): v is number => typeof v === "number");
    if (nums.length) return { kind: 0, n: desc ? Math.max(...nums) : Math.min(...nums), s: "" };
    const strs = values.map((v) => String(v).toLowerCase()).sort();
    if (strs.length) return { kind: 1, n: 0, s: desc ? strs[strs.length - 1] : strs[0] };
    return { kind: 2, n: 0, s: "" };
  };
  const ka = key(a);
  const kb = key(b);
  if (ka.kind !== kb.kind) return ka.kind - kb.kind;
  if (ka.kind === 2) return 0;
  const d = ka.kind === 0 ? ka.n - kb.n : ka.s < kb.s ? -1 : ka.s > kb.s ? 1 : 0;
  return desc ? -d : d;
}
