import { describe, expect, it } from "vitest";
import { benchReading, benchSheet, copperAt20C, copperCorrectionFactor, resistanceUnit, type BenchReading } from "~/domain/bench";
import { WorkshopInputError } from "~/domain/wire-size";

// Sources are the sections of /work/shared/REFERENCE-FACTS.md named beside each check.

const coil = (over: Partial<BenchReading> = {}): BenchReading => ({
  name: "pickup coil",
  min: 450,
  max: 550,
  unit: "Ω",
  measured: 500,
  tempC: 20,
  ...over,
});

describe("copper correction to 20 °C", () => {
  it("brings an 80 °C reading of a 500 Ω winding back to 500 / 1.2358 ≈ 404.6 Ω", () => {
    // IEC 60028 α = 0.00393 (§3.3): R80/R20 = 1.2358
    expect(copperAt20C(500, 80)).toBeCloseTo(500 / 1.2358, 10);
    expect(copperAt20C(500, 80)).toBeCloseTo(404.6, 1);
    const r = benchReading(coil({ min: 400, max: 420, measured: 500, tempC: 80 }));
    expect(r.at20C).toBeCloseTo(404.6, 1);
    expect(r.correctionFactor).toBeCloseTo(1 / 1.2358, 12);
    expect(r.verdict).toBe("in_range");
  });

  it("changes nothing at 20 °C", () => {
    const r = benchReading(coil({ measured: 512, tempC: 20 }));
    expect(r.at20C).toBe(512);
    expect(r.correctionFactor).toBe(1);
  });

  it("corrects a cold reading upwards", () => {
    // Same α below 20 °C: 1 + 0.00393 × (0 − 20) = 0.9214
    expect(copperAt20C(0.9214, 0)).toBeCloseTo(1, 12);
    expect(copperCorrectionFactor(0)).toBeCloseTo(1 / 0.9214, 12);
  });

  it("is close to the IEC 60228 Kt table, which uses α ≈ 0.004", () => {
    // §3.2 IEC 60228 Kt (multiply measured R by Kt): 40 °C 0.926, 80 °C 0.806. Ours (α = 0.00393) differs by < 1 %.
    expect(copperCorrectionFactor(40)).toBeCloseTo(0.926, 2);
    expect(Math.abs(copperCorrectionFactor(80) - 0.806) / 0.806).toBeLessThan(0.01);
  });
});

describe("verdicts", () => {
  it("counts both limits as in range and anything outside as low or high", () => {
    const v = (measured: number) => benchReading(coil({ measured })).verdict;
    expect(v(450)).toBe("in_range"); // min, inclusive
    expect(v(550)).toBe("in_range"); // max, inclusive
    expect(v(449.9)).toBe("low");
    expect(v(550.1)).toBe("high");
    expect(v(0)).toBe("low");
  });

  it("keeps a corrected reading that lands exactly on a limit in range", () => {
    // 550 × 1.2358 at 80 °C corrects to 550 (up to floating point)
    expect(benchReading(coil({ measured: 550 * 1.2358, tempC: 80 })).verdict).toBe("in_range");
    expect(benchReading(coil({ measured: 450 * 1.2358, tempC: 80 })).verdict).toBe("in_range");
  });

  it("judges the corrected value, not the raw one", () => {
    // A hot 600 Ω reading looks high, but at 20 °C it is 600 / 1.1965 = 501.5 Ω (60 °C)
    const r = benchReading(coil({ measured: 600, tempC: 70 }));
    expect(r.at20C).toBeCloseTo(600 / (1 + 0.00393 * 50), 10);
    expect(r.verdict).toBe("in_range");
  });
});

