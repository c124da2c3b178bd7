import { describe, expect, it } from "vitest";
import {
  AWG_GAUGES,
  COPPER_ALPHA_20C,
  COPPER_RESISTIVITY_20C,
  METRIC_SIZES_MM2,
  WorkshopInputError,
  awgAreaMm2,
  awgDiameterMm,
  awgLabel,
  conductorResistance,
  copperResistivity,
  defaultDropPct,
  wireSize,
} from "~/domain/wire-size";

// Sources are the sections of /work/shared/REFERENCE-FACTS.md named beside each check.

const CM_TO_MM2 = 5.067e-4; // 1 circular mil = π/4 × (0.0254 mm)² (REFERENCE-FACTS §3.4, brief)
const FT_TO_M = 0.3048;
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

// Tolerance for comparing with a published figure: ±pct, or half a unit in its last printed digit
// when the source rounded harder than that (REFERENCE-FACTS §3.1: "Use tolerances … wherever the source rounds").
function withinPublished(ours: number, published: string, pct: number) {
  const decimals = published.includes(".") ? published.split(".")[1].length : 0;
  const halfUnit = 0.5 * 10 ** -decimals;
  const tol = Math.max((pct / 100) * Number(published), halfUnit);
  expect(Math.abs(ours - Number(published)), `${ours} vs published ${published}`).toBeLessThanOrEqual(tol * (1 + 1e-9));
}

describe("copper constants and resistance", () => {
  it("uses IEC 60028 ρ20 and α", () => {
    expect(COPPER_RESISTIVITY_20C).toBe(0.017241); // IEC 60028 (§3.3) = 1/58 Ω·mm²/m
    expect(COPPER_ALPHA_20C).toBe(0.00393); // IEC 60028 / IACS (§3.3)
    expect(copperResistivity(20)).toBe(0.017241);
  });

  it("1 mm² at 20 °C is 17.24 mΩ/m", () => {
    // §3.3 [computed] check: R′(1 mm², 20 °C) = 0.017241 Ω/m
    expect(conductorResistance(1, 1, 20) * 1000).toBeCloseTo(17.24, 2);
  });

  it("R80/R20 = 1.2358 with IEC 60028 α", () => {
    // §3.3 [computed] check: 1 + 0.00393 × 60
    expect(conductorResistance(1, 1, 80) / conductorResistance(1, 1, 20)).toBeCloseTo(1.2358, 10);
    expect(copperResistivity(80) / copperResistivity(20)).toBeCloseTo(1.2358, 10);
  });

  it("scales with length and inversely with area", () => {
    expect(conductorResistance(2.5, 10)).toBeCloseTo((0.017241 * 10) / 2.5, 12);
    expect(conductorResistance(0.5, 4, 20)).toBeCloseTo(2 * conductorResistance(1, 4, 20), 12);
  });

  it("agrees with the IEC 60228 class 5 maximum resistances as an upper bound", () => {
    // §3.2 IEC 60228 class 5 plain copper max Ω/km: an ideal conductor (ρ/A) must be below, but within ~15 %.
    const table: [number, number][] = [
      [0.5, 39.0],
      [0.75, 26.0],
      [1, 19.5],
      [1.5, 13.3],
      [2.5, 7.98],
      [4, 4.95],
      [6, 3.3],
      [10, 1.91],
      [16, 1.21],
    ];
    for (const [a, maxOhmPerKm] of table) {
      const ours = conductorResistance(a, 1000);
      expect(ours).toBeLessThan(maxOhmPerKm);
      expect(ours).toBeGreaterThan(maxOhmPerKm * 0.85);
    }
  });
});

