/**
 * Loom templates for the invented demo families. Each template takes the family's own colour codes
 * (in its maker's notation) and housing choices, so families share an architecture but not a loom.
 * All names, colours and values are invented for the demo; none is any real machine's diagram.
 */
import type { CircuitSpec, ComponentSpec, FamilySpec, NetSpec, PairSpec } from "./spec.ts";

type Codes<K extends string> = Record<K, string>;
type Base = Omit<FamilySpec, "systems" | "components" | "nets" | "pairs" | "circuits">;

const DEMO = "demo card value (invented for the scenario)";
const PICKUP_SRC = `${DEMO}; inside the generic 150–1000 Ω pickup range (REFERENCE-FACTS §4)`;
const TCI_PRIMARY_SRC = `${DEMO}; transistor-ignition primaries are about 2–4 Ω (from memory)`;
const POINTS_PRIMARY_SRC = `${DEMO}; points-era 12 V coil primaries are about 3–5 Ω (from memory)`;

const battery = (location: string): ComponentSpec => ({
  key: "battery", kind: "battery", name: "Battery 12 V", system: "charging", location,
  terminals: [{ label: "+", terminal: "30" }, { label: "-", terminal: "31" }],
  links: [{ from: "battery.+", to: "battery.-", kind: "source", label: "cells" }],
});
const frameEarth = (location: string): ComponentSpec => ({
  key: "frame-earth", kind: "frame-earth", name: "Frame earth point", system: null, location, terminals: [{ label: "E", terminal: "31" }],
});
const fuse = (key: string, name: string, ratingA: number, system: string, location: string): ComponentSpec => ({
  key, kind: "fuse", name: `${name} ${ratingA} A`, system, location,
  terminals: [{ label: "in" }, { label: "out" }],
  links: [{ from: `${key}.in`, to: `${key}.out`, kind: "fuse", label: "fuse", ratingA }],
});
const coil = (key: string, name: string, twoEnded: boolean, primary?: string): ComponentSpec => ({
  key, kind: "ignition-coil", name, system: "ignition", location: "under the fuel tank",
  terminals: [
    ...(primary ? [] : [{ label: "+", terminal: "15" }, { label: "-", terminal: "1" }]),
    ...(twoEnded ? [{ label: "HT-a", terminal: "4a" }, { label: "HT-b", terminal: "4b" }] : [{ label: "HT", terminal: "4" }]),
  ],
  links: [
    ...(primary ? [] : [{ from: `${key}.+`, to: `${key}.-`, kind: "winding" as const, label: "primary" }]),
    twoEnded
      ? { from: `${key}.HT-a`, to: `${key}.HT-b`, kind: "winding" as const, label: "secondary" }
      : { from: `${key}.-`, to: `${key}.HT`, kind: "winding" as const, label: "secondary" },
  ],
});
// Lamp wattages are part of the link label: the loom planner reads a load's current from it (W / 12 V).
const lamp = (key: string, name: string, feedTerminal: string, location: string): ComponentSpec => ({
  key, kind: "lamp", name, system: "lighting", location,
  terminals: [{ label: "feed", terminal: feedTerminal }, { label: "E", terminal: "31" }],
  links: [{ from: `${key}.feed`, to: `${key}.E`, kind: "lamp", label: "filament 60/55 W" }],
});
const brakeSwitch = (location: string): ComponentSpec => ({
  key: "brake-switch", kind: "brake-switch", name: "Rear brake light switch", system: "lighting", location,
  terminals: [{ label: "a" }, { label: "b", terminal: "54" }],
  links: [{ from: "brake-switch.a", to: "brake-switch.b", kind: "contact", label: "contact", switch: "brake", positions: ["pressed"] }],
});
const tailLamp = (): ComponentSpec => ({
  key: "tail-lamp", kind: "lamp", name: "Tail and brake lamp", system: "lighting", location: "rear mudguard",
  links: [
    { from: "tail-lamp:1", to: "tail-lamp:3", kind: "lamp", label: "tail filament 5 W" },
    { from: "tail-lamp:2", to: "tail-lamp:3", kind: "lamp", label: "brake filament 21 W" },
  ],
});
const tailPair = (housing: string, latch: PairSpec["latch"]): PairSpec => ({
  key: "tail-lamp", name: "Tail lamp", system: "lighting", owner: "tail-lamp", ownerGender: "plug", ownerWhere: "on the lamp lead",
  location: "under the seat tail, above the rear mudguard", housing, rows: 1, cols: 3, latch,
  pins: [{ cavity: "1", net: "tail-feed", terminal: "58" }, { cavity: "2", net: "brake-feed", terminal: "54" }, { cavity: "3", net: "earth", terminal: "31" }],
});
const starterParts = (): ComponentSpec[] => [
  {
    key: "starter-relay", kind: "starter-relay", name: "Starter relay", system: "starting", location: "beside the battery",
    terminals: [{ label: "30", terminal: "30" }, { label: "87", terminal: "87" }],
    links: [
      { from: "starter-relay.30", to: "starter-relay.87", kind: "contact", label: "contact", switch: "start", positions: ["pressed"] },
      { from: "starter-relay:1", to: "starter-relay:2", kind: "winding", label: "coil" },
    ],
  },
  {
    key: "starter-motor", kind: "starter-motor", name: "Starter motor", system: "starting", location: "behind the cylinders",
    terminals: [{ label: "post" }, { label: "case", terminal: "31" }],
    links: [{ from: "starter-motor.post", to: "starter-motor.case", kind: "load", label: "motor" }],
  },
];
const relayPair = (housing: string): PairSpec => ({
  key: "starter-relay", name: "Starter relay", system: "starting", owner: "starter-relay", ownerGender: "socket", ownerWhere: "on the relay",
  location: "beside the battery", housing, rows: 1, cols: 2, latch: "top",
  pins: [{ cavity: "1", net: "start-sw", terminal: "86" }, { cavity: "2", net: "earth", terminal: "85" }],
  specs: [{ name: "Relay coil resistance", min: 3, max: 5, unit: "Ω", between: ["1", "2"], source: `${DEMO}; small starter relays read a few ohms (common practice)` }],
});
const starterCircuits = (viaKill: boolean): CircuitSpec[] => [
  { slug: "starter-control", name: "Starting: button to relay coil", system: "starting", from: "battery.+", to: "battery.-", via: ["starter-relay.coil"],
    switches: viaKill ? { main: "on", kill: "run", start: "pressed" } : { main: "on", start: "pressed" } },
  { slug: "starter-motor", name: "Starting: relay contact to motor", system: "starting", from: "battery.+", to: "battery.-", via: ["starter-motor.motor"], switches: { start: "pressed" } },
];
const lightCircuits = (): CircuitSpec[] => [
  { slug: "headlamp", name: "Lighting: headlamp", system: "lighting", from: "battery.+", to: "battery.-", via: ["headlamp.filament 60/55 W"], switches: { main: "on", lights: "on" } },
  { slug: "tail-lamp", name: "Lighting: tail lamp", system: "lighting", from: "battery.+", to: "battery.-", via: ["tail-lamp.tail filament 5 W"], switches: { main: "on", lights: "on" } },
  { slug: "brake-lamp", name: "Lighting: brake lamp", system: "lighting", from: "battery.+", to: "battery.-", via: ["tail-lamp.brake filament 21 W"], switches: { main: "on", brake: "pressed" } },
];

