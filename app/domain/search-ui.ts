/**
 * What the search page and the header's type-ahead box share, kept pure so it is unit-tested without a browser: hits
 * grouped by type (families, connector cards, pins, always in that order), the filter links' query strings, the
 * listbox's keyboard movement, and the debounce that keeps the type-ahead to a few calls however fast one types
 * (QUALITY P3: 10 characters at 50 ms intervals issue at most 3 search calls).
 */

export type HitType = "family" | "connector" | "pin";

/** The groups a result list is shown in, in this order. */
export const HIT_GROUPS: readonly { type: HitType; label: string; one: string; many: string }[] = [
  { type: "family", label: "Families", one: "family", many: "families" },
  { type: "connector", label: "Connector cards", one: "connector card", many: "connector cards" },
  { type: "pin", label: "Pins", one: "pin", many: "pins" },
];

/** Hits in their groups (empty groups left out); within a group the service's ranking is kept. */
export function groupHits<H extends { type: string }>(hits: readonly H[]): { type: HitType; label: string; hits: H[] }[] {
  return HIT_GROUPS.map((g) => ({ type: g.type, label: g.label, hits: hits.filter((h) => h.type === g.type) })).filter((g) => g.hits.length > 0);
}

/** "1 pin", "40 pins". */
export function countOf(type: HitType, n: number): string {
  const g = HIT_GROUPS.find((x) => x.type === type)!;
  return `${n} ${n === 1 ? g.one : g.many}`;
}

// --- filter links ---------------------------------------------------------------------------------------------------

/** The query-string keys of the search page: the words, the filters (all links) and the page. */
export const FILTER_KEYS = ["type", "make", "family", "system", "pins"] as const;
export type FilterKey = (typeof FILTER_KEYS)[number];
const ORDER = ["q", ...FILTER_KEYS, "limit", "offset"] as const;
type Key = (typeof ORDER)[number];

export type SearchState = Partial<Record<Key, string | number | undefined | null>>;

/**
 * `/search?…` for the current state with some keys changed (null removes one). Changing the words or a filter starts
 * again at the first page, unless the change sets `offset` itself. Empty values, offset 0 and the default limit (20)
 * are left out, so every link has one spelling.
 */
export function searchHref(current: SearchState, change: SearchState = {}, path = "/search"): string {
  const next: SearchState = { ...current, ...change };
  if (!("offset" in change)) next.offset = undefined;
  const qs = new URLSearchParams();
  for (const k of ORDER) {
    const v = next[k];
    if (v === undefined || v === null || v === "") continue;
    if (k === "offset" && Number(v) === 0) continue;
    if (k === "limit" && Number(v) === 20) continue;
    qs.set(k, String(v));
  }
  const s = qs.toString();
  return s ? `${path}?${s}` : path;
}

/** The filters set in a state, in FILTER_KEYS order. */
export function activeFilters(state: SearchState): { key: FilterKey; value: string }[] {
  return FILTER_KEYS.flatMap((key) => (state[key] === undefined || state[key] === null || state[key] === "" ? [] : [{ key, value: String(state[key]) }]));
}

/** Facet values most frequent first (ties by label); cavity counts in number order. */
export function facetEntries(counts: Record<string, number>, numeric = false): [string, number][] {
  const list = Object.entries(counts).filter(([, n]) => n > 0);
  return numeric ? list.sort((a, b) => Number(a[0]) - Number(b[0])) : list.sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]));
}

// --- the listbox ----------------------------------------------------------------------------------------------------

/**
 * The highlighted option after a key (-1: none, the caret stays in the box). ArrowDown from none goes to the first
 * option and past the last back to none; ArrowUp the other way round; Home and End jump. Other keys: unchanged.
 */
export function moveActive(active: number, count: number, key: string): number {
  if (count <= 0) return -1;
  switch (key) {
    case "ArrowDown":
      return active >= count - 1 ? -1 : active + 1;
    case "ArrowUp":
      return active < 0 ? count - 1 : active - 1;
    case "Home":
      return 0;
    case "End":
      return count - 1;
    default:
      return active;
  }
}

/** What Enter does in the box: open the highlighted option, or submit the form (the full results page). */
export function enterAction(active: number, count: number): { kind: "open"; index: number } | { kind: "submit" } {
  return active >= 0 && active < count ? { kind: "open", index: active } : { kind: "submit" };
}

// --- the debounce ---------------------------------------------------------------------------------------------------

export interface Timers {
  now(): number;
  set(fn: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

const realTimers: Timers = {
  now: () => Date.now(),
  set: (fn, ms) => setTimeout(fn, ms),
  clear: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
};

export interface Debounced<T> {
  /** A new value: runs `fn` with the latest value once `wait` ms pass without another, or `maxWait` after the first. */
  call(value: T): void;
  /** Forget what is pending. */
  cancel(): void;
  /** Whether a call is pending. */
  pending(): boolean;
}

/**
 * Trailing debounce with a ceiling: quiet for `wait` ms runs the latest value; a burst longer than `maxWait` runs it
 * once at `maxWait` too, so a long word still shows answers while it is typed. 10 characters at 50 ms intervals with
 * wait 150 and maxWait 600 make one call, 150 ms after the last key.
 */
export function debounce<T>(fn: (value: T) => void, opts: { wait: number; maxWait?: number }, timers: Timers = realTimers): Debounced<T> {
  let handle: unknown = null;
  let firstAt: number | null = null;
  let latest: T;
  const fire = () => {
    handle = null;
    firstAt = null;
    fn(latest);
  };
  return {
    call(value) {
      latest = value;
      const now = timers.now();
      firstAt ??= now;
      if (handle !== null) timers.clear(handle);
      const ceiling = opts.maxWait === undefined ? Infinity : opts.maxWait - (now - firstAt);
      handle = timers.set(fire, Math.max(0, Math.min(opts.wait, ceiling)));
    },
    cancel() {
      if (handle !== null) timers.clear(handle);
      handle = null;
      firstAt = null;
    },
    pending: () => handle !== null,
  };
}

// --- the answer of GET /api/v1/search, as the browser sees it -------------------------------------------------------

export interface SearchAnswerHit {
  type: HitType;
  slug: string;
  cavity: string | null;
  title: string;
  subtitle: string;
  url: string;
  family: string;
  make: string;
}
export interface SearchAnswer {
  hits: SearchAnswerHit[];
  facets: {
    type: Record<string, number>;
    make: Record<string, number>;
    family: Record<string, number>;
    system: Record<string, number>;
    pinCount: Record<string, number>;
  };
  total: number;
  limit: number;
  offset: number;
  source: "index" | "database";
  reduced: boolean;
  tookMs: number;
}

// --- only the latest answer -------------------------------------------------------------------------------------------

/**
 * Sequence numbers for requests that may answer out of order: `begin()` hands out a ticket, and only the newest
 * ticket's answer `isLatest`; `drop()` makes every ticket out so far stale (the box was cleared, the page changed).
 */
export function latestOnly() {
  let newest = 0;
  return {
    begin: (): number => ++newest,
    isLatest: (ticket: number): boolean => ticket === newest,
    drop: (): void => {
      newest++;
    },
  };
}
