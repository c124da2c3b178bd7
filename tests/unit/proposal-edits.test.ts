import { describe, expect, it } from "vitest";
import {
  addPinRow,
  addSpecRow,
  applyEditorIntent,
  movePinRow,
  pastePins,
  removePinRow,
  removeSpecRow,
  resizeLayout,
  syncPinsToLayout,
} from "~/domain/proposal-edits";
import { blankProposal, type CardProposal, type ProposedPin } from "~/domain/submissions";
import { LIMITS } from "~/validation/submissions";

// Invented demo card: a 2 × 3 housing with one empty position (row 2, column 3), Japanese-style letter codes.
function demo(): CardProposal {
  return {
    ...blankProposal("ignition"),
    name: "Demo pickup plug",
    location: "Under the tank, left side",
    layout: {
      rows: 2,
      cols: 3,
      pin1: "1",
      latch: "top",
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "2", row: 1, col: 2 },
        { cavity: "3", row: 1, col: 3 },
        { cavity: "4", row: 2, col: 1 },
        { cavity: "5", row: 2, col: 2 },
      ],
    },
    pins: [
      { cavity: "1", code: "B/W", circuit: "Pickup coil, cylinders 1 and 4", terminal: null, goesTo: null },
      { cavity: "2", code: "R/Y", circuit: "Switched supply", terminal: "15", goesTo: { connector: "demo-loom-socket", cavity: "2" } },
      { cavity: "3", code: "G/R", circuit: "Earth", terminal: "31", goesTo: null },
    ],
    specs: [
      {
        name: "Pickup coil resistance",
        min: 400,
        max: 500,
        unit: "Ω",
        between: ["1", "3"],
        atC: 20,
        source: "demo",
        conditions: "Ignition off, plug apart",
        kind: "resistance",
        material: "copper",
      },
    ],
  };
}

const pin = (cavity: string, code: string | null = null, circuit = ""): ProposedPin => ({ cavity, code, circuit, terminal: null, goesTo: null });
const cavitiesOf = (p: CardProposal) => p.pins.map((x) => x.cavity);

describe("pin rows", () => {
  it("adds a row on the first layout cavity without one, and leaves the input alone", () => {
    const p = demo();
    const before = JSON.stringify(p);
    const next = addPinRow(p);
    expect(cavitiesOf(next)).toEqual(["1", "2", "3", "4"]);
    expect(next.pins[3]).toEqual(pin("4"));
    expect(JSON.stringify(p)).toBe(before);
    // Every cavity taken: an empty cavity label for the contributor to fill in.
    const full = addPinRow(addPinRow(next));
    expect(cavitiesOf(full)).toEqual(["1", "2", "3", "4", "5", ""]);
  });

  it("stops at the row limit", () => {
    const p = { ...demo(), pins: Array.from({ length: LIMITS.pins }, (_, i) => pin(String(i + 1))) };
    expect(addPinRow(p)).toBe(p);
    expect(applyEditorIntent(p, "add-row", {})?.notice).toMatch(/at most 200 rows/);
  });

  it("removes a row; indices out of range change nothing", () => {
    const p = demo();
    expect(cavitiesOf(removePinRow(p, 1))).toEqual(["1", "3"]);
    for (const i of [-1, 3, 99, 1.5, Number.NaN]) expect(removePinRow(p, i)).toBe(p);
  });

  it("moves a row up and down, stopping at the ends", () => {
    const p = demo();
    expect(cavitiesOf(movePinRow(p, 2, -1))).toEqual(["1", "3", "2"]);
    expect(cavitiesOf(movePinRow(p, 0, 1))).toEqual(["2", "1", "3"]);
    expect(movePinRow(p, 0, -1)).toBe(p);
    expect(movePinRow(p, 2, 1)).toBe(p);
    expect(cavitiesOf(movePinRow(p, 2, -10))).toEqual(["3", "1", "2"]);
    expect(movePinRow(p, 3, -1)).toBe(p);
    expect(movePinRow(p, -1, 1)).toBe(p);
    // The row travels whole: its colour, circuit and "goes to" go with it.
    expect(movePinRow(p, 1, 1).pins[2]).toEqual(p.pins[1]);
  });
});

