import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { DomUtils, parseDocument } from "htmlparser2";
import { describe, expect, it, vi } from "vitest";
import { ProposalEditor, editorFieldId, type ProposalEditorProps } from "~/components/proposal-editor";
import { swatch } from "~/domain/colours";
import { applyEditorIntent } from "~/domain/proposal-edits";
import { blankProposal, type CardProposal, type Problem } from "~/domain/submissions";
import { proposalFromForm, proposalSchema } from "~/validation/submissions";

// Invented demo card in the Japanese-style letter notation ("jis"): a 2 × 3 housing with one empty position.
function demo(): CardProposal {
  return {
    name: "Demo pickup plug",
    location: "Under the tank, left side",
    housing: "6-way, 2 × 3, white",
    gender: "plug",
    system: "ignition",
    matesWith: "demo-loom-socket",
    layout: {
      rows: 2,
      cols: 3,
      pin1: "2",
      latch: "left",
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "2", row: 1, col: 2 },
        { cavity: "3", row: 1, col: 3 },
        { cavity: "4", row: 2, col: 1 },
        { cavity: "5", row: 2, col: 2 },
      ],
    },
    pins: [
      { cavity: "1", code: "B/W", circuit: "Pickup coil, cylinders 1 and 4", terminal: null, goesTo: { connector: "demo-igniter-plug", cavity: "3" } },
      { cavity: "2", code: "R/Y", circuit: "Switched supply", terminal: "15", goesTo: null },
      { cavity: "3", code: "Bl", circuit: "Tacho signal", terminal: null, goesTo: null },
      { cavity: "4", code: "G/R", circuit: "Earth", terminal: "31", goesTo: { connector: "demo-loom-socket", cavity: "4" } },
      { cavity: "5", code: null, circuit: "", terminal: null, goesTo: null },
    ],
    specs: [
      {
        name: "Pickup coil resistance",
        min: 400,
        max: 500,
        unit: "Ω",
        between: ["1", "4"],
        atC: 20,
        source: "Demo manual p. 7",
        conditions: "Ignition off, plug apart, meter on the 2 kΩ range",
        kind: "resistance",
        material: "copper",
      },
      {
        name: "Supply voltage",
        min: 12.2,
        max: 12.8,
        unit: "V",
        between: ["2", "4"],
        atC: 25,
        source: "",
        conditions: "",
        kind: "regulated-voltage",
        material: null,
      },
    ],
    notes: "Check the **pin 1** mark.\n\n- first\n- second",
    photos: [],
  };
}

const familyCards: ProposalEditorProps["familyCards"] = [
  { slug: "demo-loom-socket", name: "Demo loom socket", cavities: ["1", "2", "3", "4", "5"] },
  { slug: "demo-igniter-plug", name: "Demo igniter plug", cavities: ["1", "2", "3"] },
];

// The demo's Japanese-style maker writes jis-letters (REFERENCE-FACTS 1.3): in that house "Bl" is no code. Without a
// house every Japanese-style house is tried and Bl reads as black (REFERENCE-FACTS 5 [from memory]).
const render = (props: Partial<ProposalEditorProps> = {}) =>
  renderToStaticMarkup(
    createElement(ProposalEditor, { proposal: demo(), colourSystem: "jis", houseStyle: "jis-letters", familyCards, problems: [], ...props }),
  );

type El = ReturnType<typeof DomUtils.findAll>[number];
const dom = (html: string) => parseDocument(html).children;
const all = (html: string, test: (e: El) => boolean) => DomUtils.findAll(test, dom(html));
const byId = (html: string, id: string) => DomUtils.findOne((e) => e.attribs.id === id, dom(html)) ?? null;
const text = (el: El | null) => (el ? DomUtils.textContent(el).replace(/\s+/g, " ").trim() : "");

function insideDisabledFieldset(e: El): boolean {
  for (let p = e.parent as El | null; p && p.type === "tag"; p = p.parent as El | null) if (p.name === "fieldset" && "disabled" in p.attribs) return true;
  return false;
}

