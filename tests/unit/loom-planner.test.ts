import { describe, expect, it } from "vitest";
import { demoFamilies, demoNetwork, demoPlannerInput } from "../support/demo-network";
import { decodeColour } from "~/domain/colours";
import { CUTTING_ALLOWANCE, MIN_PRACTICAL_MM2, circuitDropPct, cutListCsv, planLoom, type PlanResult, type PlannerInput } from "~/domain/loom-planner";
import { parseFitting } from "~/domain/terminals";
import { FUSE_RATINGS_A, IEC_60228_CLASS5_OHM_PER_KM, strandedOhmsPerM, strandedResistance } from "~/domain/wire-size";

// Sources beside the checks: REFERENCE-FACTS (/work/shared) §3.2 (IEC 60228 class 5), §5 and 5.1 (the trade's figures,
// marked [common practice] / [from memory] there), IEC 60757 (GNYE). Currents come from the loom's own electrics.

const plan = (input: PlannerInput): PlanResult => {
  const r = planLoom(input);
  if (!r.ok) throw new Error(`${r.error.field}: ${r.error.message}`);
  return r.plan;
};
const family = (slug: string) => demoFamilies.find((f) => f.slug === slug)!;
const circuitsOf = (slug: string) => demoNetwork(family(slug)).rows.circuits.map((c) => c.slug);

/** A few keep-sets per family: everything, a minimal loom, and ignition alone. */
function keepSets(slug: string): string[][] {
  const all = circuitsOf(slug);
  const minimal = all.filter((c) => /ignition|pickup|charging|stator|field|starter|headlamp-dip|tail|brake/.test(c));
  return [all, minimal, all.filter((c) => /ignition|pickup/.test(c))];
}

