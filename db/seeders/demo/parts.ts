/**
 * Parts every demo family shares: the battery, fuses, coils, the lights, indicators, horn and instrument lamps, the
 * neutral and oil-pressure switches. Each takes the family's colour codes (in its maker's notation), its voltage and
 * its housings, so families share a design but not a loom. All names, colours and values are invented for the demo;
 * none is any real machine's diagram.
 *
 * Electrical conventions (app/domain/electrics.ts): a lamp's watts are at the family's system voltage; a winding's ohms
 * are the middle of its card spec; momentary loads (horn, starter) say so; the live post is the battery's + on a
 * negative-earth bike and its − on a positive-earth one, and every circuit runs from the live post to the earth post.
 */
import type { CircuitSpec, ComponentSpec, NetSpec, PairSpec, SpecSpec } from "./spec.ts";

export type Volts = 6 | 12;
export type Earth = "negative" | "positive";

/** The part of a family's loom a builder function adds: merged into the family by `merge`. */
export interface Part {
  components: ComponentSpec[];
  nets: Record<string, NetSpec>;
  pairs: PairSpec[];
  circuits: CircuitSpec[];
}

/** Merge parts; a net named in several parts keeps the first's code and hub and gathers every part's terminals. */
export function merge(...parts: Part[]): Part {
  const out: Part = { components: [], nets: {}, pairs: [], circuits: [] };
  for (const p of parts) {
    out.components.push(...p.components);
    out.pairs.push(...p.pairs);
    out.circuits.push(...p.circuits);
    for (const [name, net] of Object.entries(p.nets)) {
      const had = out.nets[name];
      out.nets[name] = had ? { ...had, terminals: [...(had.terminals ?? []), ...(net.terminals ?? [])] } : { ...net, terminals: [...(net.terminals ?? [])] };
    }
  }
  return out;
}

// ---- Sources: every demo value says it is invented, and what it is typical of ------------------------------------

export const DEMO = "Invented for the demo scenario";
export const SRC = {
  pickup: `${DEMO}; inductive pickups of the era read a few hundred ohms (from memory), inside the 150–1000 Ω range an automotive meter maker's manual gives for reluctance sensors`,
  tciPrimary: `${DEMO}; transistor-ignition coil primaries are about 2–4 Ω (from memory)`,
  pointsPrimary: `${DEMO}; 12 V points-era coil primaries without a ballast are about 3–5 Ω (from memory)`,
  sixVoltPrimary: `${DEMO}; 6 V coil primaries are about 1–2 Ω (from memory)`,
  secondary: `${DEMO}; coil secondaries read several kΩ, typically 6–20 kΩ (common practice)`,
  cap: `${DEMO}; resistor plug caps are about 5 kΩ (common practice); the HT loop is the secondary plus both caps`,
  stator3: `${DEMO}; three-phase stators read well under 1 Ω phase to phase (common practice)`,
  stator1: `${DEMO}; single-phase stators read under 1 Ω (common practice)`,
  insulation: `${DEMO}; a winding must not conduct to its core: open on an ohmmeter's highest range (common practice)`,
  acOutput: `${DEMO}; unloaded AC output rises with rpm, so the trade quotes it per 1000 rpm (common practice)`,
  regulated12: `${DEMO}; regulators of the era hold about 14–15 V at the battery at speed (from memory)`,
  regulated6: `${DEMO}; half the 12 V figure: three cells instead of six (computed)`,
  gap: `${DEMO}; points gaps of the era are a few tenths of a millimetre (common practice)`,
  dwell: `${DEMO}; the points are closed for a little over half the cycle (common practice)`,
  condenser: `${DEMO}; ignition condensers are about 0.2–0.3 µF (from memory)`,
  relay: `${DEMO}; small starter relays read a few ohms (common practice)`,
  field: `${DEMO}; small alternator rotors read a few ohms (common practice)`,
};

// ---- Building blocks --------------------------------------------------------------------------------------------

