import { describe, expect, it } from "vitest";
import { benchReading, benchSheet, copperAt20C, copperCorrectionFactor, resistanceUnit, type BenchReading } from "~/domain/bench";
import { WorkshopInputError } from "~/domain/wire-size";

// Sources are the sections of /work/shared/REFERENCE-FACTS.md named beside each check.

const coil = (over: Partial<BenchReading> = {}): BenchReading => ({
  name: "pickup coil", min: 450, max: 550, unit: "Ω", measured: 500, tempC: 20, ...over,
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