describe("AWG per ASTM B258", () => {
  it("defines 36 AWG = 0.127 mm and 4/0 = 0.46 in (n = −3)", () => {
    // §3.1 definition: No. 36 = 0.0050 in, No. 0000 = 0.4600 in, ratio 92^(1/39)
    expect(awgDiameterMm(36)).toBeCloseTo(0.127, 12);
    expect(awgDiameterMm(-3)).toBeCloseTo(0.46 * 25.4, 9);
    expect(awgDiameterMm(11) / awgDiameterMm(12)).toBeCloseTo(1.1229322, 7);
    expect(awgAreaMm2(12)).toBeCloseTo((Math.PI / 4) * awgDiameterMm(12) ** 2, 12);
  });

  // §3.1 "Published check" column: 1728.org (diameter, Ω/km) and daycounter (mm²); null = not published for that gauge.
  // 20 AWG's diameter is published as the rounded 0.032 in, kept here in inches so its own rounding applies.
  const published: { awg: number; dMm?: string; dIn?: string; aMm2?: string; ohmPerKm: string }[] = [
    { awg: 10, dMm: "2.5883", aMm2: "5.26", ohmPerKm: "3.28" },
    { awg: 11, ohmPerKm: "4.13" },
    { awg: 12, dMm: "2.0523", aMm2: "3.31", ohmPerKm: "5.21" },
    { awg: 13, ohmPerKm: "6.57" },
    { awg: 14, dMm: "1.6281", aMm2: "2.08", ohmPerKm: "8.28" },
    { awg: 15, ohmPerKm: "10.44" },
    { awg: 16, dMm: "1.2903", aMm2: "1.31", ohmPerKm: "13.17" },
    { awg: 17, ohmPerKm: "16.61" },
    { awg: 18, dMm: "1.0236", aMm2: "0.823", ohmPerKm: "20.94" },
    { awg: 19, ohmPerKm: "26.41" },
    { awg: 20, dIn: "0.032", aMm2: "0.518", ohmPerKm: "33.29" },
    { awg: 21, ohmPerKm: "41.98" },
    { awg: 22, dMm: "0.644", aMm2: "0.326", ohmPerKm: "52.94" },
  ];

  it.each(published)("$awg AWG matches the published table (d, A ±0.1 %, Ω/km ±0.2 %)", ({ awg, dMm, dIn, aMm2, ohmPerKm }) => {
    if (dMm) withinPublished(awgDiameterMm(awg), dMm, 0.1);
    if (dIn) withinPublished(awgDiameterMm(awg) / 25.4, dIn, 0.1);
    if (aMm2) withinPublished(awgAreaMm2(awg), aMm2, 0.1);
    withinPublished(conductorResistance(awgAreaMm2(awg), 1000), ohmPerKm, 0.2);
  });

  it("recomputes the §3.1 computed column to its printed digits", () => {
    // §3.1 [computed] columns d (mm), A (mm²), R (Ω/km) for 10–22 AWG
    const computed: [number, string, string, string][] = [
      [10, "2.5882", "5.2612", "3.277"],
      [11, "2.3048", "4.1723", "4.132"],
      [12, "2.0525", "3.3088", "5.211"],
      [13, "1.8278", "2.6240", "6.571"],
      [14, "1.6277", "2.0809", "8.285"],
      [15, "1.4495", "1.6502", "10.448"],
      [16, "1.2908", "1.3087", "13.174"],
      [17, "1.1495", "1.0378", "16.612"],
      [18, "1.0237", "0.8230", "20.948"],
      [19, "0.9116", "0.6527", "26.415"],
      [20, "0.8118", "0.5176", "33.308"],
      [21, "0.7229", "0.4105", "42.001"],
      [22, "0.6438", "0.3255", "52.962"],
    ];
    for (const [n, d, a, r] of computed) {
      withinPublished(awgDiameterMm(n), d, 0);
      withinPublished(awgAreaMm2(n), a, 0);
      withinPublished(conductorResistance(awgAreaMm2(n), 1000), r, 0);
    }
  });

  it("keeps the published rules of thumb: 3 gauges ≈ ×2 resistance, 6 gauges ≈ ×2 diameter, AWG 15 ≈ 10 mΩ/m", () => {
    // §3.1 rules of thumb (daycounter page)
    expect(awgAreaMm2(12) / awgAreaMm2(15)).toBeCloseTo(2, 1);
    expect(awgDiameterMm(12) / awgDiameterMm(18)).toBeCloseTo(2, 1);
    expect(conductorResistance(awgAreaMm2(15), 1) * 1000).toBeCloseTo(10, 0);
  });

  it("offers 0 (1/0) to 24 AWG and rejects non-gauges", () => {
    expect(AWG_GAUGES[0]).toBe(0);
    expect(AWG_GAUGES[AWG_GAUGES.length - 1]).toBe(24);
    expect(awgLabel(0)).toBe("1/0 AWG");
    expect(awgLabel(-3)).toBe("4/0 AWG");
    expect(awgLabel(12)).toBe("12 AWG");
    expect(() => awgDiameterMm(12.5)).toThrow(RangeError);
    expect(() => awgDiameterMm(-4)).toThrow(WorkshopInputError);
  });
});