/** The live and earth posts' pin refs for a polarity. */
export const postsOf = (earth: Earth) => (earth === "negative" ? { live: "battery.+", earth: "battery.-" } : { live: "battery.-", earth: "battery.+" });

export function battery(location: string, v: Volts, earth: Earth): ComponentSpec {
  // DIN 72552's 30 and 31 are the negative-earth convention; a positive-earth battery's posts are left unnumbered.
  const neg = earth === "negative";
  return {
    key: "battery", kind: "battery", name: `Battery ${v} V`, system: "charging", location,
    terminals: [{ label: "+", terminal: neg ? "30" : undefined, fitting: "ring M6" }, { label: "-", terminal: neg ? "31" : undefined, fitting: "ring M6" }],
    links: [{ from: "battery.+", to: "battery.-", kind: "source", label: "cells" }],
  };
}

export const frameEarth = (location: string): ComponentSpec => ({
  key: "frame-earth", kind: "frame-earth", name: "Frame earth point", system: null, location, terminals: [{ label: "E", terminal: "31", fitting: "ring M6" }],
});

/** The crankcase: the neutral and oil switches and the starter motor earth through it; one strap joins it to the frame. */
export const crankcase = (): ComponentSpec => ({
  key: "crankcase", kind: "engine-earth", name: "Crankcase (engine earth)", system: null, location: "engine", terminals: [{ label: "E", terminal: "31", fitting: "ring M6" }],
});

export function fuse(key: string, name: string, ratingA: number, system: string, location: string, fitting = "6.3 mm flat-blade"): ComponentSpec {
  return {
    key, kind: "fuse", name: `${name} ${ratingA} A`, system, location,
    terminals: [{ label: "in", fitting }, { label: "out", fitting }],
    links: [{ from: `${key}.in`, to: `${key}.out`, kind: "fuse", label: "fuse", ratingA }],
  };
}

export interface CoilOptions {
  key: string;
  name: string;
  /** Double-ended (two HT towers, wasted spark) or one tower. */
  twoEnded: boolean;
  ohms: number;
  spec: { min: number; max: number; source: string };
  secondary: { min: number; max: number };
  location: string;
  housing: string;
  feedNet: string;
  negNet: string;
  negTerminal?: string;
}

/** An ignition coil with its primary plug as a card (specs: primary, secondary, the HT loop with caps). */
export function coil(o: CoilOptions): Part {
  const comp: ComponentSpec = {
    key: o.key, kind: "ignition-coil", name: o.name, system: "ignition", location: o.location,
    terminals: o.twoEnded ? [{ label: "HT-a", terminal: "4a" }, { label: "HT-b", terminal: "4b" }] : [{ label: "HT", terminal: "4" }],
    links: [
      { from: `${o.key}:1`, to: `${o.key}:2`, kind: "winding", label: "primary", params: { ohms: o.ohms } },
      o.twoEnded
        ? { from: `${o.key}.HT-a`, to: `${o.key}.HT-b`, kind: "winding", label: "secondary", params: { ohms: (o.secondary.min + o.secondary.max) / 2 } }
        : { from: `${o.key}:2`, to: `${o.key}.HT`, kind: "winding", label: "secondary", params: { ohms: (o.secondary.min + o.secondary.max) / 2 } },
    ],
  };
  const off = "Ignition off (battery earth lead off for safety), the coil's primary plug off";
  const specs: SpecSpec[] = [
    { name: "Primary winding", min: o.spec.min, max: o.spec.max, unit: "Ω", between: ["1", "2"], source: o.spec.source, material: "copper",
      conditions: `${off}: ohmmeter on the coil's own two spades (the socket side of this card). Null the meter's leads first: a few tenths of an ohm matter here.` },
    o.twoEnded
      ? { name: "Secondary winding", min: o.secondary.min, max: o.secondary.max, unit: "kΩ", between: ["HT A", "HT B"], source: SRC.secondary, material: "copper",
          conditions: `${off} and both HT leads pulled out of the coil: ohmmeter between the two HT towers.` }
      : { name: "Secondary winding", min: o.secondary.min, max: o.secondary.max, unit: "kΩ", between: ["2", "HT"], source: SRC.secondary, material: "copper",
          conditions: `${off} and the HT lead pulled out of the coil: ohmmeter between the − spade (cavity 2) and the HT tower.` },
    o.twoEnded
      ? { name: "HT loop: secondary, both leads and caps", min: o.secondary.min + 8, max: o.secondary.max + 12, unit: "kΩ", between: ["cap A", "cap B"], source: SRC.cap, material: "other",
          conditions: "Ignition off, both caps pulled off their plugs, leads left in the coil: ohmmeter between the two caps' plug terminals. Each 5 kΩ cap adds its share; an open reading means a lead or cap, not necessarily the coil." }
      : { name: "Plug cap", min: 4, max: 6, unit: "kΩ", between: ["cap", "HT"], source: SRC.cap, material: "carbon",
          conditions: "Ignition off, cap off the plug and lead out of the coil: ohmmeter between the cap's plug terminal and the lead's coil end. Carbon resistor: no temperature correction." },
  ];
  const pair: PairSpec = {
    key: o.key, name: o.name, system: "ignition", owner: o.key, ownerGender: "socket", ownerWhere: "on the coil", location: o.location,
    housing: o.housing, rows: 1, cols: 2, latch: "top",
    pins: [{ cavity: "1", net: o.feedNet, terminal: "15" }, { cavity: "2", net: o.negNet, terminal: o.negTerminal ?? "1" }],
    specs,
  };
  return { components: [comp], nets: {}, pairs: [pair], circuits: [] };
}

