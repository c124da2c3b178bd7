/**
 * One index of the search stand-in: settings, documents (in insertion order, as the service's internal ids keep them)
 * and a MiniSearch index over the searchable attributes, plus the search itself. No I/O here: search/server.ts owns
 * HTTP, tasks and persistence.
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
import MiniSearch, { type Query, type SearchResult } from "minisearch";
import { ApiError } from "./errors.ts";
import {
  attributeAllowed,
  facetValues,
  filterAttributes,
  FilterSyntaxError,
  lookup,
  matchesFilter,
  parseFilter,
  type FilterNode,
} from "./filter.ts";
import { containsPhrase, crop, highlight, normalize, parseQuery, EXACT_MARK, prefixIndexTerms, tokenizeForIndex, type MatchInfo, type QueryWord } from "./text.ts";

/** Last words up to this many characters are matched through the prefix index (SearchIndex.prefixMini). */
export const PREFIX_INDEX_MAX = 2;
/** A prefix match weighs this much of an exact one: MiniSearch's default `weights.prefix`. */
const PREFIX_WEIGHT = 0.375;

export type Doc = Record<string, unknown>;

/** The settings object as GET /indexes/:uid/settings returns it (defaults of the service). */
export interface Settings {
  displayedAttributes: string[];
  searchableAttributes: string[];
  filterableAttributes: unknown[];
  sortableAttributes: string[];
  rankingRules: string[];
  stopWords: string[];
  nonSeparatorTokens: string[];
  separatorTokens: string[];
  dictionary: string[];
  synonyms: Record<string, string[]>;
  distinctAttribute: string | null;
  proximityPrecision: string;
  typoTolerance: {
    enabled: boolean;
    minWordSizeForTypos: { oneTypo: number; twoTypos: number };
    disableOnWords: string[];
    disableOnAttributes: string[];
    disableOnNumbers: boolean;
  };
  faceting: { maxValuesPerFacet: number; sortFacetValuesBy: Record<string, "alpha" | "count"> };
  pagination: { maxTotalHits: number };
  embedders: Record<string, unknown>;
  searchCutoffMs: number | null;
  localizedAttributes: unknown[] | null;
  facetSearch: boolean;
  prefixSearch: "indexingTime" | "disabled";
  [other: string]: unknown;
}

export function defaultSettings(): Settings {
  return {
    displayedAttributes: ["*"],
    searchableAttributes: ["*"],
    filterableAttributes: [],
    sortableAttributes: [],
    rankingRules: ["words", "typo", "proximity", "attribute", "sort", "exactness"],
    stopWords: [],
    nonSeparatorTokens: [],
    separatorTokens: [],
    dictionary: [],
    synonyms: {},
    distinctAttribute: null,
    proximityPrecision: "byWord",
    typoTolerance: {
      enabled: true,
      minWordSizeForTypos: { oneTypo: 5, twoTypos: 9 },
      disableOnWords: [],
      disableOnAttributes: [],
      disableOnNumbers: false,
    },
    faceting: { maxValuesPerFacet: 100, sortFacetValuesBy: { "*": "alpha" } },
    pagination: { maxTotalHits: 1000 },
    embedders: {},
    searchCutoffMs: null,
    localizedAttributes: null,
    facetSearch: true,
    prefixSearch: "indexingTime",
  };
}