describe("what gets corrected", () => {
  it("does not correct a non-copper part (resistor plug cap)", () => {
    // §4: resistor caps ≈ 5 kΩ; carbon, not copper
    const r = benchReading({ name: "plug cap", min: 4, max: 6, unit: "kΩ", measured: 5.2, tempC: 60, copper: false });
    expect(r.copper).toBe(false);
    expect(r.at20C).toBe(5.2);
    expect(r.correctionFactor).toBe(1);
    expect(r.steps.join(" ")).toMatch(/no temperature correction/);
  });

  it("takes copper as the default for ohm units and corrects kΩ the same way", () => {
    // §4: coil secondary 6–20 kΩ; a 14.2 kΩ reading at 60 °C → 14.2 / 1.1572
    const r = benchReading({ name: "coil secondary", min: 6, max: 20, unit: "kΩ", measured: 14.2, tempC: 60 });
    expect(r.copper).toBe(true);
    expect(r.unit).toBe("kΩ");
    expect(r.at20C).toBeCloseTo(14.2 / 1.1572, 10);
    expect(r.verdict).toBe("in_range");
  });

  it("accepts ohm spellings and keeps milli and mega apart", () => {
    expect(resistanceUnit("Ω")).toBe("Ω");
    expect(resistanceUnit("\u2126")).toBe("Ω"); // the ohm sign
    expect(resistanceUnit("ohm")).toBe("Ω");
    expect(resistanceUnit("Ohms")).toBe("Ω");
    expect(resistanceUnit("kΩ")).toBe("kΩ");
    expect(resistanceUnit("KOhm")).toBe("kΩ");
    expect(resistanceUnit("k ohm")).toBe("kΩ");
    expect(resistanceUnit("kilohm")).toBe("kΩ");
    expect(resistanceUnit("mΩ")).toBe("mΩ");
    expect(resistanceUnit("milliohm")).toBe("mΩ");
    expect(resistanceUnit("MΩ")).toBe("MΩ");
    expect(resistanceUnit("V")).toBeNull();
    const r = benchReading({ name: "earth strap", min: 0, max: 5, unit: "mohm", measured: 3 });
    expect(r).toMatchObject({ unit: "mΩ", copper: true, tempC: 20 });
  });

  it("compares a non-resistance reading as read, and refuses the copper correction on it", () => {
    const v = benchReading({ name: "battery at rest", min: 12.4, max: 12.9, unit: "V", measured: 12.6 });
    expect(v).toMatchObject({ copper: false, at20C: 12.6, verdict: "in_range" });
    expect(() => benchReading({ name: "battery", min: 12, max: 13, unit: "V", measured: 12.6, copper: true })).toThrow(WorkshopInputError);
  });
});

describe("the arithmetic shown", () => {
  it("writes out the correction as in the brief's example", () => {
    // Brief: "R20 = R / (1 + 0.00393 × (35 − 20)) = 512 / 1.05895 = 483.5 Ω"
    const r = benchReading(coil({ measured: 512, tempC: 35 }));
    expect(r.steps).toContain("R20 = R / (1 + 0.00393 × (35 − 20)) = 512 / 1.05895 = 483.5 Ω");
    expect(r.steps.some((s) => /IEC 60028/.test(s))).toBe(true);
    expect(r.steps[r.steps.length - 1]).toMatch(/^In range: 483\.5 Ω is within 450–550 Ω/);
  });

  it("uses a real minus sign below zero and names the verdict", () => {
    const r = benchReading(coil({ measured: 400, tempC: -5 }));
    expect(r.steps.join("\n")).toContain("(−5 − 20)");
    expect(r.verdict).toBe("low"); // 400 / 0.90175 = 443.6 < 450
    expect(r.steps[r.steps.length - 1]).toMatch(/^Low: 443\.6 Ω is below the minimum/);
  });

  it("says when no temperature was given", () => {
    const r = benchReading(coil({ tempC: undefined }));
    expect(r.tempC).toBe(20);
    expect(r.steps[0]).toMatch(/No temperature given/);
  });
});

describe("benchSheet", () => {
  it("checks every reading in order", () => {
    const { results } = benchSheet([
      coil({ measured: 512, tempC: 35 }),
      { name: "coil primary", min: 2.5, max: 3.5, unit: "ohm", measured: 4.1, tempC: 20 }, // §4 TCI primary ≈ 2–4 Ω
      { name: "plug cap", min: 4, max: 6, unit: "kΩ", measured: 3.1, copper: false },
    ]);
    expect(results.map((r) => [r.name, r.verdict])).toEqual([
      ["pickup coil", "in_range"],
      ["coil primary", "high"],
      ["plug cap", "low"],
    ]);
  });

  it.each([
    [[], "readings"],
    [[coil({ measured: Number.NaN })], "readings[0].measured"],
    [[coil(), coil({ min: 600 })], "readings[1].min"],
    [[coil({ name: " " })], "readings[0].name"],
    [[coil({ unit: "" })], "readings[0].unit"],
    [[coil({ measured: -3 })], "readings[0].measured"],
    [[coil({ tempC: 400 })], "readings[0].tempC"],
  ])("rejects bad input naming the field (%#)", (readings, field) => {
    try {
      benchSheet(readings as BenchReading[]);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(WorkshopInputError);
      expect((e as WorkshopInputError).field).toBe(field);
    }
  });
});