/** A stator's specs: each phase pair's resistance, a phase to earth (open) and its AC output. */
export function statorSpecs(phases: 1 | 3, ohms: [number, number], acPer1000: [number, number]): SpecSpec[] {
  const off = "Engine stopped, ignition off, the stator plug unplugged from the regulator";
  const pairs: [string, string][] = phases === 3 ? [["1", "2"], ["2", "3"], ["1", "3"]] : [["1", "2"]];
  return [
    ...pairs.map(([a, b]): SpecSpec => ({ name: phases === 3 ? `Phase ${a} to phase ${b}` : "Stator winding", min: ohms[0], max: ohms[1], unit: "Ω", between: [a, b],
      source: phases === 3 ? SRC.stator3 : SRC.stator1, material: "copper", conditions: `${off}: ohmmeter on the stator side of the plug; null the leads first.` })),
    { name: "Phase to earth (insulation)", min: 1, max: null, unit: "MΩ", between: ["1", "earth"], source: SRC.insulation, kind: "insulation",
      conditions: `${off}: ohmmeter on its highest range between cavity 1 of the stator side and the bare crankcase; it must read open (OL). Repeat for every lead.` },
    { name: "AC output, unloaded, per 1000 rpm", min: acPer1000[0], max: acPer1000[1], unit: "V AC", between: phases === 3 ? ["1", "2"] : ["1", "2"], source: SRC.acOutput, kind: "ac-output",
      conditions: "Stator plug unplugged, engine running at a steady speed, meter on AC volts across the stator side's leads (each pair in turn): divide the reading by the rpm/1000. Keep leads clear of the belt, chain and exhaust." },
  ];
}

/** A regulated-voltage spec, measured where the card says. */
export function regulatedSpec(v: Volts, between: [string, string], where: string, range: [number, number]): SpecSpec {
  return {
    name: "Regulated voltage", min: range[0], max: range[1], unit: "V", between, source: v === 12 ? SRC.regulated12 : SRC.regulated6, kind: "regulated-voltage",
    conditions: `Battery charged, engine at 5000 rpm, headlamp on: DC volts ${where}. Never disconnect the battery with the engine running.`,
  };
}