type FourNet = "batt" | "main-fused" | "ign-sw" | "ign-fused" | "kill-run" | "coil1-neg" | "coil2-neg" | "pick1-a" | "pick1-b"
  | "pick2-a" | "pick2-b" | "earth" | "start-sw" | "starter-main" | "ph1" | "ph2" | "ph3" | "charge" | "acc" | "acc-fused"
  | "head-feed" | "tail-feed" | "brake-feed";

/** A late-1970s-style inline four with battery-powered transistor ignition, two pickups and two double-ended coils. */
export function transistorFour(base: Base, c: Codes<FourNet>, h: { unit: [number, number]; unitHousing: string; blade: string }): FamilySpec {
  const nets: Record<FourNet, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in", "starter-relay.30"], lengthMm: 300, sizeMm2: 5 },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1400, sizeMm2: 2 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on)", terminals: ["ign-fuse.in", "brake-switch.a"], lengthMm: 1300 },
    "ign-fused": { code: c["ign-fused"], circuit: "fused ignition feed", terminals: ["ign-fuse.out"], lengthMm: 1300 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill switch", terminals: ["coil-1.+", "coil-2.+"], lengthMm: 1200 },
    "coil1-neg": { code: c["coil1-neg"], circuit: "coil 1 (cyl. 1 & 4) negative to unit", terminals: ["coil-1.-"], lengthMm: 500 },
    "coil2-neg": { code: c["coil2-neg"], circuit: "coil 2 (cyl. 2 & 3) negative to unit", terminals: ["coil-2.-"], lengthMm: 500 },
    "pick1-a": { code: c["pick1-a"], circuit: "pickup 1 signal", lengthMm: 900, sizeMm2: 0.5 },
    "pick1-b": { code: c["pick1-b"], circuit: "pickup 1 return", lengthMm: 900, sizeMm2: 0.5 },
    "pick2-a": { code: c["pick2-a"], circuit: "pickup 2 signal", lengthMm: 900, sizeMm2: 0.5 },
    "pick2-b": { code: c["pick2-b"], circuit: "pickup 2 return", lengthMm: 900, sizeMm2: 0.5 },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-", "starter-motor.case", "headlamp.E"], lengthMm: 400 },
    "start-sw": { code: c["start-sw"], circuit: "start button to relay", lengthMm: 1400 },
    "starter-main": { code: c["starter-main"], circuit: "starter motor cable", terminals: ["starter-relay.87", "starter-motor.post"], lengthMm: 600, sizeMm2: 8 },
    ph1: { code: c.ph1, circuit: "alternator phase 1", lengthMm: 700, sizeMm2: 2 },
    ph2: { code: c.ph2, circuit: "alternator phase 2", lengthMm: 700, sizeMm2: 2 },
    ph3: { code: c.ph3, circuit: "alternator phase 3", lengthMm: 700, sizeMm2: 2 },
    charge: { code: c.charge, circuit: "charging output to battery", terminals: ["battery.+"], lengthMm: 500, sizeMm2: 2 },
    acc: { code: c.acc, circuit: "switched feed (lights)", terminals: ["lights-fuse.in"], lengthMm: 1300 },
    "acc-fused": { code: c["acc-fused"], circuit: "fused lights feed", terminals: ["lights-fuse.out"], lengthMm: 1300 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp", terminals: ["headlamp.feed"], lengthMm: 300 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail lamp", lengthMm: 1700 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", terminals: ["brake-switch.b"], lengthMm: 600 },
  };
  const [ur, uc] = h.unit;
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `4-way ${h.blade}`, rows: 2, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "main-fused", terminal: "30" }, { cavity: "2", net: "ign-sw", terminal: "15" }, { cavity: "3", net: "acc" }, { cavity: "4", net: "tail-feed", terminal: "57" }] },
    { key: "right-switch", name: "Right handlebar switch", system: "ignition", owner: "right-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `6-way ${h.blade}`, rows: 2, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "ign-fused" }, { cavity: "2", net: "kill-run", terminal: "15" }, { cavity: "3", net: "start-sw", terminal: "50" },
        { cavity: "4", net: "acc-fused" }, { cavity: "5", net: "head-feed", terminal: "56" }, { cavity: "6", net: "tail-feed", terminal: "58" }] },
    { key: "ignition-unit", name: "Ignition unit", system: "ignition", owner: "ignition-unit", ownerGender: "socket", ownerWhere: "on the unit",
      location: "under the seat, left of the battery", housing: h.unitHousing, rows: ur, cols: uc, latch: "top",
      pins: [{ cavity: "1", net: "kill-run", terminal: "15" }, { cavity: "2", net: "earth", terminal: "31" }, { cavity: "3", net: "coil1-neg", terminal: "1" },
        { cavity: "4", net: "coil2-neg", terminal: "1" }, { cavity: "5", net: "pick1-a", terminal: "7" }, { cavity: "6", net: "pick1-b", terminal: "31d" },
        { cavity: "7", net: "pick2-a", terminal: "7" }, { cavity: "8", net: "pick2-b", terminal: "31d" }],
      specs: [
        { name: "Pickup 1 through the loom", min: 400, max: 600, unit: "Ω", between: ["5", "6"], source: PICKUP_SRC, side: "loom" },
        { name: "Pickup 2 through the loom", min: 400, max: 600, unit: "Ω", between: ["7", "8"], source: PICKUP_SRC, side: "loom" },
        { name: "Coil 1 primary through the loom", min: 2.6, max: 3.5, unit: "Ω", between: ["1", "3"], source: TCI_PRIMARY_SRC, side: "loom" },
        { name: "Coil 2 primary through the loom", min: 2.6, max: 3.5, unit: "Ω", between: ["1", "4"], source: TCI_PRIMARY_SRC, side: "loom" },
      ],
      notes: "Unplug the unit before measuring the pickups or coils through the loom: the meter's own current can upset the unit's input stage." },
    { key: "pickups", name: "Pickup coils", system: "ignition", owner: "pickups", ownerGender: "plug", ownerWhere: "on the pickup lead",
      location: "left of the frame, below the tank", housing: `4-way ${h.blade}`, rows: 2, cols: 2, latch: "left",
      pins: [{ cavity: "1", net: "pick1-a", terminal: "7" }, { cavity: "2", net: "pick1-b", terminal: "31d" }, { cavity: "3", net: "pick2-a", terminal: "7" }, { cavity: "4", net: "pick2-b", terminal: "31d" }],
      specs: [
        { name: "Pickup 1 (cyl. 1 & 4)", min: 420, max: 580, unit: "Ω", between: ["1", "2"], source: PICKUP_SRC },
        { name: "Pickup 2 (cyl. 2 & 3)", min: 420, max: 580, unit: "Ω", between: ["3", "4"], source: PICKUP_SRC },
      ] },
    { key: "stator", name: "Alternator stator", system: "charging", owner: "stator", ownerGender: "plug", ownerWhere: "on the stator lead",
      location: "behind the left side cover", housing: "3-way 6.3 mm flat-blade", rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "ph3" }],
      specs: [
        { name: "Stator phase to phase", min: 0.3, max: 0.8, unit: "Ω", between: ["1", "2"], source: `${DEMO}; three-phase stators read well under 1 Ω (common practice)` },
        { name: "Stator phase to phase", min: 0.3, max: 0.8, unit: "Ω", between: ["2", "3"], source: `${DEMO}; three-phase stators read well under 1 Ω (common practice)` },
      ] },
    { key: "regulator", name: "Regulator/rectifier", system: "charging", owner: "regulator", ownerGender: "socket", ownerWhere: "on the regulator",
      location: "behind the right side cover", housing: "6-way 6.3 mm flat-blade", rows: 2, cols: 3, missing: [[2, 3]], latch: "bottom",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "ph3" }, { cavity: "4", net: "charge", terminal: "B+" }, { cavity: "5", net: "earth", terminal: "31" }] },
    relayPair(`2-way ${h.blade}`),
    tailPair(`3-way ${h.blade}`, "right"),
  ];
  const components: ComponentSpec[] = [
    battery("under the seat"), frameEarth("on the frame behind the battery"),
    fuse("main-fuse", "Main fuse", 20, "charging", "beside the battery"),
    fuse("ign-fuse", "Ignition fuse", 10, "ignition", "fuse box under the seat"),
    fuse("lights-fuse", "Lights fuse", 10, "lighting", "fuse box under the seat"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "between the instruments",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"] },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "lights contact", switch: "main", positions: ["on"] },
        { from: "main-switch:1", to: "main-switch:4", kind: "contact", label: "park contact", switch: "main", positions: ["park"] },
      ] },
    { key: "right-switch", kind: "kill-switch", name: "Right handlebar switch (kill, start, lights)", system: "ignition", location: "right handlebar",
      links: [
        { from: "right-switch:1", to: "right-switch:2", kind: "contact", label: "kill switch", switch: "kill", positions: ["run"] },
        { from: "right-switch:2", to: "right-switch:3", kind: "contact", label: "start button", switch: "start", positions: ["pressed"] },
        { from: "right-switch:4", to: "right-switch:5", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"] },
        { from: "right-switch:4", to: "right-switch:6", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"] },
      ] },
    { key: "ignition-unit", kind: "ignition-unit", name: "Transistor ignition unit", system: "ignition", location: "under the seat",
      links: [
        { from: "ignition-unit:1", to: "ignition-unit:2", kind: "load", label: "supply" },
        { from: "ignition-unit:3", to: "ignition-unit:2", kind: "transistor", label: "output 1" },
        { from: "ignition-unit:4", to: "ignition-unit:2", kind: "transistor", label: "output 2" },
        { from: "ignition-unit:5", to: "ignition-unit:6", kind: "sense", label: "input 1" },
        { from: "ignition-unit:7", to: "ignition-unit:8", kind: "sense", label: "input 2" },
      ] },
    coil("coil-1", "Ignition coil, cylinders 1 & 4", true), coil("coil-2", "Ignition coil, cylinders 2 & 3", true),
    { key: "pickups", kind: "pickup-coil", name: "Pickup coils", system: "ignition", location: "right crank end, under the points cover",
      links: [
        { from: "pickups:1", to: "pickups:2", kind: "winding", label: "pickup 1" },
        { from: "pickups:3", to: "pickups:4", kind: "winding", label: "pickup 2" },
      ] },
    { key: "stator", kind: "alternator", name: "Alternator stator (three-phase)", system: "charging", location: "left crank end",
      links: [
        { from: "stator:1", to: "stator:2", kind: "winding", label: "phases 1-2" },
        { from: "stator:2", to: "stator:3", kind: "winding", label: "phases 2-3" },
      ] },
    { key: "regulator", kind: "regulator-rectifier", name: "Regulator/rectifier", system: "charging", location: "behind the right side cover",
      links: [
        { from: "regulator:4", to: "regulator:5", kind: "load", label: "output" },
        { from: "regulator:1", to: "regulator:5", kind: "sense", label: "phase 1 input" },
      ] },
    ...starterParts(),
    lamp("headlamp", "Headlamp", "56", "front"), tailLamp(), brakeSwitch("behind the right footrest"),
  ];
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: "Ignition: battery to coils and unit", system: "ignition", from: "battery.+", to: "battery.-",
      via: ["coil-1.primary", "coil-2.primary", "ignition-unit.supply"], switches: { main: "on", kill: "run" } },
    { slug: "pickup-1", name: "Ignition: pickup 1 signal loop", system: "ignition", from: "ignition-unit:5", to: "ignition-unit:6", via: ["pickups.pickup 1"], switches: {} },
    { slug: "pickup-2", name: "Ignition: pickup 2 signal loop", system: "ignition", from: "ignition-unit:7", to: "ignition-unit:8", via: ["pickups.pickup 2"], switches: {} },
    { slug: "charging", name: "Charging: regulator output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["regulator.output"], switches: {} },
    { slug: "stator-1-2", name: "Charging: stator phases 1–2", system: "charging", from: "regulator:1", to: "regulator:2", via: ["stator.phases 1-2"], switches: {} },
    { slug: "stator-2-3", name: "Charging: stator phases 2–3", system: "charging", from: "regulator:2", to: "regulator:3", via: ["stator.phases 2-3"], switches: {} },
    ...starterCircuits(true), ...lightCircuits(),
  ];
  return { ...base, systems: ["ignition", "charging", "starting", "lighting"], components, nets, pairs, circuits };
}