/** The form data a browser would post for this markup with no button pressed (HTML's "constructing the entry list"). */
function formDataOf(html: string): FormData {
  const fd = new FormData();
  for (const e of all(html, (x) => ["input", "select", "textarea"].includes(x.name))) {
    const name = e.attribs.name;
    if (!name || "disabled" in e.attribs || insideDisabledFieldset(e)) continue;
    if (e.name === "input") {
      const type = (e.attribs.type ?? "text").toLowerCase();
      if (["submit", "button", "image", "reset", "file"].includes(type)) continue;
      if ((type === "checkbox" || type === "radio") && !("checked" in e.attribs)) continue;
      fd.append(name, e.attribs.value ?? (type === "checkbox" || type === "radio" ? "on" : ""));
    } else if (e.name === "select") {
      const options = DomUtils.findAll((o) => o.name === "option", e.children);
      const chosen = options.find((o) => "selected" in o.attribs) ?? options[0];
      if (chosen) fd.append(name, chosen.attribs.value ?? text(chosen));
    } else {
      // A newline straight after <textarea> is not part of its value (HTML parsing rules).
      fd.append(name, DomUtils.textContent(e).replace(/^\n/, ""));
    }
  }
  return fd;
}

const roundTrip = (html: string) => proposalSchema.parse(proposalFromForm(formDataOf(html)));

describe("ProposalEditor: field names", () => {
  it("renders every field proposalFromForm reads, each once", () => {
    const html = render();
    const names = all(html, (e) => ["input", "select", "textarea"].includes(e.name) && !!e.attribs.name).map((e) => e.attribs.name);
    const expected = ["name", "location", "housing", "system", "matesWith", "layout.rows", "layout.cols", "layout.pin1", "layout.latch", "notes"];
    for (let r = 1; r <= 2; r++) for (let c = 1; c <= 3; c++) expected.push(`layout.cell.${r}.${c}`);
    for (let i = 0; i < 5; i++) for (const f of ["cavity", "code", "circuit", "terminal", "goesToConnector", "goesToCavity"]) expected.push(`pins.${i}.${f}`);
    for (let i = 0; i < 2; i++) {
      for (const f of ["name", "min", "max", "open", "unit", "betweenA", "betweenB", "atC", "source", "conditions", "kind", "material"])
        expected.push(`specs.${i}.${f}`);
    }
    for (const n of expected)
      expect(
        names.filter((x) => x === n),
        n,
      ).toHaveLength(1);
    // Two radios for gender; the paste box's own fields; nothing else.
    expect(names.filter((x) => x === "gender")).toHaveLength(2);
    expect(new Set(names)).toEqual(new Set([...expected, "gender", "paste", "pasteMode"]));
    // Photos are the upload panel's (photos.<i>.id / caption / credit / remove), not the editor's.
    expect(names.some((n) => n.startsWith("photos."))).toBe(false);
  });

  it("gives every element a unique id and renders without React warnings", () => {
    const errors: unknown[] = [];
    const spy = vi.spyOn(console, "error").mockImplementation((...a: unknown[]) => {
      errors.push(a);
    });
    try {
      const html = render({ problems: [{ field: "pins.0.goesTo", message: "x" }] });
      const ids = all(html, (e) => !!e.attribs.id).map((e) => e.attribs.id);
      expect(ids.filter((id, k) => ids.indexOf(id) !== k)).toEqual([]);
      // Every aria-describedby names elements that exist.
      for (const e of all(html, (x) => !!x.attribs["aria-describedby"])) {
        for (const id of e.attribs["aria-describedby"].split(" ")) expect(ids, `${e.attribs.name} → ${id}`).toContain(id);
      }
    } finally {
      spy.mockRestore();
    }
    expect(errors).toEqual([]);
  });

  it("gives each field a label", () => {
    const html = render();
    const labelled = new Set(all(html, (e) => e.name === "label" && !!e.attribs.for).map((e) => e.attribs.for));
    for (const e of all(html, (x) => ["input", "select", "textarea"].includes(x.name) && x.attribs.type !== "radio")) {
      const ok = labelled.has(e.attribs.id) || !!e.attribs["aria-label"];
      expect(ok, e.attribs.name).toBe(true);
    }
  });
});