/** Contact-breaker specs: gap, dwell and the condenser, for the set wired to `lead`. */
export function pointsSpecs(set: string, lead: string, earth: string): SpecSpec[] {
  return [
    { name: `Points gap${set}`, min: 0.35, max: 0.4, unit: "mm", between: [lead, earth], source: SRC.gap, kind: "gap",
      conditions: "Engine stopped, ignition off, the engine turned until the heel of the points sits on the cam's peak (fully open): feeler gauge between the contacts." },
    { name: `Dwell${set}`, min: 55, max: 65, unit: "%", between: [lead, earth], source: SRC.dwell, kind: "dwell",
      conditions: "Dwell meter between this cavity (the points lead, back-probed) and earth, engine cranking or idling, set to the engine's cylinders. Never touch the lead itself while the engine turns: primary spikes reach a few hundred volts." },
    { name: `Condenser${set}`, min: 0.2, max: 0.28, unit: "µF", between: [lead, earth], source: SRC.condenser, kind: "capacitance",
      conditions: "Ignition off, the points open (cam on its peak) and the condenser's lead off the points: capacitance meter between the lead and the condenser's body." },
  ];
}

// ---- Lights, indicators, horn, instruments ------------------------------------------------------------------------

export interface FrontCodes {
  "main-beam": string; "dip-beam": string; "flash-out": string; "ind-left": string; "ind-right": string; "horn-sw": string;
  "neutral-sw": string; "oil-sw": string;
}

export interface FrontOptions {
  v: Volts;
  codes: FrontCodes;
  /** Sizes (mm²) the factory used for lamp feeds and for the small warning-lamp leads. */
  sizes: { lamp: number; small: number };
  /** The housing words for its small plugs, e.g. "2.8 mm flat-blade", "3.5 mm bullet". */
  blade: string;
  bullet: string;
  /** Net names of the template that feed these parts. */
  headFeed: string;
  tailFeed: string;
  sigFeed: string;
  /** The net the charge lamp's switched side joins: the regulator's lamp terminal, or the alternator's D+. */
  chargeLampNet: string;
  /** Where the charge lamp's circuit ends: the earth post, or (field-excited) the alternator's D+ terminal, since its current goes on through the field. */
  chargeLampTo?: string;
  watts: { main: number; dip: number; indicator: number; illumination: number; warning: number; highBeam: number; horn: number };
  earth: Earth;
}

