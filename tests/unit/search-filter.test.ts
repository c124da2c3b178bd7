/**
 * The search stand-in's filter expressions (search/filter.ts) against the hosted service's documented filter syntax:
 * ../shared/STACK.md §4 (`filter`: string, or array — outer AND, inner OR) and the service's public filter expression
 * reference (operators =, !=, >, >=, <, <=, TO, EXISTS, IN, NOT, AND, OR, IS NULL, IS EMPTY; AND binds tighter than
 * OR; `=`/`!=` case-insensitive on strings; `!=` and NOT select what the positive form does not, documents without the
 * attribute included; an array attribute matches when one element does). Documents are invented.
 */
import { describe, expect, it } from "vitest";
import { attributeAllowed, facetValues, filterAttributes, FilterSyntaxError, matchesFilter, parseFilter, parseFilterExpression } from "../../search/filter.ts";

type Doc = Record<string, unknown>;

const CARDS: Doc[] = [
  { id: 1, family: "RX750 Four", make: "asagiri", cavities: 2, year: 1979, codes: ["W/R", "B/Y"], circuit: "pickup coil", note: null, tags: [] },
  { id: 2, family: "B 800 Boxer", make: "brennwald", cavities: 4, year: 1976, codes: ["ws/rt", "BLGN"], circuit: "kill switch", note: "", tags: ["din"] },
  {
    id: 3,
    family: "Sovereign 650",
    make: "Ashcombe",
    cavities: 6,
    year: 1968,
    codes: ["W", "R"],
    circuit: "starting",
    note: "from a loom",
    tags: ["bs", "lucar"],
  },
  { id: 4, family: "RX400 Four", make: "asagiri", cavities: 9, year: 1982, codes: ["Y/G"], circuit: "charging", rating: { bench: 4, road: 5 } },
  { id: 5, family: "Marquis 500", make: "ashcombe", year: "1971", circuit: "lighting", parts: [{ term: "31b" }, { term: "87a" }] },
];

/** The ids a filter selects from CARDS. */
function select(filter: unknown, docs: Doc[] = CARDS): unknown[] {
  const node = parseFilter(filter);
  return docs.filter((d) => matchesFilter(node, d)).map((d) => d.id);
}

