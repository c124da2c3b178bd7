import { describe, expect, it } from "vitest";
import { planPublish, PublishConflict, type PlanPin, type PublishInput } from "~/domain/publish-plan";
import type { ProposedPin } from "~/domain/submissions";

/*
 * An invented demo loom, no database. Four cards in two mated pairs:
 *   1 demo-pickups-socket (loom half)  ⇄  2 demo-pickups-plug (on the pickups, component 70)
 *   3 demo-unit-plug (loom half)       ⇄  4 demo-unit-socket (on the ignition unit, component 80)
 * Wires: socket 1 → unit plug 5 (RD); socket 2 → splice 90 → unit plug 6 (BK). Socket 3 has no wire yet.
 * Codes are IEC 60757 letter codes (RD red, BK black, GN green, BU blue, WH white, BN brown).
 */
const pin = (id: number, connectorId: number | null, cavity: string, colourCode: string | null, position = 0, circuit = ""): PlanPin => ({
  id,
  connectorId,
  cavity,
  colourCode,
  circuit,
  terminal: null,
  position,
});

function world(): Omit<PublishInput, "rows"> {
  return {
    card: { id: 1, componentId: null },
    pins: [
      pin(11, 1, "1", "RD", 0, "Pickup 1"),
      pin(12, 1, "2", "BK", 1, "Earth"),
      pin(13, 1, "3", "GN", 2, "Pickup 2"),
      pin(21, 2, "1", "RD"),
      pin(22, 2, "2", "BK"),
      pin(23, 2, "3", "GN"),
      pin(31, 3, "5", "RD"),
      pin(32, 3, "6", "BK"),
      pin(33, 3, "7", "BU"),
      pin(41, 4, "5", "RD"),
      pin(42, 4, "6", "BK"),
      pin(43, 4, "7", "BU"),
      pin(90, null, "a", null), // a splice's terminal: no card, no colour of its own
    ],
    wires: [
      { id: 101, fromPinId: 11, toPinId: 31, colourCode: "RD" },
      { id: 102, fromPinId: 12, toPinId: 90, colourCode: "BK" },
      { id: 103, fromPinId: 90, toPinId: 32, colourCode: "BK" },
    ],
    connectors: [
      { id: 1, slug: "demo-pickups-socket", matesWithId: 2 },
      { id: 2, slug: "demo-pickups-plug", matesWithId: 1 },
      { id: 3, slug: "demo-unit-plug", matesWithId: 4 },
      { id: 4, slug: "demo-unit-socket", matesWithId: 3 },
    ],
    circuits: [],
    componentLinks: [],
    // As the published card's snapshot says (it looks through one splice for socket 2).
    goesToBefore: new Map([
      ["1", { connector: "demo-unit-plug", cavity: "5" }],
      ["2", { connector: "demo-unit-plug", cavity: "6" }],
      ["3", null],
    ]),
  };
}

/** The card as published, as proposal rows. */
function rows(): ProposedPin[] {
  return [
    { cavity: "1", code: "RD", circuit: "Pickup 1", terminal: null, goesTo: { connector: "demo-unit-plug", cavity: "5" } },
    { cavity: "2", code: "BK", circuit: "Earth", terminal: null, goesTo: { connector: "demo-unit-plug", cavity: "6" } },
    { cavity: "3", code: "GN", circuit: "Pickup 2", terminal: null, goesTo: null },
  ];
}
const row = (r: ProposedPin[], cavity: string) => r.find((x) => x.cavity === cavity)!;
const plan = (r: ProposedPin[], change: (w: Omit<PublishInput, "rows">) => void = () => {}) => {
  const w = world();
  change(w);
  return planPublish({ ...w, rows: r });
};

