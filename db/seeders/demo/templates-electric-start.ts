/** The demo loom templates with an electric starter, a fuse box and separate ignition, lights and signals fuses: the inline four and the flat twin. */
import {
  SRC, battery, coil, crankcase, frameEarth, front, fuse, merge, pointsSpecs, regulatedSpec, starter, statorSpecs, tailAndBrake, type FrontCodes,
} from "./parts.ts";
import type { CircuitSpec, ComponentSpec, FamilySpec, NetSpec, PairSpec } from "./spec.ts";
import { CHARGE_LAMP_DRIVER, family, UNPLUGGED_UNIT, type Base, type Codes } from "./templates-shared.ts";

type FourNet = "batt" | "main-fused" | "ign-sw" | "ign-fused" | "sig-fused" | "kill-run" | "coil1-neg" | "coil2-neg" | "pick1-a" | "pick1-b"
  | "pick2-a" | "pick2-b" | "earth" | "start-sw" | "starter-main" | "ph1" | "ph2" | "ph3" | "charge" | "charge-lamp" | "acc" | "acc-fused"
  | "head-feed" | "tail-feed" | "brake-feed" | keyof FrontCodes;

/** A late-1970s-style inline four with battery-powered transistor ignition, two pickups and two double-ended coils. */
export function transistorFour(
  base: Base, c: Codes<FourNet>,
  h: { unit: [number, number]; unitHousing: string; blade: string; bullet: string; mainSwitch: string; outputA: number; jp: boolean },
): FamilySpec {
  const small = h.jp ? 0.5 : 0.5;
  const lamp = h.jp ? 0.85 : 0.75;
  // Feeds sized so a healthy loom loses at most 0.5 V on an earth side and 0.8 V on a supply side in any state
  // (tests/unit/circuit-walk.test.ts; ≤ 0.5 V over a circuit is common practice, the lamp feeds of the era lost more).
  const feed = h.jp ? 2 : 1.5;
  const nets: Record<Exclude<FourNet, keyof FrontCodes>, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in", "starter-relay.30"], lengthMm: 300, sizeMm2: 5, leadsMm2: { "starter-relay.30": 8 } },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1400, sizeMm2: 3 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on)", terminals: ["ign-fuse.in", "signals-fuse.in"], lengthMm: 1300, sizeMm2: 3 },
    "ign-fused": { code: c["ign-fused"], circuit: "fused ignition feed", terminals: ["ign-fuse.out"], lengthMm: 1300, sizeMm2: feed },
    "sig-fused": { code: c["sig-fused"], circuit: "fused signals feed (indicators, horn, brake lamp, warning lamps)", terminals: ["signals-fuse.out"], lengthMm: 900, sizeMm2: feed },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill switch", lengthMm: 1200, sizeMm2: feed },
    "coil1-neg": { code: c["coil1-neg"], circuit: "coil 1 (cyl. 1 & 4) negative to unit", lengthMm: 500, sizeMm2: lamp },
    "coil2-neg": { code: c["coil2-neg"], circuit: "coil 2 (cyl. 2 & 3) negative to unit", lengthMm: 500, sizeMm2: lamp },
    "pick1-a": { code: c["pick1-a"], circuit: "pickup 1 signal", lengthMm: 900, sizeMm2: small },
    "pick1-b": { code: c["pick1-b"], circuit: "pickup 1 return", lengthMm: 900, sizeMm2: small },
    "pick2-a": { code: c["pick2-a"], circuit: "pickup 2 signal", lengthMm: 900, sizeMm2: small },
    "pick2-b": { code: c["pick2-b"], circuit: "pickup 2 return", lengthMm: 900, sizeMm2: small },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-", "crankcase.E"], lengthMm: 400, sizeMm2: feed,
      // The starter's current comes back through the engine's strap and the battery's earth lead: starter-cable size.
      leadsMm2: { "battery.-": 8, "crankcase.E": 8 } },
    "start-sw": { code: c["start-sw"], circuit: "start button to relay", lengthMm: 1400, sizeMm2: lamp },
    "starter-main": { code: c["starter-main"], circuit: "starter motor cable", terminals: ["starter-relay.87", "starter-motor.post"], lengthMm: 600, sizeMm2: 8 },
    ph1: { code: c.ph1, circuit: "alternator phase 1", lengthMm: 700, sizeMm2: 2 },
    ph2: { code: c.ph2, circuit: "alternator phase 2", lengthMm: 700, sizeMm2: 2 },
    ph3: { code: c.ph3, circuit: "alternator phase 3", lengthMm: 700, sizeMm2: 2 },
    charge: { code: c.charge, circuit: "charging output to battery", terminals: ["battery.+"], lengthMm: 500, sizeMm2: 2 },
    "charge-lamp": { code: c["charge-lamp"], circuit: "charge lamp to regulator", lengthMm: 900, sizeMm2: small },
    acc: { code: c.acc, circuit: "switched feed (lights)", terminals: ["lights-fuse.in"], lengthMm: 1300, sizeMm2: feed },
    "acc-fused": { code: c["acc-fused"], circuit: "fused lights feed", terminals: ["lights-fuse.out"], lengthMm: 1300, sizeMm2: feed },
    "head-feed": { code: c["head-feed"], circuit: "headlamp feed to the dip switch (56)", lengthMm: 300, sizeMm2: feed },
    "tail-feed": { code: c["tail-feed"], circuit: "tail, number-plate and panel lamps (58)", lengthMm: 1700, sizeMm2: lamp },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", lengthMm: 600, sizeMm2: lamp },
  };
  const [ur, uc] = h.unit;
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `4-way ${h.mainSwitch}`, rows: 2, cols: 2, latch: "top",
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
        { name: "Pickup 1 through the loom", min: 400, max: 600, unit: "Ω", between: ["5", "6"], source: SRC.pickup, side: "loom", material: "copper",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter into the loom plug's cavities 5 and 6 (the pickup plug stays connected).` },
        { name: "Pickup 2 through the loom", min: 400, max: 600, unit: "Ω", between: ["7", "8"], source: SRC.pickup, side: "loom", material: "copper",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter into the loom plug's cavities 7 and 8 (the pickup plug stays connected).` },
        { name: "Coil 1 primary through the loom", min: 2.6, max: 3.8, unit: "Ω", between: ["1", "3"], source: SRC.tciPrimary, side: "loom", material: "copper",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter between the loom plug's cavity 1 (the coils' feed after the kill switch) and cavity 3. The path runs through coil 1's primary and its two wires only, so it reads with the ignition off.` },
        { name: "Coil 2 primary through the loom", min: 2.6, max: 3.8, unit: "Ω", between: ["1", "4"], source: SRC.tciPrimary, side: "loom", material: "copper",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter between the loom plug's cavities 1 and 4 (coil 2's primary and its two wires).` },
        { name: "Pickup 1 insulation to earth", min: 1, max: null, unit: "MΩ", between: ["5", "earth"], source: SRC.insulation, side: "loom", kind: "insulation",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter on its highest range between cavity 5 and the bare frame: it must read open (OL).` },
      ],
      notes: "This unit switches its coils off at rest: with the ignition on and the engine stopped, each coil's negative (cavities 3 and 4) reads battery voltage. It switches them on only while the pickups see the engine turning. Unplug the unit before measuring the pickups or coils through the loom: the meter's own current can upset the unit's input stage." },
    { key: "pickups", name: "Pickup coils", system: "ignition", owner: "pickups", ownerGender: "plug", ownerWhere: "on the pickup lead",
      location: "left of the frame, below the tank", housing: `4-way ${h.blade}`, rows: 2, cols: 2, latch: "left",
      pins: [{ cavity: "1", net: "pick1-a", terminal: "7" }, { cavity: "2", net: "pick1-b", terminal: "31d" }, { cavity: "3", net: "pick2-a", terminal: "7" }, { cavity: "4", net: "pick2-b", terminal: "31d" }],
      specs: [
        { name: "Pickup 1 (cyl. 1 & 4)", min: 420, max: 580, unit: "Ω", between: ["1", "2"], source: SRC.pickup, material: "copper",
          conditions: "Ignition off, the pickup plug unplugged: ohmmeter on the pickup side's cavities 1 and 2." },
        { name: "Pickup 2 (cyl. 2 & 3)", min: 420, max: 580, unit: "Ω", between: ["3", "4"], source: SRC.pickup, material: "copper",
          conditions: "Ignition off, the pickup plug unplugged: ohmmeter on the pickup side's cavities 3 and 4." },
      ] },
    { key: "stator", name: "Alternator stator", system: "charging", owner: "stator", ownerGender: "plug", ownerWhere: "on the stator lead",
      location: "behind the left side cover", housing: "3-way 6.3 mm flat-blade", rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "ph3" }],
      specs: statorSpecs(3, [0.3, 0.8], [14, 20]) },
    { key: "regulator", name: "Regulator/rectifier", system: "charging", owner: "regulator", ownerGender: "socket", ownerWhere: "on the regulator",
      location: "behind the right side cover", housing: "6-way 6.3 mm flat-blade", rows: 2, cols: 3, latch: "bottom",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "ph3" }, { cavity: "4", net: "charge", terminal: "B+" },
        { cavity: "5", net: "earth", terminal: "31" }, { cavity: "6", net: "charge-lamp", terminal: "61" }],
      specs: [regulatedSpec(12, ["4", "5"], "at the battery posts (or back-probed between cavities 4 and 5)", [14, 14.8])],
      notes: "Cavity 6 earths the charge lamp until the stator's output comes up." },
  ];
  const components: ComponentSpec[] = [
    battery("under the seat", 12, "negative"), frameEarth("on the frame behind the battery"), crankcase(),
    fuse("main-fuse", "Main fuse", 20, "charging", "beside the battery"),
    fuse("ign-fuse", "Ignition fuse", 10, "ignition", "fuse box under the seat"),
    fuse("lights-fuse", "Lights fuse", 10, "lighting", "fuse box under the seat"),
    fuse("signals-fuse", "Signals fuse", 10, "signals", "fuse box under the seat"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "between the instruments",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"], params: { contactA: 15 } },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "lights contact", switch: "main", positions: ["on"], params: { contactA: 15 } },
        { from: "main-switch:1", to: "main-switch:4", kind: "contact", label: "park contact", switch: "main", positions: ["park"], params: { contactA: 5 } },
      ] },
    { key: "right-switch", kind: "kill-switch", name: "Right handlebar switch (kill, start, lights)", system: "ignition", location: "right handlebar",
      links: [
        { from: "right-switch:1", to: "right-switch:2", kind: "contact", label: "kill switch", switch: "kill", positions: ["run"], params: { contactA: 10 } },
        { from: "right-switch:2", to: "right-switch:3", kind: "contact", label: "start button", switch: "start", positions: ["pressed"], params: { contactA: 5 } },
        { from: "right-switch:4", to: "right-switch:5", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"], params: { contactA: 10 } },
        { from: "right-switch:4", to: "right-switch:6", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"], params: { contactA: 5 } },
      ] },
    { key: "ignition-unit", kind: "ignition-unit", name: "Transistor ignition unit", system: "ignition", location: "under the seat",
      links: [
        { from: "ignition-unit:1", to: "ignition-unit:2", kind: "load", label: "supply", params: { amps: 0.3 } },
        { from: "ignition-unit:3", to: "ignition-unit:2", kind: "transistor", label: "output 1", params: { role: "ignition-output", atRest: "off", duty: 0.5 } },
        { from: "ignition-unit:4", to: "ignition-unit:2", kind: "transistor", label: "output 2", params: { role: "ignition-output", atRest: "off", duty: 0.5 } },
        { from: "ignition-unit:5", to: "ignition-unit:6", kind: "sense", label: "input 1" },
        { from: "ignition-unit:7", to: "ignition-unit:8", kind: "sense", label: "input 2" },
      ] },
    { key: "pickups", kind: "pickup-coil", name: "Pickup coils", system: "ignition", location: "right crank end, under the points cover",
      links: [
        { from: "pickups:1", to: "pickups:2", kind: "winding", label: "pickup 1", params: { ohms: 500 } },
        { from: "pickups:3", to: "pickups:4", kind: "winding", label: "pickup 2", params: { ohms: 500 } },
      ] },
    { key: "stator", kind: "alternator", name: "Alternator stator (three-phase)", system: "charging", location: "left crank end",
      links: [
        { from: "stator:1", to: "stator:2", kind: "winding", label: "phases 1-2", params: { role: "stator", ohms: 0.5, outputA: h.outputA } },
        { from: "stator:2", to: "stator:3", kind: "winding", label: "phases 2-3", params: { role: "stator", ohms: 0.5, outputA: h.outputA } },
      ] },
    { key: "regulator", kind: "regulator-rectifier", name: "Regulator/rectifier", system: "charging", location: "behind the right side cover",
      links: [
        { from: "regulator:5", to: "regulator:4", kind: "load", label: "output", params: { role: "charging-output", outputA: h.outputA } },
        { from: "regulator:1", to: "regulator:5", kind: "sense", label: "phase 1 input" },
        { from: "regulator:2", to: "regulator:5", kind: "sense", label: "phase 2 input" },
        { from: "regulator:3", to: "regulator:5", kind: "sense", label: "phase 3 input" },
        CHARGE_LAMP_DRIVER("regulator:6", "regulator:5"),
      ] },
  ];
  const coilPart = (n: 1 | 2, cyl: string) => coil({
    key: `coil-${n}`, name: `Ignition coil ${n} (cylinders ${cyl})`, twoEnded: true, ohms: 3, spec: { min: 2.6, max: 3.5, source: SRC.tciPrimary },
    secondary: { min: 12, max: 18 }, location: "under the fuel tank", housing: "2-way 6.3 mm flat-blade (spades on the coil)",
    feedNet: "kill-run", negNet: n === 1 ? "coil1-neg" : "coil2-neg",
  });
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: "Ignition: battery to coils and unit", system: "ignition", from: "battery.+", to: "battery.-",
      via: ["coil-1.primary", "coil-2.primary", "ignition-unit.supply"], switches: { main: "on", kill: "run" } },
    { slug: "pickup-1", name: "Ignition: pickup 1 signal loop", system: "ignition", from: "ignition-unit:5", to: "ignition-unit:6", via: ["pickups.pickup 1"], switches: {} },
    { slug: "pickup-2", name: "Ignition: pickup 2 signal loop", system: "ignition", from: "ignition-unit:7", to: "ignition-unit:8", via: ["pickups.pickup 2"], switches: {} },
    { slug: "charging", name: "Charging: regulator output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["regulator.output"], switches: { engine: "running" } },
    { slug: "stator-1-2", name: "Charging: stator phases 1–2", system: "charging", from: "regulator:1", to: "regulator:2", via: ["stator.phases 1-2"], switches: {} },
    { slug: "stator-2-3", name: "Charging: stator phases 2–3", system: "charging", from: "regulator:2", to: "regulator:3", via: ["stator.phases 2-3"], switches: {} },
  ];
  const part = merge(
    { components, nets, pairs, circuits },
    coilPart(1, "1 & 4"), coilPart(2, "2 & 3"),
    starter({ housing: `2-way ${h.blade}`, earth: "negative", relayOhms: 4, motorOhms: 0.08, viaKill: true }),
    front({
      v: 12, codes: c, sizes: { lamp, small }, blade: h.blade, bullet: h.bullet, headFeed: "head-feed", tailFeed: "tail-feed", sigFeed: "sig-fused",
      chargeLampNet: "charge-lamp", earth: "negative",
      watts: { main: 60, dip: 55, indicator: 21, illumination: 6.8, warning: 3.4, highBeam: 1.7, horn: 3 },
    }),
    tailAndBrake({ watts: { tail: 5, brake: 21 }, housing: `3-way ${h.blade}`, latch: "right", switchLocation: "behind the right footrest", brakeFeed: "brake-feed", brakeFeedCode: c["brake-feed"], feed: "sig-fused", earth: "negative" }),
  );
  return family(base, ["ignition", "charging", "starting", "lighting", "signals", "instruments"], part);
}