describe("conditions (attribute OPERATOR value)", () => {
  it("= selects a value; on strings it is case-insensitive", () => {
    expect(select("make = asagiri")).toEqual([1, 4]);
    expect(select("make = ASHCOMBE")).toEqual([3, 5]);
  });

  it("values with white space are quoted with single or double quotes; quotes can be escaped", () => {
    expect(select("family = 'RX750 Four'")).toEqual([1]);
    expect(select('family = "Sovereign 650"')).toEqual([3]);
    const docs = [{ id: "q", label: 'it\'s "wired"' }];
    expect(select("label = 'it\\'s \"wired\"'", docs)).toEqual(["q"]);
    expect(select('label = "it\'s \\"wired\\""', docs)).toEqual(["q"]);
  });

  it("a bare value may hold slashes and hyphens (colour codes, terminals)", () => {
    expect(select("codes = W/R")).toEqual([1]);
    expect(select("codes = ws/rt")).toEqual([2]);
    expect(parseFilterExpression("code = kill-switch")).toEqual({ type: "compare", attribute: "code", op: "=", value: "kill-switch" });
  });

  it("a number matches the number and its text form", () => {
    expect(select("year = 1979")).toEqual([1]);
    expect(select("year = '1971'")).toEqual([5]);
    expect(select("year = 1971")).toEqual([5]);
    expect(select("cavities = 4.0")).toEqual([2]);
  });

  it("!= selects every document = does not select, including those without the attribute", () => {
    expect(select("make != asagiri")).toEqual([2, 3, 5]);
    expect(select("cavities != 4")).toEqual([1, 3, 4, 5]); // 5 has no cavities
  });

  it(">, >=, <, <= compare numbers", () => {
    expect(select("cavities > 4")).toEqual([3, 4]);
    expect(select("cavities >= 4")).toEqual([2, 3, 4]);
    expect(select("cavities < 4")).toEqual([1]);
    expect(select("cavities <= 4")).toEqual([1, 2]);
    expect(select("year > 1980")).toEqual([4]); // the string "1971" is not a number
  });

  it("TO is >= AND <= (both bounds included)", () => {
    expect(select("cavities 2 TO 6")).toEqual([1, 2, 3]);
    expect(select("year 1976 TO 1979")).toEqual([1, 2]);
    expect(parseFilterExpression("year 1970 TO 1980")).toEqual({ type: "range", attribute: "year", from: "1970", to: "1980" });
  });

  it("IN [a, b] selects documents holding any of the values; NOT IN the others", () => {
    expect(select("make IN [brennwald, ashcombe]")).toEqual([2, 3, 5]);
    expect(select("make IN ['Brennwald', \"asagiri\",]")).toEqual([1, 2, 4]); // a trailing comma is allowed
    expect(select("make NOT IN [asagiri]")).toEqual([2, 3, 5]);
    expect(select("codes IN [BLGN, Y/G]")).toEqual([2, 4]);
  });

  it("EXISTS: the attribute is present (null and empty values count); NOT EXISTS the opposite", () => {
    expect(select("note EXISTS")).toEqual([1, 2, 3]);
    expect(select("note NOT EXISTS")).toEqual([4, 5]);
    expect(select("NOT note EXISTS")).toEqual([4, 5]);
  });

  it("IS NULL / IS NOT NULL test for a null value", () => {
    expect(select("note IS NULL")).toEqual([1]);
    expect(select("note IS NOT NULL")).toEqual([2, 3, 4, 5]);
  });

  it('IS EMPTY / IS NOT EMPTY test for "", [] or {}', () => {
    expect(select("note IS EMPTY")).toEqual([2]);
    expect(select("tags IS EMPTY")).toEqual([1]);
    expect(select("tags IS NOT EMPTY")).toEqual([2, 3, 4, 5]);
    expect(select("x IS EMPTY", [{ id: "o", x: {} }])).toEqual(["o"]);
  });

  it("= never matches null or an empty array", () => {
    expect(select("note = null")).toEqual([]);
    expect(select("tags = ''")).toEqual([]);
  });
});

describe("arrays and nested attributes", () => {
  // The reference's example: sizes held as arrays match when any element matches.
  const SIZES: Doc[] = [
    { id: 0, size: [0, "small"], colour: "blue" },
    { id: 1, size: 1 },
    { id: 2, size: [2, 20] },
  ];

  it("an array attribute matches when any element matches", () => {
    expect(select("size = 0 OR size = 1", SIZES)).toEqual([0, 1]);
    expect(select("size = small", SIZES)).toEqual([0]);
    expect(select("size > 5 AND size < 5", SIZES)).toEqual([2]); // 20 > 5 and 2 < 5
  });

  it("AND binds tighter than OR", () => {
    expect(select("size = 0 AND size = 2 OR colour = blue", SIZES)).toEqual([0]);
    expect(select("colour = blue OR size = 1 AND size = 2", SIZES)).toEqual([0]);
  });

  it("dot notation reaches nested objects and arrays of objects", () => {
    expect(select("rating.road >= 5")).toEqual([4]);
    expect(select("parts.term = 31b")).toEqual([5]);
    expect(select("parts.term IN [87A]")).toEqual([5]);
    expect(select("rating.bench EXISTS")).toEqual([4]);
    expect(select("'flat.key' = yes", [{ id: "f", "flat.key": "yes" }])).toEqual(["f"]);
  });

  it("booleans compare as true/false", () => {
    const docs = [
      { id: "a", sealed: true },
      { id: "b", sealed: false },
    ];
    expect(select("sealed = true", docs)).toEqual(["a"]);
    expect(select("sealed = false", docs)).toEqual(["b"]);
  });

  it("facetValues lists the string, number and boolean values (arrays flattened)", () => {
    expect(facetValues(CARDS[0], "codes")).toEqual(["W/R", "B/Y"]);
    expect(facetValues(CARDS[4], "parts.term")).toEqual(["31b", "87a"]);
    expect(facetValues(CARDS[0], "note")).toEqual([]);
  });
});

