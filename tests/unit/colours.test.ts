import { describe, expect, it } from "vitest";
import {
  COLOUR_NAMES,
  COLOUR_SYSTEM_IDS,
  colourSystems,
  contrastRatio,
  EN_COLOUR_WORDS,
  HOUSE_STYLES,
  JIS_HOUSE_ORDER,
  decodeColour,
  describeColour,
  encodeColour,
  houseStyles,
  isEnglishColourWords,
  iecCode,
  iecCombination,
  swatch,
  type ColourName,
  type ColourSystemId,
  type DecodeOptions,
  type DecodedColour,
} from "~/domain/colours";
import { EN_CODES } from "~/domain/colours/systems";

// Unwraps a decode that must succeed, with the error in the failure message if it did not.
function ok(input: string, system: ColourSystemId | "auto", options?: DecodeOptions): DecodedColour {
  const r = decodeColour(input, system, options);
  if (!r.ok) throw new Error(`decode(${JSON.stringify(input)}, ${system}) failed: ${r.error.message}`);
  return r.value;
}

function bad(input: string, system: ColourSystemId | "auto", options?: DecodeOptions) {
  const r = decodeColour(input, system, options);
  if (r.ok) throw new Error(`decode(${JSON.stringify(input)}, ${system}) should fail, got ${JSON.stringify(r.value)}`);
  expect(r.error.code).toBe("unknown_colour");
  return r.error;
}

const wire = (d: DecodedColour) => [d.base?.name ?? null, ...d.tracers.map((t) => t.name)];
const readingIn = (d: DecodedColour, system: ColourSystemId) => d.ambiguities.filter((a) => a.system === system).map((a) => a.reading);

describe("IEC 60757 code table", () => {
  // IEC 60757:2021 Table 1 (codes [published] H; order M, from the GOST 28763-90 copy) — REFERENCE-FACTS 1.1.
  const TABLE: [string, ColourName][] = [
    ["BK", "black"],
    ["BN", "brown"],
    ["RD", "red"],
    ["OG", "orange"],
    ["YE", "yellow"],
    ["GN", "green"],
    ["BU", "blue"],
    ["VT", "violet"],
    ["GY", "grey"],
    ["WH", "white"],
    ["PK", "pink"],
    ["GD", "gold"],
    ["TQ", "turquoise"],
    ["SR", "silver"],
    ["GNYE", "green-yellow"],
  ];

  it("lists all 15 codes in the standard's table order", () => {
    // IEC 60757:2021 Table 1 via GOST 28763-90 (identical to IEC 757-83), REFERENCE-FACTS 1.1.
    const iec = colourSystems().find((s) => s.id === "iec")!;
    expect(iec.codes).toEqual(TABLE.map(([code, colour]) => ({ code, colour })));
  });

  it("lines up BK..WH with the IEC 60062 resistor digits 0..9", () => {
    // IEC 60062 resistor colour code cross-check, German Wikipedia "Farb-Kurzzeichen" (REFERENCE-FACTS 1.1).
    const digits = { BK: 0, BN: 1, RD: 2, OG: 3, YE: 4, GN: 5, BU: 6, VT: 7, GY: 8, WH: 9 };
    const iec = colourSystems().find((s) => s.id === "iec")!;
    for (const [code, digit] of Object.entries(digits)) {
      expect(iec.codes.findIndex((c) => c.code === code)).toBe(digit);
    }
    // Table order also drives combination order: brown (1) before red (2) before white (9).
    expect(encodeColour("white", ["red", "brown"], "iec")).toBe("BNRDWH");
  });

  it("gives each colour its code, and decodes each code to its colour", () => {
    // IEC 60757:2021 Table 1 (REFERENCE-FACTS 1.1).
    for (const [code, colour] of TABLE) {
      expect(iecCode(colour)).toBe(code);
      const d = ok(code, "iec");
      expect(d.colours).toEqual([colour]);
      expect(d.iec).toBe(code);
      expect(d.base).toBeNull();
      expect(d.tracers).toEqual([]);
    }
  });

  it("counts light blue as BU and has no code for the trade's other shades", () => {
    // REFERENCE-FACTS 1.1 table row "BU blue (incl. light blue)"; API.md "Colour words" for the nulls.
    expect(iecCode("light blue")).toBe("BU");
    for (const c of ["light green", "dark green", "sky blue", "chocolate", "tan"] as const) expect(iecCode(c)).toBeNull();
    // A combination with a colour IEC has no code for has no IEC designation at all (API.md).
    expect(ok("Lg/R", "jis").iec).toBeNull();
    expect(encodeColour("sky blue", ["white"], "iec")).toBeNull();
  });

  it("writes red and blue as RDBU whichever is the base", () => {
    // IEC 60757:2021 clause 5.1: codes joined in table order; the standard's own example is RDBU.
    expect(encodeColour("red", ["blue"], "iec")).toBe("RDBU");
    expect(encodeColour("blue", ["red"], "iec")).toBe("RDBU");
    expect(ok("R/L", "jis").iec).toBe("RDBU");
    expect(ok("L/R", "jis").iec).toBe("RDBU");
    expect(ok("BURD", "iec").iec).toBe("RDBU");
  });

  it("writes white with a red tracer as RDWH, and never reads IEC as base/tracer", () => {
    // REFERENCE-FACTS 1.4 (the trap: IEC RDWH and Japanese W/R are the same wire); API.md "Colour words".
    expect(ok("W/R", "jis").iec).toBe("RDWH");
    const d = ok("RDWH", "iec");
    expect(d.base).toBeNull();
    expect(d.tracers).toEqual([]);
    expect(d.colours).toEqual(["red", "white"]);
    // Colours keep the order written; the iec field is normalised to table order.
    const reversed = ok("WHRD", "iec");
    expect(reversed.colours).toEqual(["white", "red"]);
    expect(reversed.iec).toBe("RDWH");
    // Lower case is a permitted variant (GOST 28763-90 note to table 7, REFERENCE-FACTS 1.1); separators are liberal.
    expect(ok("rdwh", "iec").iec).toBe("RDWH");
    expect(ok("RD/WH", "iec").iec).toBe("RDWH");
    expect(ok("RD-WH", "iec").iec).toBe("RDWH");
    expect(ok("RD WH", "iec").iec).toBe("RDWH");
  });

  it("reads GNYE only as the protective-earth colour", () => {
    // IEC 60757:2021 clause 5.1: GN and YE may be combined only as GNYE (IEC 60445 protective conductor).
    const earth = ok("GNYE", "iec");
    expect(earth.colours).toEqual(["green-yellow"]);
    expect(earth.base).toBeNull();
    expect(describeColour(earth)).toBe("green-yellow (protective earth)");
    expect(ok("gnye", "iec").iec).toBe("GNYE");
    // GN followed by YE with a separator is the same code as printed on labels (our normalisation).
    expect(ok("GN/YE", "iec").colours).toEqual(["green-yellow"]);
    // Any other way of putting green and yellow together is refused, not reordered (our decision).
    const e = bad("YEGN", "iec");
    expect(e.part).toBe("YEGN");
    expect(e.message).toContain("GNYE");
    expect(bad("YE/GN", "iec").part).toBe("YE/GN");
    expect(bad("GNRDYE", "iec").message).toContain("GNYE");
    // In auto mode the broken rule is still the explanation given where nothing else reads the code.
    expect(bad("BK+BU", "auto").message).toMatch(/one wire/);
    // YEGN is the upper-case pairs house's yellow with a green tracer (REFERENCE-FACTS 5 [from memory]), so auto reads it
    // that way instead of refusing it, and flags it: IEC 60445 keeps green-and-yellow for the protective conductor.
    const caps = ok("YEGN", "auto");
    expect([caps.system, caps.houseStyle, wire(caps)]).toEqual(["jis", "jis-caps", ["yellow", "green"]]);
    expect(caps.warnings.map((w) => w.code)).toEqual(["green_yellow_reserved"]);
  });

  it("combines any green + yellow into GNYE, since IEC has no other way to write them", () => {
    // IEC 60757:2021 clause 5.1; DecodedColour.iec contract in the colours module brief (green+yellow → GNYE).
    expect(iecCombination(["green", "yellow"])).toBe("GNYE");
    expect(iecCombination(["green-yellow", "green"])).toBe("GNYE");
    expect(iecCombination(["red", "green", "yellow"])).toBe("RDGNYE");
    // A Japanese-style G/Y wire is still green with a yellow tracer, not called an earth.
    const gy = ok("G/Y", "jis");
    expect(gy.iec).toBe("GNYE");
    expect(describeColour(gy)).toBe("green with yellow tracer");
  });

  it("refuses '+', which joins separate cores of a cable", () => {
    // IEC 757 / GOST 28763-90 example BK+BK+BN+BU+GNYE (REFERENCE-FACTS 1.1, profsector.com copy).
    const e = bad("BK+BU", "iec");
    expect(e.part).toBe("+");
    expect(e.message).toMatch(/one wire/);
    // A bad core is reported before the "+".
    expect(bad("BK+XQ", "iec").part).toBe("XQ");
    expect(bad("BK+", "iec").part).toBe("+");
  });

  it("refuses codes that are not IEC, such as the DIN BR and BL", () => {
    // REFERENCE-FACTS 1.5: brown is BN in IEC, blue is BU.
    expect(bad("BR", "iec").part).toBe("BR");
    expect(bad("BLGN", "iec").part).toBe("BLGN");
  });
});