describe("ProposalEditor: round trip through the form", () => {
  it("posts back exactly the proposal it was given", () => {
    expect(roundTrip(render())).toEqual(demo());
  });

  it("round-trips a blank new card", () => {
    const blank = blankProposal("charging");
    expect(roundTrip(render({ proposal: blank }))).toEqual(blank);
  });

  it("drops a spec row that was added but never filled in", () => {
    const p = applyEditorIntent(demo(), "add-spec", {})!.proposal;
    const html = render({ proposal: p });
    expect(byId(html, "ed-specs-2-min")?.attribs.value).toBe("");
    expect(roundTrip(html)).toEqual(demo());
  });

  it("works as the no-JavaScript path: post a button, apply it on the server, render again", () => {
    const form = formDataOf(render());
    form.set("layout.rows", "3");
    form.set("intent", "add-row");
    const posted = proposalSchema.parse(proposalFromForm(form));
    expect(posted.layout.rows).toBe(3);
    const r = applyEditorIntent(posted, String(form.get("intent")), {});
    const html = render({ proposal: r!.proposal });
    expect(byId(html, "ed-pins-5-cavity")?.attribs.value).toBe("");
    expect(all(html, (e) => e.name === "input" && /^layout\.cell\.3\./.test(e.attribs.name ?? ""))).toHaveLength(3);
    expect(roundTrip(html)).toEqual(r!.proposal);
  });
});

describe("ProposalEditor: spec conditions, kind, material and an open maximum", () => {
  // Invented demo spec: an insulation test of a pickup winding to the engine, which must read open.
  const withInsulation = (): CardProposal => {
    const p = demo();
    p.specs.push({
      name: "Pickup to earth",
      min: 1,
      max: null,
      unit: "MΩ",
      between: ["1", "4"],
      atC: 20,
      source: "",
      conditions: "Ignition off, plug apart, cavity 1 to the engine",
      kind: "insulation",
      material: null,
    });
    return p;
  };

  it("renders the conditions, the kind and material selects and the no-upper-limit box with the spec's values", () => {
    const html = render({ proposal: withInsulation() });
    expect(byId(html, "ed-specs-0-conditions")?.attribs.value).toBe("Ignition off, plug apart, meter on the 2 kΩ range");
    expect(byId(html, "ed-specs-0-conditions")?.attribs["aria-describedby"]).toContain("ed-specs-0-conditions-hint");
    const selected = (id: string) => DomUtils.findAll((o) => o.name === "option" && "selected" in o.attribs, byId(html, id)!.children)[0]?.attribs.value;
    expect(selected("ed-specs-0-kind")).toBe("resistance");
    expect(selected("ed-specs-0-material")).toBe("copper");
    expect(selected("ed-specs-1-kind")).toBe("regulated-voltage");
    expect(selected("ed-specs-1-material")).toBe("");
    expect(selected("ed-specs-2-kind")).toBe("insulation");
    expect("checked" in byId(html, "ed-specs-2-open")!.attribs).toBe(true);
    expect("checked" in byId(html, "ed-specs-0-open")!.attribs).toBe(false);
    // Before hydration the greatest-value box stays usable: the server cannot switch it back on without JavaScript.
    expect("disabled" in byId(html, "ed-specs-2-max")!.attribs).toBe(false);
    expect(byId(html, "ed-specs-2-max")?.attribs.value).toBe("");
  });

  it("round-trips conditions, kind, material and a null maximum through the form", () => {
    expect(roundTrip(render({ proposal: withInsulation() }))).toEqual(withInsulation());
  });

  it("without JavaScript a ticked no-upper-limit box wins over a number left in the greatest box", () => {
    const form = formDataOf(render());
    form.set("specs.0.open", "1");
    expect(proposalSchema.parse(proposalFromForm(form)).specs[0].max).toBeNull();
  });

  it("shows a server problem about a spec's conditions beside its conditions box", () => {
    const message =
      "Spec 1: say when and how it can be measured (ignition off or on, engine stopped or at what rpm, what is unplugged), so a rider can repeat it.";
    const p = demo();
    p.specs[0] = { ...p.specs[0], conditions: "" };
    const html = render({ proposal: p, problems: [{ field: "specs.0.conditions", message }] });
    expect(text(byId(html, "ed-specs-0-conditions-problem"))).toBe(message);
    expect(byId(html, "ed-specs-0-conditions")!.attribs["aria-invalid"]).toBe("true");
    expect(editorFieldId("specs.0.conditions")).toBe("ed-specs-0-conditions");
  });

  it("the JSON schema: max null is no upper limit, an omitted max is an error, empty kind and material take their defaults", () => {
    const base = { ...demo().specs[0] } as Record<string, unknown>;
    const parse = (spec: Record<string, unknown>) => proposalSchema.safeParse({ ...demo(), specs: [spec] });
    const open = parse({ ...base, max: null });
    expect(open.success && open.data.specs[0].max).toBeNull();
    const { max: _max, ...noMax } = base;
    const missing = parse(noMax);
    expect(missing.success).toBe(false);
    expect(!missing.success && missing.error.issues[0].path.join(".")).toBe("specs.0.max");
    const defaults = parse({ ...base, kind: "", material: "", conditions: undefined });
    expect(defaults.success && defaults.data.specs[0]).toMatchObject({ kind: "resistance", material: null, conditions: "" });
    expect(parse({ ...base, kind: "voltage" }).success).toBe(false);
    expect(parse({ ...base, material: "brass" }).success).toBe(false);
  });
});

