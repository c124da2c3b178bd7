import { describe, expect, it } from "vitest";
import { parseFiringOrder, wastedSparkPairs } from "~/domain/wasted-spark";
import { WorkshopInputError } from "~/domain/wire-size";

// Sources are the sections of /work/shared/REFERENCE-FACTS.md named beside each check.

describe("companion-cylinder method (Halderman, §4.1)", () => {
  it("pairs 1-2-4-3 as 1&4 and 2&3", () => {
    // §4.1: "1 2 / 4 3" → columns 1&4, 2&3
    const r = wastedSparkPairs("1-2-4-3", { cylinders: 4, layout: "inline", crankDeg: 180 });
    expect(r.suitable).toBe(true);
    expect(r.pairs).toEqual([
      [1, 4],
      [2, 3],
    ]);
    expect(r.columns).toEqual([
      [1, 4],
      [2, 3],
    ]);
    expect(r.method).toMatch(/companion-cylinder/i);
    expect(r.method).toContain("1 2 / 4 3");
    expect(r.intervalsDeg).toEqual([180, 180, 180, 180]);
  });

  it("gives 1-3-4-2 the same pairs, normalised to sorted pairs", () => {
    // §4.1: 1-3-4-2 gives 1 & 4, 3 & 2; we normalise each pair ascending and order pairs by first cylinder
    const r = wastedSparkPairs("1-3-4-2", { cylinders: 4, layout: "inline" });
    expect(r.columns).toEqual([
      [1, 4],
      [3, 2],
    ]);
    expect(r.pairs).toEqual([
      [1, 4],
      [2, 3],
    ]);
    expect(r.reason).toMatch(/even-firing crank assumed/);
  });

  it("refuses an uneven inline four (cross-plane throws 90° apart)", () => {
    // §4.1 general rule: wasted spark needs even firing with pairs 360° apart (grokipedia)
    const r = wastedSparkPairs("1-3-2-4", { cylinders: 4, layout: "inline", crankDeg: 90 });
    expect(r.suitable).toBe(false);
    expect(r.pairs).toEqual([]);
  });

  it("judges given intervals by whether each column is 360° apart", () => {
    // §4.1 "pairs cylinders that are 360 degrees out of phase": 90–270–90–270 still pairs 360° apart
    const ok = wastedSparkPairs("1-2-3-4", { cylinders: 4, layout: "v", intervalsDeg: [90, 270, 90, 270] });
    expect(ok.suitable).toBe(true);
    expect(ok.pairs).toEqual([
      [1, 3],
      [2, 4],
    ]);
    // Cross-plane inline four, 1-3-2-4 firing 180–270–180–90: no column is 360° apart
    const bad = wastedSparkPairs("1-3-2-4", { cylinders: 4, layout: "inline", intervalsDeg: [180, 270, 180, 90] });
    expect(bad.suitable).toBe(false);
  });

  it("pairs an even-firing V8 the textbook way", () => {
    // Companion-cylinder method applied to 1-8-4-3-6-5-7-2: 1&6, 8&5, 4&7, 3&2
    const r = wastedSparkPairs("1-8-4-3-6-5-7-2", { cylinders: 8, layout: "v" });
    expect(r.columns).toEqual([
      [1, 6],
      [8, 5],
      [4, 7],
      [3, 2],
    ]);
    expect(r.pairs).toEqual([
      [1, 6],
      [2, 3],
      [4, 7],
      [5, 8],
    ]);
  });
});