describe("combining conditions", () => {
  it("NOT negates a condition or a group, and can be repeated", () => {
    expect(select("NOT make = asagiri")).toEqual([2, 3, 5]);
    expect(select("NOT (make = asagiri OR make = brennwald)")).toEqual([3, 5]);
    expect(select("NOT NOT make = asagiri")).toEqual([1, 4]);
  });

  it("parentheses group", () => {
    expect(select("(make = asagiri OR make = brennwald) AND cavities >= 4")).toEqual([2, 4]);
    expect(select("make = asagiri OR (make = brennwald AND cavities >= 4)")).toEqual([1, 2, 4]);
    expect(select("((cavities = 2))")).toEqual([1]);
  });

  it("the array form: outer items are ANDed, an inner array is ORed", () => {
    expect(select([["make = brennwald", "make = ashcombe"], "year < 1975"])).toEqual([3]);
    expect(select(["make = asagiri", "cavities > 2"])).toEqual([4]);
    expect(select([["codes = W/R"], ["circuit = starting", "circuit = charging"]])).toEqual([]);
    expect(select([["codes = W/R", "circuit = starting"]])).toEqual([1, 3]);
  });

  it("no filter, an empty string or an empty array select everything", () => {
    expect(select(undefined)).toHaveLength(5);
    expect(select(null)).toHaveLength(5);
    expect(select("")).toHaveLength(5);
    expect(select("   ")).toHaveLength(5);
    expect(select([])).toHaveLength(5);
  });

  it("filterAttributes lists every attribute a filter names", () => {
    expect(filterAttributes(parseFilter(["make = x", ["cavities > 2", "NOT note EXISTS"]])).sort()).toEqual(["cavities", "make", "note"]);
  });
});

describe("syntax errors", () => {
  const BAD = [
    "year >",
    "year",
    "year 1970 TO",
    "(make = asagiri",
    "make = 'asagiri",
    "make IN [a, b",
    "make IN a",
    "AND make = x",
    "make = x AND",
    "make = x make = y",
    "make == x",
    "make ! x",
    "note IS",
    "note IS NOTHING",
    "make = AND",
  ];
  it.each(BAD)("%j is refused with a message pointing at the problem", (input) => {
    let error: unknown;
    try {
      parseFilterExpression(input);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(FilterSyntaxError);
    expect((error as FilterSyntaxError).message).toMatch(/\n\d+:\d+ /);
  });

  it("the array form accepts only strings and arrays of strings", () => {
    expect(() => parseFilter([1])).toThrow(FilterSyntaxError);
    expect(() => parseFilter([["a = 1", ["b = 2"]]])).toThrow(FilterSyntaxError);
    expect(() => parseFilter({ make: "x" })).toThrow(FilterSyntaxError);
    expect(() => parseFilter(["a = 1", "b >"])).toThrow(FilterSyntaxError);
  });

  it("keywords are upper case, as the service spells them", () => {
    expect(() => parseFilterExpression("make = x and cavities = 2")).toThrow(FilterSyntaxError);
  });
});

describe("which attributes may be filtered", () => {
  it("an attribute is allowed when listed, when a parent object is listed, or when a * pattern matches", () => {
    expect(attributeAllowed("make", ["make", "year"])).toBe(true);
    expect(attributeAllowed("rating.road", ["rating"])).toBe(true);
    expect(attributeAllowed("ratings", ["rating"])).toBe(false);
    expect(attributeAllowed("parts.term", ["parts.*"])).toBe(true);
    expect(attributeAllowed("anything", ["*"])).toBe(true);
    expect(attributeAllowed("make", [])).toBe(false);
  });
});
