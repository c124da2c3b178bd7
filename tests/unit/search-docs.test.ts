/**
 * The search documents (app/domain/search-docs.ts): a colour code is indexed in every notation Loomlore reads, with its
 * decoded words, and a family / connector card becomes the documents the search service and the database fallback hold.
 * Families and makers below are the demo library's invented ones; no real maker or diagram is described.
 */
import { describe, expect, it } from "vitest";
import { COLOUR_SYSTEM_IDS, decodeColour, encodeColour, type ColourSystemId } from "~/domain/colours";
import { codeVariants, colourWords, connectorDocs, familyDoc, SEARCH_SETTINGS, type ConnectorInput, type FamilyInput } from "~/domain/search-docs";

describe("codeVariants: one wire, every notation", () => {
  // White base with a red tracer, written in each notation (REFERENCE-FACTS 1.1–1.5):
  //   jis "W/R" (Japanese-style letters, base first, tracer after the slash, §1.3),
  //   iec "RDWH" (IEC 60757 Table 1: codes joined in TABLE order, RD before WH, never base-first, §1.1),
  //   din "ws/rt" (DIN 47002 lower-case abbreviations: ws = weiß, rt = rot, §1.2),
  //   bs  "WR" (the older British letter code, written run together),
  //   en  "wht/red" (workshop English abbreviations).
  const WHITE_RED: Record<ColourSystemId, string> = { jis: "W/R", iec: "RDWH", din: "ws/rt", bs: "WR", en: "wht/red" };

  it.each(Object.entries(WHITE_RED).filter(([s]) => s !== "iec") as [ColourSystemId, string][])(
    "%s %s → the same wire in all five notations",
    (system, code) => {
      const v = codeVariants(code, system);
      expect(v[0], "the code as written comes first").toBe(code);
      expect(new Set(v)).toEqual(new Set(Object.values(WHITE_RED)));
      expect(v.length, "no duplicates").toBe(new Set(v).size);
    },
  );

  it("IEC 60757 joins codes in table order whatever the base: white+red is RDWH, not WHRD", () => {
    expect(codeVariants("W/R", "jis")).toContain("RDWH");
    expect(codeVariants("W/R", "jis")).not.toContain("WHRD");
    // blue base, white tracer: BU comes before WH in Table 1
    expect(codeVariants("L/W", "jis")).toEqual(expect.arrayContaining(["L/W", "BUWH", "bl/ws", "UW", "blu/wht"]));
    // black base, yellow tracer: BK before YE; DIN 47002 sw = schwarz, ge = gelb
    expect(codeVariants("sw/ge", "din")).toEqual(expect.arrayContaining(["sw/ge", "B/Y", "BKYE", "BY", "blk/yel"]));
  });

  it("an IEC designation names no base: the variants take the table's first colour as the base", () => {
    // IEC 60757 does not say which colour is the base, so RDWH reads back as red with white (R/W), and the jis W/R
    // wire still carries RDWH among its variants — both cards are found by RDWH.
    expect(new Set(codeVariants("RDWH", "iec"))).toEqual(new Set(["RDWH", "R/W", "rt/ws", "RW", "red/wht"]));
  });

  it("every variant decodes back to the same colours in its own notation", () => {
    for (const [code, system] of [
      ["W/R", "jis"],
      ["ws/rt", "din"],
      ["NG", "bs"],
      ["Lg/R", "jis"],
      ["gr/sw", "din"],
      ["P/W", "bs"],
    ] as const) {
      const want = decodeColour(code, system);
      if (!want.ok) throw new Error(`${code} should decode`);
      const colours = [want.value.base?.name, ...want.value.tracers.map((t) => t.name)];
      const variants = codeVariants(code, system);
      for (const s of COLOUR_SYSTEM_IDS) {
        const written = encodeColour(colours[0]!, colours.slice(1) as never, s);
        if (written) expect(variants, `${code} (${system}) in ${s}`).toContain(written);
      }
    }
  });

  it("colours a notation has no code for are left out, not guessed", () => {
    // Light green has no IEC 60757 row and no DIN 47002 abbreviation: jis Lg/R has British and English forms only.
    expect(new Set(codeVariants("Lg/R", "jis"))).toEqual(new Set(["Lg/R", "LGR", "lt grn/red"]));
    // Sky blue exists in the Japanese-style letters and in English only.
    expect(new Set(codeVariants("Sb", "jis"))).toEqual(new Set(["Sb", "sky blue"]));
    // Green-yellow (protective earth, IEC 60757 GNYE): no Japanese-style or British letter.
    expect(new Set(codeVariants("GNYE", "iec"))).toEqual(new Set(["GNYE", "gnge", "green-and-yellow"]));
  });

  it("one colour: the same letter in two notations is listed once", () => {
    // B is black in the Japanese-style letters and in the British code alike.
    expect(codeVariants("B", "jis")).toEqual(["B", "BK", "sw", "blk"]);
    expect(codeVariants("N", "bs")).toEqual(["N", "Br", "BN", "br", "brn"]);
  });

  it("a code that does not parse is indexed as written; no code, nothing", () => {
    expect(codeVariants("XQ/Z", "jis")).toEqual(["XQ/Z"]);
    expect(codeVariants(null, "jis")).toEqual([]);
    expect(codeVariants("", "din")).toEqual([]);
  });
});

