/**
 * One index of the search stand-in: settings (index-settings.ts), documents (in insertion order, as the service's
 * internal ids keep them) and a MiniSearch index over the searchable attributes (documents.ts), plus the search itself
 * (here; facets.ts counts facets, format.ts shapes hits, ranking.ts merges and sorts). No I/O here: search/server.ts
 * and the modules it uses own HTTP, tasks and persistence.
 *
 * Ranking and typo tolerance are MiniSearch's (BM25 with prefix and fuzzy matching), configured to behave like the
 * service's defaults:
 *   - prefix matching on the last query word, as the service does (as-you-type: "kil" finds "kill switch"), with prefix
 *     data built at indexing time for one- and two-character last words (SearchIndex.prefixMini);
 *     `prefixSearch: "disabled"` turns it off;
 *   - typo tolerance by word length as the service's `typoTolerance.minWordSizeForTypos` (defaults oneTypo 5,
 *     twoTypos 9): no typo under 5 characters, 1 typo for 5–8, 2 from 9 — via MiniSearch's `fuzzy(term)` returning a
 *     maximum edit distance; `typoTolerance.enabled: false`, `disableOnWords` and `disableOnNumbers` are honoured;
 *   - field boosts from searchableAttributes order (earlier = more important, like the service's `attribute` rule);
 *   - matching: every query word must match (AND); when that finds nothing and matchingStrategy is not "all", words
 *     are combined with OR instead. This approximates the service's default strategy "last" (which also returns
 *     documents matching fewer words, ranked below) — here those appear only when no document matches every word.
 *   - sort (when given) is the main order of the results and relevance breaks ties; the service puts its `sort`
 *     ranking rule after words/typo/proximity/attribute, so on a real instance relevance weighs more.
 */
import type { Query, SearchResult } from "minisearch";
import { IndexedDocuments, PREFIX_INDEX_MAX, textAt, type Doc, type IndexSnapshot } from "./documents.ts";
import { ApiError } from "./errors.ts";
import { attributeAllowed, facetValues, filterAttributes, FilterSyntaxError, matchesFilter, parseFilter, type FilterNode } from "./filter.ts";
import { formatHit } from "./format.ts";
import { defaultSettings, filterablePatterns } from "./index-settings.ts";
import { compareForSort, mergeHits, type Candidate, type Hit } from "./ranking.ts";
import { containsPhrase, normalize, parseQuery, EXACT_MARK, tokenizeForIndex, type QueryWord } from "./text.ts";

// the pieces of an index, from where they live now, so importers of engine.ts keep working
export { PREFIX_INDEX_MAX, type Doc, type IndexSnapshot } from "./documents.ts";
export { applySetting, defaultSettings, filterablePatterns, SETTINGS, validateSetting, type Settings } from "./index-settings.ts";
export { compareForSort } from "./ranking.ts";

/** A prefix match weighs this much of an exact one: MiniSearch's default `weights.prefix`. */
const PREFIX_WEIGHT = 0.375;

export interface SearchRequest {
  q?: string | null;
  offset?: number;
  limit?: number;
  page?: number;
  hitsPerPage?: number;
  filter?: unknown;
  facets?: string[];
  sort?: string[];
  attributesToRetrieve?: string[];
  attributesToHighlight?: string[];
  highlightPreTag?: string;
  highlightPostTag?: string;
  attributesToCrop?: string[];
  cropLength?: number;
  cropMarker?: string;
  matchingStrategy?: "last" | "all" | "frequency";
  showRankingScore?: boolean;
  attributesToSearchOn?: string[] | null;
  distinct?: string;
}

/** Parse a filter and check its attributes are filterable; errors carry the given code (search vs documents routes). */
export function compileFilter(filter: unknown, allowed: string[], primaryKey: string | null, code: string): FilterNode {
  let node: FilterNode;
  try {
    node = parseFilter(filter);
  } catch (e) {
    if (e instanceof FilterSyntaxError) throw new ApiError(400, code, e.message);
    throw e;
  }
  for (const attribute of filterAttributes(node)) {
    // the primary key is filterable without being listed (the service's filter guide says so)
    if (attribute === primaryKey || attributeAllowed(attribute, allowed)) continue;
    const list = allowed.length ? allowed.join(", ") : "";
    throw new ApiError(
      400,
      code,
      allowed.length
        ? `Attribute \`${attribute}\` is not filterable. Available filterable attribute patterns are: \`${list}\`.`
        : `Attribute \`${attribute}\` is not filterable. This index does not have configured filterable attributes.`,
    );
  }
  return node;
}