type TwinNet = "batt" | "main-fused" | "ign-sw" | "ign-fused" | "kill-run" | "coil-neg" | "trig-a" | "trig-b" | "earth" | "start-sw"
  | "starter-main" | "charge" | "d-plus" | "field" | "acc" | "head-feed" | "tail-feed" | "brake-feed";

/** An 800–1000 cc-class flat twin: one double-ended coil fired by points, or by a transistor unit with one pickup. */
export function boxerTwin(base: Base, c: Codes<Exclude<TwinNet, "trig-a" | "trig-b">> & Partial<Codes<"trig-a" | "trig-b">>, o: { trigger: "points" | "transistor"; blade: string }): FamilySpec {
  const tci = o.trigger === "transistor";
  const nets: Record<TwinNet, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in", "starter-relay.30"], lengthMm: 300, sizeMm2: 6 },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1300, sizeMm2: 2.5 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on)", terminals: ["ign-fuse.in", "brake-switch.a", "lights-fuse.in"], lengthMm: 1200, sizeMm2: 1.5 },
    "ign-fused": { code: c["ign-fused"], circuit: "fused ignition feed", terminals: ["ign-fuse.out"], lengthMm: 1200 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill switch", lengthMm: 1100 },
    "coil-neg": { code: c["coil-neg"], circuit: tci ? "coil negative to unit" : "coil negative to points", lengthMm: 600 },
    "trig-a": { code: c["trig-a"] ?? "", circuit: "pickup signal", lengthMm: 700, sizeMm2: 0.5 },
    "trig-b": { code: c["trig-b"] ?? "", circuit: "pickup return", lengthMm: 700, sizeMm2: 0.5 },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-", "starter-motor.case", "headlamp.E"], lengthMm: 400, sizeMm2: 1.5 },
    "start-sw": { code: c["start-sw"], circuit: "start button to relay", lengthMm: 1300 },
    "starter-main": { code: c["starter-main"], circuit: "starter motor cable", terminals: ["starter-relay.87", "starter-motor.post"], lengthMm: 500, sizeMm2: 10 },
    charge: { code: c.charge, circuit: "alternator output (B+) to battery", terminals: ["battery.+"], lengthMm: 600, sizeMm2: 4 },
    "d-plus": { code: c["d-plus"], circuit: "alternator D+ to regulator", lengthMm: 500 },
    field: { code: c.field, circuit: "alternator field (DF)", lengthMm: 500 },
    acc: { code: c.acc, circuit: "fused lights feed", terminals: ["lights-fuse.out"], lengthMm: 1200 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp", terminals: ["headlamp.feed"], lengthMm: 300 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail lamp", lengthMm: 1600 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", terminals: ["brake-switch.b"], lengthMm: 500 },
  };
  if (!tci) {
    delete (nets as Partial<typeof nets>)["trig-a"];
    delete (nets as Partial<typeof nets>)["trig-b"];
  }
  const trigger: PairSpec = tci
    ? { key: "ignition-unit", name: "Ignition unit", system: "ignition", owner: "ignition-unit", ownerGender: "socket", ownerWhere: "on the unit",
        location: "under the fuel tank, on the frame spine", housing: `6-way ${o.blade}`, rows: 2, cols: 3, missing: [[2, 3]], latch: "left",
        pins: [{ cavity: "1", net: "kill-run", terminal: "15" }, { cavity: "2", net: "earth", terminal: "31" }, { cavity: "3", net: "coil-neg", terminal: "1" },
          { cavity: "4", net: "trig-a", terminal: "7" }, { cavity: "5", net: "trig-b", terminal: "31d" }],
        specs: [{ name: "Pickup through the loom", min: 450, max: 650, unit: "Ω", between: ["4", "5"], source: PICKUP_SRC, side: "loom" }] }
    : { key: "points", name: "Contact breaker", system: "ignition", owner: "points", ownerGender: "plug", ownerWhere: "on the points lead",
        location: "front engine cover", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "top",
        pins: [{ cavity: "1", net: "coil-neg", terminal: "1" }, { cavity: "2", net: "earth", terminal: "31" }],
        notes: "With the points closed this pair reads near 0 Ω; open, the condenser makes the meter rise slowly towards open circuit." };
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "under the instrument panel", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "bottom",
      pins: [{ cavity: "1", net: "main-fused", terminal: "30" }, { cavity: "2", net: "ign-sw", terminal: "15" }, { cavity: "3", net: "tail-feed", terminal: "57" }] },
    { key: "right-switch", name: "Right handlebar switch", system: "ignition", owner: "right-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `4-way ${o.blade}`, rows: 2, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ign-fused" }, { cavity: "2", net: "kill-run", terminal: "15" }, { cavity: "3", net: "start-sw", terminal: "50" }, { cavity: "4", net: "acc" }] },
    { key: "coil", name: "Ignition coil", system: "ignition", owner: "coil", ownerGender: "socket", ownerWhere: "on the coil",
      location: "under the fuel tank", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "right",
      pins: [{ cavity: "1", net: "kill-run", terminal: "15" }, { cavity: "2", net: "coil-neg", terminal: "1" }],
      specs: [{ name: "Coil primary", min: tci ? 2.5 : 3.2, max: tci ? 3.3 : 4.4, unit: "Ω", between: ["1", "2"], source: tci ? TCI_PRIMARY_SRC : POINTS_PRIMARY_SRC }] },
    trigger,
    ...(tci ? [{ key: "pickup", name: "Pickup", system: "ignition", owner: "pickup", ownerGender: "plug" as const, ownerWhere: "on the pickup lead",
      location: "front engine cover", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "top" as const,
      pins: [{ cavity: "1", net: "trig-a", terminal: "7" }, { cavity: "2", net: "trig-b", terminal: "31d" }],
      specs: [{ name: "Pickup coil", min: 470, max: 630, unit: "Ω", between: ["1", "2"] as [string, string], source: PICKUP_SRC }] }] : []),
    { key: "alternator", name: "Alternator", system: "charging", owner: "alternator", ownerGender: "socket", ownerWhere: "on the alternator",
      location: "front of the engine, behind the cover", housing: "4-way 6.3 mm flat-blade", rows: 2, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "charge", terminal: "B+" }, { cavity: "2", net: "d-plus", terminal: "D+" }, { cavity: "3", net: "field", terminal: "DF" }, { cavity: "4", net: "earth", terminal: "D-" }],
      specs: [{ name: "Field winding (rotor)", min: 3.4, max: 4.2, unit: "Ω", between: ["3", "4"], source: `${DEMO}; small alternator rotors read a few ohms (common practice)` }] },
    { key: "regulator", name: "Voltage regulator", system: "charging", owner: "regulator", ownerGender: "socket", ownerWhere: "on the regulator",
      location: "under the fuel tank, right side", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "left",
      pins: [{ cavity: "1", net: "d-plus", terminal: "D+" }, { cavity: "2", net: "field", terminal: "DF" }, { cavity: "3", net: "earth", terminal: "31" }] },
    relayPair(`2-way ${o.blade}`),
    { key: "lights-switch", name: "Left handlebar switch", system: "lighting", owner: "lights-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "acc" }, { cavity: "2", net: "head-feed", terminal: "56" }, { cavity: "3", net: "tail-feed", terminal: "58" }] },
    tailPair(`3-way ${o.blade}`, "left"),
  ];
  const components: ComponentSpec[] = [
    battery("under the seat"), frameEarth("on the gearbox housing"),
    fuse("main-fuse", "Main fuse", 25, "charging", "beside the battery"),
    fuse("ign-fuse", "Ignition fuse", 10, "ignition", "fuse holder under the tank"),
    fuse("lights-fuse", "Lights fuse", 15, "lighting", "fuse holder under the tank"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "instrument panel",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"] },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "park contact", switch: "main", positions: ["park"] },
      ] },
    { key: "right-switch", kind: "kill-switch", name: "Right handlebar switch (kill, start)", system: "ignition", location: "right handlebar",
      links: [
        { from: "right-switch:1", to: "right-switch:2", kind: "contact", label: "kill switch", switch: "kill", positions: ["run"] },
        { from: "right-switch:2", to: "right-switch:3", kind: "contact", label: "start button", switch: "start", positions: ["pressed"] },
      ] },
    { key: "coil", kind: "ignition-coil", name: "Ignition coil (double-ended, both plugs)", system: "ignition", location: "under the fuel tank",
      terminals: [{ label: "HT-a", terminal: "4a" }, { label: "HT-b", terminal: "4b" }],
      links: [
        { from: "coil:1", to: "coil:2", kind: "winding", label: "primary" },
        { from: "coil.HT-a", to: "coil.HT-b", kind: "winding", label: "secondary" },
      ] },
    ...(tci
      ? [
          { key: "ignition-unit", kind: "ignition-unit", name: "Transistor ignition unit", system: "ignition", location: "frame spine",
            links: [
              { from: "ignition-unit:1", to: "ignition-unit:2", kind: "load" as const, label: "supply" },
              { from: "ignition-unit:3", to: "ignition-unit:2", kind: "transistor" as const, label: "output" },
              { from: "ignition-unit:4", to: "ignition-unit:5", kind: "sense" as const, label: "input" },
            ] },
          { key: "pickup", kind: "pickup-coil", name: "Pickup coil", system: "ignition", location: "front engine cover",
            links: [{ from: "pickup:1", to: "pickup:2", kind: "winding" as const, label: "winding" }] },
        ]
      : [
          { key: "points", kind: "contact-breaker", name: "Contact breaker and condenser", system: "ignition", location: "front engine cover",
            links: [{ from: "points:1", to: "points:2", kind: "breaker" as const, label: "points" }] },
        ]),
    { key: "alternator", kind: "alternator", name: "Alternator (with rectifier)", system: "charging", location: "front of the engine",
      links: [
        { from: "alternator:1", to: "alternator:4", kind: "load", label: "output" },
        { from: "alternator:3", to: "alternator:4", kind: "winding", label: "field" },
      ] },
    { key: "regulator", kind: "regulator", name: "Voltage regulator", system: "charging", location: "under the fuel tank",
      links: [{ from: "regulator:1", to: "regulator:2", kind: "transistor", label: "field drive" }] },
    ...starterParts(),
    { key: "lights-switch", kind: "lights-switch", name: "Left handlebar switch (lights)", system: "lighting", location: "left handlebar",
      links: [
        { from: "lights-switch:1", to: "lights-switch:2", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"] },
        { from: "lights-switch:1", to: "lights-switch:3", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"] },
      ] },
    lamp("headlamp", "Headlamp", "56", "front"), tailLamp(), brakeSwitch("under the gearbox, right side"),
  ];
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: tci ? "Ignition: battery to coil and unit" : "Ignition: battery to coil and points", system: "ignition",
      from: "battery.+", to: "battery.-", via: tci ? ["coil.primary", "ignition-unit.supply"] : ["coil.primary"], switches: { main: "on", kill: "run" } },
    ...(tci ? [{ slug: "pickup", name: "Ignition: pickup signal loop", system: "ignition", from: "ignition-unit:4", to: "ignition-unit:5", via: ["pickup.winding"], switches: {} }] : []),
    { slug: "charging", name: "Charging: alternator output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["alternator.output"], switches: {} },
    { slug: "field", name: "Charging: regulator to field winding", system: "charging", from: "regulator:1", to: "frame-earth.E", via: ["alternator.field"], switches: {} },
    ...starterCircuits(true), ...lightCircuits(),
  ];
  return { ...base, systems: ["ignition", "charging", "starting", "lighting"], components, nets, pairs, circuits };
}