/** Dip/main switch, headlamp, flasher and four indicators, horn, instrument and warning lamps, neutral and oil switches. */
export function front(o: FrontOptions): Part {
  const c = o.codes;
  const { live, earth } = postsOf(o.earth);
  const left: ComponentSpec = {
    key: "left-switch", kind: "handlebar-switch", name: "Left handlebar switch (dip, indicators, horn)", system: "lighting", location: "left handlebar",
    links: [
      { from: "left-switch:1", to: "left-switch:3", kind: "contact", label: "dip contact", switch: "beam", positions: ["low"], params: { contactA: 10 } },
      { from: "left-switch:1", to: "left-switch:2", kind: "contact", label: "main beam contact", switch: "beam", positions: ["high"], params: { contactA: 10 } },
      { from: "left-switch:4", to: "left-switch:5", kind: "contact", label: "indicator left", switch: "indicators", positions: ["left"], params: { contactA: 5 } },
      { from: "left-switch:4", to: "left-switch:6", kind: "contact", label: "indicator right", switch: "indicators", positions: ["right"], params: { contactA: 5 } },
      { from: "left-switch:7", to: "left-switch:8", kind: "contact", label: "horn button", switch: "horn", positions: ["pressed"], params: { contactA: 5 } },
    ],
  };
  const ind = (key: string, name: string, where: string): ComponentSpec => ({
    key, kind: "lamp", name, system: "signals", location: where,
    links: [{ from: `${key}:1`, to: `${key}:2`, kind: "lamp", label: "filament", params: { watts: o.watts.indicator } }],
  });
  const indPair = (key: string, name: string, net: string, where: string, latch: PairSpec["latch"]): PairSpec => ({
    key, name, system: "signals", owner: key, ownerGender: "plug", ownerWhere: "on the lamp lead", location: where,
    housing: `2-way ${o.bullet}`, rows: 1, cols: 2, latch,
    pins: [{ cavity: "1", net, terminal: key.includes("left") ? "L" : "R" }, { cavity: "2", net: "earth", terminal: "31" }],
  });
  const v = o.v;
  const components: ComponentSpec[] = [
    left,
    { key: "headlamp", kind: "lamp", name: "Headlamp", system: "lighting", location: "front",
      links: [
        { from: "headlamp:1", to: "headlamp:3", kind: "lamp", label: "main filament", params: { watts: o.watts.main } },
        { from: "headlamp:2", to: "headlamp:3", kind: "lamp", label: "dip filament", params: { watts: o.watts.dip } },
      ] },
    { key: "flasher", kind: "flasher", name: "Flasher unit", system: "signals", location: "inside the headlamp shell",
      links: [{ from: "flasher:1", to: "flasher:2", kind: "transistor", label: "flasher", params: { role: "flasher", duty: 0.5, contactA: 8 } }] },
    ind("ind-front-left", "Front indicator, left", "left of the headlamp"),
    ind("ind-front-right", "Front indicator, right", "right of the headlamp"),
    ind("ind-rear-left", "Rear indicator, left", "left of the number plate"),
    ind("ind-rear-right", "Rear indicator, right", "right of the number plate"),
    { key: "horn", kind: "horn", name: "Horn", system: "signals", location: "below the headlamp, on the frame",
      links: [{ from: "horn:1", to: "horn:2", kind: "load", label: "horn", params: { amps: o.watts.horn, momentary: true } }] },
    { key: "instruments", kind: "instruments", name: "Instrument panel (lamps)", system: "instruments", location: "above the headlamp",
      links: [
        { from: "instruments:1", to: "instruments:8", kind: "lamp", label: "illumination lamps", params: { watts: o.watts.illumination } },
        { from: "instruments:2", to: "instruments:3", kind: "lamp", label: "neutral lamp", params: { watts: o.watts.warning } },
        { from: "instruments:2", to: "instruments:4", kind: "lamp", label: "oil lamp", params: { watts: o.watts.warning } },
        // 2 W: with a field-excited alternator this lamp's current starts the excitation (REFERENCE-FACTS 5.1, from memory).
        { from: "instruments:2", to: "instruments:5", kind: "lamp", label: "charge lamp", params: { watts: v === 12 ? 2 : 1 } },
        { from: "instruments:6", to: "instruments:8", kind: "lamp", label: "high-beam lamp", params: { watts: o.watts.highBeam } },
        { from: "instruments:7", to: "instruments:8", kind: "lamp", label: "indicator lamp", params: { watts: o.watts.warning } },
      ] },
    { key: "neutral-switch", kind: "neutral-switch", name: "Neutral switch", system: "instruments", location: "gearbox, left side, behind the sprocket cover",
      links: [{ from: "neutral-switch:1", to: "crankcase.E", kind: "contact", label: "neutral contact", switch: "gear", positions: ["neutral"] }] },
    { key: "oil-switch", kind: "oil-pressure-switch", name: "Oil-pressure switch", system: "instruments", location: "crankcase, above the oil filter",
      // Closed until the oil pressure builds: the lamp is lit with the engine stopped and goes out once it runs.
      links: [{ from: "oil-switch:1", to: "crankcase.E", kind: "contact", label: "pressure contact", switch: "engine", positions: ["stopped", "cranking"] }] },
  ];
  const nets: Record<string, NetSpec> = {
    "main-beam": { code: c["main-beam"], circuit: "main beam (56a)", lengthMm: 400, sizeMm2: o.sizes.lamp },
    "dip-beam": { code: c["dip-beam"], circuit: "dipped beam (56b)", lengthMm: 400, sizeMm2: o.sizes.lamp },
    "flash-out": { code: c["flash-out"], circuit: "flasher output (49a)", lengthMm: 500, sizeMm2: o.sizes.lamp },
    "ind-left": { code: c["ind-left"], circuit: "left indicators", lengthMm: 1900, sizeMm2: o.sizes.lamp },
    "ind-right": { code: c["ind-right"], circuit: "right indicators", lengthMm: 1900, sizeMm2: o.sizes.lamp },
    "horn-sw": { code: c["horn-sw"], circuit: "horn button to horn", lengthMm: 700, sizeMm2: o.sizes.lamp },
    "neutral-sw": { code: c["neutral-sw"], circuit: "neutral lamp to neutral switch", lengthMm: 1100, sizeMm2: o.sizes.small },
    "oil-sw": { code: c["oil-sw"], circuit: "oil lamp to oil-pressure switch", lengthMm: 1000, sizeMm2: o.sizes.small },
  };
  const p2 = (key: string, name: string, system: string, owner: string, ownerGender: "plug" | "socket", where: string, location: string, housing: string,
    pins: PairSpec["pins"], rows = 1, cols = pins.length, latch: PairSpec["latch"] = "top"): PairSpec =>
    ({ key, name, system, owner, ownerGender, ownerWhere: where, location, housing, rows, cols, latch, pins });
  const pairs: PairSpec[] = [
    p2("left-switch", "Left handlebar switch", "lighting", "left-switch", "plug", "on the switch lead", "inside the headlamp shell", `8-way ${o.blade}`, [
      { cavity: "1", net: o.headFeed, terminal: "56" }, { cavity: "2", net: "main-beam", terminal: "56a" }, { cavity: "3", net: "dip-beam", terminal: "56b" },
      { cavity: "4", net: "flash-out", terminal: "49a" }, { cavity: "5", net: "ind-left", terminal: "L" }, { cavity: "6", net: "ind-right", terminal: "R" },
      { cavity: "7", net: o.sigFeed }, { cavity: "8", net: "horn-sw" },
    ], 2, 4),
    p2("headlamp", "Headlamp", "lighting", "headlamp", "socket", "on the lamp unit", "headlamp shell", `3-way ${o.blade}`, [
      { cavity: "1", net: "main-beam", terminal: "56a" }, { cavity: "2", net: "dip-beam", terminal: "56b" }, { cavity: "3", net: "earth", terminal: "31" },
    ], 1, 3, "bottom"),
    p2("flasher", "Flasher unit", "signals", "flasher", "plug", "on the unit", "inside the headlamp shell", `2-way ${o.blade}`, [
      { cavity: "1", net: o.sigFeed, terminal: "49" }, { cavity: "2", net: "flash-out", terminal: "49a" },
    ], 1, 2, "left"),
    indPair("ind-front-left", "Front indicator, left", "ind-left", "inside the headlamp shell", "top"),
    indPair("ind-front-right", "Front indicator, right", "ind-right", "inside the headlamp shell", "top"),
    indPair("ind-rear-left", "Rear indicator, left", "ind-left", "under the seat tail", "bottom"),
    indPair("ind-rear-right", "Rear indicator, right", "ind-right", "under the seat tail", "bottom"),
    p2("horn", "Horn", "signals", "horn", "socket", "on the horn", "below the headlamp", "2-way 6.3 mm flat-blade (spades on the horn)", [
      { cavity: "1", net: "horn-sw" }, { cavity: "2", net: "earth", terminal: "31" },
    ]),
    p2("instruments", "Instrument panel", "instruments", "instruments", "socket", "on the panel", "behind the instruments", `8-way ${o.blade}, two rows`, [
      { cavity: "1", net: o.tailFeed, terminal: "58" }, { cavity: "2", net: o.sigFeed, terminal: "15" }, { cavity: "3", net: "neutral-sw" },
      { cavity: "4", net: "oil-sw" }, { cavity: "5", net: o.chargeLampNet, terminal: "61" }, { cavity: "6", net: "main-beam", terminal: "56a" },
      { cavity: "7", net: "flash-out", terminal: "C" }, { cavity: "8", net: "earth", terminal: "31" },
    ], 2, 4, "top"),
    p2("neutral-switch", "Neutral switch", "instruments", "neutral-switch", "plug", "on the switch lead", "behind the sprocket cover", `1-way ${o.bullet}`, [
      { cavity: "1", net: "neutral-sw" },
    ]),
    p2("oil-switch", "Oil-pressure switch", "instruments", "oil-switch", "plug", "on the switch (spade)", "crankcase, above the oil filter", "1-way 6.3 mm flat-blade", [
      { cavity: "1", net: "oil-sw" },
    ]),
  ];
  // Every pair's spec-less: bulbs are rated in watts, not measured.
  const w = (on: Partial<Record<string, string>>) => on as CircuitSpec["switches"];
  const circuits: CircuitSpec[] = [
    { slug: "headlamp-main", name: "Lighting: headlamp, main beam", system: "lighting", from: live, to: earth, via: ["headlamp.main filament"], switches: w({ main: "on", lights: "on", beam: "high" }) },
    { slug: "headlamp-dip", name: "Lighting: headlamp, dipped beam", system: "lighting", from: live, to: earth, via: ["headlamp.dip filament"], switches: w({ main: "on", lights: "on", beam: "low" }) },
    { slug: "indicators-left", name: "Signals: left indicators", system: "signals", from: live, to: earth, via: ["ind-front-left.filament", "ind-rear-left.filament"], switches: w({ main: "on", indicators: "left" }) },
    { slug: "indicators-right", name: "Signals: right indicators", system: "signals", from: live, to: earth, via: ["ind-front-right.filament", "ind-rear-right.filament"], switches: w({ main: "on", indicators: "right" }) },
    { slug: "horn", name: "Signals: horn", system: "signals", from: live, to: earth, via: ["horn.horn"], switches: w({ main: "on", horn: "pressed" }) },
    { slug: "instrument-lamps", name: "Instruments: panel lamps", system: "instruments", from: live, to: earth, via: ["instruments.illumination lamps"], switches: w({ main: "on", lights: "on" }) },
    { slug: "neutral-lamp", name: "Instruments: neutral lamp", system: "instruments", from: live, to: earth, via: ["instruments.neutral lamp"], switches: w({ main: "on", gear: "neutral" }) },
    { slug: "oil-lamp", name: "Instruments: oil-pressure lamp", system: "instruments", from: live, to: earth, via: ["instruments.oil lamp"], switches: w({ main: "on", engine: "stopped" }) },
    { slug: "charge-lamp", name: "Instruments: charge lamp", system: "instruments", from: live, to: o.chargeLampTo ?? earth, via: ["instruments.charge lamp"], switches: w({ main: "on", engine: "stopped" }) },
    { slug: "high-beam-lamp", name: "Instruments: high-beam lamp", system: "instruments", from: live, to: earth, via: ["instruments.high-beam lamp"], switches: w({ main: "on", lights: "on", beam: "high" }) },
    { slug: "indicator-lamp", name: "Instruments: indicator lamp", system: "instruments", from: live, to: earth, via: ["instruments.indicator lamp"], switches: w({ main: "on", indicators: "left" }) },
  ];
  return { components, nets, pairs, circuits };
}