describe("metric sizes", () => {
  it("merges ISO 6722-1 and the Japanese sizes into one ascending list", () => {
    // §3.2 ISO 6722-1 sizes; §1.3 Japanese nominal sizes 0.3, 0.85, 1.25, 2, 3, 5, 8 mm² [from memory]
    expect(METRIC_SIZES_MM2).toEqual([0.3, 0.35, 0.5, 0.75, 0.85, 1, 1.25, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10, 16, 25, 35, 50]);
  });
});

describe("defaultDropPct", () => {
  it("is 3 % for ignition and charging, 10 % elsewhere", () => {
    // §3.4: ABYC 3 % for critical loads, 10 % for non-critical
    expect(defaultDropPct("ignition")).toBe(3);
    expect(defaultDropPct("charging")).toBe(3);
    expect(defaultDropPct("lighting")).toBe(10);
    expect(defaultDropPct("horn")).toBe(10);
    expect(() => defaultDropPct("flux" as never)).toThrow(WorkshopInputError);
  });

  it("is used when maxDropPct is omitted", () => {
    const lamp = wireSize({ currentA: 2.1, lengthM: 18, circuitKind: "lighting" });
    expect(lamp.maxDropPct).toBe(10);
    expect(lamp.allowedDropV).toBeCloseTo(1.2, 12);
    expect(wireSize({ currentA: 2.1, lengthM: 18 }).maxDropPct).toBe(3); // the API's documented default
  });
});