describe("colourWords", () => {
  it("decodes a code into plain words in the family's notation", () => {
    expect(colourWords("W/R", "jis")).toBe("white with red tracer");
    expect(colourWords("ws/rt", "din")).toBe("white with red tracer");
    expect(colourWords("WR", "bs")).toBe("white with red tracer");
    expect(colourWords("SWRT", "din")).toBe("black with red tracer"); // later upper-case DIN 72551-7 style
    expect(colourWords("RDWH", "iec")).toBe("red and white"); // IEC names no base, so no tracer either
    expect(colourWords("GNYE", "iec")).toBe("green-yellow (protective earth)");
    expect(colourWords("U", "bs")).toBe("blue"); // British U = blue
    expect(colourWords("P", "jis")).toBe("pink"); // Japanese-style P = pink …
    expect(colourWords("P", "bs")).toBe("violet"); // … British P = purple (violet) — REFERENCE-FACTS 1.5
  });

  it("null for no code or an unreadable one", () => {
    expect(colourWords(null, "jis")).toBeNull();
    expect(colourWords("XQ/Z", "jis")).toBeNull();
  });
});

// Invented demo data (db/seeders/demo/makes.ts).
const FAMILY: FamilyInput = {
  slug: "rx750-four",
  name: "RX750 Four",
  modelRange: "RX750, RX750 S",
  yearFrom: 1977,
  yearTo: 1982,
  engine: "inline four, air-cooled, DOHC",
  ignition: "transistor, battery-powered",
  make: { slug: "asagiri", name: "Asagiri Motor Works" },
};
const CARD: ConnectorInput = {
  slug: "rx750-four-right-switch-plug",
  name: "Right handlebar switch, plug on the switch lead",
  location: "inside the headlamp shell",
  housing: "6-way bullet block",
  system: "ignition",
  revision: 3,
  pins: [
    { cavity: "1", code: "Br/W", circuit: "fused ignition feed", terminal: null, goesTo: null },
    { cavity: "2", code: "O/W", circuit: "ignition feed after the kill switch", terminal: "15", goesTo: "ignition unit" },
    { cavity: "3", code: "W/R", circuit: "headlamp", terminal: "56", goesTo: null },
    { cavity: "A 4", code: "W/R", circuit: "headlamp", terminal: "56", goesTo: null },
    { cavity: "5", code: null, circuit: "", terminal: null, goesTo: null },
  ],
};

describe("familyDoc", () => {
  const d = familyDoc(FAMILY);
  it("is the family's page with every year of production", () => {
    expect(d).toMatchObject({
      id: "family-rx750-four",
      type: "family",
      slug: "rx750-four",
      cavity: null,
      title: "Asagiri Motor Works RX750 Four",
      url: "/families/rx750-four",
      make: "Asagiri Motor Works",
      makeSlug: "asagiri",
      family: "RX750 Four",
      familySlug: "rx750-four",
      system: null,
      pinCount: null,
      version: 1,
      codes: [],
      colours: [],
      circuits: [],
      terminals: [],
    });
    expect(d.years).toEqual([1977, 1978, 1979, 1980, 1981, 1982]);
    expect(d.subtitle).toContain("1977–1982");
    expect(d.text).toContain("RX750 S");
  });
  it("a one-year family has one year; a reversed range none", () => {
    expect(familyDoc({ ...FAMILY, yearFrom: 1980, yearTo: 1980 }).years).toEqual([1980]);
    expect(familyDoc({ ...FAMILY, yearFrom: 1981, yearTo: 1980 }).years).toEqual([]);
  });
});

