import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { DomUtils, parseDocument } from "htmlparser2";
import { describe, expect, it } from "vitest";
import { CardDiffView } from "~/components/card-diff";
import { gridLayout } from "~/domain/connector-face";
import { diffCards, proposalProblems, type CardProposal, type ProposedPin } from "~/domain/submissions";

// Invented demo cards in the Japanese-style letter notation ("jis"); no real bike's diagram.
// HTML is parsed with htmlparser2 (jsdom does not load on this machine's Node).

type El = ReturnType<typeof DomUtils.findAll>[number];

const pin = (cavity: string, code: string | null, circuit: string, terminal: string | null = null, goesTo: ProposedPin["goesTo"] = null): ProposedPin => ({
  cavity,
  code,
  circuit,
  terminal,
  goesTo,
});

const published: CardProposal = {
  name: "Trigger plug (demo)",
  location: "Under the left side cover",
  housing: "4-way flat housing",
  gender: "plug",
  system: "ignition",
  matesWith: "demo-trigger-socket",
  layout: gridLayout(2, 2),
  pins: [
    pin("1", "B/W", "Trigger 1 feed", null, { connector: "demo-igniter", cavity: "3" }),
    pin("2", "R/Y", "Trigger 1 return", null, { connector: "demo-igniter", cavity: "4" }),
    pin("3", "G/R", "Earth", "31", { connector: "demo-earth-block", cavity: "1" }),
    pin("4", "Y/G", "Spare", null, null),
  ],
  specs: [
    {
      name: "Trigger winding",
      min: 400,
      max: 600,
      unit: "Ω",
      between: ["1", "2"],
      atC: 20,
      source: "demo data",
      conditions: "Ignition off, plug apart, meter on the 2 kΩ range",
      kind: "resistance",
      material: "copper",
    },
    {
      name: "Insulation to earth",
      min: 1,
      max: null,
      unit: "MΩ",
      between: ["1", "3"],
      atC: 20,
      source: "demo data",
      conditions: "Ignition off, plug apart, cavity 1 to the engine",
      kind: "insulation",
      material: null,
    },
  ],
  notes: "Old notes.",
  photos: [
    { id: "ph-kept", caption: "Plug from the wire side", credit: "A. Rider" },
    { id: "ph-gone", caption: "", credit: "B. Builder" },
  ],
};

const clone = (c: CardProposal): CardProposal => structuredClone(c);
const url = (id: string, thumb: boolean) => `/photos/${id}${thumb ? "?size=thumb" : ""}`;
const notesHtml = { before: "<p>Old notes.</p>", after: "<p>New <strong>notes</strong>.</p>" };

// jis-letters is the demo's Japanese-style house (REFERENCE-FACTS 1.3): there "Bl" is not understood.
function render(before: CardProposal | null, after: CardProposal, notes = notesHtml) {
  const html = renderToStaticMarkup(
    createElement(CardDiffView, { diff: diffCards(before, after), colourSystem: "jis", houseStyle: "jis-letters", photoUrl: url, notesHtml: notes }),
  );
  const nodes = parseDocument(html).children;
  const all = (pred: (e: El) => boolean) => DomUtils.findAll(pred, nodes);
  const text = (e: El) => DomUtils.textContent(e).replace(/\s+/g, " ").trim();
  const pinRows = () => all((e) => e.name === "tr" && e.attribs["data-cavity"] !== undefined);
  const row = (cavity: string) => {
    const found = pinRows().filter((e) => e.attribs["data-cavity"] === cavity);
    expect(found, `one pin row for cavity ${cavity}`).toHaveLength(1);
    return found[0];
  };
  const cell = (r: El, field: string) => DomUtils.findOne((e) => e.name === "td" && e.attribs["data-field"] === field, [r])!;
  const faces = () => all((e) => e.name === "figure" && e.attribs["data-face"] !== undefined);
  return { html, all, text, row, pinRows, cell, faces };
}