describe("wireSize: worked examples", () => {
  it("ABYC E-11: 10 A, 21 ft loop, 3 % at 12 V → 12 AWG", () => {
    // §3.4 example 1: CM = 10.75 × 10 × 21 / 0.36 = 6 270.8 CM → 12 AWG (6 530 CM)
    const cm = (10.75 * 10 * 21) / 0.36;
    expect(cm).toBeCloseTo(6270.8, 1);
    const abycMm2 = cm * CM_TO_MM2; // ≈ 3.177 mm²
    expect(abycMm2).toBeCloseTo(3.177, 3);

    const r = wireSize({ currentA: 10, lengthM: (21 * FT_TO_M) / 2, systemV: 12, maxDropPct: 3, roundTrip: true, tempC: 20 });
    expect(r.conductorLengthM).toBeCloseTo(6.4008, 10);
    expect(r.allowedDropV).toBeCloseTo(0.36, 12);
    expect(r.awg.gauge).toBe(12);
    expect(r.decidedBy).toBe("voltage-drop");

    // The brief asked for ±2 %, but the constants differ by more than that: ABYC's K = 10.75 Ω·CM/ft,
    // while IEC 60028's ρ = 0.017241 Ω·mm²/m is 10.37 Ω·CM/ft. So our 20 °C area is 3.5 % smaller, by
    // exactly that ratio; asserting the ratio (not a loose band) is the check that both sides agree.
    const kIec = (COPPER_RESISTIVITY_20C / CM_TO_MM2) * FT_TO_M;
    expect(kIec).toBeCloseTo(10.37, 2);
    expect(r.minAreaMm2 / abycMm2).toBeCloseTo(kIec / 10.75, 3);
    expect(relErr(r.minAreaMm2, abycMm2)).toBeLessThan(0.04);

    // ABYC's K equals IEC copper at about 29 °C; at that temperature the two methods agree to ±0.1 %.
    const tK = 20 + (10.75 / kIec - 1) / COPPER_ALPHA_20C;
    const warm = wireSize({ currentA: 10, lengthM: (21 * FT_TO_M) / 2, maxDropPct: 3, tempC: tK });
    expect(relErr(warm.minAreaMm2, abycMm2)).toBeLessThan(0.001);
    expect(warm.awg.gauge).toBe(12);
  });

  it("ABYC's SAE remark: an SAE 12 cable is not converted as 12 AWG", () => {
    // §3.2: 12 AWG = 6 500 CM, 12 SAE = 5 833 CM (ABYC example). We report AWG only, and the basis says so.
    expect(awgAreaMm2(12) / CM_TO_MM2).toBeCloseTo(6530, -1);
    const r = wireSize({ currentA: 10, lengthM: 3.2 });
    const awgBasis = r.basis.find((b) => b.quantity === "AWG size");
    expect(awgBasis?.source).toMatch(/ASTM B258/);
    expect(awgBasis?.source).toMatch(/SAE J1128.*not AWG/);
    expect(Object.keys(r)).not.toContain("sae");
  });

  it("conductivity-56 example: 2.1 A, 18 m one way, 5 % at 12 V → 2.5 mm²", () => {
    // §3.4 example 2: A = 2 × 18 × 2.1 / (56 × 0.6) = 2.25 mm² → 2.5 mm²
    expect((2 * 18 * 2.1) / (56 * 0.6)).toBeCloseTo(2.25, 10);
    const r = wireSize({ currentA: 2.1, lengthM: 18, systemV: 12, maxDropPct: 5, roundTrip: true, tempC: 20 });
    expect(r.minAreaMm2).toBeCloseTo((2.1 * 0.017241 * 36) / 0.6, 10); // IEC 60028 ρ: ≈ 2.17 mm²
    expect(r.minAreaMm2).toBeCloseTo(2.17, 2);
    expect(r.metric.sizeMm2).toBe(2.5); // the Japanese 2 mm² is too small; the next size is 2.5
    expect(r.metric.series).toBe("ISO 6722-1");
    expect(r.metric.dropPct).toBeLessThanOrEqual(5);

    // Conductivity 56 m/(Ω·mm²) is IEC copper at about 29 °C; there we reproduce the 2.25 mm².
    const t56 = 20 + (1 / 56 / COPPER_RESISTIVITY_20C - 1) / COPPER_ALPHA_20C;
    const r56 = wireSize({ currentA: 2.1, lengthM: 18, maxDropPct: 5, tempC: t56 });
    expect(r56.minAreaMm2).toBeCloseTo(2.25, 6);
    expect(r56.metric.sizeMm2).toBe(2.5);
  });

  it("Engineering ToolBox: 6 mm², 10 A, 2 % at 12 V allows about 8.3 m of conductor", () => {
    // §3.4 example 3: R′ = 2.9e-3 Ω/m; L = 12 × 0.02 / (2.9e-3 × 10) = 8.28 m (conductor length, not out-and-back)
    expect(conductorResistance(6, 1)).toBeCloseTo(2.9e-3, 4); // ρ/6 = 2.87e-3 ≈ 2.9e-3
    const maxLen = (12 * 0.02) / (conductorResistance(6, 1) * 10);
    expect(relErr(maxLen, 8.3)).toBeLessThan(0.01);
    const r = wireSize({ currentA: 10, lengthM: 8.28, maxDropPct: 2, roundTrip: false });
    expect(r.metric.sizeMm2).toBe(6);
    expect(r.metric.dropPct).toBeLessThanOrEqual(2);
    expect(r.metric.dropV).toBeCloseTo(0.24, 2);
  });

  it("generic 12 V example: 16 AWG, 20 m one way, 1 A, ρ = 0.01785 → 0.549 V", () => {
    // §3.4 example 4 uses a rounder ρ and A = 1.3 mm²; with IEC ρ and the ASTM 16 AWG area the drop is ≈ 3 % lower.
    const theirs = (1 * 2 * 20 * 0.01785) / 1.3;
    expect(theirs).toBeCloseTo(0.549, 3);
    const ours = 1 * conductorResistance(awgAreaMm2(16), 40);
    expect(relErr(ours, theirs)).toBeLessThan(0.05);
  });

  it("motorcycle-scale check: 1.0 mm², 3 m one way, 5 A → 0.517 V ideal", () => {
    // §3.4 example 5: with ρ = 0.017241, ΔU = 5 × 6 × 0.017241 = 0.517 V (4.3 %)
    expect(5 * conductorResistance(1, 6)).toBeCloseTo(0.517, 3);
  });
});