/** Tail and brake lamp (5/21 W at 12 V, or the 6 V family's own), its plug and the brake switch. */
export function tailAndBrake(o: { watts: { tail: number; brake: number }; housing: string; latch: PairSpec["latch"]; switchLocation: string; brakeFeed: string; brakeFeedCode: string; feed: string; earth: Earth }): Part {
  const { live, earth } = postsOf(o.earth);
  return {
    components: [
      { key: "tail-lamp", kind: "lamp", name: "Tail and brake lamp", system: "lighting", location: "rear mudguard",
        links: [
          { from: "tail-lamp:1", to: "tail-lamp:3", kind: "lamp", label: "tail filament", params: { watts: o.watts.tail } },
          { from: "tail-lamp:2", to: "tail-lamp:3", kind: "lamp", label: "brake filament", params: { watts: o.watts.brake } },
        ] },
      { key: "brake-switch", kind: "brake-switch", name: "Rear brake light switch", system: "lighting", location: o.switchLocation,
        terminals: [{ label: "a", fitting: "4.7 mm bullet" }, { label: "b", terminal: "54", fitting: "4.7 mm bullet" }],
        links: [{ from: "brake-switch.a", to: "brake-switch.b", kind: "contact", label: "contact", switch: "brake", positions: ["pressed"], params: { contactA: 5 } }] },
    ],
    nets: {
      [o.brakeFeed]: { code: o.brakeFeedCode, circuit: "brake lamp", terminals: ["brake-switch.b"], lengthMm: 600, sizeMm2: 0.75 },
      [o.feed]: { code: "", circuit: "", terminals: ["brake-switch.a"] },
    },
    pairs: [{
      key: "tail-lamp", name: "Tail lamp", system: "lighting", owner: "tail-lamp", ownerGender: "plug", ownerWhere: "on the lamp lead",
      location: "under the seat tail, above the rear mudguard", housing: o.housing, rows: 1, cols: 3, latch: o.latch,
      pins: [{ cavity: "1", net: "tail-feed", terminal: "58" }, { cavity: "2", net: o.brakeFeed, terminal: "54" }, { cavity: "3", net: "earth", terminal: "31" }],
    }],
    circuits: [
      { slug: "tail-lamp", name: "Lighting: tail lamp", system: "lighting", from: live, to: earth, via: ["tail-lamp.tail filament"], switches: { main: "on", lights: "on" } },
      { slug: "brake-lamp", name: "Lighting: brake lamp", system: "lighting", from: live, to: earth, via: ["tail-lamp.brake filament"], switches: { main: "on", brake: "pressed" } },
    ],
  };
}