describe("connectorDocs", () => {
  const docs = connectorDocs(FAMILY, CARD, "jis");
  const [card, ...pins] = docs;

  it("one card document, then one per pin, in pin order", () => {
    expect(docs).toHaveLength(1 + CARD.pins.length);
    expect(card.type).toBe("connector");
    expect(pins.map((p) => p.type)).toEqual(CARD.pins.map(() => "pin"));
    expect(pins.map((p) => p.cavity)).toEqual(CARD.pins.map((p) => p.cavity));
    expect(new Set(docs.map((d) => d.id)).size, "ids are unique").toBe(docs.length);
  });

  it("the card: ids, url, counts, family fields, years, revision as version", () => {
    expect(card).toMatchObject({
      id: "connector-rx750-four-right-switch-plug",
      slug: CARD.slug,
      cavity: null,
      title: CARD.name,
      url: "/connectors/rx750-four-right-switch-plug",
      make: "Asagiri Motor Works",
      makeSlug: "asagiri",
      family: "RX750 Four",
      familySlug: "rx750-four",
      system: "ignition",
      pinCount: 5,
      version: 3,
    });
    expect(card.years).toEqual([1977, 1978, 1979, 1980, 1981, 1982]);
    expect(card.subtitle).toBe("Asagiri Motor Works RX750 Four · ignition · inside the headlamp shell");
    expect(card.text).toBe("inside the headlamp shell 6-way bullet block");
  });

  it("the card gathers its pins' codes in every notation, colour words, circuits and terminals, each once", () => {
    expect(card.codes).toEqual(expect.arrayContaining(["Br/W", "O/W", "W/R", "RDWH", "ws/rt", "WR", "wht/red", "BNWH", "or/ws", "brn/wht"]));
    expect(card.codes.length).toBe(new Set(card.codes).size);
    expect(card.colours).toEqual(["brown with white tracer", "orange with white tracer", "white with red tracer"]);
    expect(card.circuits).toEqual(["fused ignition feed", "ignition feed after the kill switch", "headlamp"]);
    expect(card.terminals).toEqual(["15", "56"]);
  });

  it("each pin: its own id, link to the cavity, the card's pin count, its code variants, circuit, terminal and destination", () => {
    const p3 = pins[2];
    expect(p3).toMatchObject({
      id: "pin-rx750-four-right-switch-plug-3",
      slug: CARD.slug,
      cavity: "3",
      title: `${CARD.name}, cavity 3`,
      pinCount: 5,
      version: 3,
      url: "/connectors/rx750-four-right-switch-plug?cavity=3#pin-3",
      circuits: ["headlamp"],
      terminals: ["56"],
      colours: ["white with red tracer"],
      familySlug: "rx750-four",
      system: "ignition",
    });
    expect(new Set(p3.codes)).toEqual(new Set(["W/R", "RDWH", "ws/rt", "WR", "wht/red"]));
    expect(p3.subtitle).toBe("W/R · white with red tracer · headlamp · terminal 56");
    expect(p3.years).toEqual(card.years);
    expect(pins[1].text).toBe("ignition unit");
  });

  it("a cavity name with spaces: the id is made safe, the url encodes it", () => {
    const p = pins[3];
    expect(p.id).toBe("pin-rx750-four-right-switch-plug-a_4");
    expect(p.id).toMatch(/^[a-zA-Z0-9_-]+$/); // the service's document id rule
    expect(p.url).toBe("/connectors/rx750-four-right-switch-plug?cavity=A%204#pin-A%204");
  });

  it("a pin without code, circuit or terminal carries empty lists", () => {
    expect(pins[4]).toMatchObject({ codes: [], colours: [], circuits: [], terminals: [], subtitle: "", text: "" });
  });

  it("codes are read in the family's notation: the same letters mean other colours in the British code", () => {
    const bs = connectorDocs(
      { ...FAMILY, slug: "sovereign-650" },
      { ...CARD, pins: [{ cavity: "1", code: "P", circuit: "brake lamp", terminal: "54", goesTo: null }] },
      "bs",
    );
    expect(bs[1].colours).toEqual(["violet"]);
    expect(bs[1].codes).toEqual(expect.arrayContaining(["P", "VT", "vi", "V"]));
  });
});

describe("SEARCH_SETTINGS", () => {
  it("every attribute the app filters or facets on is filterable; codes, terminals and circuits are searchable", () => {
    // search.server.ts filters on type, makeSlug, familySlug, system, pinCount, and deletes a card's pins by slug.
    for (const a of ["type", "slug", "makeSlug", "familySlug", "system", "pinCount"]) expect(SEARCH_SETTINGS.filterableAttributes).toContain(a);
    for (const a of ["title", "codes", "terminals", "circuits", "family", "colours"]) expect(SEARCH_SETTINGS.searchableAttributes).toContain(a);
    // Searchable attributes are in ranking order: the title first, then codes before colour words.
    expect(SEARCH_SETTINGS.searchableAttributes[0]).toBe("title");
    expect(SEARCH_SETTINGS.searchableAttributes.indexOf("codes")).toBeLessThan(SEARCH_SETTINGS.searchableAttributes.indexOf("colours"));
  });
});