describe("German abbreviations (din)", () => {
  it("reads the DIN 47002 table with its IEC 60757 equivalents", () => {
    // DIN 47002 ↔ IEC 60757, German Wikipedia "Farb-Kurzzeichen" (REFERENCE-FACTS 1.2) [published] H.
    const TABLE: [string, ColourName, string][] = [
      ["sw", "black", "BK"],
      ["br", "brown", "BN"],
      ["rt", "red", "RD"],
      ["or", "orange", "OG"],
      ["ge", "yellow", "YE"],
      ["gn", "green", "GN"],
      ["bl", "blue", "BU"],
      ["vi", "violet", "VT"],
      ["gr", "grey", "GY"],
      ["ws", "white", "WH"],
      ["rs", "pink", "PK"],
      ["tk", "turquoise", "TQ"],
      ["gnge", "green-yellow", "GNYE"],
    ];
    for (const [code, colour, iec] of TABLE) {
      const d = ok(code, "din");
      expect(d.colours).toEqual([colour]);
      expect(d.iec).toBe(iec);
      // The later upper-case spelling (SW, WS, RT …) means the same (same Wikipedia page).
      expect(ok(code.toUpperCase(), "din").colours).toEqual([colour]);
    }
  });

  it("reads the older variants ro, hbl, hb, li, vio, org", () => {
    // Older German automotive literature, REFERENCE-FACTS 1.2 [common practice] M.
    expect(ok("ro", "din").colours).toEqual(["red"]);
    expect(ok("hbl", "din").colours).toEqual(["light blue"]);
    expect(ok("hb", "din").colours).toEqual(["light blue"]);
    expect(ok("li", "din").colours).toEqual(["violet"]);
    expect(ok("vio", "din").colours).toEqual(["violet"]);
    expect(ok("org", "din").colours).toEqual(["orange"]);
    expect(wire(ok("hblws", "din"))).toEqual(["light blue", "white"]);
  });

  it("tells BLGN (blue with green stripe) from GNBL (green with blue stripe)", () => {
    // DIN 72551-7:2014 introduction: base colour first, then the identifying colour; BLGN ≠ GNBL.
    const blgn = ok("BLGN", "din");
    const gnbl = ok("GNBL", "din");
    expect(wire(blgn)).toEqual(["blue", "green"]);
    expect(wire(gnbl)).toEqual(["green", "blue"]);
    expect(wire(blgn)).not.toEqual(wire(gnbl));
    // IEC 60757 cannot tell them apart (clause 5.1 table order) — which is why base/tracer live outside `iec`.
    expect(blgn.iec).toBe("GNBU");
    expect(gnbl.iec).toBe("GNBU");
  });

  it("reads the DIN 72551-7 examples RDBN and RDOR as red with brown / orange", () => {
    // DIN 72551-7:2014 introduction (RDBN hard to tell from RDOR), REFERENCE-FACTS 1.2.
    expect(wire(ok("RDBN", "din"))).toEqual(["red", "brown"]);
    expect(wire(ok("RDOR", "din"))).toEqual(["red", "orange"]);
  });

  it("accepts '/', '-', a space or nothing between codes, in any case", () => {
    // REFERENCE-FACTS 1.4 (ws/rt or WSRT) [common practice]; case-insensitivity is our reading rule.
    for (const s of ["sw/rt", "sw-rt", "sw rt", "swrt", "SWRT", "SW/RT", "Sw/Rt"]) {
      expect(wire(ok(s, "din"))).toEqual(["black", "red"]);
    }
    expect(wire(ok("ws/rt", "din"))).toEqual(["white", "red"]);
    // Longest match first, with backtracking: gnge is one code, orge is or + ge.
    expect(wire(ok("gnge", "din"))).toEqual(["green-yellow"]);
    expect(wire(ok("orge", "din"))).toEqual(["orange", "yellow"]);
  });
});

