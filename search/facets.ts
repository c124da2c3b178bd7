/**
 * Facet counts over every match of a search (facetDistribution and facetStats), kept per index (SearchIndex.facets).
 */
import type { Doc } from "./documents.ts";
import { facetValues } from "./filter.ts";
import type { Settings } from "./index-settings.ts";
import type { Candidate } from "./ranking.ts";
import { normalize } from "./text.ts";

interface FacetCell {
  label: string;
  num: number | null;
  count: number;
  /** The facet count that last touched this cell (its count belongs to that one). */
  epoch: number;
}

export class FacetCounts {
  /**
   * Facet counting: each distinct facet value is one shared cell per facet (strings case- and accent-folded, numbers
   * apart), and each document's cells are worked out once (facetColumns). Counting then reads no document and looks
   * nothing up by string: a cell's count is reset the first time a count (`epoch`) touches it.
   */
  private readonly facetCells = new Map<string, Map<string, FacetCell>>();
  /**
   * Per facet, per document by its insertion rank: the document's cells. Reset when the document is replaced or
   * deleted. (A WeakMap by document object cost more in garbage collection than the counting itself.)
   */
  private readonly facetColumns = new Map<string, (FacetCell[] | undefined)[]>();
  private facetEpoch = 0;
  private cellsOf(doc: Doc, facet: string): FacetCell[] {
    let interned = this.facetCells.get(facet);
    if (!interned) this.facetCells.set(facet, (interned = new Map()));
    const out: FacetCell[] = [];
    for (const v of facetValues(doc, facet)) {
      const label = String(v);
      const key = typeof v === "string" ? normalize(v) : `\u0000${label}`;
      let cell = interned.get(key);
      if (!cell) interned.set(key, (cell = { label, num: typeof v === "number" ? v : null, count: 0, epoch: 0 }));
      if (!out.includes(cell)) out.push(cell);
    }
    return out;
  }

  /** A document was replaced or deleted: its cached facet cells go. */
  forgetCells(rank: number): void {
    for (const column of this.facetColumns.values()) column[rank] = undefined;
  }

  facetDistribution(candidates: Candidate[], facets: string[], faceting: Settings["faceting"]) {
    const distribution: Record<string, Record<string, number>> = {};
    const stats: Record<string, { min: number; max: number }> = {};
    for (const facet of facets) {
      const epoch = ++this.facetEpoch;
      const touched: FacetCell[] = [];
      let column = this.facetColumns.get(facet);
      if (!column) this.facetColumns.set(facet, (column = []));
      for (const c of candidates) {
        let cells = column[c.rank];
        if (!cells) column[c.rank] = cells = this.cellsOf(c.doc, facet);
        for (const cell of cells) {
          if (cell.epoch !== epoch) {
            cell.epoch = epoch;
            cell.count = 0;
            touched.push(cell);
          }
          cell.count += 1;
        }
      }
      let min = Infinity;
      let max = -Infinity;
      for (const cell of touched) {
        if (cell.num === null) continue;
        if (cell.num < min) min = cell.num;
        if (cell.num > max) max = cell.num;
      }
      const by = faceting.sortFacetValuesBy[facet] ?? faceting.sortFacetValuesBy["*"] ?? "alpha";
      const entries = touched.sort((a, b) => {
        if (by === "count" && a.count !== b.count) return b.count - a.count;
        if (a.num !== null && b.num !== null) return a.num - b.num;
        if (a.num !== null) return -1;
        if (b.num !== null) return 1;
        return a.label.toLowerCase() < b.label.toLowerCase() ? -1 : a.label.toLowerCase() > b.label.toLowerCase() ? 1 : 0;
      });
      const out: Record<string, number> = {};
      for (const e of entries.slice(0, faceting.maxValuesPerFacet)) out[e.label] = e.count;
      distribution[facet] = out;
      if (min !== Infinity) stats[facet] = { min, max };
    }
    return { distribution, stats };
  }

  /** Every document went (SearchIndex.clear()). */
  clear(): void {
    this.facetCells.clear();
    this.facetColumns.clear();
  }
}