describe("spec rows", () => {
  it("adds an empty spec (numbers not yet typed) and removes by index", () => {
    const p = demo();
    const next = addSpecRow(p);
    expect(next.specs).toHaveLength(2);
    expect(next.specs[1].name).toBe("");
    expect(Number.isNaN(next.specs[1].min) && Number.isNaN(next.specs[1].max as number)).toBe(true);
    expect(next.specs[1].atC).toBe(20);
    // A new spec states no conditions yet (the contributor must, before review), measures a resistance, no material.
    expect(next.specs[1]).toMatchObject({ conditions: "", kind: "resistance", material: null });
    expect(removeSpecRow(next, 0).specs).toEqual([next.specs[1]]);
    expect(removeSpecRow(next, 2)).toBe(next);
    expect(removeSpecRow(next, -1)).toBe(next);
  });

  it("keeps the conditions, kind, material and an open maximum of the other rows when one is removed", () => {
    const p = demo();
    p.specs.push({
      name: "Pickup to earth",
      min: 1,
      max: null,
      unit: "MΩ",
      between: ["1", "3"],
      atC: 20,
      source: "demo",
      conditions: "Plug apart, cavity 1 to the engine",
      kind: "insulation",
      material: null,
    });
    expect(removeSpecRow(p, 0).specs).toEqual([p.specs[1]]);
    expect(applyEditorIntent(p, "remove-spec:0", {})!.proposal.specs[0]).toMatchObject({
      max: null,
      kind: "insulation",
      conditions: "Plug apart, cavity 1 to the engine",
    });
  });

  it("stops at the spec limit", () => {
    const p = { ...demo(), specs: Array.from({ length: LIMITS.specs }, () => demo().specs[0]) };
    expect(addSpecRow(p)).toBe(p);
  });
});

describe("resizeLayout", () => {
  it("keeps the cavities that still fit, where they are", () => {
    const next = resizeLayout(demo(), 1, 2);
    expect(next.layout).toMatchObject({ rows: 1, cols: 2, pin1: "1" });
    expect(next.layout.cavities).toEqual([
      { cavity: "1", row: 1, col: 1 },
      { cavity: "2", row: 1, col: 2 },
    ]);
    // The pin map is not touched: rows for dropped cavities stay (and are reported by the checks).
    expect(cavitiesOf(next)).toEqual(["1", "2", "3"]);
  });

  it("grows with empty cells and moves pin 1 when its cavity is dropped", () => {
    const grown = resizeLayout(demo(), 3, 4);
    expect(grown.layout.rows).toBe(3);
    expect(grown.layout.cols).toBe(4);
    expect(grown.layout.cavities).toEqual(demo().layout.cavities);
    const p = { ...demo(), layout: { ...demo().layout, pin1: "3" } };
    expect(resizeLayout(p, 2, 2).layout.pin1).toBe("1");
    expect(resizeLayout(p, 2, 3).layout.pin1).toBe("3");
  });

  it("clamps to 1…LIMITS and keeps the current size for a value that is not a number", () => {
    expect(resizeLayout(demo(), 0, -3).layout).toMatchObject({ rows: 1, cols: 1 });
    expect(resizeLayout(demo(), 500, 99).layout).toMatchObject({ rows: LIMITS.rows, cols: LIMITS.cols });
    expect(resizeLayout(demo(), Number.NaN, 2.7).layout).toMatchObject({ rows: 2, cols: 2 });
    expect(resizeLayout(demo(), 0, 1).layout.cavities).toEqual([{ cavity: "1", row: 1, col: 1 }]);
  });
});

describe("syncPinsToLayout", () => {
  it("adds a row per cavity without one, in layout order, after the rows already there", () => {
    const p = { ...demo(), pins: [pin("3", "G/R", "Earth"), pin("9", "B")] };
    const next = syncPinsToLayout(p);
    expect(cavitiesOf(next)).toEqual(["3", "9", "1", "2", "4", "5"]);
    expect(next.pins[0]).toEqual(p.pins[0]);
    expect(syncPinsToLayout(next)).toBe(next);
  });

  it("gives a label drawn twice one row only", () => {
    const p = {
      ...demo(),
      pins: [],
      layout: {
        ...demo().layout,
        cavities: [
          { cavity: "A", row: 1, col: 1 },
          { cavity: "A", row: 1, col: 2 },
        ],
      },
    };
    expect(cavitiesOf(syncPinsToLayout(p))).toEqual(["A"]);
  });
});