/** The settings the stand-in knows, by camelCase name, with the kebab-case route segment and a validator. */
type Kind = "strings" | "stringsOrNull" | "filterable" | "synonyms" | "stringOrNull" | "object" | "boolean" | "numberOrNull" | "string" | "any";
export const SETTINGS: Record<string, { route: string; kind: Kind }> = {
  displayedAttributes: { route: "displayed-attributes", kind: "strings" },
  searchableAttributes: { route: "searchable-attributes", kind: "strings" },
  filterableAttributes: { route: "filterable-attributes", kind: "filterable" },
  sortableAttributes: { route: "sortable-attributes", kind: "strings" },
  rankingRules: { route: "ranking-rules", kind: "strings" },
  stopWords: { route: "stop-words", kind: "strings" },
  nonSeparatorTokens: { route: "non-separator-tokens", kind: "strings" },
  separatorTokens: { route: "separator-tokens", kind: "strings" },
  dictionary: { route: "dictionary", kind: "strings" },
  synonyms: { route: "synonyms", kind: "synonyms" },
  distinctAttribute: { route: "distinct-attribute", kind: "stringOrNull" },
  proximityPrecision: { route: "proximity-precision", kind: "string" },
  typoTolerance: { route: "typo-tolerance", kind: "object" },
  faceting: { route: "faceting", kind: "object" },
  pagination: { route: "pagination", kind: "object" },
  embedders: { route: "embedders", kind: "object" },
  searchCutoffMs: { route: "search-cutoff-ms", kind: "numberOrNull" },
  localizedAttributes: { route: "localized-attributes", kind: "any" },
  facetSearch: { route: "facet-search", kind: "boolean" },
  prefixSearch: { route: "prefix-search", kind: "string" },
};

const snake = (camel: string) => camel.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

function typeName(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "an array";
  if (typeof v === "object") return "an object";
  return `a ${typeof v === "number" ? "number" : typeof v}`;
}

/** Validate one setting's value (null = reset). Throws ApiError 400 `invalid_settings_<name>`. */
export function validateSetting(name: string, value: unknown): void {
  const spec = SETTINGS[name];
  const bad = (expected: string): never => {
    throw new ApiError(400, `invalid_settings_${snake(name)}`, `Invalid value type at \`.${name}\`: expected ${expected}, but found ${typeName(value)}: \`${JSON.stringify(value)}\``);
  };
  if (value === null) return;
  switch (spec.kind) {
    case "strings":
    case "stringsOrNull":
      if (!Array.isArray(value) || value.some((v) => typeof v !== "string")) bad("an array of strings");
      return;
    case "filterable":
      if (!Array.isArray(value)) bad("an array");
      for (const v of value as unknown[]) {
        if (typeof v === "string") continue;
        const patterns = (v as { attributePatterns?: unknown })?.attributePatterns;
        if (!v || typeof v !== "object" || !Array.isArray(patterns) || patterns.some((p) => typeof p !== "string")) {
          bad("an array of strings or of objects with `attributePatterns`");
        }
      }
      return;
    case "synonyms":
      if (typeof value !== "object" || Array.isArray(value)) bad("an object");
      for (const list of Object.values(value as object)) if (!Array.isArray(list) || list.some((v) => typeof v !== "string")) bad("an object of string arrays");
      return;
    case "stringOrNull":
    case "string":
      if (typeof value !== "string") bad("a string");
      return;
    case "object":
      if (typeof value !== "object" || Array.isArray(value)) bad("an object");
      return;
    case "boolean":
      if (typeof value !== "boolean") bad("a boolean");
      return;
    case "numberOrNull":
      if (typeof value !== "number" || !Number.isInteger(value) || value < 0) bad("a positive integer");
      return;
    case "any":
      return;
  }
}

/** Apply one setting (already validated): null resets it; object settings (typoTolerance, faceting, pagination) merge. */
export function applySetting(settings: Settings, name: string, value: unknown): void {
  const defaults = defaultSettings();
  if (value === null) {
    settings[name] = defaults[name];
    return;
  }
  if (SETTINGS[name].kind === "object" && name !== "embedders") {
    const current = settings[name] as Record<string, unknown>;
    const merged: Record<string, unknown> = { ...current };
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
      const base = (defaults[name] as Record<string, unknown>)[k];
      if (v === null) merged[k] = base;
      else if (v && typeof v === "object" && !Array.isArray(v) && base && typeof base === "object" && !Array.isArray(base)) {
        merged[k] = { ...(current[k] as object), ...(v as object) };
      } else merged[k] = v;
    }
    settings[name] = merged;
    return;
  }
  settings[name] = value;
}