describe("material: only copper is corrected", () => {
  it("a 6.3 kΩ resistor cap at 40 °C against 4–6 kΩ is high: carbon is not corrected", () => {
    // §4: resistor plug caps ≈ 5 kΩ (from memory / common practice), so a 4–6 kΩ window; §5.1: the copper correction
    // applies to copper windings only, carbon resistor caps are not corrected with α (common practice).
    const r = benchReading({ name: "Resistor plug cap", min: 4, max: 6, unit: "kΩ", measured: 6.3, tempC: 40 });
    expect(r.material).toBe("carbon");
    expect(r.materialBy).toBe("name");
    expect(r.copper).toBe(false);
    expect(r.at20C).toBe(6.3);
    expect(r.verdict).toBe("high");
    expect(r.steps.join(" ")).toMatch(/Material not given: carbon, from the name/);
    // The wrong answer it avoids: IEC 60028 α = 0.00393 (§3.3) would bring it to 6.3 / 1.0786 = 5.84 kΩ, "in range".
    const asCopper = benchReading({ name: "Resistor plug cap", min: 4, max: 6, unit: "kΩ", measured: 6.3, tempC: 40, material: "copper" });
    expect(1 + 0.00393 * (40 - 20)).toBeCloseTo(1.0786, 10);
    expect(asCopper.at20C).toBeCloseTo(6.3 / 1.0786, 10);
    expect(asCopper.at20C).toBeCloseTo(5.84, 2);
    expect(asCopper.verdict).toBe("in_range");
  });

  it.each([
    // [name, unit, material, by] — the defaults the brief lists (windings, coils, stators, pickups → copper; caps,
    // suppressors, HT leads → carbon; lamps → other), plus names the demo cards use.
    ["Pickup coil", "Ω", "copper", "name"],
    ["Coil primary", "Ω", "copper", "name"],
    ["coil secondary", "kΩ", "copper", "name"],
    ["Stator winding", "Ω", "copper", "name"],
    ["Field winding (rotor)", "Ω", "copper", "name"],
    ["Relay coil resistance", "Ω", "copper", "name"],
    ["Pulser 2", "Ω", "copper", "name"],
    ["Earth strap", "mΩ", "copper", "name"],
    ["Stator leads, yellow to yellow", "Ω", "copper", "name"], // a stator's leads are its copper, not an HT lead
    ["Plug cap 1", "kΩ", "carbon", "name"],
    ["Suppressor", "kΩ", "carbon", "name"],
    ["HT lead, cylinder 2", "kΩ", "carbon", "name"],
    ["Carbon brush holder", "Ω", "carbon", "name"],
    ["Ballast resistor", "Ω", "other", "name"],
    ["Flasher load resistor", "Ω", "other", "name"],
    ["Tail lamp filament", "Ω", "other", "name"],
    ["Headlamp bulb, dip", "Ω", "other", "name"],
    ["Stator phase to earth", "MΩ", "other", "name"], // an insulation test, not the winding's resistance
    ["Reading 3", "Ω", "copper", "fallback"],
  ] as const)("%s (%s) defaults to %s (%s)", (name, unit, material, by) => {
    const r = benchReading({ name, min: 0, max: 1000, unit, measured: 1, tempC: 30 });
    expect(r.material).toBe(material);
    expect(r.materialBy).toBe(by);
    expect(r.copper).toBe(material === "copper");
    expect(r.steps.some((s) => /^Material not given/.test(s))).toBe(true);
  });

  it("says so when an unknown name falls back to copper", () => {
    const r = benchReading({ name: "Mystery plug, 3 to 4", min: 1, max: 2, unit: "Ω", measured: 1.5, tempC: 30 });
    expect(r).toMatchObject({ material: "copper", materialBy: "fallback", copper: true });
    expect(r.steps.join(" ")).toMatch(/not recognised from the name: taken as copper/);
  });

  it("never corrects a hot lamp filament with copper's α (tungsten)", () => {
    // §5.1: the copper correction applies to copper windings only (common practice); a filament is tungsten (from memory).
    const r = benchReading({ name: "Number-plate bulb", min: 5, max: 8, unit: "Ω", measured: 7.9, tempC: 60 });
    expect(r).toMatchObject({ material: "other", copper: false, at20C: 7.9, correctionFactor: 1, verdict: "in_range" });
    expect(r.steps.join(" ")).toMatch(/tungsten/);
  });

  it("a reading through a winding and its caps is taken as not copper, and the steps say why", () => {
    // §4 derived check: the HT loop is cap + secondary + cap in series, e.g. 15 + 2 × 5 = 25 kΩ ([computed]).
    const r = benchReading({ name: "Secondary through both plug caps", min: 20, max: 30, unit: "kΩ", measured: 25, tempC: 50 });
    expect(r.material).toBe("carbon");
    expect(r.at20C).toBe(25);
    expect(r.steps.join(" ")).toMatch(/also names a winding/);
  });

  it("copper: true ≡ material copper and copper: false ≡ other (API v1); a given material wins over the name", () => {
    const base = { name: "Plug cap", min: 4, max: 6, unit: "kΩ", measured: 5.5, tempC: 80 };
    expect(benchReading({ ...base, copper: true })).toMatchObject({ material: "copper", materialBy: "given", copper: true });
    expect(benchReading({ ...base, copper: true }).at20C).toBeCloseTo(5.5 / 1.2358, 9); // §3.3: R80/R20 = 1.2358
    expect(benchReading({ ...base, copper: false })).toMatchObject({ material: "other", materialBy: "given", at20C: 5.5 });
    expect(benchReading({ ...base, material: "copper", copper: true }).copper).toBe(true);
    expect(benchReading({ name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: 500, tempC: 60, material: "carbon" }).at20C).toBe(500);
  });

  it.each([
    [{ material: "carbon", copper: true }, "reading.material"],
    [{ material: "copper", copper: false }, "reading.material"],
    [{ material: "brass" }, "reading.material"],
    [{ unit: "V", material: "copper" }, "reading.material"],
    [{ unit: "V", copper: true }, "reading.copper"],
  ])("refuses %o naming %s", (over, field) => {
    try {
      benchReading({ name: "Pickup coil", min: 1, max: 2, unit: "Ω", measured: 1.5, ...over } as BenchReading);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(WorkshopInputError);
      expect((e as WorkshopInputError).field).toBe(field);
    }
  });

  it("accepts the unit words ohm and kohm and answers in Ω and kΩ", () => {
    expect(benchReading({ name: "Pickup coil", min: 400, max: 600, unit: "ohm", measured: 500 }).unit).toBe("Ω");
    expect(benchReading({ name: "Coil secondary", min: 6, max: 20, unit: "kohm", measured: 12 }).unit).toBe("kΩ");
    expect(benchReading({ name: "Coil secondary", min: 6, max: 20, unit: "kohms", measured: 12 }).unit).toBe("kΩ");
    expect(resistanceUnit("ohms")).toBe("Ω");
  });
});