describe("pastePins", () => {
  // Common practice: a spreadsheet puts copied cells on the clipboard as tab-separated text, one line per row.
  it("reads a spreadsheet copy (tabs) with a header row, replacing the pin map", () => {
    const text = "Cavity\tColour\tCircuit\tTerminal\n1\tB/W\tPickup coil, cylinders 1 and 4\t\n2\tR/Y\tSwitched supply\t15\n\n3\tG/R\tEarth\t31\n";
    const r = pastePins(demo(), text, "replace");
    expect(r).toMatchObject({ added: 3, skipped: 0, problems: [] });
    expect(r.proposal.pins).toEqual([
      pin("1", "B/W", "Pickup coil, cylinders 1 and 4"),
      { ...pin("2", "R/Y", "Switched supply"), terminal: "15" },
      { ...pin("3", "G/R", "Earth"), terminal: "31" },
    ]);
  });

  it("reads a spreadsheet copy without a header as cavity, colour, circuit, terminal", () => {
    const r = pastePins(blankProposal(), "1\tB/W\tPickup\r\n2\tBl\tSupply\t15\r\n", "replace");
    expect(r.added).toBe(2);
    expect(r.proposal.pins[1]).toEqual({ ...pin("2", "Bl", "Supply"), terminal: "15" });
  });

  // RFC 4180 §2: a field containing commas, quotes or line breaks is enclosed in double quotes, and a quote inside
  // it is written twice.
  it("reads CSV with quoted fields (commas and doubled quotes inside)", () => {
    const text = 'cavity,colour,circuit,terminal\n1,B/W,"Pickup coil, cylinders 1 and 4",\n2,R/Y,"Supply from the ""main"" fuse",15\n';
    const r = pastePins(demo(), text, "replace");
    expect(r.problems).toEqual([]);
    expect(r.proposal.pins.map((p) => p.circuit)).toEqual(["Pickup coil, cylinders 1 and 4", 'Supply from the "main" fuse']);
  });

  it("reads semicolon-separated CSV (a common spreadsheet export where the comma is the decimal mark)", () => {
    const r = pastePins(blankProposal(), "1;B/W;Pickup\n2;R/Y;Supply\n", "replace");
    expect(cavitiesOf(r.proposal)).toEqual(["1", "2"]);
    expect(r.proposal.pins[1].code).toBe("R/Y");
  });

  // Our own export's columns: app/services/library.server.ts cardCsv (CRLF lines, an apostrophe before a leading
  // = + - @ so a spreadsheet does not run the cell as a formula).
  it("reads our own CSV export back, goes-to columns included", () => {
    const text = [
      "cavity,colour_code,base,tracers,iec,circuit,terminal,goes_to_connector,goes_to_cavity,goes_to",
      '1,B/W,black,white,BKWH,"Pickup coil, cylinders 1 and 4",,demo-igniter-plug,3,Demo igniter plug 3',
      "2,R/Y,red,yellow,RDYE,'-ve side of the coil,15,,,",
      "3,,,,,Spare,,,,",
      "",
    ].join("\r\n");
    const r = pastePins(blankProposal(), text, "replace");
    expect(r).toMatchObject({ added: 3, skipped: 0 });
    expect(r.proposal.pins[0]).toEqual({ ...pin("1", "B/W", "Pickup coil, cylinders 1 and 4"), goesTo: { connector: "demo-igniter-plug", cavity: "3" } });
    expect(r.proposal.pins[1]).toEqual({ ...pin("2", "R/Y", "-ve side of the coil"), terminal: "15" });
    expect(r.proposal.pins[2]).toEqual(pin("3", null, "Spare"));
  });

  it("skips blank lines and rows without a cavity, saying which line", () => {
    const r = pastePins(blankProposal(), "\n\n1\tB/W\n\n\tR/Y\tno cavity\n3\tG/R\n   \n", "replace");
    expect(cavitiesOf(r.proposal)).toEqual(["1", "3"]);
    expect(r.added).toBe(2);
    expect(r.skipped).toBe(1);
    expect(r.problems).toEqual([{ field: "paste", message: "Line 5: no cavity, so the row was left out." }]);
  });

  it("keeps the first of a cavity pasted twice", () => {
    const r = pastePins(blankProposal(), "1,B/W\n1,R/Y\n", "replace");
    expect(r.proposal.pins).toEqual([pin("1", "B/W")]);
    expect(r.skipped).toBe(1);
    expect(r.problems[0].message).toMatch(/^Line 2: cavity “1” is pasted twice/);
  });

  it("appends after the existing rows, filling in rows that hold only their cavity and never overwriting one filled in", () => {
    const p = { ...demo(), pins: [pin("1", "B/W", "Pickup"), pin("2")] };
    const r = pastePins(p, "1\tG/R\tclash\n2\tR/Y\tSupply\n4\tB\tEarth\n", "append");
    expect(r.proposal.pins).toEqual([pin("1", "B/W", "Pickup"), pin("2", "R/Y", "Supply"), pin("4", "B", "Earth")]);
    expect(r.added).toBe(2);
    expect(r.skipped).toBe(1);
    expect(r.problems[0].message).toMatch(/^Line 1: cavity “1” already has a row/);
  });

  it("leaves the pin map alone when nothing could be read", () => {
    const p = demo();
    for (const text of ["", "  \n\t\n", "cavity,colour\n"]) {
      const r = pastePins(p, text, "replace");
      expect(r.proposal).toBe(p);
      expect(r.added).toBe(0);
      expect(r.problems.length).toBeGreaterThan(0);
    }
    expect(pastePins(p, "x".repeat(100_001), "replace").proposal).toBe(p);
  });

  it("reports a quoted cell that is never closed", () => {
    const r = pastePins(blankProposal(), '1,B/W,"Pickup coil\n2,R/Y,Supply\n', "replace");
    expect(r.problems.some((x) => /quoted cell is not closed/.test(x.message))).toBe(true);
  });

  it("stops at the row limit", () => {
    const text = Array.from({ length: LIMITS.pins + 3 }, (_, i) => `${i + 1}\tB`).join("\n");
    const r = pastePins(blankProposal(), text, "replace");
    expect(r.proposal.pins).toHaveLength(LIMITS.pins);
    expect(r.skipped).toBe(3);
  });
});