type TwinNet = "batt" | "main-fused" | "ign-sw" | "ign-fused" | "sig-fused" | "kill-run" | "coil-neg" | "trig-a" | "trig-b" | "earth" | "start-sw"
  | "starter-main" | "charge" | "d-plus" | "field" | "acc" | "head-feed" | "tail-feed" | "brake-feed" | keyof FrontCodes;

/** An 800–1000 cc-class flat twin with a field-excited alternator: one double-ended coil fired by points, or by a transistor unit with one pickup. */
export function boxerTwin(
  base: Base, c: Codes<Exclude<TwinNet, "trig-a" | "trig-b">> & Partial<Codes<"trig-a" | "trig-b">>,
  o: { trigger: "points" | "transistor"; blade: string; bullet: string; outputA: number },
): FamilySpec {
  const tci = o.trigger === "transistor";
  const nets: Partial<Record<Exclude<TwinNet, keyof FrontCodes>, NetSpec>> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in", "starter-relay.30"], lengthMm: 300, sizeMm2: 6, leadsMm2: { "starter-relay.30": 10 } },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1300, sizeMm2: 4 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on)", terminals: ["ign-fuse.in", "lights-fuse.in", "signals-fuse.in"], lengthMm: 1200, sizeMm2: 4 },
    "ign-fused": { code: c["ign-fused"], circuit: "fused ignition feed", terminals: ["ign-fuse.out"], lengthMm: 1200, sizeMm2: 2.5 },
    "sig-fused": { code: c["sig-fused"], circuit: "fused signals feed (indicators, horn, brake lamp, warning lamps)", terminals: ["signals-fuse.out"], lengthMm: 900, sizeMm2: 1.5 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill switch", lengthMm: 1100, sizeMm2: 2.5 },
    "coil-neg": { code: c["coil-neg"], circuit: tci ? "coil negative to unit" : "coil negative to points", lengthMm: 600, sizeMm2: 1 },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-", "crankcase.E"], lengthMm: 400, sizeMm2: 1.5,
      leadsMm2: { "battery.-": 10, "crankcase.E": 10 } },
    "start-sw": { code: c["start-sw"], circuit: "start button to relay", lengthMm: 1300, sizeMm2: 0.75 },
    "starter-main": { code: c["starter-main"], circuit: "starter motor cable", terminals: ["starter-relay.87", "starter-motor.post"], lengthMm: 500, sizeMm2: 10 },
    charge: { code: c.charge, circuit: "alternator output (B+) to battery", terminals: ["battery.+"], lengthMm: 600, sizeMm2: 4 },
    "d-plus": { code: c["d-plus"], circuit: "alternator D+ to regulator and charge lamp", lengthMm: 500, sizeMm2: 1 },
    field: { code: c.field, circuit: "alternator field (DF)", lengthMm: 500, sizeMm2: 1 },
    acc: { code: c.acc, circuit: "fused lights feed", terminals: ["lights-fuse.out"], lengthMm: 1200, sizeMm2: 2.5 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp feed to the dip switch (56)", lengthMm: 300, sizeMm2: 2.5 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail, number-plate and panel lamps (58)", lengthMm: 1600, sizeMm2: 0.75 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", lengthMm: 500, sizeMm2: 0.75 },
  };
  if (tci) {
    nets["trig-a"] = { code: c["trig-a"]!, circuit: "pickup signal", lengthMm: 700, sizeMm2: 0.5 };
    nets["trig-b"] = { code: c["trig-b"]!, circuit: "pickup return", lengthMm: 700, sizeMm2: 0.5 };
  }
  const trigger: PairSpec = tci
    ? { key: "ignition-unit", name: "Ignition unit", system: "ignition", owner: "ignition-unit", ownerGender: "socket", ownerWhere: "on the unit",
        location: "under the fuel tank, on the frame spine", housing: `6-way ${o.blade}`, rows: 2, cols: 3, missing: [[2, 3]], latch: "left",
        pins: [{ cavity: "1", net: "kill-run", terminal: "15" }, { cavity: "2", net: "earth", terminal: "31" }, { cavity: "3", net: "coil-neg", terminal: "1" },
          { cavity: "4", net: "trig-a", terminal: "7" }, { cavity: "5", net: "trig-b", terminal: "31d" }],
        specs: [{ name: "Pickup through the loom", min: 450, max: 650, unit: "Ω", between: ["4", "5"], source: SRC.pickup, side: "loom", material: "copper",
          conditions: `${UNPLUGGED_UNIT}: ohmmeter into the loom plug's cavities 4 and 5.` }],
        notes: "This unit switches the coil off at rest: with the ignition on and the engine stopped, the coil negative (cavity 3) reads battery voltage." }
    : { key: "points", name: "Contact breaker", system: "ignition", owner: "points", ownerGender: "plug", ownerWhere: "on the points lead",
        location: "front engine cover", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "top",
        pins: [{ cavity: "1", net: "coil-neg", terminal: "1" }, { cavity: "2", net: "earth", terminal: "31" }],
        specs: pointsSpecs("", "1", "2"),
        notes: "With the points closed this pair reads near 0 Ω; open, the condenser makes the meter rise slowly towards open circuit." };
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "under the instrument panel", housing: `3-way 6.3 mm flat-blade`, rows: 1, cols: 3, latch: "bottom",
      pins: [{ cavity: "1", net: "main-fused", terminal: "30" }, { cavity: "2", net: "ign-sw", terminal: "15" }, { cavity: "3", net: "tail-feed", terminal: "57" }] },
    { key: "right-switch", name: "Right handlebar switch", system: "ignition", owner: "right-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `4-way ${o.blade}`, rows: 2, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ign-fused" }, { cavity: "2", net: "kill-run", terminal: "15" }, { cavity: "3", net: "start-sw", terminal: "50" }, { cavity: "4", net: "acc" }] },
    trigger,
    ...(tci ? [{ key: "pickup", name: "Pickup", system: "ignition", owner: "pickup", ownerGender: "plug" as const, ownerWhere: "on the pickup lead",
      location: "front engine cover", housing: `2-way ${o.blade}`, rows: 1, cols: 2, latch: "top" as const,
      pins: [{ cavity: "1", net: "trig-a", terminal: "7" }, { cavity: "2", net: "trig-b", terminal: "31d" }],
      specs: [{ name: "Pickup coil", min: 470, max: 630, unit: "Ω", between: ["1", "2"] as [string, string], source: SRC.pickup, material: "copper" as const,
        conditions: "Ignition off, the pickup plug unplugged: ohmmeter on the pickup side's cavities 1 and 2." }] }] : []),
    { key: "alternator", name: "Alternator", system: "charging", owner: "alternator", ownerGender: "socket", ownerWhere: "on the alternator",
      location: "front of the engine, behind the cover", housing: "4-way 6.3 mm flat-blade", rows: 2, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "charge", terminal: "B+" }, { cavity: "2", net: "d-plus", terminal: "D+" }, { cavity: "3", net: "field", terminal: "DF" }, { cavity: "4", net: "earth", terminal: "D-" }],
      specs: [
        { name: "Field winding (rotor)", min: 3.4, max: 4.2, unit: "Ω", between: ["3", "4"], source: SRC.field, material: "copper",
          conditions: "Ignition off, the alternator plug off: ohmmeter between the alternator's DF and D− spades. Turn the engine slowly by hand: a reading that jumps means worn brushes or slip rings." },
        { name: "Field winding to earth (insulation)", min: 1, max: null, unit: "MΩ", between: ["3", "earth"], source: SRC.insulation, kind: "insulation",
          conditions: "Ignition off, the alternator plug off and the D− lead free: ohmmeter on its highest range between the DF spade and the alternator's body." },
        regulatedSpec(12, ["1", "4"], "between the alternator's B+ and D− (back-probed), or at the battery posts", [13.9, 14.6]),
      ],
      notes: "The charge lamp is also what starts this alternator: with the ignition on it feeds a small current through D+ to the field. A dead lamp means no charge." },
    { key: "regulator", name: "Voltage regulator", system: "charging", owner: "regulator", ownerGender: "socket", ownerWhere: "on the regulator",
      location: "under the fuel tank, right side", housing: `3-way 6.3 mm flat-blade`, rows: 1, cols: 3, latch: "left",
      pins: [{ cavity: "1", net: "d-plus", terminal: "D+" }, { cavity: "2", net: "field", terminal: "DF" }, { cavity: "3", net: "earth", terminal: "31" }] },
    { key: "lights-switch", name: "Lights switch", system: "lighting", owner: "lights-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "acc" }, { cavity: "2", net: "head-feed", terminal: "56" }, { cavity: "3", net: "tail-feed", terminal: "58" }] },
  ];
  const components: ComponentSpec[] = [
    battery("under the seat", 12, "negative"), frameEarth("on the gearbox housing"), crankcase(),
    fuse("main-fuse", "Main fuse", 25, "charging", "beside the battery"),
    fuse("ign-fuse", "Ignition fuse", 10, "ignition", "fuse holder under the tank"),
    fuse("lights-fuse", "Lights fuse", 15, "lighting", "fuse holder under the tank"),
    fuse("signals-fuse", "Signals fuse", 10, "signals", "fuse holder under the tank"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "instrument panel",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"], params: { contactA: 25 } },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "park contact", switch: "main", positions: ["park"], params: { contactA: 5 } },
      ] },
    { key: "right-switch", kind: "kill-switch", name: "Right handlebar switch (kill, start)", system: "ignition", location: "right handlebar",
      links: [
        { from: "right-switch:1", to: "right-switch:2", kind: "contact", label: "kill switch", switch: "kill", positions: ["run"], params: { contactA: 10 } },
        { from: "right-switch:2", to: "right-switch:3", kind: "contact", label: "start button", switch: "start", positions: ["pressed"], params: { contactA: 5 } },
      ] },
    ...(tci
      ? [
          { key: "ignition-unit", kind: "ignition-unit", name: "Transistor ignition unit", system: "ignition", location: "frame spine",
            links: [
              { from: "ignition-unit:1", to: "ignition-unit:2", kind: "load" as const, label: "supply", params: { amps: 0.3 } },
              { from: "ignition-unit:3", to: "ignition-unit:2", kind: "transistor" as const, label: "output", params: { role: "ignition-output" as const, atRest: "off" as const, duty: 0.5 } },
              { from: "ignition-unit:4", to: "ignition-unit:5", kind: "sense" as const, label: "input" },
            ] },
          { key: "pickup", kind: "pickup-coil", name: "Pickup coil", system: "ignition", location: "front engine cover",
            links: [{ from: "pickup:1", to: "pickup:2", kind: "winding" as const, label: "winding", params: { ohms: 550 } }] },
        ]
      : [
          { key: "points", kind: "contact-breaker", name: "Contact breaker and condenser", system: "ignition", location: "front engine cover",
            links: [{ from: "points:1", to: "points:2", kind: "breaker" as const, label: "points", params: { duty: 0.6 } }] },
        ]),
    { key: "alternator", kind: "alternator", name: "Alternator (field-excited, with rectifier)", system: "charging", location: "front of the engine",
      links: [
        { from: "alternator:4", to: "alternator:1", kind: "load", label: "output", params: { role: "charging-output", outputA: o.outputA } },
        { from: "alternator:2", to: "alternator:4", kind: "load", label: "exciter diodes", params: { role: "exciter" } },
        { from: "alternator:3", to: "alternator:4", kind: "winding", label: "field", params: { ohms: 3.8 } },
      ] },
    { key: "regulator", kind: "regulator", name: "Voltage regulator", system: "charging", location: "under the fuel tank",
      links: [{ from: "regulator:1", to: "regulator:2", kind: "transistor", label: "field drive", params: { role: "field-drive", duty: 0.6 } }] },
    { key: "lights-switch", kind: "lights-switch", name: "Lights switch", system: "lighting", location: "headlamp shell",
      links: [
        { from: "lights-switch:1", to: "lights-switch:2", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"], params: { contactA: 10 } },
        { from: "lights-switch:1", to: "lights-switch:3", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"], params: { contactA: 5 } },
      ] },
  ];
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: tci ? "Ignition: battery to coil and unit" : "Ignition: battery to coil and points", system: "ignition",
      from: "battery.+", to: "battery.-", via: tci ? ["coil.primary", "ignition-unit.supply"] : ["coil.primary"], switches: { main: "on", kill: "run" } },
    ...(tci ? [{ slug: "pickup", name: "Ignition: pickup signal loop", system: "ignition", from: "ignition-unit:4", to: "ignition-unit:5", via: ["pickup.winding"], switches: {} }] : []),
    { slug: "charging", name: "Charging: alternator output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["alternator.output"], switches: { engine: "running" } },
    { slug: "field", name: "Charging: regulator to field winding", system: "charging", from: "regulator:1", to: "frame-earth.E", via: ["alternator.field"], switches: {} },
  ];
  const part = merge(
    { components, nets: nets as Record<string, NetSpec>, pairs, circuits },
    coil({ key: "coil", name: "Ignition coil (double-ended, both plugs)", twoEnded: true, ohms: tci ? 2.9 : 3.8,
      spec: tci ? { min: 2.5, max: 3.3, source: SRC.tciPrimary } : { min: 3.2, max: 4.4, source: SRC.pointsPrimary },
      secondary: { min: 10, max: 15 }, location: "under the fuel tank", housing: `2-way ${o.blade}`, feedNet: "kill-run", negNet: "coil-neg" }),
    starter({ housing: `2-way ${o.blade}`, earth: "negative", relayOhms: 4, motorOhms: 0.07, viaKill: true }),
    front({
      v: 12, codes: c, sizes: { lamp: 0.75, small: 0.5 }, blade: o.blade, bullet: o.bullet, headFeed: "head-feed", tailFeed: "tail-feed", sigFeed: "sig-fused",
      chargeLampNet: "d-plus", chargeLampTo: "alternator:2", earth: "negative",
      watts: { main: 60, dip: 55, indicator: 21, illumination: 6, warning: 3, highBeam: 2, horn: 4 },
    }),
    tailAndBrake({ watts: { tail: 5, brake: 21 }, housing: `3-way ${o.blade}`, latch: "left", switchLocation: "under the gearbox, right side", brakeFeed: "brake-feed", brakeFeedCode: c["brake-feed"], feed: "sig-fused", earth: "negative" }),
  );
  return family(base, ["ignition", "charging", "starting", "lighting", "signals", "instruments"], part);
}