describe("CardDiffView", () => {
  it("marks a new row, a row taken out and changed rows with words and symbols on the right rows", () => {
    const after = clone(published);
    after.pins = [
      pin("1", "B/W", "Trigger 1 feed", null, { connector: "demo-igniter", cavity: "3" }), // unchanged
      pin("2", "L", "Trigger 1 return", null, { connector: "demo-igniter", cavity: "4" }), // colour R/Y → L
      pin("3", "G/R", "Earth", "31", { connector: "demo-frame-earth", cavity: "1" }), // goes to changes
      // cavity 4 taken out; cavity 5 new (layout grows to 2×3 below would be a layout change; keep 5 in a bigger grid)
      pin("5", "W", "Tacho signal", null, null),
    ];
    after.layout = gridLayout(2, 3, { missing: [[2, 3]] });
    const v = render(published, after);

    const r2 = v.row("2");
    expect(r2.attribs["data-change"]).toBe("changed");
    expect(v.text(r2)).toContain("Δ changed");
    // The proposed colour emphasised, the published one after "was", both as words too.
    const code2 = v.cell(r2, "code");
    expect(code2.attribs["data-changed"]).toBe("true");
    expect(v.text(DomUtils.findOne((e) => e.name === "ins", [code2])!)).toBe("L");
    expect(v.text(DomUtils.findOne((e) => e.attribs["data-was"] === "true", [code2])!)).toBe("was R/Y");
    expect(v.text(v.cell(r2, "colour"))).toContain("blue");
    expect(v.text(v.cell(r2, "colour"))).toContain("was red with yellow tracer");
    expect(v.cell(r2, "circuit").attribs["data-changed"]).toBeUndefined();

    const r3 = v.row("3");
    expect(r3.attribs["data-change"]).toBe("changed");
    const goes3 = v.cell(r3, "goesTo");
    expect(goes3.attribs["data-changed"]).toBe("true");
    expect(v.text(goes3)).toBe("demo-frame-earth, cavity 1 was demo-earth-block, cavity 1");
    expect(v.cell(r3, "code").attribs["data-changed"]).toBeUndefined();

    const r4 = v.row("4");
    expect(r4.attribs["data-change"]).toBe("removed");
    expect(v.text(r4)).toContain("− row taken out");
    expect(DomUtils.findAll((e) => e.name === "del", [r4]).length).toBeGreaterThan(0);

    const r5 = v.row("5");
    expect(r5.attribs["data-change"]).toBe("added");
    expect(v.text(r5)).toContain("+ new row");
    expect(v.text(v.cell(r5, "colour"))).toContain("white");

    // Each row carries exactly one marking, and only its own.
    for (const [cavity, mark] of [
      ["2", "changed"],
      ["3", "changed"],
      ["4", "removed"],
      ["5", "added"],
      ["1", "same"],
    ] as const) {
      const marks = DomUtils.findAll((e) => e.attribs["data-mark"] !== undefined, [v.row(cavity)]).map((e) => e.attribs["data-mark"]);
      expect(marks).toEqual([mark]);
    }
    expect(v.text(v.all((e) => e.attribs["data-summary"] === "true")[0])).toBe(
      "Against the published card it changes: the housing layout; 4 pin-map rows (1 new row, 1 row taken out, 2 changed).",
    );
    // Rings on each face where the cavity exists: 5 is not in the published 2×2 housing; 4 stays, empty, in the proposed one.
    const ringed = v
      .faces()
      .map((f) =>
        DomUtils.findAll((e) => e.attribs["data-face-mark"] !== undefined, [f]).map((m) => `${m.attribs["data-cavity"]}:${m.attribs["data-face-mark"]}`),
      );
    expect(ringed).toEqual([
      ["2:changed", "3:changed", "4:removed"],
      ["2:changed", "3:changed", "4:removed", "5:added"],
    ]);
  });

  it("keeps unchanged rows in a collapsed <details> that works without JavaScript", () => {
    const after = clone(published);
    after.pins[1] = { ...after.pins[1], circuit: "Trigger 1 return (screened)" };
    const v = render(published, after);
    const details = v.all((e) => e.name === "details" && e.attribs["data-unchanged-rows"] !== undefined);
    expect(details).toHaveLength(1);
    expect(details[0].attribs.open).toBeUndefined();
    expect(details[0].attribs["data-unchanged-rows"]).toBe("3");
    expect(v.text(DomUtils.findOne((e) => e.name === "summary", details)!)).toBe("3 unchanged rows: show");
    const hidden = DomUtils.findAll((e) => e.name === "tr" && e.attribs["data-cavity"] !== undefined, details).map((e) => e.attribs["data-cavity"]);
    expect(hidden).toEqual(["1", "3", "4"]);
    for (const c of hidden) expect(v.text(v.row(c))).toContain("= unchanged");
    // The changed row is outside the details, in the main table.
    const r2 = v.row("2");
    expect(DomUtils.findAll((e) => e === r2, details)).toHaveLength(0);
    expect(v.text(v.cell(r2, "circuit"))).toBe("Trigger 1 return (screened) was Trigger 1 return");
  });

  it("uses semantic tables: captions, column and row headers", () => {
    const after = clone(published);
    after.name = "Trigger plug, left (demo)";
    after.pins[0] = { ...after.pins[0], terminal: "15" };
    const v = render(published, after);
    const tables = v.all((e) => e.name === "table");
    expect(tables.length).toBeGreaterThanOrEqual(3);
    for (const t of tables) {
      expect(DomUtils.findOne((e) => e.name === "caption", [t])).toBeTruthy();
      expect(DomUtils.findAll((e) => e.name === "th" && e.attribs.scope === "col", [t]).length).toBeGreaterThan(1);
    }
    const fieldRow = v.all((e) => e.name === "tr" && e.attribs["data-field"] === "name")[0];
    const th = DomUtils.findOne((e) => e.name === "th" && e.attribs.scope === "row", [fieldRow])!;
    expect(v.text(th)).toBe("Name");
    expect(v.text(fieldRow)).toContain("Trigger plug (demo)");
    expect(v.text(fieldRow)).toContain("Trigger plug, left (demo)");
    expect(DomUtils.findOne((e) => e.name === "th" && e.attribs.scope === "row", [v.row("1")])).toBeTruthy();
    // Table wrappers scroll sideways on a phone.
    expect(v.html).toContain("overflow-x-auto");
  });

  it("draws published and proposed face views when the layout changes, ringing the cavities whose rows change", () => {
    const after = clone(published);
    after.layout = gridLayout(1, 4, { latch: "bottom" });
    after.pins[3] = { ...after.pins[3], code: "B/W" };
    const v = render(published, after);
    const faces = v.faces();
    expect(faces.map((f) => f.attribs["data-face"])).toEqual(["published", "proposed"]);
    expect(v.all((e) => e.name === "svg" && e.attribs.role === "img")).toHaveLength(2);
    expect(v.html).toContain("The housing layout changes.");
    expect(v.text(faces[0])).toContain("2×2 grid");
    expect(v.text(faces[1])).toContain("1×4 grid");
    expect(v.text(faces[1])).toContain("latch at the bottom");
    for (const f of faces) {
      const marks = DomUtils.findAll((e) => e.attribs["data-face-mark"] !== undefined, [f]);
      expect(marks.map((m) => [m.attribs["data-cavity"], m.attribs["data-face-mark"]])).toEqual([["4", "changed"]]);
      expect(v.text(f)).toContain("Marked here: cavity 4 (Δ changed)");
    }
    // The face paints from the decoded colours: the proposed cavity 4 is black with a white tracer.
    expect(v.html).toContain("Cavity 4: B/W, black with white tracer");
    expect(v.html).toContain("Cavity 4: Y/G, yellow with green tracer");
  });

  it("shows new, taken-out and kept photos as linked lazy thumbnails with captions and credits", () => {
    const after = clone(published);
    after.photos = [published.photos[0], { id: "ph-new", caption: "Socket half, mating face", credit: "C. Restorer" }];
    const v = render(published, after);
    const imgs = v.all((e) => e.name === "img");
    expect(imgs).toHaveLength(3);
    for (const img of imgs) {
      expect(img.attribs.loading).toBe("lazy");
      expect(img.attribs.alt).toBeTruthy();
      const a = img.parent as El;
      expect(a.name).toBe("a");
      expect(a.attribs.href).toBe(img.attribs.src.replace("?size=thumb", ""));
    }
    const fig = (id: string) => v.all((e) => e.name === "figure" && e.attribs["data-photo"] === id)[0];
    expect(fig("ph-new").attribs["data-change"]).toBe("added");
    expect(v.text(fig("ph-new"))).toContain("+ new photo");
    expect(v.text(fig("ph-new"))).toContain("Credit: C. Restorer");
    expect(DomUtils.findOne((e) => e.name === "img", [fig("ph-new")])!.attribs.alt).toBe("Socket half, mating face");
    expect(fig("ph-gone").attribs["data-change"]).toBe("removed");
    expect(v.text(fig("ph-gone"))).toContain("− photo taken out");
    // No caption: "Photo N" stands in.
    expect(DomUtils.findOne((e) => e.name === "img", [fig("ph-gone")])!.attribs.alt).toMatch(/^Photo \d+$/);
    expect(v.text(fig("ph-kept"))).toContain("kept");
    expect(v.text(fig("ph-kept"))).toContain("Credit: A. Rider");
    expect(DomUtils.findOne((e) => e.name === "img", [fig("ph-kept")])!.attribs.src).toBe("/photos/ph-kept?size=thumb");
  });

  it("marks specs added, taken out and changed", () => {
    const after = clone(published);
    after.specs = [
      { ...published.specs[0], max: 650 },
      {
        name: "Pickup air gap check",
        min: 0.3,
        max: 0.5,
        unit: "mm",
        between: ["1", "2"],
        atC: 20,
        source: "demo data",
        conditions: "Engine stopped, feeler gauge at the rotor tip",
        kind: "gap",
        material: null,
      },
    ];
    const v = render(published, after);
    const spec = (name: string) => v.all((e) => e.name === "tr" && e.attribs["data-spec"] === name)[0];
    expect(spec("Trigger winding").attribs["data-change"]).toBe("changed");
    expect(v.text(spec("Trigger winding"))).toContain("400–650 Ω was 400–600 Ω");
    expect(spec("Pickup air gap check").attribs["data-change"]).toBe("added");
    expect(spec("Insulation to earth").attribs["data-change"]).toBe("removed");
    expect(v.text(spec("Insulation to earth"))).toContain("row taken out");
  });

  it("inserts the sanitised notes HTML as given, published beside proposed", () => {
    const after = clone(published);
    after.notes = "New **notes**.";
    const v = render(published, after);
    expect(v.html).toContain('data-notes-changed="true"');
    expect(v.html).toContain("<p>Old notes.</p>");
    expect(v.html).toContain("<p>New <strong>notes</strong>.</p>");
    const boxes = v.all((e) => e.attribs["data-notes"] !== undefined).map((e) => e.attribs["data-notes"]);
    expect(boxes).toEqual(["published", "proposed"]);
  });

  it("renders cavity labels, colour codes and circuits only as escaped text", () => {
    const script = "<script>alert(1)</script>";
    const img = '"><img src=x onerror=alert(1)>';
    const before = clone(published);
    before.pins[0] = { ...before.pins[0], circuit: img };
    const after = clone(published);
    after.layout = { ...gridLayout(2, 2), cavities: [{ cavity: script, row: 1, col: 1 }, ...gridLayout(2, 2).cavities.slice(1)], pin1: script };
    after.pins = [pin(script, img, script, img, { connector: img, cavity: script }), ...published.pins.slice(1).map((p) => ({ ...p }))];
    after.pins[1].code = script;
    after.name = img;
    after.photos = [{ id: "ph-x", caption: img, credit: script }];
    const v = render(before, after, { before: "<p>safe</p>", after: "<p>also safe</p>" });
    expect(v.all((e) => e.name === "script")).toHaveLength(0);
    // Only our own thumbnails (the new one and the two taken out), none from the typed strings.
    expect(
      v
        .all((e) => e.name === "img")
        .map((e) => e.attribs.src)
        .sort(),
    ).toEqual(["/photos/ph-gone?size=thumb", "/photos/ph-kept?size=thumb", "/photos/ph-x?size=thumb"]);
    expect(v.all((e) => e.attribs.onerror !== undefined)).toHaveLength(0);
    expect(v.html).not.toContain("<script");
    expect(v.html).not.toContain("<img src=x");
    expect(v.html).toContain("&lt;script&gt;alert(1)&lt;/script&gt;");
    expect(v.html).toContain("&quot;&gt;&lt;img src=x onerror=alert(1)&gt;");
    // The strings survive as text where they were typed.
    expect(v.text(v.row(script))).toContain(script);
    expect(v.text(v.row("1"))).toContain(img);
    expect(v.text(v.cell(v.row("2"), "code"))).toContain(script);
  });

  it("shows a new card with the proposed face only and every row as new", () => {
    const fresh = clone(published);
    fresh.photos = [{ id: "ph-1", caption: "", credit: "D. Builder" }];
    const v = render(null, fresh, { before: "", after: "<p>Fresh notes.</p>" });
    expect(v.html).toContain('data-diff="new-card"');
    expect(v.html).toContain("A new card: there is no published version to compare with");
    expect(v.faces().map((f) => f.attribs["data-face"])).toEqual(["proposed"]);
    expect(v.all((e) => e.name === "svg" && e.attribs.role === "img")).toHaveLength(1);
    expect(v.pinRows().map((r) => r.attribs["data-change"])).toEqual(["added", "added", "added", "added"]);
    for (const r of v.pinRows()) expect(v.text(r)).toContain("+ new row");
    expect(v.all((e) => e.name === "th" && e.attribs.scope === "col" && DomUtils.textContent(e).startsWith("Published"))).toHaveLength(0);
    expect(v.html).toContain("<p>Fresh notes.</p>");
    expect(
      DomUtils.findOne(
        (e) => e.name === "img",
        v.all(() => true),
      )!.attribs.alt,
    ).toBe("Photo 1");
  });

  it("says when the proposal changes nothing", () => {
    const v = render(published, clone(published), { before: "<p>Old notes.</p>", after: "<p>Old notes.</p>" });
    expect(v.html).toContain('data-diff="none"');
    expect(v.text(v.all((e) => e.attribs["data-nothing-changed"] === "true")[0])).toContain("This proposal changes nothing");
    expect(v.pinRows()).toHaveLength(0);
    expect(v.faces()).toHaveLength(0);
  });

  it("says so when a code is not understood, and an empty cavity reads as empty", () => {
    const after = clone(published);
    after.pins[2] = { ...after.pins[2], code: "Bl" };
    after.pins[3] = { ...after.pins[3], code: null };
    const v = render(published, after);
    expect(v.text(v.cell(v.row("3"), "colour"))).toContain("not understood in this notation");
    expect(v.text(v.cell(v.row("4"), "colour"))).toContain("empty cavity");
    expect(v.text(v.cell(v.row("4"), "code"))).toBe("— was Y/G");
  });
});