describe("Japanese-style letter codes (jis)", () => {
  it("reads every letter code", () => {
    // REFERENCE-FACTS 1.3 [from memory] M/L (JIS C 3406 / JASO D 611 heritage).
    const TABLE: [string, ColourName][] = [
      ["B", "black"],
      ["Br", "brown"],
      ["Ch", "chocolate"],
      ["Dg", "dark green"],
      ["G", "green"],
      ["Gr", "grey"],
      ["Gy", "grey"],
      ["L", "blue"],
      ["Lb", "light blue"],
      ["Lg", "light green"],
      ["O", "orange"],
      ["P", "pink"],
      ["R", "red"],
      ["Sb", "sky blue"],
      ["V", "violet"],
      ["W", "white"],
      ["Y", "yellow"],
    ];
    for (const [code, colour] of TABLE) expect(ok(code, "jis").colours).toEqual([colour]);
  });

  it("reads the first code as the base and the rest as tracers, with any separator", () => {
    // REFERENCE-FACTS 1.4: W/R is white base, red tracer; separators "/", "-" or none [common practice] H.
    for (const s of ["W/R", "W-R", "WR", "W R"]) {
      const d = ok(s, "jis");
      expect(d.base).toEqual({ name: "white", iec: "WH" });
      expect(d.tracers).toEqual([{ name: "red", iec: "RD" }]);
    }
    // A capital starts each code, lower case continues it (module brief tokenising rule).
    expect(wire(ok("BrW", "jis"))).toEqual(["brown", "white"]);
    expect(wire(ok("LgR", "jis"))).toEqual(["light green", "red"]);
    expect(wire(ok("DgCh", "jis"))).toEqual(["dark green", "chocolate"]);
    expect(wire(ok("Sb/W", "jis"))).toEqual(["sky blue", "white"]);
    expect(wire(ok("W/R/B", "jis"))).toEqual(["white", "red", "black"]);
    // L is blue so it cannot be mistaken for B or Br (REFERENCE-FACTS 1.3 [from memory]).
    expect(wire(ok("L/B", "jis"))).toEqual(["blue", "black"]);
    // All capitals follow the same rule: BR is black with a red tracer in jis.
    expect(wire(ok("BR", "jis"))).toEqual(["black", "red"]);
  });

  it("accepts lower-case codes when jis is named explicitly", () => {
    // Our leniency for typed input; diagrams always capitalise (REFERENCE-FACTS 1.3).
    expect(wire(ok("lg/r", "jis"))).toEqual(["light green", "red"]);
    expect(wire(ok("w/r", "jis"))).toEqual(["white", "red"]);
  });
});

describe("older British letter code (bs)", () => {
  it("reads U, N, K, S and LG, and P as purple (violet)", () => {
    // REFERENCE-FACTS 1.5 [from memory] M/L: U blue, N brown, K pink, S slate, LG light green, P purple.
    expect(ok("U", "bs").colours).toEqual(["blue"]);
    expect(ok("N", "bs").colours).toEqual(["brown"]);
    expect(ok("K", "bs").colours).toEqual(["pink"]);
    expect(ok("S", "bs").colours).toEqual(["grey"]);
    expect(ok("LG", "bs").colours).toEqual(["light green"]);
    expect(ok("P", "bs").colours).toEqual(["violet"]);
    expect(ok("P", "bs").iec).toBe("VT");
    for (const [code, colour] of [
      ["B", "black"],
      ["G", "green"],
      ["R", "red"],
      ["W", "white"],
      ["Y", "yellow"],
      ["O", "orange"],
    ]) {
      expect(ok(code, "bs").colours).toEqual([colour]);
    }
  });

  it("reads base then tracer with '/', '-' or nothing between", () => {
    // REFERENCE-FACTS 1.4 base/tracer [common practice]; run-together writing is from memory.
    for (const s of ["GW", "G/W", "G-W"]) expect(wire(ok(s, "bs"))).toEqual(["green", "white"]);
    // L only ever begins LG, so LGN is light green with brown, NLG brown with light green.
    expect(wire(ok("LGN", "bs"))).toEqual(["light green", "brown"]);
    expect(wire(ok("NLG", "bs"))).toEqual(["brown", "light green"]);
    expect(wire(ok("gw", "bs"))).toEqual(["green", "white"]);
  });

  it("refuses L on its own, which is only the 'light' prefix", () => {
    // REFERENCE-FACTS 1.5: in the British code L is a prefix meaning "light" [from memory] M.
    const e = bad("L", "bs");
    expect(e.part).toBe("L");
    expect(e.message).toMatch(/prefix/);
    expect(bad("LU", "bs").part).toBe("L");
  });
});

describe("English names and workshop abbreviations (en)", () => {
  it("reads the workshop forms", () => {
    // API.md "Colour notation" examples; abbreviations [common practice].
    expect(wire(ok("Red w/ White stripe", "en"))).toEqual(["red", "white"]);
    expect(wire(ok("blk/wht", "en"))).toEqual(["black", "white"]);
    expect(wire(ok("Black/White", "en"))).toEqual(["black", "white"]);
    expect(wire(ok("red with white tracer", "en"))).toEqual(["red", "white"]);
    expect(wire(ok("blue-white", "en"))).toEqual(["blue", "white"]);
    expect(wire(ok("BRN/YEL", "en"))).toEqual(["brown", "yellow"]);
    expect(wire(ok("red w/white", "en"))).toEqual(["red", "white"]);
  });

  it("reads shades, spellings and purple", () => {
    // Common practice: lt/dk shades, purple ≡ violet, gray ≡ grey.
    expect(ok("light green", "en").colours).toEqual(["light green"]);
    expect(ok("lt grn", "en").colours).toEqual(["light green"]);
    expect(wire(ok("Lt. Blue/red", "en"))).toEqual(["light blue", "red"]);
    expect(ok("dk grn", "en").colours).toEqual(["dark green"]);
    expect(ok("sky blue", "en").colours).toEqual(["sky blue"]);
    expect(ok("purple", "en").colours).toEqual(["violet"]);
    expect(ok("pur", "en").colours).toEqual(["violet"]);
    expect(ok("gray", "en").colours).toEqual(["grey"]);
    expect(ok("tan", "en").colours).toEqual(["tan"]);
    expect(ok("choc", "en").colours).toEqual(["chocolate"]);
    // IEC 60757 calls GNYE "green-and-yellow"; that phrase is the earth colour, other "and"s join.
    expect(ok("green and yellow", "en").colours).toEqual(["green-yellow"]);
    expect(ok("green-and-yellow", "en").colours).toEqual(["green-yellow"]);
    expect(wire(ok("black and white", "en"))).toEqual(["black", "white"]);
  });

  it("collapses spaces and trims the input it echoes back", () => {
    // API.md: input as given, trimmed; the module brief asks to collapse spaces.
    expect(ok("  Red   w/  White  stripe ", "en").input).toBe("Red w/ White stripe");
  });

  it("names the word it does not know", () => {
    // Our error contract (API.md: unknown_colour naming the part not understood).
    expect(bad("dark blue", "en").part).toBe("dark blue");
    expect(bad("red/magenta", "en").part).toBe("magenta");
  });
});

