/**
 * One caution set for every page and API answer where the work can hurt someone, worded to agree with the steps the
 * tools give (connect the meter with the ignition off, then switch on; crank only once the probes are fitted). Pure
 * TypeScript: the cautions component renders these texts, and JSON routes can return them as they are.
 *
 * Sources (../shared/REFERENCE-FACTS.md):
 * - battery: §6 CCOHS "Garages – Work Practices" and "Garages – Batteries" (disable the electrical system, explosive gas,
 *   goggles); earth lead off first and on last (battery-dealer FAQ, common practice); HSE INDG139 (no sparks or flames).
 * - ignition: §4 secondary voltages (tens of kV, published); §6 never crank or run with an HT lead or plug open-circuit
 *   (common practice).
 * - fuel: §6 HSE "Fire and explosion" (vapour invisible, heavier than air, collects in pits and drains; disconnect the
 *   battery before draining fuel).
 * - meter, primary: §5.1 "coil primary spikes: a few hundred volts on the coil negative when the current is broken"
 *   (from memory); §6 switch the ignition off before connecting test gear (common practice).
 * - spark: §6 spark-testing: ground the plug body firmly with a clip, an ignition source near fuel (common practice).
 * - charging: the regulator clamps the alternator's output only with the battery in circuit (from memory; §5 charging
 *   window 13.5–14.5 V at the battery, common practice).
 * - cranking: neutral, stand, clear of moving parts; run engines only with the exhaust led outside (common practice).
 * - planner: §5 main fuse typically 15–30 A (from memory / common practice); the starter cable is usually unfused
 *   (DEVELOPERS.md planner decision, common practice); a fuse protects the wire behind it, so it is sized for that wire
 *   (§5 ampacity rule of thumb, common practice).
 */
import type { EngineState } from "./electrics";

export const CAUTION_KINDS = ["meter", "battery", "ignition", "primary", "spark", "fuel", "charging", "cranking", "planner"] as const;
export type CautionKind = (typeof CAUTION_KINDS)[number];

export interface Caution {
  kind: CautionKind;
  title: string;
  text: string;
}

const TEXT: Readonly<Record<CautionKind, { title: string; text: string }>> = Object.freeze({
  meter: {
    title: "Meter",
    text: "Connect the meter with the ignition off, then switch on for a voltage reading. Never take a resistance reading on a live circuit: switch off and unplug the part (or disconnect the battery) first.",
  },
  battery: {
    title: "Battery",
    text: "Disconnect the battery's earth lead first and reconnect it last (the negative lead on most bikes, the positive on a positive-earth one), so a spanner touching the frame cannot short the live post. A shorted battery can weld a tool and start a fire, and a battery gives off explosive gas: no flames or sparks near it, ventilate, and wear eye protection.",
  },
  ignition: {
    title: "Ignition",
    text: "Ignition secondaries reach tens of kilovolts. Switch the ignition off before connecting test gear or touching coils, caps or leads, and never crank or run with a plug lead off or a plug out of its cap and not earthed: the spark then finds another path, through the coil, the ignition unit or you.",
  },
  primary: {
    title: "Coil primary",
    text: "Never probe the coil negative or the points while the engine is cranking or running: each time the primary current is broken it spikes to a few hundred volts. Fit the probe with the ignition off, then switch on and crank.",
  },
  spark: {
    title: "Spark tests",
    text: "A spark test is an ignition source: turn the fuel off, wipe up any spill and test away from the carburettors and open fuel. Earth the plug body firmly to the engine with a clip (do not just lay it on metal), and keep your hands off the lead and cap while cranking.",
  },
  fuel: {
    title: "Fuel",
    text: "Petrol vapour is invisible, heavier than air and ignites from a spark. Work in a ventilated space away from pits and drains, keep the tank and lines closed, and disconnect the battery before draining fuel or working near the lines.",
  },
  charging: {
    title: "Charging",
    text: "Never disconnect the battery while the engine runs: without it the regulator and the loom see the alternator's unclamped voltage, which can destroy the regulator, the ignition unit and the bulbs. Read the charging voltage across the battery posts.",
  },
  cranking: {
    title: "Cranking and running",
    text: "Gearbox in neutral, the bike on its stand on level ground, and hands, hair, sleeves and meter leads clear of the chain, the rear wheel and anything else that turns. Run the engine outdoors, or with the exhaust led outside.",
  },
  planner: {
    title: "Building the loom",
    text: "Fit the main fuse as close to the battery as you can: the cable before it is unprotected. The starter cable is usually unfused: route and protect it (grommets where it passes metal, no sharp edges, an insulated boot on the relay terminal). Size every fuse for the wire behind it, never the wire for the fuse.",
  },
});

/** Shown under every caution block: none of these texts replaces the manual, the rules or a mechanic. */
export const CAUTION_DEFERRAL =
  "The factory service manual, your local road-worthiness rules and a qualified mechanic take precedence over anything shown here.";

/** The workshop tools that show cautions. */
export type CautionTool = "walk" | "bench" | "finder" | "planner";

/**
 * The caution kinds a tool shows, in reading order, for the engine's state: the meter first (how to connect), then what
 * can hurt. A stopped engine needs no cranking or charging caution; cranking adds the primary spikes, moving parts and
 * the sparks it makes; running adds the charging caution.
 */
export function cautionsFor(tool: CautionTool, engine: EngineState = "stopped"): CautionKind[] {
  switch (tool) {
    case "planner":
      // A new loom is laid along the tank and the fuel lines.
      return ["planner", "battery", "fuel"];
    case "finder":
      // Identifying a cut-off plug means probing and cutting wires: with the battery disconnected.
      return ["battery", "meter"];
    case "walk":
    case "bench": {
      const kinds: CautionKind[] = ["meter", "battery", "ignition"];
      if (engine === "cranking") kinds.push("primary", "cranking", "spark");
      if (engine === "running") kinds.push("primary", "charging", "cranking");
      return kinds;
    }
  }
}

/** The title and text of each kind, in the order given (duplicates dropped). */
export function cautionTexts(kinds: readonly CautionKind[]): Caution[] {
  return [...new Set(kinds)].map((kind) => ({ kind, ...TEXT[kind] }));
}