describe("spec conditions, kinds and open maximums", () => {
  it("a changed condition alone makes the spec row changed, and the view shows what it was", () => {
    const after = clone(published);
    after.specs[0] = { ...after.specs[0], conditions: "Ignition off, plug apart, across cavities 1 and 2 of the coil side" };
    const diff = diffCards(published, after);
    expect(diff.any).toBe(true);
    expect(diff.specs[0]).toMatchObject({ change: "changed", fields: ["conditions"] });
    expect(diff.specs[1]).toMatchObject({ change: "same", fields: [] });
    const v = render(published, after);
    const row = v.all((e) => e.name === "tr" && e.attribs["data-spec"] === "Trigger winding")[0];
    expect(row.attribs["data-change"]).toBe("changed");
    const cell = v.cell(row, "conditions");
    expect(cell.attribs["data-changed"]).toBe("true");
    expect(v.text(cell)).toBe("Ignition off, plug apart, across cavities 1 and 2 of the coil side was Ignition off, plug apart, meter on the 2 kΩ range");
    expect(v.cell(row, "range").attribs["data-changed"]).toBeUndefined();
  });

  it("a changed kind, material or open maximum is a change too", () => {
    const after = clone(published);
    after.specs[0] = { ...after.specs[0], material: "carbon" };
    after.specs[1] = { ...after.specs[1], max: 1000, kind: "resistance" };
    const diff = diffCards(published, after);
    expect(diff.specs[0].fields).toEqual(["material"]);
    expect(diff.specs[1].fields).toEqual(["max", "kind"]);
    const v = render(published, after);
    const insul = v.all((e) => e.name === "tr" && e.attribs["data-spec"] === "Insulation to earth")[0];
    expect(v.text(v.cell(insul, "range"))).toBe("1–1000 MΩ was ≥ 1 MΩ (open: no upper limit)");
    expect(v.text(v.cell(insul, "what"))).toBe("resistance was insulation (must read open)");
  });

  it("shows an open maximum as no upper limit and an unstated condition as such", () => {
    const after = clone(published);
    after.specs.push({
      name: "Coil primary",
      min: 2.5,
      max: 3.5,
      unit: "Ω",
      between: ["3", "4"],
      atC: 20,
      source: "demo data",
      conditions: "",
      kind: "resistance",
      material: null,
    });
    const v = render(published, after);
    const insul = v.all((e) => e.name === "tr" && e.attribs["data-spec"] === "Insulation to earth")[0];
    expect(v.text(v.cell(insul, "range"))).toBe("≥ 1 MΩ (open: no upper limit)");
    const added = v.all((e) => e.name === "tr" && e.attribs["data-spec"] === "Coil primary")[0];
    expect(v.text(v.cell(added, "conditions"))).toBe("— (not stated)");
  });

  it("reads a revision written before conditions existed as empty conditions, resistance, no material", () => {
    const old = clone(published);
    old.specs = old.specs.map(({ conditions: _c, kind: _k, material: _m, ...rest }) => rest as CardProposal["specs"][number]);
    const now = clone(old);
    now.specs = now.specs.map((x) => ({ ...x, conditions: "", kind: "resistance", material: null }));
    expect(diffCards(old, now).specs.map((x) => x.change)).toEqual(["same", "same"]);
  });
});