describe("auto-detection and ambiguities", () => {
  it("reads W/R as Japanese white with red tracer, as API.md shows", () => {
    // API.md "Colour notation" decode example; REFERENCE-FACTS 1.4.
    const d = ok("W/R", "auto");
    expect(d).toMatchObject({
      input: "W/R",
      system: "jis",
      base: { name: "white", iec: "WH" },
      tracers: [{ name: "red", iec: "RD" }],
      colours: ["white", "red"],
      iec: "RDWH",
    });
    // The British code reads it the same way; same readings are listed, not merged (our decision).
    expect(d.ambiguities).toEqual([{ system: "bs", reading: "white with red tracer" }]);
  });

  it("Bl: blue in DIN, black in English shorthand, black or blue in the Japanese-style houses that write it", () => {
    // REFERENCE-FACTS 1.5: DIN 47002 bl = blau [published] H; English BL = black [common practice] M.
    const d = ok("Bl", "auto");
    expect(d.system).toBe("din");
    expect(d.colours).toEqual(["blue"]);
    expect(readingIn(d, "en")).toEqual(["black"]);
    // jis-letters uses L for blue and B for black (REFERENCE-FACTS 1.3), but one house writes Bl black and another
    // Bl blue (REFERENCE-FACTS 5 [from memory]): both are listed, each naming its house. DIN still wins, being published.
    expect(d.ambiguities.filter((a) => a.system === "jis")).toEqual([
      { system: "jis", houseStyle: "jis-bl-black", reading: "black" },
      { system: "jis", houseStyle: "jis-bl-blue", reading: "blue" },
    ]);
    expect(ok("BL", "auto").colours).toEqual(["blue"]);
    expect(readingIn(ok("BL", "auto"), "en")).toEqual(["black"]);
  });

  it("Gr: grey in DIN and Japanese usage, green in English shorthand", () => {
    // REFERENCE-FACTS 1.5: DIN gr = grau [published] H; Japanese Gr grey, English GR green [common practice] M.
    const d = ok("Gr", "auto");
    expect(d.system).toBe("jis");
    expect(d.colours).toEqual(["grey"]);
    expect(readingIn(d, "din")).toEqual(["grey"]);
    expect(readingIn(d, "en")).toEqual(["green"]);
    for (const s of ["gr", "GR"]) {
      const other = ok(s, "auto");
      expect(other.system).toBe("din");
      expect(other.colours).toEqual(["grey"]);
      expect(readingIn(other, "en")).toEqual(["green"]);
    }
  });

  it("P: pink in Japanese codes, purple (violet) in the British code", () => {
    // REFERENCE-FACTS 1.5 [from memory] M: British pink is K.
    const d = ok("P", "auto");
    expect(d.system).toBe("jis");
    expect(d.colours).toEqual(["pink"]);
    expect(readingIn(d, "bs")).toEqual(["violet"]);
  });

  it("Sb: sky blue; the Swedish-origin 'black' reading is out of scope", () => {
    // REFERENCE-FACTS 1.5 [from memory] M. Loomlore reads no Swedish notation, so SB = svart is not offered.
    const d = ok("Sb", "auto");
    expect(d.system).toBe("jis");
    expect(d.colours).toEqual(["sky blue"]);
    expect(d.iec).toBeNull();
    expect(d.ambiguities.map((a) => a.reading)).not.toContain("black");
    // In capitals it is no Japanese code; the British code reads slate with a black tracer.
    const caps = ok("SB", "auto");
    expect(caps.system).toBe("bs");
    expect(wire(caps)).toEqual(["grey", "black"]);
  });

  it("L: blue in Japanese codes; in the British code only a prefix", () => {
    // REFERENCE-FACTS 1.5 [from memory] M.
    const d = ok("L", "auto");
    expect(d.system).toBe("jis");
    expect(d.colours).toEqual(["blue"]);
    expect(readingIn(d, "bs")).toEqual([]);
    expect(bad("L", "bs").message).toMatch(/prefix/);
  });

  it("LG: light green in the British code, blue with green tracer in Japanese capitals", () => {
    // REFERENCE-FACTS 1.5 (L prefix, LG light green) [from memory]; fewer colours is the likelier reading (our rule).
    const d = ok("LG", "auto");
    expect(d.system).toBe("bs");
    expect(d.colours).toEqual(["light green"]);
    // The upper-case pairs house writes LG for light green (REFERENCE-FACTS 5 [from memory], our pair); jis-letters L + G differs.
    expect(d.ambiguities.filter((a) => a.system === "jis")).toEqual([
      { system: "jis", houseStyle: "jis-caps", reading: "light green" },
      { system: "jis", houseStyle: "jis-letters", reading: "blue with green tracer" },
    ]);
  });

  it("B and G: black and green in both Japanese and British codes", () => {
    // REFERENCE-FACTS 1.5 [from memory] M.
    const b = ok("B", "auto");
    expect([b.system, b.colours]).toEqual(["jis", ["black"]]);
    expect(readingIn(b, "bs")).toEqual(["black"]);
    const g = ok("G", "auto");
    expect([g.system, g.colours]).toEqual(["jis", ["green"]]);
    expect(readingIn(g, "bs")).toEqual(["green"]);
    // GN/gn is green in IEC and DIN [published] H: upper case reads as IEC, lower case as DIN (our rule).
    const gn = ok("GN", "auto");
    expect([gn.system, gn.colours]).toEqual(["iec", ["green"]]);
    expect(readingIn(gn, "din")).toEqual(["green"]);
    expect(ok("gn", "auto").system).toBe("din");
    expect(readingIn(ok("gn", "auto"), "iec")).toEqual(["green"]);
  });

  it("BR and Br: brown (Japanese Br, DIN br/BR), never IEC, which writes BN", () => {
    // REFERENCE-FACTS 1.5 [published] H.
    const br = ok("Br", "auto");
    expect([br.system, br.colours]).toEqual(["jis", ["brown"]]);
    expect(readingIn(br, "din")).toEqual(["brown"]);
    const caps = ok("BR", "auto");
    expect([caps.system, caps.colours]).toEqual(["din", ["brown"]]);
    // BR is brown in the upper-case pairs house (REFERENCE-FACTS 5 [from memory], our pair), black with red in jis-letters.
    expect(readingIn(caps, "jis")).toEqual(["brown", "black with red tracer"]);
    expect(readingIn(caps, "bs")).toEqual(["black with red tracer"]);
    expect(readingIn(caps, "iec")).toEqual([]);
    expect(ok("BN", "auto").system).toBe("iec");
  });

  it("S, U, N: slate, blue and brown in the British code", () => {
    // REFERENCE-FACTS 1.5 [from memory] L/M.
    expect([ok("S", "auto").system, ok("S", "auto").colours]).toEqual(["bs", ["grey"]]);
    expect([ok("U", "auto").system, ok("U", "auto").colours]).toEqual(["bs", ["blue"]]);
    expect([ok("N", "auto").system, ok("N", "auto").colours]).toEqual(["bs", ["brown"]]);
  });

  it("V/VT/vi violet and OR/or/O/OG orange in their systems", () => {
    // REFERENCE-FACTS 1.5 [published] H for IEC/DIN.
    expect([ok("V", "auto").system, ok("V", "auto").colours]).toEqual(["jis", ["violet"]]);
    expect([ok("VT", "auto").system, ok("VT", "auto").colours]).toEqual(["iec", ["violet"]]);
    expect([ok("vi", "auto").system, ok("vi", "auto").colours]).toEqual(["din", ["violet"]]);
    expect([ok("OR", "auto").system, ok("OR", "auto").colours]).toEqual(["din", ["orange"]]);
    expect([ok("or", "auto").system, ok("or", "auto").colours]).toEqual(["din", ["orange"]]);
    expect([ok("O", "auto").system, ok("O", "auto").colours]).toEqual(["jis", ["orange"]]);
    expect([ok("OG", "auto").system, ok("OG", "auto").colours]).toEqual(["iec", ["orange"]]);
  });

  it("GNYE is the IEC earth code, not green with a yellow tracer", () => {
    // REFERENCE-FACTS 1.5; IEC 60757:2021 clause 5.1.
    const d = ok("GNYE", "auto");
    expect(d.system).toBe("iec");
    expect(d.base).toBeNull();
    expect(d.colours).toEqual(["green-yellow"]);
  });

  it("RDBN out of IEC table order reads as DIN 72551-7 red with brown stripe, IEC listed", () => {
    // DIN 72551-7:2014 introduction (RDBN); IEC 60757 clause 5.1 (IEC would write BNRD).
    const d = ok("RDBN", "auto");
    expect(d.system).toBe("din");
    expect(wire(d)).toEqual(["red", "brown"]);
    expect(readingIn(d, "iec")).toEqual(["red and brown"]);
    // In table order the IEC reading wins.
    expect(ok("RDWH", "auto").system).toBe("iec");
  });

  it("picks up the other notations too", () => {
    // API.md examples; REFERENCE-FACTS 1.2 and 1.4.
    expect(ok("blk/wht", "auto").system).toBe("en");
    expect(ok("Red w/ White stripe", "auto").system).toBe("en");
    expect(ok("sw/rt", "auto").system).toBe("din");
    expect(ok("BLGN", "auto").system).toBe("din");
    expect(wire(ok("GNBL", "auto"))).toEqual(["green", "blue"]);
    expect(ok("BrW", "auto").system).toBe("jis");
    // Lower-case Japanese codes are read when nothing else fits (our leniency).
    expect(ok("w/r", "auto").system).toBe("jis");
  });

  it("lists each other reading at most once, never the chosen one, and none with a house style", () => {
    // Module contract: a system (for jis, a system and house) appears once; with a house nothing is ambiguous.
    for (const s of ["W/R", "Bl", "Gr", "GR", "P", "B", "G", "BR", "LG", "RDBN", "BU", "Bl/W"]) {
      const d = ok(s, "auto");
      const keys = d.ambiguities.map((a) => `${a.system}/${a.houseStyle ?? ""}`);
      expect(new Set(keys).size, s).toBe(keys.length);
      expect(keys, s).not.toContain(`${d.system}/${d.system === "jis" ? d.houseStyle : ""}`);
      // jis houses are listed only where they read the code otherwise than the jis reading before them.
      const jisReadings = d.ambiguities.filter((a) => a.system === "jis").map((a) => a.reading);
      expect(new Set(jisReadings).size, s).toBe(jisReadings.length);
      expect(ok(s, d.system, { houseStyle: d.houseStyle }).ambiguities, s).toEqual([]);
    }
    // Explicit non-jis systems have one reading, so no ambiguities either (module contract).
    for (const [s, system] of [
      ["Bl", "din"],
      ["GR", "din"],
      ["LG", "bs"],
      ["RDBN", "din"],
      ["BU", "iec"],
    ] as const) {
      expect(ok(s, system).ambiguities).toEqual([]);
    }
  });
});