describe("applyEditorIntent", () => {
  it("applies every editor button and returns null for anything else", () => {
    const p = demo();
    expect(cavitiesOf(applyEditorIntent(p, "add-row", {})!.proposal)).toEqual(["1", "2", "3", "4"]);
    expect(cavitiesOf(applyEditorIntent(p, "remove-row:0", {})!.proposal)).toEqual(["2", "3"]);
    expect(cavitiesOf(applyEditorIntent(p, "move-up:1", {})!.proposal)).toEqual(["2", "1", "3"]);
    expect(cavitiesOf(applyEditorIntent(p, "move-down:1", {})!.proposal)).toEqual(["1", "3", "2"]);
    expect(applyEditorIntent(p, "add-spec", {})!.proposal.specs).toHaveLength(2);
    expect(applyEditorIntent(p, "remove-spec:0", {})!.proposal.specs).toEqual([]);
    expect(cavitiesOf(applyEditorIntent(p, "sync-pins", {})!.proposal)).toEqual(["1", "2", "3", "4", "5"]);
    for (const intent of ["save", "submit", "", "remove-row:", "remove-row:x", "remove-row:-1", "move-up:1:2", "Add-Row", "paste-all"]) {
      expect(applyEditorIntent(p, intent, {}), intent).toBeNull();
    }
  });

  it("answers a stale index with the proposal unchanged and a notice", () => {
    const p = demo();
    for (const intent of ["remove-row:3", "move-up:99", "move-down:7", "remove-spec:1"]) {
      const r = applyEditorIntent(p, intent, {})!;
      expect(r.proposal, intent).toBe(p);
      expect(r.notice).toMatch(/no longer there/);
    }
  });

  it("redraws the grid from the posted rows and columns", () => {
    const r = applyEditorIntent(demo(), "layout", { rows: "1", cols: "3" })!;
    expect(r.proposal.layout.cavities.map((c) => c.cavity)).toEqual(["1", "2", "3"]);
    expect(r.notice).toBe("The grid is now 1 × 3; 2 cavities outside it were dropped.");
    expect(applyEditorIntent(demo(), "layout", {})!.proposal.layout).toEqual(demo().layout);
    expect(applyEditorIntent(demo(), "layout", { rows: "ten", cols: "40" })!.proposal.layout).toMatchObject({ rows: 2, cols: LIMITS.cols });
  });

  it("pastes in the posted mode and says what happened", () => {
    const replace = applyEditorIntent(demo(), "paste", { paste: "4\tB\tEarth\n\tW\n", pasteMode: "replace" })!;
    expect(cavitiesOf(replace.proposal)).toEqual(["4"]);
    expect(replace.notice).toBe("Put 1 row in the pin map. Skipped 1 row. Line 2: no cavity, so the row was left out.");
    const append = applyEditorIntent(demo(), "paste", { paste: "4\tB\tEarth\n", pasteMode: "append" })!;
    expect(cavitiesOf(append.proposal)).toEqual(["1", "2", "3", "4"]);
    // Anything but "append" replaces, as the select's first choice does.
    expect(cavitiesOf(applyEditorIntent(demo(), "paste", { paste: "5,B", pasteMode: "bogus" })!.proposal)).toEqual(["5"]);
    const empty = applyEditorIntent(demo(), "paste", {})!;
    expect(empty.proposal.pins).toEqual(demo().pins);
    expect(empty.notice).toMatch(/^Nothing was added/);
  });

  it("says when every cavity already has a row", () => {
    const p = syncPinsToLayout(demo());
    const r = applyEditorIntent(p, "sync-pins", {})!;
    expect(r.proposal).toBe(p);
    expect(r.notice).toBe("Every cavity in the layout already has a row.");
  });
});