/** The attribute patterns a filterableAttributes setting allows (strings, or `attributePatterns` of granular entries). */
export function filterablePatterns(settings: Settings): string[] {
  const out: string[] = [];
  for (const f of settings.filterableAttributes) {
    if (typeof f === "string") out.push(f);
    else out.push(...((f as { attributePatterns: string[] }).attributePatterns ?? []));
  }
  return out;
}

/** Leaf paths of a document with string or number values, in order of appearance (`a.b` for nested objects). */
function searchablePaths(doc: Doc, prefix = "", out: string[] = []): string[] {
  for (const [k, v] of Object.entries(doc)) {
    const path = prefix ? `${prefix}.${k}` : k;
    const visit = (x: unknown) => {
      if (typeof x === "string" || (typeof x === "number" && Number.isFinite(x))) {
        if (!out.includes(path)) out.push(path);
      } else if (Array.isArray(x)) x.forEach(visit);
      else if (x && typeof x === "object") searchablePaths(x as Doc, path, out);
    };
    visit(v);
  }
  return out;
}

/** Every string/number leaf under a path, as text (arrays and nested objects flattened). */
function textAt(doc: Doc, path: string): string[] {
  const out: string[] = [];
  const visit = (x: unknown) => {
    if (typeof x === "string") out.push(x);
    else if (typeof x === "number" && Number.isFinite(x)) out.push(String(x));
    else if (Array.isArray(x)) x.forEach(visit);
    else if (x && typeof x === "object") Object.values(x).forEach(visit);
  };
  lookup(doc, path).values.forEach(visit);
  return out;
}

export interface IndexSnapshot {
  uid: string;
  primaryKey: string | null;
  createdAt: string;
  updatedAt: string;
  settings: Settings;
  documents: Doc[];
}

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

/** One matching document as MiniSearch scored it (our ids are strings: extractField makes them so). */
interface Hit {
  id: string;
  score: number;
  terms: string[];
  queryTerms: string[];
}

