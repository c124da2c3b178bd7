/**
 * The pure parts of the search page and the header's type-ahead box (app/domain/search-ui.ts): the debounce against
 * QUALITY P3's type-ahead clause (10 characters at 50 ms intervals issue at most 3 search calls), the listbox's keys
 * (WAI-ARIA APG combobox pattern: ArrowDown/ArrowUp move the highlight, Enter opens it or submits), the grouping of
 * hits and the filter links' query strings. The component's timings are the ones tested here (TYPE_AHEAD_WAIT).
 */
import { describe, expect, it } from "vitest";
import { activeFilters, countOf, debounce, enterAction, facetEntries, groupHits, latestOnly, moveActive, searchHref, type Timers } from "~/domain/search-ui";
import { TYPE_AHEAD_WAIT } from "~/components/search-box";

/** A clock the test moves by hand. */
function fakeTimers() {
  let now = 0;
  let seq = 0;
  const due = new Map<number, { at: number; fn: () => void }>();
  const timers: Timers = {
    now: () => now,
    set: (fn, ms) => {
      const id = ++seq;
      due.set(id, { at: now + ms, fn });
      return id;
    },
    clear: (h) => {
      due.delete(h as number);
    },
  };
  const advance = (ms: number) => {
    const until = now + ms;
    for (;;) {
      const next = [...due.entries()].sort((a, b) => a[1].at - b[1].at)[0];
      if (!next || next[1].at > until) break;
      due.delete(next[0]);
      now = next[1].at;
      next[1].fn();
    }
    now = until;
  };
  return { timers, advance, now: () => now };
}

/** Type `word` one character every `interval` ms into a debounced loader; the calls it made and when. */
function typeInto(word: string, interval: number, opts = TYPE_AHEAD_WAIT) {
  const clock = fakeTimers();
  const calls: { at: number; q: string }[] = [];
  const d = debounce<string>((q) => calls.push({ at: clock.now(), q }), opts, clock.timers);
  for (let i = 1; i <= word.length; i++) {
    d.call(word.slice(0, i));
    if (i < word.length) clock.advance(interval);
  }
  const lastKeyAt = clock.now();
  clock.advance(2000);
  return { calls, lastKeyAt };
}

describe("type-ahead debounce (QUALITY P3: ≤ 3 calls for 10 characters at 50 ms)", () => {
  it("10 characters at 50 ms intervals: one call, with the whole word, 150 ms after the last key", () => {
    const { calls, lastKeyAt } = typeInto("kill switc", 50);
    expect(calls.length).toBeLessThanOrEqual(3);
    expect(calls).toEqual([{ at: lastKeyAt + 150, q: "kill switc" }]);
  });

  it("slower typing (120 ms a key) still shows answers while typing, and never more than one call per maxWait", () => {
    const { calls } = typeInto("pickup coil", 120);
    expect(calls.length).toBeGreaterThanOrEqual(2);
    expect(calls.at(-1)!.q).toBe("pickup coil");
    for (let i = 1; i < calls.length; i++) expect(calls[i].at - calls[i - 1].at).toBeGreaterThanOrEqual(TYPE_AHEAD_WAIT.wait);
    // 11 keys over 1200 ms: at most one call per 600 ms of typing plus the final one.
    expect(calls.length).toBeLessThanOrEqual(3);
  });

  it("a pause longer than the wait sends what was typed so far; cancel forgets the pending value", () => {
    const clock = fakeTimers();
    const calls: string[] = [];
    const d = debounce<string>((q) => calls.push(q), { wait: 150, maxWait: 600 }, clock.timers);
    d.call("p");
    clock.advance(200);
    d.call("pi");
    expect(d.pending()).toBe(true);
    d.cancel();
    expect(d.pending()).toBe(false);
    clock.advance(1000);
    expect(calls).toEqual(["p"]);
  });

  it("without maxWait it is a plain trailing debounce", () => {
    const { calls } = typeInto("abcdefghij", 100, { wait: 150 } as typeof TYPE_AHEAD_WAIT);
    expect(calls.map((c) => c.q)).toEqual(["abcdefghij"]);
  });
});

