/**
 * One hit as a search answers it: the shown attributes, `_formatted` (highlight and crop) and `_rankingScore`.
 */
import type { Doc } from "./documents.ts";
import type { SearchRequest } from "./engine.ts";
import { attributeAllowed } from "./filter.ts";
import type { Candidate } from "./ranking.ts";
import { crop, highlight, type MatchInfo } from "./text.ts";

const EMPTY_MATCH: MatchInfo = { terms: new Set(), queryTerms: [] };

export function formatHit(index: { project(doc: Doc, fields?: string[] | null): Doc }, c: Candidate, req: SearchRequest, topScore: number): Doc {
  const shown = index.project(c.doc, req.attributesToRetrieve);
  const hit: Doc = { ...shown };
  const toHighlight = req.attributesToHighlight ?? [];
  const toCropSpecs = req.attributesToCrop ?? [];
  if (toHighlight.length || toCropSpecs.length) {
    const cropLength = req.cropLength ?? 10;
    const cropFor = new Map<string, number>();
    for (const spec of toCropSpecs) {
      const m = /^(.*):(\d+)$/.exec(spec);
      cropFor.set(m ? m[1] : spec, m ? Number(m[2]) : cropLength);
    }
    const pre = req.highlightPreTag ?? "<em>";
    const post = req.highlightPostTag ?? "</em>";
    const marker = req.cropMarker ?? "…";
    const match: MatchInfo = c.match ? { terms: new Set(c.match.terms), queryTerms: c.match.queryTerms, prefixes: c.prefixes } : EMPTY_MATCH;
    const format = (value: unknown, path: string): unknown => {
      if (Array.isArray(value)) return value.map((v) => format(v, path));
      if (value && typeof value === "object") {
        const o: Doc = {};
        for (const [k, v] of Object.entries(value)) o[k] = format(v, `${path}.${k}`);
        return o;
      }
      const hl = attributeAllowed(path, toHighlight) || toHighlight.includes("*");
      const cropLen =
        cropFor.get(path) ?? (cropFor.has("*") ? cropFor.get("*") : [...cropFor.keys()].some((k) => path.startsWith(`${k}.`)) ? cropLength : undefined);
      if (typeof value === "number" && (hl || cropLen !== undefined)) value = String(value);
      if (typeof value !== "string") return value;
      let text = value;
      if (cropLen !== undefined) text = crop(text, match, cropLen, marker);
      if (hl) text = highlight(text, match, pre, post);
      return text;
    };
    const formatted: Doc = {};
    for (const [k, v] of Object.entries(shown)) formatted[k] = format(v, k);
    hit._formatted = formatted;
  }
  if (req.showRankingScore) hit._rankingScore = c.match ? Math.round((c.score / topScore) * 1e6) / 1e6 : 1;
  return hit;
}