describe("twins", () => {
  it("360° parallel twin: suitable, one double-ended coil for 1 & 2", () => {
    // §4.1: both pistons at TDC together, intervals 360–360 (cryer.org.uk); one double-ended coil
    const r = wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin", crankDeg: 360 });
    expect(r).toMatchObject({ suitable: true, status: "suitable", pairs: [[1, 2]], intervalsDeg: [360, 360] });
    expect(r.reason).toMatch(/one double-ended coil/);
    expect(wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin", crankDeg: 0 }).suitable).toBe(true); // throws together
  });

  it("180° parallel twin: not suitable, firing 180–540", () => {
    // §4.1: firing intervals 180–540 (cryer.org.uk); each cylinder needs its own trigger and coil
    const r = wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin", crankDeg: 180 });
    expect(r.suitable).toBe(false);
    expect(r.pairs).toEqual([]);
    expect(r.reason).toContain("180–540");
    expect(r.reason).toMatch(/own trigger and coil/);
    expect(r.reason).toMatch(/bottom dead centre/);
  });

  it("270° parallel twin: not suitable, firing 270–450", () => {
    // §4.1: 270° and other uneven twins (270–450) need separate triggering (cryer.org.uk)
    const r = wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin", crankDeg: 270 });
    expect(r.suitable).toBe(false);
    expect(r.reason).toContain("270–450");
  });

  it("parallel twin without the crank: undetermined, asks for it", () => {
    const r = wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin" });
    expect(r).toMatchObject({ suitable: false, status: "undetermined", pairs: [] });
    expect(r.reason).toMatch(/crankDeg/);
  });

  it("flat twin: suitable, throws 180° apart fire 360–360", () => {
    // §4.1: flat twins and the double-ended coil (classiccars.fandom.com); throws 180° apart, intervals 360–360
    for (const crankDeg of [undefined, null, 180]) {
      const r = wastedSparkPairs("1 2", { cylinders: 2, layout: "flat-twin", crankDeg });
      expect(r).toMatchObject({ suitable: true, pairs: [[1, 2]], intervalsDeg: [360, 360] });
      expect(r.reason).toContain("360–360");
    }
  });

  it("V-twin on a shared crankpin: not suitable (45° V fires 315–405)", () => {
    // Uneven twins need separate triggering (§4.1, cryer.org.uk interval table)
    expect(wastedSparkPairs("1-2", { cylinders: 2, layout: "v-twin" }).suitable).toBe(false);
    const r = wastedSparkPairs("1-2", { cylinders: 2, layout: "v-twin", bankDeg: 45 });
    expect(r.suitable).toBe(false);
    expect(r.reason).toContain("315–405");
  });
});

describe("singles and odd counts", () => {
  it("single: not applicable", () => {
    const r = wastedSparkPairs("1", { cylinders: 1, layout: "single" });
    expect(r).toMatchObject({ suitable: false, status: "not-applicable", pairs: [] });
    expect(r.reason).toMatch(/not apply/);
  });

  it("three cylinders: not suitable", () => {
    // §4.1 general rule: an even number of cylinders (grokipedia)
    const r = wastedSparkPairs("1-2-3", { cylinders: 3, layout: "inline" });
    expect(r).toMatchObject({ suitable: false, status: "not-suitable", pairs: [] });
    expect(r.reason).toMatch(/odd/);
  });
});

describe("parsing the firing order", () => {
  it("reads dashes, spaces and commas", () => {
    expect(parseFiringOrder("1-2-4-3", 4)).toEqual([1, 2, 4, 3]);
    expect(parseFiringOrder("1 2 4 3", 4)).toEqual([1, 2, 4, 3]);
    expect(parseFiringOrder("1,3,4,2", 4)).toEqual([1, 3, 4, 2]);
    expect(parseFiringOrder(" 1, 3, 4, 2 ", 4)).toEqual([1, 3, 4, 2]);
    expect(parseFiringOrder("1–5–3–6–2–4", 6)).toEqual([1, 5, 3, 6, 2, 4]);
  });

  it.each([
    ["1-2-2-3", 4, /twice/],
    ["1-2-4-5", 4, /missing/],
    ["1-2-4", 4, /lists 3/],
    ["1-2-4-3-5", 4, /lists 5/],
    ["1-x-4-3", 4, /not a firing order/],
    ["1243", 4, /not a firing order/],
    ["0-1-2-3", 4, /not a firing order/],
    ["1--2", 2, /not a firing order/],
    ["", 2, /firing order/],
  ])("rejects %j", (order, cylinders, message) => {
    expect(() => wastedSparkPairs(order, { cylinders, layout: cylinders === 2 ? "parallel-twin" : "inline" })).toThrow(message);
    expect(() => parseFiringOrder(order, cylinders)).toThrow(WorkshopInputError);
  });

  it("rejects a layout that contradicts the cylinder count, and bad angles", () => {
    const field = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return (e as WorkshopInputError).field;
      }
      return null;
    };
    expect(field(() => wastedSparkPairs("1-2", { cylinders: 2, layout: "single" }))).toBe("cylinders");
    expect(field(() => wastedSparkPairs("1-2-3-4", { cylinders: 4, layout: "flat-twin" }))).toBe("cylinders");
    expect(field(() => wastedSparkPairs("1-2", { cylinders: 2, layout: "rotary" as never }))).toBe("layout");
    expect(field(() => wastedSparkPairs("1-2", { cylinders: 2, layout: "parallel-twin", crankDeg: 400 }))).toBe("crankDeg");
    expect(field(() => wastedSparkPairs("1-2-3-4", { cylinders: 4, layout: "v", intervalsDeg: [180, 180, 180] }))).toBe("intervalsDeg");
    expect(field(() => wastedSparkPairs("1-2-3-4", { cylinders: 4, layout: "v", crankDeg: 90 }))).toBe("crankDeg");
  });
});