describe("wireSize: constraints and fuse", () => {
  it("lets ampacity decide a short heavy run: 20 A over 0.5 m → at least 4 mm²", () => {
    // §5 rule of thumb: continuous ≤ 5 A/mm² → 20 A needs 4 mm²; the drop alone would allow 1 mm²
    const r = wireSize({ currentA: 20, lengthM: 0.5 });
    expect(r.minAreaMm2).toBeLessThan(1);
    expect(r.ampacityMinAreaMm2).toBe(4);
    expect(r.decidedBy).toBe("ampacity");
    expect(r.metric).toMatchObject({ sizeMm2: 4, decidedBy: "ampacity" });
    expect(r.awg.gauge).toBe(11); // 4.17 mm², the thinnest AWG ≥ 4 mm²
    expect(r.awg.decidedBy).toBe("ampacity");
    const rule = r.basis.find((b) => b.unit === "A/mm²");
    expect(rule).toMatchObject({ value: 5 });
    expect(rule?.source).toMatch(/rule of thumb/);
  });

  it("reports the drop of the chosen sizes", () => {
    const r = wireSize({ currentA: 10, lengthM: 3.2004 });
    expect(r.metric.dropV).toBeCloseTo((10 * 0.017241 * 6.4008) / r.metric.sizeMm2, 12);
    expect(r.metric.dropPct).toBeCloseTo((r.metric.dropV / 12) * 100, 12);
    expect(r.awg.dropV).toBeCloseTo((10 * 0.017241 * 6.4008) / r.awg.areaMm2, 12);
    expect(r.metric.dropPct).toBeLessThanOrEqual(3);
    expect(r.awg.dropPct).toBeLessThanOrEqual(3);
  });

  it("picks the smallest standard fuse ≥ 1.25 × current that the wire can carry", () => {
    // §5 / common practice: 10 A × 1.25 = 12.5 → 15 A; 4 mm² and 12 AWG (3.31 mm²) carry 20 A and 16.5 A
    const r = wireSize({ currentA: 10, lengthM: 3.2004 });
    expect(r.fuseA).toBe(15);
    expect(r.warnings).toEqual([]);
    expect(wireSize({ currentA: 2.1, lengthM: 18, maxDropPct: 5 }).fuseA).toBe(3); // 2.6 A → 3 A on 2.5 mm²
  });

  it("always names a fuse: the smallest ≥ 1.25 × current, within what the wire stands short-term", () => {
    // Common practice: fuse ≥ 1.25 × continuous current; REFERENCE-FACTS §5 rule of thumb: a wire stands 10 A/mm²
    // short-term (5 A/mm² continuous). 20 A → 4 mm² (5 A/mm²) → 25 A fuse ≤ 40 A short-term.
    const r = wireSize({ currentA: 20, lengthM: 0.5 });
    expect(r.metric.sizeMm2).toBe(4);
    expect(r.fuseA).toBe(25);
    expect(r.warnings).toEqual([]);
    // 10 A over 2 m: 2 mm² by the continuous rule, a 15 A fuse, within 20 A short-term.
    const ten = wireSize({ currentA: 10, lengthM: 2 });
    expect(ten.fuseA).toBe(15);
    expect(ten.fuseA!).toBeLessThanOrEqual(10 * Math.min(ten.metric.sizeMm2, ten.awg.areaMm2));
    // Past the largest standard rating (40 A) there is no fuse to name: split the load.
    const big = wireSize({ currentA: 35, lengthM: 0.3 });
    expect(big.fuseA).toBeNull();
    expect(big.warnings.join(" ")).toMatch(/largest is 40 A/);
  });

  it("roundTrip false halves the conductor length and the drop", () => {
    // API.md: false → the return is through the frame (conductor = lengthM)
    const both = wireSize({ currentA: 20, lengthM: 0.5, roundTrip: true });
    const frame = wireSize({ currentA: 20, lengthM: 0.5, roundTrip: false });
    expect(frame.conductorLengthM).toBe(0.5);
    expect(both.conductorLengthM).toBe(1);
    expect(frame.minAreaMm2).toBeCloseTo(both.minAreaMm2 / 2, 12);
    expect(frame.metric.sizeMm2).toBe(both.metric.sizeMm2); // ampacity decides both, so the same 4 mm²
    expect(frame.metric.dropV).toBeCloseTo(both.metric.dropV / 2, 12);
  });

  it("corrects the drop for conductor temperature", () => {
    // §3.3: ρ(t) = ρ20 (1 + 0.00393 (t − 20)); at 80 °C the area needed is 1.2358 × that at 20 °C
    const cold = wireSize({ currentA: 5, lengthM: 3 });
    const hot = wireSize({ currentA: 5, lengthM: 3, tempC: 80 });
    expect(hot.minAreaMm2 / cold.minAreaMm2).toBeCloseTo(1.2358, 10);
  });

  it("refuses a run beyond the largest size", () => {
    expect(() => wireSize({ currentA: 300, lengthM: 1 })).toThrow(WorkshopInputError);
    try {
      wireSize({ currentA: 30, lengthM: 100 });
      expect.unreachable();
    } catch (e) {
      expect((e as WorkshopInputError).field).toBe("lengthM");
    }
  });
});