describe("only the latest answer is shown", () => {
  it("answers arriving out of order: only the newest ticket's counts; drop() makes every ticket stale", async () => {
    const seq = latestOnly();
    const shown: string[] = [];
    const answer = (q: string, ms: number) => {
      const t = seq.begin();
      return new Promise<void>((r) =>
        setTimeout(() => {
          if (seq.isLatest(t)) shown.push(q);
          r();
        }, ms),
      );
    };
    await Promise.all([answer("pi", 40), answer("pick", 5), answer("pickup", 15)]);
    expect(shown).toEqual(["pickup"]);
    const t = seq.begin();
    seq.drop();
    expect(seq.isLatest(t)).toBe(false);
  });
});

describe("listbox keys", () => {
  it("ArrowDown walks the options and past the last returns to the box; ArrowUp goes the other way", () => {
    const seq: number[] = [];
    let a = -1;
    for (let i = 0; i < 5; i++) seq.push((a = moveActive(a, 3, "ArrowDown")));
    expect(seq).toEqual([0, 1, 2, -1, 0]);
    a = -1;
    const up: number[] = [];
    for (let i = 0; i < 4; i++) up.push((a = moveActive(a, 3, "ArrowUp")));
    expect(up).toEqual([2, 1, 0, -1]);
    expect(moveActive(1, 3, "Home")).toBe(0);
    expect(moveActive(0, 3, "End")).toBe(2);
    expect(moveActive(1, 3, "a")).toBe(1);
    expect(moveActive(2, 0, "ArrowDown")).toBe(-1);
  });

  it("Enter opens the highlighted option, or submits the form when none is", () => {
    expect(enterAction(1, 3)).toEqual({ kind: "open", index: 1 });
    expect(enterAction(-1, 3)).toEqual({ kind: "submit" });
    expect(enterAction(3, 3)).toEqual({ kind: "submit" });
  });
});

describe("grouping and filter links", () => {
  it("groups hits as families, connector cards, pins (that order), keeping the ranking inside a group", () => {
    const hits = [
      { type: "pin", id: 1 },
      { type: "connector", id: 2 },
      { type: "pin", id: 3 },
      { type: "family", id: 4 },
    ];
    expect(groupHits(hits).map((g) => [g.label, g.hits.map((h) => h.id)])).toEqual([
      ["Families", [4]],
      ["Connector cards", [2]],
      ["Pins", [1, 3]],
    ]);
    expect(groupHits([{ type: "pin" }]).map((g) => g.type)).toEqual(["pin"]);
    expect(countOf("pin", 1)).toBe("1 pin");
    expect(countOf("connector", 12)).toBe("12 connector cards");
    expect(countOf("family", 2)).toBe("2 families");
  });

  it("adding or removing a filter keeps the words and the other filters, and starts again at the first page", () => {
    const state = { q: "W/R", make: "asagiri", limit: 20, offset: 40 };
    expect(searchHref(state, { system: "lighting" })).toBe("/search?q=W%2FR&make=asagiri&system=lighting");
    expect(searchHref(state, { make: null })).toBe("/search?q=W%2FR");
    expect(searchHref(state, { offset: 60 })).toBe("/search?q=W%2FR&make=asagiri&offset=60");
    expect(searchHref({ q: "pickup", limit: 50, offset: 0 }, { offset: 0 })).toBe("/search?q=pickup&limit=50");
    expect(searchHref({})).toBe("/search");
    expect(searchHref({ q: "31d", pins: 8 }, { type: "pin" })).toBe("/search?q=31d&type=pin&pins=8");
  });

  it("lists the active filters in one order, and facet values by count (cavities by number)", () => {
    expect(activeFilters({ q: "x", pins: 4, make: "asagiri", family: "" })).toEqual([
      { key: "make", value: "asagiri" },
      { key: "pins", value: "4" },
    ]);
    expect(facetEntries({ b: 2, a: 2, c: 5, z: 0 })).toEqual([
      ["c", 5],
      ["a", 2],
      ["b", 2],
    ]);
    expect(facetEntries({ "10": 1, "2": 9, "4": 3 }, true)).toEqual([
      ["2", 9],
      ["4", 3],
      ["10", 1],
    ]);
  });
});