describe("ProposalEditor: buttons", () => {
  it("has every editor button as a submit button named intent, skipping validation", () => {
    const html = render();
    const buttons = all(html, (e) => e.name === "button" && e.attribs.name === "intent");
    const values = buttons.map((b) => b.attribs.value);
    const expected = ["layout", "add-row", "sync-pins", "paste", "add-spec"];
    for (let i = 0; i < 5; i++) expected.push(`move-up:${i}`, `move-down:${i}`, `remove-row:${i}`);
    for (let i = 0; i < 2; i++) expected.push(`remove-spec:${i}`);
    expect(new Set(values)).toEqual(new Set(expected));
    expect(values).toHaveLength(expected.length);
    for (const b of buttons) {
      expect(b.attribs.type, b.attribs.value).toBe("submit");
      expect("formnovalidate" in b.attribs, b.attribs.value).toBe(true);
    }
    expect(text(buttons.find((b) => b.attribs.value === "layout")!)).toBe("Redraw the grid");
    expect(text(buttons.find((b) => b.attribs.value === "sync-pins")!)).toBe("Add a row per cavity");
    // The first row cannot move up nor the last down.
    expect("disabled" in buttons.find((b) => b.attribs.value === "move-up:0")!.attribs).toBe(true);
    expect("disabled" in buttons.find((b) => b.attribs.value === "move-down:4")!.attribs).toBe(true);
    expect("disabled" in buttons.find((b) => b.attribs.value === "move-down:0")!.attribs).toBe(false);
  });

  it("offers the paste box with its two modes", () => {
    const html = render();
    expect(byId(html, "ed-paste")?.name).toBe("textarea");
    const modes = DomUtils.findAll((o) => o.name === "option", byId(html, "ed-pasteMode")!.children).map((o) => o.attribs.value);
    expect(modes).toEqual(["replace", "append"]);
  });

  it("renders no <form> of its own and disables everything when asked", () => {
    expect(all(render(), (e) => e.name === "form")).toHaveLength(0);
    const html = render({ disabled: true });
    expect([...formDataOf(html).keys()]).toEqual([]);
  });
});