describe("errors", () => {
  it("names the part not understood", () => {
    // API.md: unknown or malformed code → unknown_colour naming the part not understood.
    const e = bad("Xq", "jis");
    expect(e).toEqual({
      code: "unknown_colour",
      message: `"Xq" is not a colour code in Japanese-style letter codes (jis)`,
      part: "Xq",
    });
    expect(bad("WXq", "jis").part).toBe("Xq");
    expect(bad("W/Xq", "jis").part).toBe("Xq");
    // In the usual house Bl is no code: L is blue and B black there (REFERENCE-FACTS 1.3 [from memory]).
    expect(bad("Bl", "jis", { houseStyle: "jis-letters" }).part).toBe("Bl");
    expect(bad("swxq", "din").part).toBe("xq");
    expect(bad("BQ", "bs").part).toBe("Q");
    const auto = bad("W/Xq", "auto");
    expect(auto.part).toBe("Xq");
    expect(auto.message).toContain('"Xq"');
  });

  it("refuses empty input and an unknown system", () => {
    // API.md error contract.
    expect(bad("", "auto").message).toMatch(/No colour code/);
    expect(bad("   ", "jis").part).toBe("");
    expect(bad("W/R", "xyz" as ColourSystemId).part).toBe("xyz");
  });

  it("never throws, whatever it is given", () => {
    // API.md: never a 500 for bad input.
    const inputs: unknown[] = [null, undefined, 42, {}, "////", "++", "+", "W/R".repeat(40), "ＷＲ", "W\u0000R", "🙂", "gn+", "-"];
    for (const input of inputs) {
      for (const system of [...COLOUR_SYSTEM_IDS, "auto"] as const) {
        expect(() => decodeColour(input as string, system)).not.toThrow();
      }
    }
    expect(ok("ＷＲ", "jis").colours).toEqual(["white", "red"]); // full-width letters fold (NFKC)
    expect(bad("W/R".repeat(40), "jis").message).toMatch(/too long/);
  });
});

describe("encode and round trip", () => {
  it("writes each system's own style", () => {
    // REFERENCE-FACTS 1.4 table (W/R, ws/rt, RDWH) [common practice]; bs run-together and en abbreviations are our choice.
    expect(encodeColour("white", ["red"], "jis")).toBe("W/R");
    expect(encodeColour("white", ["red"], "din")).toBe("ws/rt");
    expect(encodeColour("white", ["red"], "bs")).toBe("WR");
    expect(encodeColour("white", ["red"], "en")).toBe("wht/red");
    expect(encodeColour("white", ["red"], "iec")).toBe("RDWH");
    expect(encodeColour("light green", ["brown"], "bs")).toBe("LGN");
    expect(encodeColour("white", [], "jis")).toBe("W");
  });

  it("returns null when a system has no code for a colour", () => {
    // REFERENCE-FACTS 1.2/1.3/1.5 tables: no tan in jis, no turquoise in bs, no sky blue in DIN 47002.
    expect(encodeColour("tan", [], "jis")).toBeNull();
    expect(encodeColour("white", ["turquoise"], "bs")).toBeNull();
    expect(encodeColour("sky blue", [], "din")).toBeNull();
    expect(encodeColour("nope" as ColourName, [], "en")).toBeNull();
  });

  for (const system of COLOUR_SYSTEM_IDS) {
    it(`decodes back what it writes in ${system}, for every colour and pair it has codes for`, () => {
      // Module contract: encode → decode round trip (codes from the tables cited above).
      const coded = COLOUR_NAMES.filter((c) => encodeColour(c, [], system) !== null);
      expect(coded.length).toBeGreaterThan(10);
      for (const colour of coded) {
        const d = ok(encodeColour(colour, [], system)!, system);
        // IEC is lossy by design: BU covers light blue (REFERENCE-FACTS 1.1), so it comes back as blue.
        if (system === "iec" && colour === "light blue") expect(d.colours).toEqual(["blue"]);
        else expect(d.colours).toEqual([colour]);
      }
      for (const base of coded) {
        for (const tracer of coded) {
          if (base === tracer) continue;
          const code = encodeColour(base, [tracer], system)!;
          const d = ok(code, system);
          // IEC has no base/tracer, so only the designation itself must survive (clause 5.1).
          if (system === "iec") expect(d.iec).toBe(code);
          else expect(wire(d)).toEqual([base, tracer]);
        }
      }
    });
  }
});