describe.each(demoFamilies.map((f) => f.slug))("loom planner on %s (demo data)", (slug) => {
  const f = family(slug);
  const plans = keepSets(slug).flatMap((keep) =>
    (["factory", "simple"] as const).map((scheme) => ({ keep, scheme, p: plan(demoPlannerInput(f, keep, scheme)) })),
  );

  it("no wire that carries power in any state is a signal wire; only pickup and sensor wires are signal", () => {
    for (const { p } of plans) {
      for (const r of p.rows) {
        if (r.role === "signal") {
          expect(r.currentA, `${r.from} → ${r.to}`).toBeLessThan(0.05);
          expect(r.peakA).toBeLessThan(0.05);
          expect(`${r.from} ${r.to}`).toMatch(/pickup|Pickup|ignition unit|Ignition unit/i);
        }
        if (r.currentA >= 0.05 || r.peakA >= 0.05) expect(r.role, `${r.from} → ${r.to}`).not.toBe("signal");
      }
    }
  });

  it("simple scheme: only earth is black, no two nets share a code, at most base + one tracer, never green with yellow; legend and cut list agree", () => {
    for (const { p, scheme } of plans) {
      if (scheme !== "simple") continue;
      const byCode = new Map<string, Set<string>>();
      for (const r of p.rows) {
        const black = r.colours.length === 1 && r.colours[0] === "black";
        expect(black, `${r.from} → ${r.to} (${r.role}) is ${r.colour}`).toBe(r.role === "earth");
        expect(r.colours.length).toBeLessThanOrEqual(2);
        expect(r.colours.includes("green") && r.colours.includes("yellow")).toBe(false); // IEC 60757: green and yellow only as GNYE (protective earth)
        byCode.set(r.colour, (byCode.get(r.colour) ?? new Set()).add(r.net));
      }
      for (const [code, nets] of byCode) if (code !== p.rows.find((r) => r.role === "earth")?.colour) expect(nets.size, `${code} on ${[...nets]}`).toBe(1);
      for (const r of p.rows) expect(p.legend.find((l) => l.colour === r.colour)?.nets, r.colour).toContain(r.net);
      for (const l of p.legend) expect(p.rows.some((r) => r.colour === l.colour)).toBe(true);
    }
  });

  it("each kept circuit's whole drop (supply and return wires) stays within its target", () => {
    for (const { p } of plans) for (const d of p.circuitDrops) expect(d.dropV, `${d.circuit}`).toBeLessThanOrEqual(d.budgetV + 1e-9);
  });

  it("a fuse is never raised above the factory rating without saying why, and then only with what carries its current rated for it", () => {
    for (const { p } of plans) {
      for (const fz of p.fuses) {
        expect(FUSE_RATINGS_A).toContain(fz.ratingA);
        if (fz.ratingA > fz.factoryA) {
          expect(fz.raised).toBe(true);
          expect(fz.basis).toMatch(/Raised above the factory's/);
        } else expect(fz.raised).toBe(false);
      }
    }
  });

  it("every wire a fuse protects stands the fuse short-term (10 A/mm², rule of thumb)", () => {
    for (const { p } of plans)
      for (const fz of p.fuses) for (const w of fz.protects) expect(10 * p.rows.find((r) => r.wire === w)!.sizeMm2).toBeGreaterThanOrEqual(fz.ratingA - 1e-9);
  });

  it("a wire whose current the dropped circuits did not reduce is never cut thinner than the factory's", () => {
    const full = plans[0].p;
    for (const r of full.rows) {
      const w = demoPlannerInput(f).wires.find((x) => x.id === r.wire)!;
      if (w.factorySizeMm2 !== null) expect(r.sizeMm2, `${r.from} → ${r.to}`).toBeGreaterThanOrEqual(w.factorySizeMm2);
    }
  });
});

describe("what each wire carries", () => {
  it("stator leads carry the alternator's whole output (12–15 A on the demo fours; common practice), never the 0.5 mm² signal minimum", () => {
    for (const [slug, amps] of [
      ["rx750-four", 14],
      ["rx400-four", 12],
    ] as const) {
      const p = plan(demoPlannerInput(family(slug)));
      const stator = p.rows.filter((r) => /Alternator stator/.test(r.from) || /Alternator stator/.test(r.to));
      expect(stator.length).toBe(3);
      for (const r of stator) {
        expect(r.role).toBe("power");
        expect(r.currentA).toBeCloseTo(amps, 1);
        expect(r.sizeMm2).toBeGreaterThanOrEqual(2); // at least the factory's 2 mm² (invented demo value)
        expect(r.sizeMm2).toBeGreaterThan(MIN_PRACTICAL_MM2);
      }
    }
  });

  it("a field-excited alternator's field lead carries the field current, a few amps (14.4 V / 3.8 Ω ≈ 3.8 A while it is full on)", () => {
    const input = demoPlannerInput(family("b800-boxer"));
    const p = plan(input);
    const fieldWire = input.wires.find((w) => w.code === family("b800-boxer").nets.field.code)!;
    const field = p.rows.find((r) => r.wire === fieldWire.id)!;
    expect(field.role).toBe("power");
    expect(field.peakA).toBeGreaterThan(2);
    expect(field.peakA).toBeLessThan(5);
  });

  it("each coil negative carries its own coil's current, not the sum of both", () => {
    for (const slug of ["rx750-four", "marquis-500"]) {
      const input = demoPlannerInput(family(slug));
      const p = plan(input);
      const codes = [family(slug).nets["coil1-neg"].code, family(slug).nets["coil2-neg"].code];
      const negs = p.rows.filter((r) => codes.includes(input.wires.find((w) => w.id === r.wire)!.code));
      expect(negs.length, slug).toBe(2);
      // One coil: 12.6–14.4 V over its own primary (3 Ω TCI, 4 Ω points; invented demo values) — Ohm's law.
      for (const r of negs) expect(r.peakA, slug).toBeLessThan(14.5 / (slug === "rx750-four" ? 3 : 4) + 0.2);
      const feed = p.rows.find((r) => /Splice \(ignition feed after the kill/.test(r.to) && /Right handlebar switch|Kill button/.test(r.from))!;
      expect(feed.peakA).toBeGreaterThan(negs[0].peakA * 1.5);
    }
  });

  it("the starter cable carries the cranking current, only while the button is held, and is sized short-term", () => {
    const p = plan(demoPlannerInput(family("rx750-four")));
    const cable = p.rows.find((r) => /Starter relay: 87/.test(r.from))!;
    expect(cable.momentary).toBe(true);
    expect(cable.currentA).toBeGreaterThan(100); // 10.5 V over a 0.08 Ω motor (invented demo value): Ohm's law
    expect(cable.sizeMm2).toBeGreaterThanOrEqual(cable.currentA / 10); // short-term 10 A/mm², rule of thumb
    expect(cable.notes.join(" ")).toMatch(/Unfused/);
  });

  it("peak coil currents and momentary relay and horn currents are not summed as continuous into a fuse", () => {
    const p = plan(demoPlannerInput(family("rx750-four")));
    const ign = p.fuses.find((f) => /Ignition fuse/.test(f.name))!;
    expect(ign.continuousA).toBeLessThan(ign.peakA);
    expect(ign.ratingA).toBeLessThanOrEqual(10);
    const sig = p.fuses.find((f) => /Signals fuse/.test(f.name))!;
    expect(sig.continuousA).toBeLessThan(sig.peakA);
  });
});

describe("sizing", () => {
  it("stranded automotive cable: IEC 60228 class 5 maximum, 19.5 mΩ/m at 1 mm², not solid copper's 17.24", () => {
    expect(strandedOhmsPerM(1)).toBeCloseTo(0.0195, 6); // IEC 60228 class 5 [published] (REFERENCE-FACTS §3.2)
    expect(IEC_60228_CLASS5_OHM_PER_KM["2.5"]).toBe(7.98);
    expect(strandedResistance(1, 6)).toBeCloseTo(0.117, 4); // REFERENCE-FACTS §3.4 example 5: 5 A × 0.117 Ω = 0.585 V
    expect(5 * strandedResistance(1, 6)).toBeCloseTo(0.585, 3);
    // Sizes the table has no row for take its worst R·A, never better than the table.
    expect(strandedOhmsPerM(0.85) * 0.85).toBeGreaterThanOrEqual(0.0195);
  });

  it("each row's drop is its current times its class 5 resistance at the conductor temperature", () => {
    const input = demoPlannerInput(family("b800-boxer"));
    const p = plan({ ...input, tempC: 60 });
    for (const r of p.rows) if (r.currentA > 0) expect(r.dropV).toBeCloseTo(r.currentA * strandedResistance(r.sizeMm2, r.lengthM, 60), 9);
  });

  it("drop targets: 3 % for ignition, charging and the headlamp, 5 % cranking, 10 % for the rest (ABYC critical / non-critical; headlamp: 90 % volts ≈ 70 % light, from memory)", () => {
    expect(circuitDropPct({ system: "ignition", slug: "ignition", loads: [] }).pct).toBe(3);
    expect(circuitDropPct({ system: "lighting", slug: "headlamp-dip", loads: [] }).pct).toBe(3);
    expect(circuitDropPct({ system: "lighting", slug: "tail-lamp", loads: [] }).pct).toBe(10);
    expect(circuitDropPct({ system: "starting", slug: "starter-motor", loads: [] }).pct).toBe(5);
    // Light ∝ V^3.4: 0.9^3.4 ≈ 0.70 (REFERENCE-FACTS 5.1, from memory).
    expect(0.9 ** 3.4).toBeCloseTo(0.7, 2);
  });

  it("builder lengths override the family's, and a longer run needs at least as much copper", () => {
    const input = demoPlannerInput(family("marquis-500"), ["headlamp-dip"]);
    const base = plan(input);
    const longest = base.rows.reduce((a, b) => (b.lengthM > a.lengthM ? b : a));
    const longer = plan({ ...input, lengthsM: { [longest.wire]: 6 } });
    const r = longer.rows.find((x) => x.wire === longest.wire)!;
    expect(r.lengthSource).toBe("builder");
    expect(r.sizeMm2).toBeGreaterThanOrEqual(longest.sizeMm2);
  });
});

describe("fuses and terminals", () => {
  it("terminal ratings by fitting (from memory): a 2.8 mm blade is not a 25 A part", () => {
    expect(parseFitting("6-way 2.8 mm flat-blade").ratingA).toBeLessThan(25);
    expect(parseFitting("6.3 mm flat-blade").ratingA).toBeGreaterThan(parseFitting("2.8 mm flat-blade").ratingA!);
    expect(parseFitting("ring M6").family).toBe("ring");
    expect(parseFitting("3.5 mm bullet")).toMatchObject({ family: "bullet", sizeMm: 3.5 });
  });

  it("a fuse that would need raising is left at the factory's rating with a warning when a terminal carrying its whole current is rated lower", () => {
    // Everything on at once on the RX750: the main fuse's kept circuits want more than its 20 A suits, and the main switch's 4.8 mm blades carry all of it.
    const p = plan(demoPlannerInput(family("rx750-four")));
    const main = p.fuses.find((f) => /Main fuse/.test(f.name))!;
    expect(main.ratingA).toBe(main.factoryA);
    expect(main.warnings.join(" ")).toMatch(/Not raised/);
    expect(p.warnings.join(" ")).toMatch(/Main fuse/);
  });

  it("dropping circuits may lower a fuse below the factory's, never raise it silently", () => {
    const keep = circuitsOf("rx750-four").filter((c) => /^ignition$|pickup/.test(c));
    const p = plan(demoPlannerInput(family("rx750-four"), keep));
    for (const fz of p.fuses) expect(fz.ratingA).toBeLessThanOrEqual(fz.factoryA);
  });
});

describe("parts and CSV", () => {
  it("parts: wire by size and colour with the cutting allowance, a fuse per fuse, a terminal per fitted end", () => {
    const p = plan(demoPlannerInput(family("sovereign-650"), undefined, "simple"));
    const metres = p.parts.filter((x) => x.kind === "wire").reduce((s, x) => s + x.quantity, 0);
    expect(metres).toBeCloseTo(p.totals.lengthM * (1 + CUTTING_ALLOWANCE), 1);
    expect(p.parts.filter((x) => x.kind === "fuse").reduce((s, x) => s + x.quantity, 0)).toBe(p.fuses.length);
    expect(p.parts.some((x) => x.kind === "terminal")).toBe(true);
  });

  it("CSV: header row, CRLF records, RFC 4180 quoting and defused formulas", () => {
    const p = plan(demoPlannerInput(family("komadori-125")));
    p.rows[0].from = '=HYPERLINK("x")';
    const csv = cutListCsv(p);
    const lines = csv.split("\r\n");
    expect(lines[0]).toBe(
      "wire,from,to,colour,colours,length_m,length_source,current_a,continuous_a,peak_a,role,circuits,size_mm2,awg,drop_v,drop_pct,decided_by,notes",
    );
    expect(lines.at(-1)).toBe("");
    expect(lines[1]).toContain(`"'=HYPERLINK(""x"")"`);
    expect(lines.length).toBe(p.rows.length + 2);
  });

  it("factory colours are the family's own codes, and they decode in its notation (or its make's house style)", () => {
    const f = family("rx750-four");
    const p = plan(demoPlannerInput(f));
    for (const r of p.rows) expect(decodeColour(r.colour, "jis").ok, r.colour).toBe(true);
  });
});

describe("errors name the field", () => {
  const input = demoPlannerInput(family("rx400-four"));
  it.each([
    [{ keep: [] }, "keep"],
    [{ keep: ["no-such-circuit"] }, "keep"],
    [{ scheme: "rainbow" as never }, "scheme"],
    [{ notation: "xx" as never }, "notation"],
    [{ tempC: 900 }, "tempC"],
    [{ lengthsM: { nope: 1 } }, "lengthsM.nope"],
    [{ lengthsM: { w0: 11 } }, "lengthsM.w0"],
  ])("%j → %s", (patch, field) => {
    const r = planLoom({ ...input, ...patch });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.field).toBe(field);
  });
});