describe("wireSize: bad input", () => {
  const fieldOf = (input: unknown) => {
    try {
      wireSize(input as Parameters<typeof wireSize>[0]);
    } catch (e) {
      expect(e).toBeInstanceOf(RangeError);
      expect(e).toBeInstanceOf(WorkshopInputError);
      return (e as WorkshopInputError).field;
    }
    return null;
  };

  it.each([
    [{ currentA: -1, lengthM: 2 }, "currentA"],
    [{ currentA: 0, lengthM: 2 }, "currentA"],
    [{ currentA: Number.NaN, lengthM: 2 }, "currentA"],
    [{ currentA: "5", lengthM: 2 }, "currentA"],
    [{ currentA: 5, lengthM: 0 }, "lengthM"],
    [{ currentA: 5, lengthM: Number.POSITIVE_INFINITY }, "lengthM"],
    [{ currentA: 5, lengthM: 2, systemV: -12 }, "systemV"],
    [{ currentA: 5, lengthM: 2, maxDropPct: 0 }, "maxDropPct"],
    [{ currentA: 5, lengthM: 2, maxDropPct: 100 }, "maxDropPct"],
    [{ currentA: 5, lengthM: 2, tempC: Number.NaN }, "tempC"],
    [{ currentA: 5, lengthM: 2, tempC: -300 }, "tempC"],
    [{ currentA: 5, lengthM: 2, roundTrip: "yes" }, "roundTrip"],
    [{ currentA: 5, lengthM: 2, circuitKind: "warp" }, "circuitKind"],
  ])("rejects %j naming %s", (input, field) => {
    expect(fieldOf(input)).toBe(field);
  });

  it("accepts a cold conductor", () => {
    expect(fieldOf({ currentA: 5, lengthM: 2, tempC: -20 })).toBeNull();
  });
});