describe("colourSystems()", () => {
  const systems = colourSystems();

  it("lists the five systems with names", () => {
    // API.md GET /api/v1/colours/systems shape.
    expect(systems.map((s) => s.id)).toEqual(["jis", "iec", "din", "bs", "en"]);
    for (const s of systems) expect(s.name.length).toBeGreaterThan(3);
  });

  it("lists every code once, and each decodes in its system to its colour", () => {
    // Module contract; tables from REFERENCE-FACTS 1.1–1.3 and 1.5.
    for (const s of systems) {
      // jis is case-sensitive (Gr ≠ GR); the others read case-insensitively, so compare folded.
      const keys = s.codes.map((c) => (s.id === "jis" ? c.code : c.code.toLowerCase()));
      expect(new Set(keys).size).toBe(keys.length);
      for (const { code, colour } of s.codes) {
        const d = ok(code, s.id);
        expect(d.colours, `${s.id} ${code}`).toEqual([colour]);
      }
    }
  });

  it("covers every colour word in at least one system", () => {
    // API.md "Colour words": the fixed list.
    const covered = new Set(systems.flatMap((s) => s.codes.map((c) => c.colour)));
    for (const c of COLOUR_NAMES) expect(covered.has(c), c).toBe(true);
    expect(COLOUR_NAMES).not.toContain("purple");
  });
});

describe("describeColour", () => {
  it("words base, tracers, IEC colours and the earth colour", () => {
    // API.md wording examples; IEC 60445 protective-earth meaning of green-yellow.
    expect(describeColour(ok("W/R", "jis"))).toBe("white with red tracer");
    expect(describeColour(ok("W/R/B", "jis"))).toBe("white with red and black tracers");
    expect(describeColour(ok("L", "jis"))).toBe("blue");
    expect(describeColour(ok("RDWH", "iec"))).toBe("red and white");
    expect(describeColour(ok("BKRDWH", "iec"))).toBe("black, red and white");
    expect(describeColour(ok("gnge", "din"))).toBe("green-yellow (protective earth)");
    expect(describeColour({ base: null, tracers: [], colours: ["green-yellow"] })).toBe("green-yellow (protective earth)");
  });
});