export class SearchIndex extends IndexedDocuments {
  static fromSnapshot(s: IndexSnapshot): SearchIndex {
    const index = new SearchIndex(s.uid, s.primaryKey, s.createdAt);
    index.updatedAt = s.updatedAt;
    index.settings = { ...defaultSettings(), ...s.settings };
    for (const doc of s.documents) index.put(index.keyOf(doc), doc);
    index.refresh();
    return index;
  }

  search(req: SearchRequest) {
    const started = performance.now();
    const settings = this.settings;
    const filterable = filterablePatterns(settings);
    const filter = compileFilter(req.filter, filterable, this.primaryKey, "invalid_search_filter");

    const sort = (req.sort ?? []).map((s) => {
      const m = /^(.+):(asc|desc)$/.exec(s.trim());
      if (!m) {
        throw new ApiError(
          400,
          "invalid_search_sort",
          `Invalid syntax for the sort parameter: expected expression ending by \`:asc\` or \`:desc\`, found \`${s}\`.`,
        );
      }
      const attribute = m[1].trim();
      if (!attributeAllowed(attribute, settings.sortableAttributes)) {
        throw new ApiError(
          400,
          "invalid_search_sort",
          settings.sortableAttributes.length
            ? `Attribute \`${attribute}\` is not sortable. Available sortable attributes are: \`${settings.sortableAttributes.join(", ")}\`.`
            : `Attribute \`${attribute}\` is not sortable. This index does not have configured sortable attributes.`,
        );
      }
      return { attribute, desc: m[2] === "desc" };
    });

    let facets = req.facets ?? null;
    if (facets) {
      if (facets.includes("*")) facets = filterable.filter((f) => !f.includes("*"));
      for (const f of facets) {
        if (!attributeAllowed(f, filterable)) {
          throw new ApiError(
            400,
            "invalid_search_facets",
            filterable.length
              ? `Invalid facet distribution: Attribute \`${f}\` is not filterable. Available filterable attributes patterns are: \`${filterable.join(", ")}\`.`
              : `Invalid facet distribution: Attribute \`${f}\` is not filterable. This index does not have configured filterable attributes.`,
          );
        }
      }
    }

    const distinctAttr = req.distinct ?? settings.distinctAttribute;
    if (req.distinct !== undefined && !attributeAllowed(req.distinct, filterable)) {
      throw new ApiError(400, "invalid_search_distinct", `Attribute \`${req.distinct}\` is not filterable and thus, cannot be used as distinct attribute.`);
    }

    if (req.attributesToSearchOn) {
      const searchable = settings.searchableAttributes;
      for (const a of req.attributesToSearchOn) {
        if (!searchable.includes("*") && !attributeAllowed(a, searchable)) {
          throw new ApiError(
            400,
            "invalid_search_attributes_to_search_on",
            `Attribute \`${a}\` is not searchable. Available searchable attributes are: \`${searchable.join(", ")}\`.`,
          );
        }
      }
    }

    const q = req.q ?? "";
    let candidates = this.candidates(q, filter, req);

    if (sort.length) {
      const indexed = candidates.map((c, i) => ({ c, i }));
      indexed.sort((a, b) => {
        for (const s of sort) {
          const d = compareForSort(a.c.doc, b.c.doc, s.attribute, s.desc);
          if (d !== 0) return d;
        }
        return a.i - b.i;
      });
      candidates = indexed.map((x) => x.c);
    }

    if (distinctAttr) {
      const seen = new Set<string>();
      candidates = candidates.filter((c) => {
        const values = facetValues(c.doc, distinctAttr);
        if (values.length === 0) return true;
        const key = values.map((v) => (typeof v === "string" ? v.toLowerCase() : String(v))).join("\u0000");
        if (seen.has(key)) return false;
        seen.add(key);
        return true;
      });
    }

    const maxTotalHits = settings.pagination.maxTotalHits;
    const total = candidates.length;
    const reachable = Math.min(total, maxTotalHits);
    const paged = req.page !== undefined || req.hitsPerPage !== undefined;
    let offset: number;
    let limit: number;
    if (paged) {
      const page = req.page ?? 1;
      const hitsPerPage = req.hitsPerPage ?? 20;
      offset = (Math.max(page, 1) - 1) * hitsPerPage;
      limit = page === 0 ? 0 : hitsPerPage;
    } else {
      offset = req.offset ?? 0;
      limit = req.limit ?? 20;
    }
    const slice = candidates.slice(Math.min(offset, reachable), Math.min(offset + limit, reachable));

    const topScore = candidates.reduce((m, c) => Math.max(m, c.score), 0) || 1;
    const hits = slice.map((c) => formatHit(this, c, req, topScore));

    const body: Record<string, unknown> = { hits, query: q, processingTimeMs: 0 };
    if (paged) {
      const hitsPerPage = req.hitsPerPage ?? 20;
      Object.assign(body, {
        hitsPerPage,
        page: req.page ?? 1,
        totalPages: hitsPerPage === 0 ? 0 : Math.ceil(reachable / hitsPerPage),
        totalHits: reachable,
      });
    } else {
      Object.assign(body, { limit, offset, estimatedTotalHits: reachable });
    }
    if (facets) {
      const { distribution, stats } = this.facets.facetDistribution(candidates, facets, this.settings.faceting);
      body.facetDistribution = distribution;
      body.facetStats = stats;
    }
    body.processingTimeMs = Math.round(performance.now() - started);
    return body;
  }