type BritNet = "batt" | "main-fused" | "ign-sw" | "kill-run" | "coil1-neg" | "coil2-neg" | "earth" | "ph1" | "ph2" | "charge"
  | "acc" | "head-feed" | "tail-feed" | "brake-feed";

/** A 500–650 cc parallel twin on points: two sets of points and two coils, kick start only. */
export function pointsTwin(base: Base, c: Codes<BritNet>, o: { blade: string }): FamilySpec {
  const nets: Record<BritNet, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in"], lengthMm: 300, sizeMm2: 2 },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1200, sizeMm2: 1.5 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on)", terminals: ["brake-switch.a"], lengthMm: 1100 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill button", terminals: ["coil-1.+", "coil-2.+"], lengthMm: 1000 },
    "coil1-neg": { code: c["coil1-neg"], circuit: "coil 1 (left cylinder) to points", terminals: ["coil-1.-"], lengthMm: 700 },
    "coil2-neg": { code: c["coil2-neg"], circuit: "coil 2 (right cylinder) to points", terminals: ["coil-2.-"], lengthMm: 700 },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-"], lengthMm: 400 },
    ph1: { code: c.ph1, circuit: "alternator output, lead 1", lengthMm: 800, sizeMm2: 1.5 },
    ph2: { code: c.ph2, circuit: "alternator output, lead 2", lengthMm: 800, sizeMm2: 1.5 },
    charge: { code: c.charge, circuit: "rectifier output to battery", terminals: ["battery.+"], lengthMm: 500, sizeMm2: 1.5 },
    acc: { code: c.acc, circuit: "switched feed (lights)", lengthMm: 300 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp", lengthMm: 300 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail lamp", lengthMm: 1600 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", terminals: ["brake-switch.b"], lengthMm: 600 },
  };
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "left side panel", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "main-fused" }, { cavity: "2", net: "ign-sw" }, { cavity: "3", net: "acc" }] },
    { key: "kill-button", name: "Kill button", system: "ignition", owner: "kill-button", ownerGender: "plug", ownerWhere: "on the button lead",
      location: "inside the headlamp shell", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ign-sw" }, { cavity: "2", net: "kill-run" }] },
    { key: "points", name: "Contact breakers", system: "ignition", owner: "points", ownerGender: "plug", ownerWhere: "on the points lead",
      location: "timing cover, right side", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "bottom",
      pins: [{ cavity: "1", net: "coil1-neg", terminal: "1a" }, { cavity: "2", net: "coil2-neg", terminal: "1b" }, { cavity: "3", net: "earth", terminal: "31" }],
      specs: [
        { name: "Coil 1 primary through the loom (points open, ignition off)", min: 3.2, max: 4.6, unit: "Ω", between: ["1", "3"], source: POINTS_PRIMARY_SRC, side: "loom" },
      ],
      notes: "Each set of points fires its own coil. Measure with the ignition off; the condenser makes the reading creep when the points open." },
    { key: "alternator", name: "Alternator stator", system: "charging", owner: "alternator", ownerGender: "plug", ownerWhere: "on the stator lead",
      location: "behind the primary chaincase, left side", housing: "2-way 6.3 mm flat-blade", rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }],
      specs: [{ name: "Stator winding", min: 0.4, max: 0.9, unit: "Ω", between: ["1", "2"], source: `${DEMO}; single-phase stators read under 1 Ω (common practice)` }] },
    { key: "rectifier", name: "Rectifier", system: "charging", owner: "rectifier", ownerGender: "socket", ownerWhere: "on the rectifier",
      location: "under the seat, on the battery carrier", housing: `4-way ${o.blade}`, rows: 2, cols: 2, latch: "left",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "charge" }, { cavity: "4", net: "earth" }] },
    { key: "lights-switch", name: "Lights switch", system: "lighting", owner: "lights-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "acc" }, { cavity: "2", net: "head-feed", terminal: "56" }, { cavity: "3", net: "tail-feed", terminal: "58" }] },
    { key: "headlamp", name: "Headlamp", system: "lighting", owner: "headlamp", ownerGender: "socket", ownerWhere: "on the lamp unit",
      location: "headlamp shell", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "bottom",
      pins: [{ cavity: "1", net: "head-feed", terminal: "56" }, { cavity: "2", net: "earth", terminal: "31" }] },
    tailPair(`3-way ${o.blade}`, "top"),
  ];
  const components: ComponentSpec[] = [
    battery("under the seat, on the battery carrier"), frameEarth("on the frame under the seat"),
    fuse("main-fuse", "In-line fuse", 15, "charging", "in the battery lead"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "left side panel",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"] },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "lights contact", switch: "main", positions: ["on", "park"] },
      ] },
    { key: "kill-button", kind: "kill-switch", name: "Kill button", system: "ignition", location: "left handlebar",
      links: [{ from: "kill-button:1", to: "kill-button:2", kind: "contact", label: "kill button", switch: "kill", positions: ["run"] }] },
    coil("coil-1", "Ignition coil, left cylinder", false), coil("coil-2", "Ignition coil, right cylinder", false),
    { key: "points", kind: "contact-breaker", name: "Contact breakers (two sets) and condensers", system: "ignition", location: "timing cover",
      links: [
        { from: "points:1", to: "points:3", kind: "breaker", label: "points 1" },
        { from: "points:2", to: "points:3", kind: "breaker", label: "points 2" },
      ] },
    { key: "alternator", kind: "alternator", name: "Alternator stator (single-phase)", system: "charging", location: "primary chaincase",
      links: [{ from: "alternator:1", to: "alternator:2", kind: "winding", label: "winding" }] },
    { key: "rectifier", kind: "rectifier", name: "Rectifier and regulator", system: "charging", location: "battery carrier",
      links: [{ from: "rectifier:3", to: "rectifier:4", kind: "load", label: "output" }] },
    { key: "lights-switch", kind: "lights-switch", name: "Lights switch", system: "lighting", location: "headlamp shell",
      links: [
        { from: "lights-switch:1", to: "lights-switch:2", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"] },
        { from: "lights-switch:1", to: "lights-switch:3", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"] },
      ] },
    { key: "headlamp", kind: "lamp", name: "Headlamp", system: "lighting", location: "front",
      links: [{ from: "headlamp:1", to: "headlamp:2", kind: "lamp", label: "filament 60/55 W" }] },
    tailLamp(), brakeSwitch("under the gearbox, right side"),
  ];
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: "Ignition: battery to coils and points", system: "ignition", from: "battery.+", to: "battery.-",
      via: ["coil-1.primary", "coil-2.primary"], switches: { main: "on", kill: "run" } },
    { slug: "charging", name: "Charging: rectifier output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["rectifier.output"], switches: {} },
    { slug: "stator", name: "Charging: stator winding", system: "charging", from: "rectifier:1", to: "rectifier:2", via: ["alternator.winding"], switches: {} },
    ...lightCircuits(),
  ];
  return { ...base, systems: ["ignition", "charging", "lighting"], components, nets, pairs, circuits };
}
