import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { Cautions } from "~/components/cautions";
import { CAUTION_DEFERRAL, CAUTION_KINDS, cautionsFor, cautionTexts, type CautionTool } from "~/domain/cautions";

// Sources are the sections of /work/shared/REFERENCE-FACTS.md named beside each check.

describe("cautionsFor: which cautions each tool shows", () => {
  it("the circuit walk with the engine stopped: meter, battery, ignition, and nothing about cranking or charging", () => {
    expect(cautionsFor("walk")).toEqual(["meter", "battery", "ignition"]);
    expect(cautionsFor("walk", "stopped")).toEqual(cautionsFor("walk"));
  });

  it("the walk while cranking warns of the primary spikes, the moving parts and the sparks", () => {
    // §5.1: a few hundred volts on the coil negative when the current is broken, never probe it while cranking (from memory);
    // §6: an open HT lead or a spark test is an ignition source near fuel (common practice).
    const kinds = cautionsFor("walk", "cranking");
    expect(kinds).toEqual(expect.arrayContaining(["meter", "primary", "cranking", "spark"]));
    expect(kinds).not.toContain("charging");
  });

  it("the walk while running adds the charging caution and keeps the primary and moving-parts ones", () => {
    // Never disconnect the battery while running: the regulator needs it to clamp the output (from memory; §5 window).
    const kinds = cautionsFor("walk", "running");
    expect(kinds).toEqual(expect.arrayContaining(["charging", "primary", "cranking"]));
  });

  it("the bench sheet follows the same rule as the walk", () => {
    for (const engine of ["stopped", "cranking", "running"] as const) expect(cautionsFor("bench", engine)).toEqual(cautionsFor("walk", engine));
    expect(cautionsFor("bench")).toEqual(["meter", "battery", "ignition"]);
  });

  it("the planner: main fuse near the battery and the unfused starter cable, then the battery", () => {
    // §5 main fuse 15–30 A (common practice); starter cable usually unfused (DEVELOPERS planner decision, common practice).
    expect(cautionsFor("planner")).toEqual(["planner", "battery", "fuel"]);
    expect(cautionTexts(["planner"])[0].text).toMatch(/main fuse as close to the battery/);
    expect(cautionTexts(["planner"])[0].text).toMatch(/starter cable is usually unfused/);
    expect(cautionTexts(["planner"])[0].text).toMatch(/grommets/);
  });

  it("the colour finder: battery disconnected and the meter connected safely", () => {
    expect(cautionsFor("finder")).toEqual(["battery", "meter"]);
  });

  it("every tool in every state starts from a known kind and names each kind once", () => {
    for (const tool of ["walk", "bench", "finder", "planner"] as CautionTool[]) {
      for (const engine of ["stopped", "cranking", "running"] as const) {
        const kinds = cautionsFor(tool, engine);
        expect(new Set(kinds).size, `${tool} ${engine}`).toBe(kinds.length);
        for (const k of kinds) expect(CAUTION_KINDS).toContain(k);
      }
    }
  });
});

describe("the texts agree with the steps", () => {
  const all = cautionTexts([...CAUTION_KINDS]);
  const text = (k: (typeof CAUTION_KINDS)[number]) => all.find((c) => c.kind === k)!.text;

  it("has a title and a text for every kind", () => {
    expect(all.map((c) => c.kind)).toEqual([...CAUTION_KINDS]);
    for (const c of all) {
      expect(c.title.trim()).not.toBe("");
      expect(c.text.length).toBeGreaterThan(40);
    }
  });

  it("connect the meter with the ignition off, then switch on", () => {
    // §6: switch ignition off before connecting test gear (common practice).
    expect(text("meter")).toMatch(/ignition off, then switch on/);
    expect(text("ignition")).toMatch(/ignition off before connecting test gear/);
    // The primary caution says the same order: fit the probe first, then switch on and crank.
    expect(text("primary")).toMatch(/ignition off, then switch on and crank/);
  });

  it("primary: never probe the coil negative or the points while cranking; a few hundred volts", () => {
    expect(text("primary")).toMatch(/coil negative or the points while the engine is cranking or running/);
    expect(text("primary")).toMatch(/a few hundred volts/); // §5.1 (from memory)
  });

  it("spark: fuel off, plug body earthed with a clip", () => {
    expect(text("spark")).toMatch(/fuel off/);
    expect(text("spark")).toMatch(/Earth the plug body firmly/); // §6 (common practice)
  });

  it("charging: never disconnect the battery while the engine runs", () => {
    expect(text("charging")).toMatch(/Never disconnect the battery while the engine runs/);
  });

  it("cranking: neutral, level ground, clear of moving parts", () => {
    expect(text("cranking")).toMatch(/neutral/);
    expect(text("cranking")).toMatch(/level ground/);
    expect(text("cranking")).toMatch(/clear of/);
  });

  it("battery: earth lead off first and on last, including positive-earth bikes", () => {
    // §6: disconnect the earth lead first and replace it last; on positive-earth machines that is the positive.
    expect(text("battery")).toMatch(/earth lead first and reconnect it last/);
    expect(text("battery")).toMatch(/positive-earth/);
  });

  it("ignition: tens of kilovolts, never crank with a plug lead off", () => {
    expect(text("ignition")).toMatch(/tens of kilovolts/); // §4 (published)
    expect(text("ignition")).toMatch(/never crank or run with a plug lead off/);
  });
});

describe("Cautions component", () => {
  it("renders the kinds given, in order, and always the deferral to the manual, local rules and a mechanic", () => {
    const html = renderToStaticMarkup(createElement(Cautions, { kinds: cautionsFor("walk", "cranking") }));
    const shown = [...html.matchAll(/data-caution="([a-z]+)"/g)].map((m) => m[1]);
    expect(shown).toEqual(cautionsFor("walk", "cranking"));
    expect(html).toContain(CAUTION_DEFERRAL);
    expect(CAUTION_DEFERRAL).toMatch(/factory service manual.*local road-worthiness rules.*qualified mechanic/);
  });

  it("keeps the card page's old kinds working", () => {
    const html = renderToStaticMarkup(createElement(Cautions, { kinds: ["battery", "ignition", "fuel"] }));
    expect([...html.matchAll(/data-caution="([a-z]+)"/g)].map((m) => m[1])).toEqual(["battery", "ignition", "fuel"]);
  });
});