describe("proposalProblems: a spec must state its conditions before review", () => {
  const clean = (p: CardProposal) =>
    proposalProblems(
      p,
      "jis",
      new Map([
        ["demo-igniter", ["3", "4"]],
        ["demo-earth-block", ["1"]],
      ]),
      { specsBefore: published.specs },
    );
  const conditionProblems = (p: CardProposal, before = published.specs) =>
    proposalProblems(
      p,
      "jis",
      new Map([
        ["demo-igniter", ["3", "4"]],
        ["demo-earth-block", ["1"]],
      ]),
      { specsBefore: before },
    ).filter((x) => /^specs\./.test(x.field));

  it("accepts the published card as it is (an open maximum is not “least above greatest”)", () => {
    expect(clean(clone(published))).toEqual([]);
  });

  it("a new spec without conditions gets a field error naming it", () => {
    const p = clone(published);
    p.specs.push({
      name: "Coil primary",
      min: 2.5,
      max: 3.5,
      unit: "Ω",
      between: ["3", "4"],
      atC: 20,
      source: "demo data",
      conditions: "  ",
      kind: "resistance",
      material: null,
    });
    const problems = conditionProblems(p);
    expect(problems).toHaveLength(1);
    expect(problems[0].field).toBe("specs.2.conditions");
    expect(problems[0].message).toMatch(/^Spec 3: say when and how it can be measured/);
  });

  it("a changed spec must state its conditions too; an unchanged one from the published card need not", () => {
    const before = published.specs.map((x) => ({ ...x, conditions: "" }));
    const p = clone(published);
    p.specs = before.map((x) => ({ ...x }));
    expect(conditionProblems(p, before), "unchanged from the published card").toEqual([]);
    p.specs[0] = { ...p.specs[0], max: 650 };
    expect(conditionProblems(p, before).map((x) => x.field)).toEqual(["specs.0.conditions"]);
    // A new card: every spec is new.
    expect(conditionProblems(p, []).map((x) => x.field)).toEqual(["specs.0.conditions", "specs.1.conditions"]);
  });

  it("is not checked when the proposal is not about to go in for review", () => {
    const p = clone(published);
    p.specs[0] = { ...p.specs[0], conditions: "" };
    expect(
      proposalProblems(
        p,
        "jis",
        new Map([
          ["demo-igniter", ["3", "4"]],
          ["demo-earth-block", ["1"]],
        ]),
      ).filter((x) => x.field.startsWith("specs.")),
    ).toEqual([]);
  });

  it("a spec may be measured to earth, an HT tower or a plug cap; any other name must be a cavity of the layout", () => {
    // The trade measures an insulation test to the bare crankcase and a coil's secondary between its HT towers
    // (common practice), points that are not cavities of the card's housing.
    const p = clone(published);
    p.specs[1] = { ...p.specs[1], between: ["1", "earth"] };
    p.specs.push({
      name: "Secondary winding",
      min: 10,
      max: 16,
      unit: "kΩ",
      between: ["HT A", "HT B"],
      atC: 20,
      source: "demo data",
      conditions: "Ignition off, leads out",
      kind: "resistance",
      material: "copper",
    });
    p.specs.push({
      name: "Plug cap",
      min: 4,
      max: 6,
      unit: "kΩ",
      between: ["cap", "HT"],
      atC: 20,
      source: "demo data",
      conditions: "Cap off the plug",
      kind: "resistance",
      material: "carbon",
    });
    expect(conditionProblems(p)).toEqual([]);
    p.specs[0] = { ...p.specs[0], between: ["1", "frame"] };
    const problems = conditionProblems(p);
    expect(problems.map((x) => x.field)).toEqual(["specs.0.between"]);
    expect(problems[0].message).toMatch(/“frame” is neither a cavity of the layout nor “earth”/);
  });

  it("an insulation test with an upper limit is refused, since it must read open", () => {
    const p = clone(published);
    p.specs[1] = { ...p.specs[1], max: 1000 };
    expect(conditionProblems(p).map((x) => x.field)).toEqual(["specs.1.max"]);
  });
});