/** The electric start: relay (coil on the start button, contact on the battery) and motor, earthed through the crankcase. */
export function starter(o: { housing: string; earth: Earth; relayOhms: number; motorOhms: number; viaKill: boolean }): Part {
  const { live, earth } = postsOf(o.earth);
  return {
    components: [
      { key: "starter-relay", kind: "starter-relay", name: "Starter relay", system: "starting", location: "beside the battery",
        terminals: [{ label: "30", terminal: "30", fitting: "ring M6" }, { label: "87", terminal: "87", fitting: "ring M6" }],
        links: [
          { from: "starter-relay.30", to: "starter-relay.87", kind: "contact", label: "contact", switch: "start", positions: ["pressed"], params: { contactA: 150 } },
          { from: "starter-relay:1", to: "starter-relay:2", kind: "winding", label: "coil", params: { ohms: o.relayOhms, momentary: true } },
        ] },
      { key: "starter-motor", kind: "starter-motor", name: "Starter motor", system: "starting", location: "behind the cylinders",
        terminals: [{ label: "post", fitting: "ring M6" }],
        links: [{ from: "starter-motor.post", to: "crankcase.E", kind: "load", label: "motor", params: { ohms: o.motorOhms, momentary: true } }] },
    ],
    nets: {},
    pairs: [{
      key: "starter-relay", name: "Starter relay", system: "starting", owner: "starter-relay", ownerGender: "socket", ownerWhere: "on the relay",
      location: "beside the battery", housing: o.housing, rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "start-sw", terminal: "86" }, { cavity: "2", net: "earth", terminal: "85" }],
      specs: [{ name: "Relay coil", min: 3, max: 5, unit: "Ω", between: ["1", "2"], source: SRC.relay, material: "copper",
        conditions: "Ignition off, the relay's small plug off: ohmmeter on the relay's two small spades." }],
    }],
    circuits: [
      { slug: "starter-control", name: "Starting: button to relay coil", system: "starting", from: live, to: earth, via: ["starter-relay.coil"],
        switches: o.viaKill ? { main: "on", kill: "run", start: "pressed", engine: "cranking" } : { main: "on", start: "pressed", engine: "cranking" } },
      { slug: "starter-motor", name: "Starting: relay contact to motor", system: "starting", from: live, to: earth, via: ["starter-motor.motor"], switches: { start: "pressed", engine: "cranking" } },
    ],
  };
}