describe("publish plan: pins matched by cavity", () => {
  // Wires, circuits and component links point at pins by id (db/models/library.ts), so a kept cavity must keep its pin.
  it("publishing the card as it stands changes nothing", () => {
    expect(plan(rows())).toEqual({ deleteWires: [], deletePins: [], updatePins: [], createPins: [], wireColours: [], createWires: [], touched: [] });
  });

  it("a reordered, re-labelled row keeps its pin's id, so its wires keep their ends", () => {
    const r = rows();
    row(r, "1").circuit = "Pickup 1 (cylinders 1 and 4)";
    const p = plan([r[2], r[0], r[1]]);
    expect(p.updatePins).toEqual([
      { id: 11, changes: { circuit: "Pickup 1 (cylinders 1 and 4)", position: 1 } },
      { id: 12, changes: { position: 2 } },
      { id: 13, changes: { position: 0 } },
    ]);
    expect(p.createPins).toEqual([]);
    expect(p.deletePins).toEqual([]);
    expect(p.deleteWires).toEqual([]); // wire 101 still runs from pin 11
    expect(p.createWires).toEqual([]);
  });

  it("a cavity new to the card becomes a new pin, and its wire starts on it", () => {
    const r = [...rows(), { cavity: "4", code: "BU", circuit: "Pickup 2", terminal: null, goesTo: { connector: "demo-unit-plug", cavity: "7" } }];
    const p = plan(r);
    expect(p.createPins).toEqual([{ ref: -1, cavity: "4", colourCode: "BU", circuit: "Pickup 2", terminal: null, position: 3 }]);
    expect(p.createWires).toEqual([{ fromPinId: -1, toPinId: 33, colourCode: "BU" }]);
  });

  it("a cavity the proposal drops goes, with its wires", () => {
    const p = plan(rows().filter((x) => x.cavity !== "1"));
    expect(p.deletePins).toEqual([11]);
    expect(p.deleteWires).toEqual([101]);
    // The far end stays: it belongs to another card.
    expect(p.updatePins).toEqual([
      { id: 12, changes: { position: 0 } },
      { id: 13, changes: { position: 1 } },
    ]);
  });

  it("a cavity that ends a circuit or leads into a component cannot be dropped", () => {
    // A circuit names its two end pins and a component link its two terminals: dropping one would leave them pointing at nothing.
    const dropOne = rows().filter((x) => x.cavity !== "1");
    expect(() =>
      plan(dropOne, (w) => {
        w.circuits = [{ name: "Pickup 1 signal loop", fromPinId: 11, toPinId: 41 }];
      }),
    ).toThrow(new PublishConflict("Cavity 1 starts or ends the circuit “Pickup 1 signal loop”, so its row cannot be taken out."));
    expect(() =>
      plan(dropOne, (w) => {
        w.componentLinks = [{ fromPinId: 41, toPinId: 11 }];
      }),
    ).toThrow(/leads into its component/);
  });

  it("leaves the rows it was given as they were", () => {
    const w = world();
    const before = JSON.stringify({ ...w, goesToBefore: [...w.goesToBefore] });
    const r = rows();
    row(r, "1").code = "WH";
    planPublish({ ...w, rows: r.slice(1) });
    planPublish({ ...w, rows: r });
    expect(JSON.stringify({ ...w, goesToBefore: [...w.goesToBefore] })).toBe(before);
  });
});

describe("publish plan: a corrected colour", () => {
  // Common practice, and the loom check (db/check.ts): a wire has one colour end to end, and mated halves show the same
  // colour in the same cavity. So a correction on one card is a correction of the physical wire.
  it("follows its wire to the far end and across both mates", () => {
    const r = rows();
    row(r, "1").code = "WH";
    const p = plan(r);
    expect(p.updatePins).toEqual([
      { id: 11, changes: { colourCode: "WH" } }, // the card's own cavity
      { id: 21, changes: { colourCode: "WH" } }, // its mate, same cavity
      { id: 31, changes: { colourCode: "WH" } }, // the wire's far end
      { id: 41, changes: { colourCode: "WH" } }, // and the far end's mate
    ]);
    expect(p.wireColours).toEqual([{ id: 101, colourCode: "WH" }]);
    expect([...p.touched].sort()).toEqual([2, 3, 4]); // each gets a revision; the card itself is not listed
    expect(p.createWires).toEqual([]);
    expect(p.deleteWires).toEqual([]);
  });

  it("does not pass through a splice, where other wires of other colours may meet", () => {
    // Common practice: a splice joins separate wires, and a branch often carries a colour of its own.
    const r = rows();
    row(r, "2").code = "BN";
    const p = plan(r);
    expect(p.wireColours).toEqual([{ id: 102, colourCode: "BN" }]); // the wire on the cavity itself
    expect(p.updatePins).toEqual([
      { id: 12, changes: { colourCode: "BN" } },
      { id: 22, changes: { colourCode: "BN" } },
    ]);
    expect(p.touched).toEqual([2]);
  });

  it("only moves what still carries the old colour", () => {
    const r = rows();
    row(r, "1").code = "WH";
    const p = plan(r, (w) => {
      w.pins.find((x) => x.id === 41)!.colourCode = "GN";
    }); // already different across the far mate
    expect(p.updatePins.map((x) => x.id)).toEqual([11, 21, 31]);
  });

  it("a colour carried onto a later row of the card stays when that row leaves its colour as it was", () => {
    // A contrived loop (socket 1 wired to the plug's cavity 2, which mates back onto socket 2), all in RD.
    const r = rows();
    row(r, "1").code = "WH";
    row(r, "2").code = "RD";
    const p = plan(r, (w) => {
      w.wires = [{ id: 101, fromPinId: 11, toPinId: 22, colourCode: "RD" }];
      for (const id of [12, 22]) w.pins.find((x) => x.id === id)!.colourCode = "RD";
      w.goesToBefore = new Map([
        ["1", { connector: "demo-pickups-plug", cavity: "2" }],
        ["2", null],
        ["3", null],
      ]);
      row(r, "1").goesTo = { connector: "demo-pickups-plug", cavity: "2" };
      row(r, "2").goesTo = null;
    });
    // Row 2 says RD, as the card was read: the correction row 1 carried onto it is not undone.
    expect(p.updatePins.find((x) => x.id === 12)).toEqual({ id: 12, changes: { colourCode: "WH" } });
  });

  it("a row with no colour before or after moves nothing along its wire", () => {
    const r = rows();
    row(r, "1").code = null;
    const p = plan(r);
    expect(p.updatePins).toEqual([{ id: 11, changes: { colourCode: null } }]);
    expect(p.wireColours).toEqual([]);
  });
});