interface Candidate {
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
function mergeHits(combineWith: "AND" | "OR", a: Hit[], b: Hit[]): Hit[] {
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

interface FacetCell {
  label: string;
  num: number | null;
  count: number;
  /** The facet count that last touched this cell (its count belongs to that one). */
  epoch: number;
}

const EMPTY_MATCH: MatchInfo = { terms: new Set(), queryTerms: [] };

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

export class SearchIndex {
  primaryKey: string | null;
  createdAt: string;
  updatedAt: string;
  settings: Settings;
  readonly docs = new Map<string, Doc>();
  /** Insertion rank of each key (a replaced document keeps its rank, as the service keeps its internal id). */
  private readonly rank = new Map<string, number>();
  private nextRank = 0;
  private mini: MiniSearch<Doc> | null = null;
  /**
   * The prefix data built at indexing time (the service's `prefixSearch: "indexingTime"`): the same fields with each
   * term's first PREFIX_INDEX_MAX characters as terms, so a short last word ("b", "1", "gr") is one posting list per
   * field instead of the hundreds of terms it is a prefix of. Built and kept in step with `mini`.
   */
  private prefixMini: MiniSearch<Doc> | null = null;
  private miniFields: string[] = [];
  /** Leaf paths seen in documents, first-seen order (the fields of searchableAttributes "*"). */
  private seenPaths: string[] = [];

  constructor(readonly uid: string, primaryKey: string | null = null, now = new Date().toISOString()) {
    this.primaryKey = primaryKey;
    this.createdAt = now;
    this.updatedAt = now;
    this.settings = defaultSettings();
  }

  static fromSnapshot(s: IndexSnapshot): SearchIndex {
    const index = new SearchIndex(s.uid, s.primaryKey, s.createdAt);
    index.updatedAt = s.updatedAt;
    index.settings = { ...defaultSettings(), ...s.settings };
    for (const doc of s.documents) index.put(index.keyOf(doc), doc);
    index.refresh();
    return index;
  }

  snapshot(): IndexSnapshot {
    return {
      uid: this.uid,
      primaryKey: this.primaryKey,
      createdAt: this.createdAt,
      updatedAt: this.updatedAt,
      settings: this.settings,
      documents: [...this.docs.values()],
    };
  }

  info() {
    return { uid: this.uid, primaryKey: this.primaryKey, createdAt: this.createdAt, updatedAt: this.updatedAt };
  }

  keyOf(doc: Doc): string {
    return String(doc[this.primaryKey ?? ""]);
  }

  // ---- writes (called by the task processor; each either throws before changing anything or completes) ----

  /** Add (replace) or update (merge) documents whose ids were validated already. */
  upsert(docs: Doc[], merge: boolean): void {
    for (const doc of docs) {
      const key = this.keyOf(doc);
      const old = this.docs.get(key);
      this.put(key, merge && old ? { ...old, ...doc } : doc);
    }
  }

  private put(key: string, doc: Doc) {
    if (!this.rank.has(key)) this.rank.set(key, this.nextRank++);
    const existed = this.docs.has(key);
    this.docs.set(key, doc);
    this.forgetCells(this.rank.get(key)!);
    const before = this.seenPaths.length;
    searchablePaths(doc, "", this.seenPaths);
    if (this.mini && this.settings.searchableAttributes.includes("*") && this.seenPaths.length !== before) this.dropIndex();
    if (this.mini && this.prefixMini) {
      if (existed) {
        this.mini.discard(key);
        this.prefixMini.discard(key);
      }
      this.mini.add(doc);
      this.prefixMini.add(doc);
    }
  }

  delete(keys: string[]): number {
    let n = 0;
    for (const key of keys) {
      if (!this.docs.delete(key)) continue;
      this.forgetCells(this.rank.get(key)!);
      this.rank.delete(key);
      n += 1;
      if (this.mini) this.mini.discard(key);
      if (this.prefixMini) this.prefixMini.discard(key);
    }
    return n;
  }

  clear(): number {
    const n = this.docs.size;
    this.docs.clear();
    this.rank.clear();
    this.seenPaths = [];
    this.dropIndex();
    this.facetCells.clear();
    this.facetColumns.clear();
    return n;
  }

  /** Settings changed: the MiniSearch index is rebuilt on the next refresh(). */
  settingsChanged(): void {
    this.dropIndex();
  }

  private dropIndex(): void {
    this.mini = null;
    this.prefixMini = null;
  }

  touch(now = new Date().toISOString()) {
    this.updatedAt = now;
  }

  /** Build the MiniSearch index if it is missing (after settings changes or new fields); cheap when it exists. */
  refresh(): void {
    if (this.mini) return;
    const searchable = this.settings.searchableAttributes;
    const fields = searchable.includes("*") ? [...this.seenPaths] : [...searchable];
    const pk = this.primaryKey ?? "";
    const ID = "\u0000id";
    const options = (tokenize: (text: string) => string[]) => ({
      idField: ID,
      fields: fields.length ? fields : ["\u0000none"],
      storeFields: [],
      extractField: (doc: Doc, field: string) => {
        if (field === ID) {
          const id = doc[pk];
          return typeof id === "number" ? String(id) : id;
        }
        const text = textAt(doc, field);
        return text.length ? text.join("\n") : undefined;
      },
      tokenize,
      processTerm: (term: string) => term,
      searchOptions: { tokenize: (text: string) => [text], processTerm: (term: string) => term },
    });
    const all = [...this.docs.values()];
    const mini = new MiniSearch<Doc>(options(tokenizeForIndex));
    mini.addAll(all);
    const prefixMini = new MiniSearch<Doc>(options((text) => prefixIndexTerms(tokenizeForIndex(text), PREFIX_INDEX_MAX)));
    prefixMini.addAll(all);
    this.mini = mini;
    this.prefixMini = prefixMini;
    this.miniFields = fields;
  }

  // ---- reads ----

  /** The document as the service shows it: displayedAttributes, then the requested fields. */
  project(doc: Doc, fields?: string[] | null): Doc {
    const displayed = this.settings.displayedAttributes;
    const all = displayed.includes("*");
    const wanted = !fields || fields.includes("*") ? null : fields;
    const out: Doc = {};
    if (!wanted) {
      for (const [k, v] of Object.entries(doc)) if (all || attributeAllowed(k, displayed)) out[k] = v;
      return out;
    }
    for (const f of wanted) {
      if (!all && !attributeAllowed(f, displayed)) continue;
      if (Object.hasOwn(doc, f)) {
        out[f] = doc[f];
        continue;
      }
      // nested: "a.b" keeps { a: { b } }
      const parts = f.split(".");
      let src: unknown = doc;
      for (const p of parts) src = src && typeof src === "object" && !Array.isArray(src) ? (src as Doc)[p] : undefined;
      if (src === undefined) continue;
      let dst = out;
      parts.forEach((p, i) => {
        if (i === parts.length - 1) dst[p] = src;
        else dst = (dst[p] ??= {}) as Doc;
      });
    }
    return out;
  }

  search(req: SearchRequest) {
    const started = performance.now();
    const settings = this.settings;
    const filterable = filterablePatterns(settings);
    const filter = compileFilter(req.filter, filterable, this.primaryKey, "invalid_search_filter");

    const sort = (req.sort ?? []).map((s) => {
      const m = /^(.+):(asc|desc)$/.exec(s.trim());
      if (!m) {
        throw new ApiError(400, "invalid_search_sort", `Invalid syntax for the sort parameter: expected expression ending by \`:asc\` or \`:desc\`, found \`${s}\`.`);
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
          throw new ApiError(400, "invalid_search_attributes_to_search_on", `Attribute \`${a}\` is not searchable. Available searchable attributes are: \`${searchable.join(", ")}\`.`);
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
    const hits = slice.map((c) => this.formatHit(c, req, topScore));

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
      const { distribution, stats } = this.facetDistribution(candidates, facets);
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
    const fields = (req.attributesToSearchOn ?? this.miniFields).filter((f) => this.miniFields.includes(f) || this.miniFields.some((m) => m.startsWith(`${f}.`)));
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
      synonyms.set(normalize(k), list.map((s) => parseQuery(s).words.map((w) => w.term)));
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
      const found = shortLast && i === last
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
      const lastQuery: Query = { combineWith: "OR", queries: [w.term, whole(w.term), ...(byParts[last] ? [{ combineWith: "AND" as const, queries: w.parts.map(whole) }] : [])] };
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

  private formatHit(c: Candidate, req: SearchRequest, topScore: number): Doc {
    const shown = this.project(c.doc, req.attributesToRetrieve);
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
        const cropLen = cropFor.get(path) ?? (cropFor.has("*") ? cropFor.get("*") : [...cropFor.keys()].some((k) => path.startsWith(`${k}.`)) ? cropLength : undefined);
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
  private forgetCells(rank: number): void {
    for (const column of this.facetColumns.values()) column[rank] = undefined;
  }

  private facetDistribution(candidates: Candidate[], facets: string[]) {
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
      const by = this.settings.faceting.sortFacetValuesBy[facet] ?? this.settings.faceting.sortFacetValuesBy["*"] ?? "alpha";
      const entries = touched.sort((a, b) => {
        if (by === "count" && a.count !== b.count) return b.count - a.count;
        if (a.num !== null && b.num !== null) return a.num - b.num;
        if (a.num !== null) return -1;
        if (b.num !== null) return 1;
        return a.label.toLowerCase() < b.label.toLowerCase() ? -1 : a.label.toLowerCase() > b.label.toLowerCase() ? 1 : 0;
      });
      const out: Record<string, number> = {};
      for (const e of entries.slice(0, this.settings.faceting.maxValuesPerFacet)) out[e.label] = e.count;
      distribution[facet] = out;
      if (min !== Infinity) stats[facet] = { min, max };
    }
    return { distribution, stats };
  }
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
