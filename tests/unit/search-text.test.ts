// The search stand-in's text handling (search/text.ts): terms, the prefix index's terms, and marking matches.
// The prefix rule checked here is the service's own (meilisearch.com/docs/learn/advanced/prefix): a query of one letter
// finds words beginning with it, and a prefix match marks what was typed.
import { describe, expect, it } from "vitest";
import { EXACT_MARK, highlight, prefixIndexTerms, tokenizeForIndex } from "../../search/text.ts";

describe("prefixIndexTerms", () => {
  it("gives each term's first one and two characters, and a term that short also whole (marked)", () => {
    expect(prefixIndexTerms(["black"], 2)).toEqual(["b", "bl"]);
    expect(prefixIndexTerms(["b"], 2)).toEqual(["b", `b${EXACT_MARK}`]);
    expect(prefixIndexTerms(["31"], 2)).toEqual(["3", "31", `31${EXACT_MARK}`]);
    expect(prefixIndexTerms([], 2)).toEqual([]);
  });

  it("counts characters, not UTF-16 units (a code point outside the BMP is one character)", () => {
    expect(prefixIndexTerms(["𝟙x"], 1)).toEqual(["𝟙"]);
  });

  it("works on the index's own terms: a code and its parts", () => {
    expect(tokenizeForIndex("W/R")).toEqual(["w/r", "w", "r"]);
    expect(prefixIndexTerms(tokenizeForIndex("W/R"), 2)).toEqual(["w", "w/", "w", `w${EXACT_MARK}`, "r", `r${EXACT_MARK}`]);
  });
});

describe("highlight with a short prefix", () => {
  it("marks only the typed characters of each word the prefix begins", () => {
    const match = { terms: new Set<string>(), queryTerms: ["b"], prefixes: ["b"] };
    expect(highlight("Black lead beside the battery", match, "<em>", "</em>")).toBe("<em>B</em>lack lead <em>b</em>eside the <em>b</em>attery");
  });

  it("marks a word typed whole in full", () => {
    const match = { terms: new Set<string>(["b"]), queryTerms: ["b"], prefixes: ["b"] };
    expect(highlight("B and W/B", match, "[", "]")).toBe("[B] and W/[B]");
  });
});