describe("publish plan: where a loom-side cavity goes", () => {
  // The loom check (db/check.ts): a loom-side cavity carries at most one wire, so a new far end replaces the old wire.
  it("a changed far end replaces the cavity's wire, in the cavity's colour", () => {
    const r = rows();
    row(r, "1").goesTo = { connector: "demo-unit-plug", cavity: "7" };
    const p = plan(r);
    expect(p.deleteWires).toEqual([101]);
    expect(p.createWires).toEqual([{ fromPinId: 11, toPinId: 33, colourCode: "RD" }]);
  });

  it("a cavity with no colour takes the far end's for its new wire", () => {
    const r = rows();
    Object.assign(row(r, "3"), { code: null, goesTo: { connector: "demo-unit-plug", cavity: "7" } });
    expect(plan(r).createWires).toEqual([{ fromPinId: 13, toPinId: 33, colourCode: "BU" }]);
  });

  it("replaces only wires straight to another card's cavity: the wire into a splice stays", () => {
    const r = rows();
    row(r, "2").goesTo = null;
    const p = plan(r);
    expect(p.deleteWires).toEqual([]);
    expect(p.createWires).toEqual([]);
  });

  it("an unchanged far end is left alone, and a card on a component is never rewired", () => {
    expect(plan(rows()).createWires).toEqual([]);
    const r = rows();
    row(r, "1").goesTo = { connector: "demo-unit-plug", cavity: "7" };
    const p = plan(r, (w) => {
      w.card = { id: 1, componentId: 70 };
    });
    expect(p.deleteWires).toEqual([]);
    expect(p.createWires).toEqual([]);
  });

  it("refuses a far end with no pin to end on", () => {
    const r = rows();
    row(r, "3").goesTo = { connector: "demo-unit-plug", cavity: "9" };
    expect(() => plan(r)).toThrow(new PublishConflict("demo-unit-plug cavity 9 has no pin for the wire to end on."));
    row(r, "3").goesTo = { connector: "demo-no-such-card", cavity: "1" };
    expect(() => plan(r)).toThrow(PublishConflict);
  });

  it("a corrected colour with a new far end: the correction follows the old wire, then the new one is laid in it", () => {
    const r = rows();
    Object.assign(row(r, "1"), { code: "WH", goesTo: { connector: "demo-unit-plug", cavity: "7" } });
    const p = plan(r);
    expect(p.updatePins.map((x) => x.id)).toEqual([11, 21, 31, 41]);
    expect(p.wireColours).toEqual([]); // wire 101 took WH, but it goes
    expect(p.deleteWires).toEqual([101]);
    expect(p.createWires).toEqual([{ fromPinId: 11, toPinId: 33, colourCode: "WH" }]);
  });
});