describe("ProposalEditor: colours and the face view", () => {
  it("shows each code decoded in the family's notation, or the parser's message, as a polite status", () => {
    const html = render();
    const ok = byId(html, "ed-pins-0-code-status")!;
    expect(ok.attribs.role).toBe("status");
    expect(text(ok)).toBe("black with white tracer");
    expect(byId(html, "ed-pins-0-code")!.attribs["aria-describedby"]).toContain("ed-pins-0-code-status");
    expect(text(byId(html, "ed-pins-1-code-status"))).toBe("red with yellow tracer");
    // "Bl" is not a Japanese-style letter code (blue is L): the decoder says so.
    expect(text(byId(html, "ed-pins-2-code-status"))).toMatch(/"Bl" is not a colour code/);
    expect(byId(html, "ed-pins-2-code")!.attribs["aria-invalid"]).toBe("true");
    expect(text(byId(html, "ed-pins-4-code-status"))).toBe("");
  });

  it("reads the codes in the make's house style", () => {
    // REFERENCE-FACTS 5 [from memory]: a house that writes Bl for black; B is then no code of that house.
    const html = render({ houseStyle: "jis-bl-black" });
    expect(text(byId(html, "ed-pins-2-code-status"))).toBe("black");
    expect(text(byId(html, "ed-pins-0-code-status"))).toMatch(/"B" is not a colour code in .*jis-bl-black/);
  });

  it("draws the face view from the layout with each cavity in its wire's colours", () => {
    const html = render();
    const svg = all(html, (e) => e.name === "svg" && e.attribs.role === "img");
    expect(svg).toHaveLength(1);
    expect(svg[0].attribs["data-view"]).toBe("mating");
    const cavities = all(html, (e) => e.name === "g" && !!e.attribs["data-cavity"]).map((e) => e.attribs["data-cavity"]);
    expect(cavities).toEqual(["1", "2", "3", "4", "5"]);
    const one = all(html, (e) => e.name === "g" && e.attribs["data-cavity"] === "1")[0];
    expect(all(DomUtils.getOuterHTML(one), (e) => e.name === "rect" && e.attribs.fill === swatch("black").hex)).not.toHaveLength(0);
    expect(all(DomUtils.getOuterHTML(one), (e) => e.name === "rect" && e.attribs.fill === swatch("white").hex)).not.toHaveLength(0);
    expect(html).toContain("<title>Cavity 2 (pin 1): R/Y, red with yellow tracer</title>");
    expect(html).toContain("<title>Cavity 3: Bl (not understood)</title>");
    expect(html).toContain("<title>Cavity 5: empty</title>");
    expect(all(html, (e) => e.attribs["data-latch"] === "left")).toHaveLength(1);
  });

  it("without JavaScript shows the mating face only and a typed cavity box with suggestions for goes-to", () => {
    const html = render();
    expect(all(html, (e) => e.name === "button" && "aria-pressed" in e.attribs)).toHaveLength(0);
    const there = byId(html, "ed-pins-0-goesToCavity")!;
    expect(there.name).toBe("input");
    const list = byId(html, there.attribs.list)!;
    expect(DomUtils.findAll((o) => o.name === "option", list.children).map((o) => o.attribs.value)).toEqual(["1", "2", "3"]);
  });
});

