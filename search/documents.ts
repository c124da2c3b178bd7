/**
 * The documents of one index (in insertion order, as the service's internal ids keep them) and the MiniSearch indexes
 * over its searchable attributes, kept in step with every write. SearchIndex (engine.ts) adds the search itself.
 * No I/O here.
 */
import MiniSearch from "minisearch";
import { FacetCounts } from "./facets.ts";
import { attributeAllowed, lookup } from "./filter.ts";
import { defaultSettings, type Settings } from "./index-settings.ts";
import { prefixIndexTerms, tokenizeForIndex } from "./text.ts";

/** Last words up to this many characters are matched through the prefix index (SearchIndex.prefixMini). */
export const PREFIX_INDEX_MAX = 2;

export type Doc = Record<string, unknown>;

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
export function textAt(doc: Doc, path: string): string[] {
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

export class IndexedDocuments {
  primaryKey: string | null;
  createdAt: string;
  updatedAt: string;
  settings: Settings;
  readonly docs = new Map<string, Doc>();
  /** Insertion rank of each key (a replaced document keeps its rank, as the service keeps its internal id). */
  protected readonly rank = new Map<string, number>();
  private nextRank = 0;
  protected mini: MiniSearch<Doc> | null = null;
  /**
   * The prefix data built at indexing time (the service's `prefixSearch: "indexingTime"`): the same fields with each
   * term's first PREFIX_INDEX_MAX characters as terms, so a short last word ("b", "1", "gr") is one posting list per
   * field instead of the hundreds of terms it is a prefix of. Built and kept in step with `mini`.
   */
  protected prefixMini: MiniSearch<Doc> | null = null;
  protected miniFields: string[] = [];
  /** Leaf paths seen in documents, first-seen order (the fields of searchableAttributes "*"). */
  private seenPaths: string[] = [];
  /** Facet cells per facet and per document (facets.ts). */
  protected readonly facets = new FacetCounts();

  constructor(
    readonly uid: string,
    primaryKey: string | null = null,
    now = new Date().toISOString(),
  ) {
    this.primaryKey = primaryKey;
    this.createdAt = now;
    this.updatedAt = now;
    this.settings = defaultSettings();
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

  protected put(key: string, doc: Doc) {
    if (!this.rank.has(key)) this.rank.set(key, this.nextRank++);
    const existed = this.docs.has(key);
    this.docs.set(key, doc);
    this.facets.forgetCells(this.rank.get(key)!);
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
      this.facets.forgetCells(this.rank.get(key)!);
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
    this.facets.clear();
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
}