describe("specs with no upper limit and open-circuit readings", () => {
  const insulation = (measured: number | "OL", over: Partial<BenchReading> = {}): BenchReading => ({
    name: "Stator phase to earth",
    min: 1,
    max: null,
    unit: "MΩ",
    measured,
    tempC: 20,
    ...over,
  });

  it("is in range at or above the minimum and low below it", () => {
    // Insulation to earth must read open: at least 1 MΩ on a meter's top range (common practice).
    expect(benchReading(insulation(1)).verdict).toBe("in_range");
    expect(benchReading(insulation(250)).verdict).toBe("in_range");
    expect(benchReading(insulation(0.2)).verdict).toBe("low");
    expect(benchReading(insulation(250)).steps.at(-1)).toMatch(/no upper limit/);
  });

  it("takes OL as above every number: in range for an open-circuit spec, high for a bounded one", () => {
    const open = benchReading(insulation("OL"));
    expect(open).toMatchObject({ measured: "OL", at20C: "OL", verdict: "in_range", max: null });
    const broken = benchReading({ name: "Pickup coil", min: 400, max: 600, unit: "Ω", measured: "OL", tempC: 40 });
    expect(broken).toMatchObject({ measured: "OL", at20C: "OL", verdict: "high", copper: true, correctionFactor: 1 });
    expect(broken.steps.join(" ")).toMatch(/open circuit/);
  });

  it("serialises without Infinity: OL stays OL and an open maximum stays null", () => {
    const json = JSON.parse(JSON.stringify(benchSheet([insulation("OL"), insulation(3)])));
    expect(json.results[0]).toMatchObject({ measured: "OL", at20C: "OL", max: null });
    expect(json.results[1]).toMatchObject({ measured: 3, at20C: 3, max: null });
    expect(JSON.stringify(json)).not.toMatch(/Infinity/);
  });

  it("defaults an open spec to no correction (an insulation test is not a winding's resistance)", () => {
    const r = benchReading({ name: "Pickup coil to frame", min: 10, max: null, unit: "MΩ", measured: 40, tempC: 60 });
    expect(r).toMatchObject({ material: "other", copper: false, at20C: 40 });
    const unnamed = benchReading({ name: "Row 7", min: 10, max: null, unit: "MΩ", measured: 40, tempC: 60 });
    expect(unnamed).toMatchObject({ material: "other", materialBy: "fallback", at20C: 40 });
  });

  it("still refuses an omitted maximum, and a measured text other than OL", () => {
    for (const [over, field] of [
      [{ max: undefined }, "reading.max"],
      [{ measured: "open" }, "reading.measured"],
      [{ measured: Number.POSITIVE_INFINITY }, "reading.measured"],
    ] as const) {
      try {
        benchReading({ name: "Pickup coil", min: 1, max: 2, unit: "Ω", measured: 1.5, ...over } as unknown as BenchReading);
        expect.unreachable();
      } catch (e) {
        expect((e as WorkshopInputError).field).toBe(field);
      }
    }
  });
});