describe("ProposalEditor: problems", () => {
  const problems: Problem[] = [
    { field: "name", message: "Give the card a name, e.g. “Pickup coil plug”." },
    { field: "pins.2.code", message: "Row 3: “Bl” is not a colour in this family's notation." },
    { field: "pins.0.goesTo", message: "Row 1: that connector has no cavity “3”." },
    { field: "layout", message: 'Cavity label "9" is used more than once.' },
    { field: "specs.1.between", message: "Spec 2: cavity “2” is not in the layout." },
    { field: "sourceKind", message: "Say how you know: traced on the bike, factory manual or measured." },
  ];

  it("shows each problem beside its field and tells assistive technology", () => {
    const html = render({ problems });
    const at = (field: string) => byId(html, `${editorFieldId(field)}-problem`);
    expect(text(at("name"))).toBe(problems[0].message);
    expect(byId(html, "ed-name")!.attribs["aria-describedby"]).toContain("ed-name-problem");
    expect(byId(html, "ed-name")!.attribs["aria-invalid"]).toBe("true");
    expect(text(at("pins.2.code"))).toBe(problems[1].message);
    expect(byId(html, "ed-pins-2-code")!.attribs["aria-describedby"]).toContain("ed-pins-2-code-problem");
    // The decoder's own message is not repeated under a server problem for the same code.
    expect(text(byId(html, "ed-pins-2-code-status"))).toBe("");
    expect(text(at("pins.0.goesTo"))).toBe(problems[2].message);
    expect(byId(html, "ed-pins-0-goesToConnector")!.attribs["aria-describedby"]).toContain(`${editorFieldId("pins.0.goesTo")}-problem`);
    expect(text(at("layout"))).toBe(problems[3].message);
    expect(byId(html, editorFieldId("layout"))?.name).toBe("section");
    expect(text(at("specs.1.between"))).toBe(problems[4].message);
    expect(byId(html, "ed-specs-1-betweenA")!.attribs["aria-describedby"]).toContain("ed-specs-1-betweenA-problem");
  });

  it("lists them at the top, each linking to its field", () => {
    const html = render({ problems });
    const summary = all(html, (e) => e.attribs["data-testid"] === "problem-summary")[0];
    expect(text(DomUtils.findOne((e) => e.name === "h2", summary.children))).toBe("6 things to put right");
    const links = DomUtils.findAll((e) => e.name === "a", summary.children).map((a) => [a.attribs.href, text(a)]);
    expect(links).toEqual([
      ["#ed-name", problems[0].message],
      ["#ed-pins-2-code", problems[1].message],
      ["#ed-pins-0-goesToConnector", problems[2].message],
      ["#ed-layout", problems[3].message],
      ["#ed-specs-1-betweenA", problems[4].message],
      // The page renders the source fields; editorFieldId gives them the id this link expects.
      ["#ed-sourceKind", problems[5].message],
    ]);
    for (const [href] of links.slice(0, 5)) expect(byId(html, href!.slice(1)), href).not.toBeNull();
    expect(all(render(), (e) => e.attribs["data-testid"] === "problem-summary")).toHaveLength(0);
  });

  it("runs the domain's checks live: a cavity not in the layout, a terminal that is not DIN 72552", () => {
    const p = demo();
    p.pins[1] = { ...p.pins[1], cavity: "8", terminal: "99x" };
    const html = render({ proposal: p });
    expect(text(byId(html, "ed-pins-1-cavity-problem"))).toBe("Row 2: cavity “8” is not in the housing layout.");
    // DIN 72552 terminal numbers are digits with an optional letter (15, 30, 31b …): see ../shared/REFERENCE-FACTS.md §2.
    expect(text(byId(html, "ed-pins-1-terminal-problem"))).toMatch(/“99x” is not a DIN 72552 terminal designation/);
  });

  it("asks plainly for what an unfinished spec row lacks, and says nothing about one left empty", () => {
    const p = applyEditorIntent(applyEditorIntent(demo(), "add-spec", {})!.proposal, "add-spec", {})!.proposal;
    p.specs[2] = { ...p.specs[2], name: "Coil primary", between: ["1", ""] };
    const html = render({ proposal: p });
    expect(text(byId(html, "ed-specs-2-min-problem"))).toBe("Spec 3: give the least and the greatest value.");
    expect(text(byId(html, "ed-specs-2-betweenA-problem"))).toBe("Spec 3: give both cavities to measure between.");
    expect(all(html, (e) => /^ed-specs-3-.*-problem$/.test(e.attribs.id ?? ""))).toHaveLength(0);
  });
});

describe("ProposalEditor: untrusted text", () => {
  it("renders codes, circuits and notes as text, never as markup", () => {
    const p = demo();
    const evil = ["<script>alert(1)</script>", '"><img src=x onerror=alert(1)>'];
    p.pins[0] = { ...p.pins[0], code: evil[0], circuit: evil[1] };
    p.pins[1] = { ...p.pins[1], code: evil[1] };
    p.notes = "</textarea><script>alert(2)</script>";
    p.name = '"><svg onload=alert(3)>';
    const html = render({ proposal: p, problems: [{ field: "pins.0.code", message: `Row 1: “${evil[0]}” is not a colour.` }] });
    expect(html).not.toMatch(/<script|<img|<svg onload/i);
    const tags = new Set(all(html, () => true).map((e) => e.name));
    for (const bad of ["script", "img", "iframe", "object", "embed"]) expect(tags.has(bad), bad).toBe(false);
    for (const e of all(html, () => true)) for (const a of Object.keys(e.attribs)) expect(a.startsWith("on"), `${e.name} ${a}`).toBe(false);
    // The text comes back intact as values (so nothing was lost by escaping).
    expect(byId(html, "ed-pins-0-code")!.attribs.value).toBe(evil[0]);
    expect(byId(html, "ed-pins-1-code")!.attribs.value).toBe(evil[1]);
    expect(byId(html, "ed-pins-0-circuit")!.attribs.value).toBe(evil[1]);
    expect(DomUtils.textContent(byId(html, "ed-notes")!)).toBe(p.notes);
    expect(text(byId(html, "ed-pins-0-code-problem"))).toContain(evil[0]);
    expect(text(byId(html, "ed-pins-1-code-status"))).toContain('"><img');
  });
});