describe("swatch", () => {
  it("gives every colour a distinct #rrggbb and an ink that reads on it", () => {
    // WCAG 2.x success criterion 1.4.3: contrast at least 4.5:1 for text.
    const hexes = new Set<string>();
    for (const c of COLOUR_NAMES) {
      const { hex, ink } = swatch(c);
      expect(hex).toMatch(/^#[0-9a-f]{6}$/);
      expect(ink).toMatch(/^#[0-9a-f]{6}$/);
      expect(contrastRatio(hex, ink), c).toBeGreaterThanOrEqual(4.5);
      hexes.add(hex);
    }
    expect(hexes.size).toBe(COLOUR_NAMES.length);
    // WCAG 2.x contrast formula check values: black on white is 21:1, a colour on itself 1:1.
    expect(contrastRatio("#000000", "#ffffff")).toBeCloseTo(21, 5);
    expect(contrastRatio("#777777", "#777777")).toBeCloseTo(1, 5);
  });
});

describe("house styles", () => {
  const house = (id: string) => HOUSE_STYLES.find((h) => h.id === id)!;
  const table = (id: string) => new Map(house(id).codes.map((c) => [c.code, c.colour]));

  it("defines exactly the seven house styles, each naming its notation", () => {
    // Our ids: the demo makes' houses (jis-letters, din, bs), the other Japanese-style houses of REFERENCE-FACTS 5 [from memory], and en.
    expect(HOUSE_STYLES.map((h) => [h.id, h.notation])).toEqual([
      ["jis-letters", "jis"],
      ["jis-bl-black", "jis"],
      ["jis-bl-blue", "jis"],
      ["jis-caps", "jis"],
      ["din", "din"],
      ["bs", "bs"],
      ["en", "en"],
    ]);
    expect(JIS_HOUSE_ORDER).toEqual(["jis-letters", "jis-bl-black", "jis-bl-blue", "jis-caps"]);
    for (const h of HOUSE_STYLES) expect(h.source.length, h.id).toBeGreaterThan(5);
    expect(houseStyles("jis").map((h) => h.id)).toEqual(JIS_HOUSE_ORDER);
  });

  it("jis-letters is the usual Japanese-style table", () => {
    // REFERENCE-FACTS 1.3 [from memory]: B black, L blue, Lb light blue, Lg light green, Gr/Gy grey, Sb sky blue.
    const t = table("jis-letters");
    expect([t.get("B"), t.get("L"), t.get("Lb"), t.get("Lg"), t.get("Gr"), t.get("Gy"), t.get("Sb")]).toEqual([
      "black",
      "blue",
      "light blue",
      "light green",
      "grey",
      "grey",
      "sky blue",
    ]);
    expect(colourSystems().find((s) => s.id === "jis")!.codes).toEqual(houseStyles("jis")[0].codes);
  });

  it("jis-bl-black: Bl black, Bu blue, Lb light blue; B and L are not its codes", () => {
    // REFERENCE-FACTS 5 [from memory] ("one writes Bl black, Bu blue"); Lb kept from 1.3 and B/L dropped: our decision.
    const h = { houseStyle: "jis-bl-black" };
    expect(ok("Bl", "jis", h).colours).toEqual(["black"]);
    expect(ok("Bu", "jis", h).colours).toEqual(["blue"]);
    expect(ok("Lb", "jis", h).colours).toEqual(["light blue"]);
    expect(wire(ok("Bl/W", "jis", h))).toEqual(["black", "white"]);
    expect(wire(ok("BuY", "jis", h))).toEqual(["blue", "yellow"]);
    expect(wire(ok("Br/Bl", "jis", h))).toEqual(["brown", "black"]);
    expect(bad("B", "jis", h).part).toBe("B");
    expect(bad("L/W", "jis", h).part).toBe("L");
    // Typed in lower case it is still meant (the jis leniency): bl/w.
    expect(wire(ok("bl/w", "jis", h))).toEqual(["black", "white"]);
  });

  it("jis-bl-blue: Bl blue, Lbl light blue, B black; L and Lb are not its codes", () => {
    // REFERENCE-FACTS 5 [from memory] ("another Bl blue, Lbl light blue"); B black as in 1.3 (our decision).
    const h = { houseStyle: "jis-bl-blue" };
    expect(ok("Bl", "jis", h).colours).toEqual(["blue"]);
    expect(ok("Lbl", "jis", h).colours).toEqual(["light blue"]);
    expect(ok("B", "jis", h).colours).toEqual(["black"]);
    expect(wire(ok("Bl/W", "jis", h))).toEqual(["blue", "white"]);
    expect(wire(ok("LblR", "jis", h))).toEqual(["light blue", "red"]);
    expect(wire(ok("lbl/b", "jis", h))).toEqual(["light blue", "black"]);
    expect(bad("L", "jis", h).part).toBe("L");
    expect(bad("Lb", "jis", h).part).toBe("Lb");
  });

  it("jis-caps: upper-case pairs BK, BL, LB, PU, GY, OR and the rest as pairs", () => {
    // REFERENCE-FACTS 5 [from memory] for BK BL LB PU GY OR; PU is purple, our word violet (names.ts, IEC 60757 VT).
    const h = { houseStyle: "jis-caps" };
    const six: [string, ColourName][] = [
      ["BK", "black"],
      ["BL", "blue"],
      ["LB", "light blue"],
      ["PU", "violet"],
      ["GY", "grey"],
      ["OR", "orange"],
    ];
    for (const [code, colour] of six) expect(ok(code, "jis", h).colours, code).toEqual([colour]);
    // The other pairs are our judgement [from memory]: BR brown, RD red, YE yellow, GN green, WH white, PK pink, LG light green.
    const rest: [string, ColourName][] = [
      ["BR", "brown"],
      ["RD", "red"],
      ["YE", "yellow"],
      ["GN", "green"],
      ["WH", "white"],
      ["PK", "pink"],
      ["LG", "light green"],
    ];
    for (const [code, colour] of rest) expect(ok(code, "jis", h).colours, code).toEqual([colour]);
    // Runs split into pairs: BKWH is black with white; GY is grey, never green with yellow.
    expect(wire(ok("BKWH", "jis", h))).toEqual(["black", "white"]);
    expect(wire(ok("BK/WH", "jis", h))).toEqual(["black", "white"]);
    expect(wire(ok("GY", "jis", h))).toEqual(["grey"]);
    expect(wire(ok("bk/wh", "jis", h))).toEqual(["black", "white"]);
    // Mixed case is the other houses' spelling, and single letters are not this house's.
    expect(bad("Bl", "jis", h).part).toBe("Bl");
    expect(bad("B/W", "jis", h).part).toBe("B");
  });

  it("din, bs and en read as their notations do", () => {
    // REFERENCE-FACTS 1.2 (DIN 47002 ws/rt), 1.5 (British U blue), common practice (blk/wht).
    expect(ok("ws/rt", "din", { houseStyle: "din" })).toMatchObject({ system: "din", houseStyle: "din", colours: ["white", "red"], ambiguities: [] });
    expect(ok("U", "auto", { houseStyle: "bs" })).toMatchObject({ system: "bs", houseStyle: "bs", colours: ["blue"] });
    expect(ok("blk/wht", "auto", { houseStyle: "en" })).toMatchObject({ system: "en", houseStyle: "en", colours: ["black", "white"] });
    // Bl in a DIN house is blue and nothing else: the house answers the question auto leaves open (REFERENCE-FACTS 1.2).
    expect(ok("Bl", "auto", { houseStyle: "din" })).toMatchObject({ system: "din", colours: ["blue"], ambiguities: [] });
  });

  it("every code of every house decodes in that house to its colour, with no ambiguity", () => {
    // Module contract over the tables above (REFERENCE-FACTS 1.2, 1.3, 1.5, 5).
    for (const h of houseStyles()) {
      for (const { code, colour } of h.codes) {
        const d = ok(code, h.notation, { houseStyle: h.id });
        expect(d.colours, `${h.id} ${code}`).toEqual([colour]);
        expect(d.houseStyle).toBe(h.id);
        expect(d.ambiguities).toEqual([]);
      }
    }
  });

  it("refuses an unknown house style and a system that contradicts the house; '' means none", () => {
    // Our error contract: bad_request naming the option (API.md error shape).
    const unknown = decodeColour("W/R", "jis", { houseStyle: "jis-morse" });
    expect(!unknown.ok && unknown.error).toMatchObject({ code: "bad_request", field: "houseStyle" });
    const clash = decodeColour("W/R", "din", { houseStyle: "jis-letters" });
    expect(!clash.ok && clash.error).toMatchObject({ code: "bad_request", field: "system" });
    expect(!clash.ok && clash.error.message).toContain("jis-letters");
    expect(ok("Bl/W", "jis", { houseStyle: "" })).toEqual(ok("Bl/W", "jis"));
    expect(ok("Bl/W", "jis", { houseStyle: null })).toEqual(ok("Bl/W", "jis"));
  });
});

describe("jis without a house style", () => {
  it("reads Bl/W as black with white (jis-bl-black first) and lists the jis-bl-blue reading, instead of refusing it", () => {
    // REFERENCE-FACTS 5 [from memory]: Bl is black in one house, blue in another; the order is JIS_HOUSE_ORDER (our decision).
    const d = ok("Bl/W", "jis");
    expect([d.houseStyle, wire(d)]).toEqual(["jis-bl-black", ["black", "white"]]);
    expect(d.ambiguities).toEqual([{ system: "jis", houseStyle: "jis-bl-blue", reading: "blue with white tracer" }]);
    // auto picks the same reading: nothing else reads Bl/W (DIN has no w, English no lone W).
    const auto = ok("Bl/W", "auto");
    expect([auto.system, auto.houseStyle, wire(auto)]).toEqual(["jis", "jis-bl-black", ["black", "white"]]);
    expect(readingIn(auto, "jis")).toEqual(["blue with white tracer"]);
  });

  it("reads in jis-letters first, and lists another house only where it reads the code otherwise", () => {
    // REFERENCE-FACTS 1.3 (W/R, B, L) and 5 [from memory] (BR, BL as upper-case pairs).
    expect(ok("W/R", "jis")).toMatchObject({ houseStyle: "jis-letters", ambiguities: [] });
    expect(ok("L/W", "jis")).toMatchObject({ houseStyle: "jis-letters", colours: ["blue", "white"], ambiguities: [] });
    const br = ok("BR", "jis");
    expect([br.houseStyle, wire(br)]).toEqual(["jis-letters", ["black", "red"]]);
    expect(br.ambiguities).toEqual([{ system: "jis", houseStyle: "jis-caps", reading: "brown" }]);
    const bl = ok("BL", "jis");
    expect(wire(bl)).toEqual(["black", "blue"]);
    expect(bl.ambiguities).toEqual([{ system: "jis", houseStyle: "jis-caps", reading: "blue" }]);
    // A code only one house writes has one reading: Lbl is jis-bl-blue's light blue.
    expect(ok("Lbl", "jis")).toMatchObject({ houseStyle: "jis-bl-blue", colours: ["light blue"], ambiguities: [] });
    expect(ok("Bu", "jis")).toMatchObject({ houseStyle: "jis-bl-black", colours: ["blue"], ambiguities: [] });
  });

  it("with a house style there is nothing ambiguous", () => {
    // Module contract (API.md additions: decode in the make's house style).
    expect(ok("Bl/W", "jis", { houseStyle: "jis-bl-blue" })).toMatchObject({ colours: ["blue", "white"], ambiguities: [] });
    expect(ok("BR", "jis", { houseStyle: "jis-caps" })).toMatchObject({ colours: ["brown"], ambiguities: [] });
    expect(ok("BR", "jis", { houseStyle: "jis-letters" })).toMatchObject({ colours: ["black", "red"], ambiguities: [] });
  });
});

describe("English words are English", () => {
  // Every whole-word code of EN_CODES (common practice names; "purple" ≡ violet, "slate" ≡ grey, see names.ts).
  const WORDS = EN_CODES.filter(({ code }) => EN_COLOUR_WORDS.includes(code));

  it("EN_COLOUR_WORDS are exactly the whole words of EN_CODES; the rest are abbreviations", () => {
    // Our partition of the common-practice English table.
    for (const w of EN_COLOUR_WORDS)
      expect(
        EN_CODES.some((c) => c.code === w),
        w,
      ).toBe(true);
    const abbreviations = EN_CODES.map((c) => c.code).filter((c) => !EN_COLOUR_WORDS.includes(c));
    expect(abbreviations).toEqual([
      "blk",
      "bk",
      "bl",
      "brn",
      "rd",
      "org",
      "yel",
      "ylw",
      "grn",
      "gr",
      "blu",
      "vio",
      "pur",
      "gry",
      "wht",
      "wh",
      "pnk",
      "turq",
      "lt grn",
      "dk grn",
      "lt blu",
      "choc",
    ]);
  });

  it("reads every English colour word of EN_CODES as en, in any case, with no letter-by-letter reading offered", () => {
    // Common practice: a word is the colour it names. BROWN would otherwise be the British B+R+O+W+N (REFERENCE-FACTS 1.5).
    expect(WORDS.length).toBe(EN_COLOUR_WORDS.length);
    for (const { code, colour } of WORDS) {
      for (const typed of [code, code[0].toUpperCase() + code.slice(1), code.toUpperCase()]) {
        const d = ok(typed, "auto");
        expect([d.system, d.colours], typed).toEqual(["en", [colour]]);
        expect(d.ambiguities, typed).toEqual([]);
        expect(isEnglishColourWords(typed), typed).toBe(true);
      }
    }
  });

  it("reads whole-word combinations as en only", () => {
    // API.md example "Red w/ White stripe"; common practice.
    for (const [typed, colours] of [
      ["brown", ["brown"]],
      ["BROWN", ["brown"]],
      ["blue", ["blue"]],
      ["Red w/ White stripe", ["red", "white"]],
      ["black/white", ["black", "white"]],
      ["BROWN/WHITE", ["brown", "white"]],
      ["light blue/red", ["light blue", "red"]],
    ] as const) {
      const d = ok(typed, "auto");
      expect([d.system, wire(d)], typed).toEqual(["en", colours]);
      expect(d.ambiguities, typed).toEqual([]);
    }
  });

  it("never reads a whole English word letter by letter in another notation", () => {
    // REFERENCE-FACTS 1.5: the British code's B, R, O, W, N would spell BROWN; our rule refuses that reading.
    const e = bad("brown", "bs");
    expect(e.part).toBe("brown");
    expect(e.message).toMatch(/English/);
    expect(bad("BROWN", "bs").message).toMatch(/letter by letter/);
    expect(bad("BROWN", "auto", { houseStyle: "bs" }).message).toMatch(/English/);
    expect(ok("brown", "en").colours).toEqual(["brown"]);
  });

  it("abbreviations and letter codes are not English words", () => {
    // Common practice: blk/wht is shorthand; Bl, BR, W/R are letter codes (REFERENCE-FACTS 1.5).
    for (const s of ["blk/wht", "Bl", "BR", "W/R", "GN", "ws/rt", "lt grn"]) expect(isEnglishColourWords(s), s).toBe(false);
    // BRN is an abbreviation, so the British reading stays listed beside it.
    expect(readingIn(ok("BRN", "auto"), "bs")).toEqual(["black with red and brown tracers"]);
  });
});

describe("green and yellow (IEC 60445)", () => {
  const flagged = (d: DecodedColour) => d.warnings.map((w) => w.code);

  it("flags every reading that is green with yellow, either way round, or green-yellow", () => {
    // IEC 60445 keeps green-and-yellow for the protective conductor (REFERENCE-FACTS 5 [published]); IEC 60757 clause 5.1.
    for (const [code, system] of [
      ["G/Y", "jis"],
      ["Y/G", "jis"],
      ["GY", "bs"],
      ["YG", "bs"],
      ["gn/ge", "din"],
      ["ge/gn", "din"],
      ["gnge", "din"],
      ["GNYE", "iec"],
      ["green and yellow", "en"],
      ["grn/yel", "en"],
      ["G/Y/R", "jis"],
    ] as const) {
      const d = ok(code, system);
      expect(flagged(d), `${code} (${system})`).toEqual(["green_yellow_reserved"]);
      expect(d.warnings[0].message).toMatch(/IEC 60445/);
      expect(d.warnings[0].message).toMatch(/earth/);
      expect(d.warnings[0].message).toMatch(/re-identify/);
    }
    expect(flagged(ok("G/Y", "jis", { houseStyle: "jis-letters" }))).toEqual(["green_yellow_reserved"]);
  });

  it("does not flag other wires", () => {
    // IEC 60757 clause 5.1 speaks of green and yellow combined; a red wire with both as tracers is not that colour (our reading).
    for (const [code, system] of [
      ["G/W", "jis"],
      ["Y/R", "jis"],
      ["R/G/Y", "jis"],
      ["Lg/Y", "jis"],
      ["GN", "iec"],
      ["ws/rt", "din"],
    ] as const) {
      expect(flagged(ok(code, system)), code).toEqual([]);
    }
  });

  it("flags a code whose likelier reading is not green-and-yellow when another reading is", () => {
    // GY is IEC 60757 grey, but Japanese-style G/Y (REFERENCE-FACTS 1.3) is green with a yellow tracer.
    const d = ok("GY", "auto");
    expect([d.system, d.colours]).toEqual(["iec", ["grey"]]);
    expect(flagged(d)).toEqual(["green_yellow_reserved"]);
    expect(d.warnings[0].message).toMatch(/^Read as (jis|bs)/);
    expect(d.warnings[0].message).toContain("green with yellow tracer");
  });
});