  private candidates(q: string, filter: FilterNode, req: SearchRequest): Candidate[] {
    const ok = (doc: Doc | undefined): doc is Doc => doc !== undefined && (filter.type === "all" || matchesFilter(filter, doc));
    const parsed = parseQuery(q);
    const stopWords = new Set(this.settings.stopWords.map(normalize));
    const words = parsed.words.filter((w) => !stopWords.has(w.term));
    if (words.length === 0) {
      // placeholder search: every (filtered) document in insertion order
      const out: Candidate[] = [];
      for (const [key, doc] of this.docs) {
        if (ok(doc) && !this.excluded(doc, parsed.excluded)) out.push({ key, rank: this.rank.get(key)!, doc, score: 1, match: null });
      }
      return out;
    }
    this.refresh();
    const mini = this.mini!;
    const fields = (req.attributesToSearchOn ?? this.miniFields).filter(
      (f) => this.miniFields.includes(f) || this.miniFields.some((m) => m.startsWith(`${f}.`)),
    );
    const searchFields = fields.flatMap((f) => (this.miniFields.includes(f) ? [f] : this.miniFields.filter((m) => m.startsWith(`${f}.`))));
    if (searchFields.length === 0) return [];
    const boost: Record<string, number> = {};
    const n = this.miniFields.length;
    this.miniFields.forEach((f, i) => (boost[f] = 1 + (n - 1 - i) / Math.max(n - 1, 1)));
    const typo = this.settings.typoTolerance;
    const disabledWords = new Set(typo.disableOnWords.map(normalize));
    const fuzzy = (term: string): number => {
      if (!typo.enabled || disabledWords.has(term)) return 0;
      if (typo.disableOnNumbers && /^\d+$/.test(term)) return 0;
      const len = [...term].length;
      return len >= typo.minWordSizeForTypos.twoTypos ? 2 : len >= typo.minWordSizeForTypos.oneTypo ? 1 : 0;
    };
    const prefixOn = this.settings.prefixSearch !== "disabled";
    const options = {
      fields: searchFields,
      boost,
      prefix: false,
      fuzzy,
      // no callback at all when nothing is filtered: MiniSearch calls it once per matching document
      ...(filter.type === "all" ? {} : { filter: (r: SearchResult) => ok(this.docs.get(String(r.id))) }),
    };
    const synonyms = new Map<string, string[][]>();
    for (const [k, list] of Object.entries(this.settings.synonyms)) {
      synonyms.set(
        normalize(k),
        list.map((s) => parseQuery(s).words.map((w) => w.term)),
      );
    }
    const last = words.length - 1;
    // A short last word is matched through the prefix index (below), the index's own prefix expansion serves a longer
    // one. Earlier words match whole (with typos): the service expands only the last word.
    const shortLast = prefixOn && [...words[last].term].length <= PREFIX_INDEX_MAX && !synonyms.has(words[last].term);
    const whole = (t: string) => t + EXACT_MARK;
    const prefixIndexOptions = { ...options, fuzzy: false, boostTerm: (t: string) => (t.endsWith(EXACT_MARK) ? 1 : PREFIX_WEIGHT) };
    /**
     * A word with parts ("w/r", "kill-switch", "b+") is matched by its parts (each whole, in any order) only when no
     * document holds the word itself. Matching the parts as well let "W/R" find every card with a white and a red wire,
     * R/W ones included, and made every such query score each document holding a "w" or an "r".
     */
    const byParts = words.map((w, i) => {
      if (w.parts.length === 0) return false;
      const found =
        shortLast && i === last
          ? this.prefixMini!.search({ combineWith: "OR", queries: [w.term, whole(w.term)] }, prefixIndexOptions)
          : mini.search({ queries: [w.term], prefix: prefixOn && i === last }, options);
      return found.length === 0;
    });
    const wordQuery = (w: QueryWord, i: number): Query => {
      const prefix = prefixOn && i === last;
      const alternatives: Query[] = [{ queries: [w.term], prefix }];
      // the letter/digit runs of a code ("w", "r" of "W/R") match exactly: no prefix, no typo
      if (byParts[i]) alternatives.push({ combineWith: "AND", queries: w.parts, prefix: false, fuzzy: false });
      for (const syn of synonyms.get(w.term) ?? []) alternatives.push({ combineWith: "AND", queries: syn, prefix });
      return { combineWith: "OR", queries: alternatives };
    };
    const search = (combineWith: "AND" | "OR"): Hit[] => {
      if (!shortLast) return mini.search({ combineWith, queries: words.map(wordQuery) }, options) as Hit[];
      // In the prefix index: the word as a prefix (weighed as MiniSearch weighs a prefix match), the word whole, or
      // else a code's parts whole ("b+" → "b"); one search, so MiniSearch adds up the scores of a document found by several.
      const w = words[last];
      const lastQuery: Query = {
        combineWith: "OR",
        queries: [w.term, whole(w.term), ...(byParts[last] ? [{ combineWith: "AND" as const, queries: w.parts.map(whole) }] : [])],
      };
      const lastHits = this.prefixMini!.search(lastQuery, prefixIndexOptions) as Hit[];
      if (words.length === 1) return lastHits;
      return mergeHits(combineWith, mini.search({ combineWith, queries: words.slice(0, last).map(wordQuery) }, options) as Hit[], lastHits);
    };
    const prefixes = shortLast ? [words[last].term] : undefined;
    const run = (combineWith: "AND" | "OR") => {
      const out: Candidate[] = [];
      for (const r of search(combineWith)) {
        const doc = this.docs.get(r.id)!;
        if (parsed.phrases.length && !parsed.phrases.every((p) => searchFields.some((f) => textAt(doc, f).some((t) => containsPhrase(t, p))))) continue;
        if (this.excluded(doc, parsed.excluded)) continue;
        out.push({ key: r.id, rank: this.rank.get(r.id)!, doc, score: r.score, match: r, prefixes });
      }
      // equal scores keep insertion order
      return out.sort((a, b) => b.score - a.score || a.rank - b.rank);
    };
    let out = run("AND");
    if (out.length === 0 && words.length > 1 && req.matchingStrategy !== "all") out = run("OR");
    return out;
  }

  private excluded(doc: Doc, terms: string[]): boolean {
    if (terms.length === 0) return false;
    this.refresh();
    return this.miniFields.some((f) => textAt(doc, f).some((t) => tokenizeForIndex(t).some((tok) => terms.includes(tok))));
  }
}
