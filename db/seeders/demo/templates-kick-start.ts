/** The demo loom templates that are kick start only, on points and a single main fuse: the parallel twin and the 6 V single. */
import {
  SRC, battery, coil, crankcase, frameEarth, front, fuse, merge, pointsSpecs, postsOf, regulatedSpec, statorSpecs, tailAndBrake, type FrontCodes,
} from "./parts.ts";
import type { CircuitSpec, ComponentSpec, FamilySpec, NetSpec, PairSpec } from "./spec.ts";
import { CHARGE_LAMP_DRIVER, family, type Base, type Codes } from "./templates-shared.ts";

type BritNet = "batt" | "main-fused" | "ign-sw" | "kill-run" | "coil1-neg" | "coil2-neg" | "earth" | "ph1" | "ph2" | "charge" | "charge-lamp"
  | "acc" | "head-feed" | "tail-feed" | "brake-feed" | keyof FrontCodes;

/** A 500–650 cc parallel twin on points: two sets of points and two coils, kick start only, one fuse. */
export function pointsTwin(base: Base, c: Codes<BritNet>, o: { blade: string; bullet: string; earth: "negative" | "positive"; outputA: number }): FamilySpec {
  const { live, earth } = postsOf(o.earth);
  const pos = o.earth === "positive";
  const nets: Record<Exclude<BritNet, keyof FrontCodes>, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed (live)", hub: live, terminals: [live, "main-fuse.in"], lengthMm: 300, sizeMm2: 2.5 },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 1200, sizeMm2: 2.5 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on): ignition, signals, warning lamps", lengthMm: 1100, sizeMm2: 2.5 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill button", lengthMm: 1000, sizeMm2: 1.5 },
    "coil1-neg": { code: c["coil1-neg"], circuit: "coil 1 (left cylinder) to points", lengthMm: 700, sizeMm2: 1 },
    "coil2-neg": { code: c["coil2-neg"], circuit: "coil 2 (right cylinder) to points", lengthMm: 700, sizeMm2: 1 },
    earth: { code: c.earth, circuit: pos ? "earth (the battery's + post)" : "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", earth, "crankcase.E"], lengthMm: 400, sizeMm2: 1.5,
      // No starter, but the battery's earth lead and the engine's strap carry the whole loom's current back.
      leadsMm2: { [earth]: 4, "crankcase.E": 4 } },
    ph1: { code: c.ph1, circuit: "alternator output, lead 1", lengthMm: 800, sizeMm2: 1.5 },
    ph2: { code: c.ph2, circuit: "alternator output, lead 2", lengthMm: 800, sizeMm2: 1.5 },
    charge: { code: c.charge, circuit: "rectifier output to battery", terminals: [live], lengthMm: 500, sizeMm2: 1.5 },
    "charge-lamp": { code: c["charge-lamp"], circuit: "charge lamp to rectifier", lengthMm: 900, sizeMm2: 0.5 },
    acc: { code: c.acc, circuit: "switched feed (lights)", lengthMm: 300, sizeMm2: 1.5 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp feed to the dip switch (56)", lengthMm: 300, sizeMm2: 1 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail and panel lamps (58)", lengthMm: 1600, sizeMm2: 0.75 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", lengthMm: 600, sizeMm2: 0.75 },
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
      pins: [{ cavity: "1", net: "coil1-neg", terminal: "1a" }, { cavity: "2", net: "coil2-neg", terminal: "1b" }, { cavity: "3", net: "earth" }],
      specs: [...pointsSpecs(" (left cylinder)", "1", "3"), ...pointsSpecs(" (right cylinder)", "2", "3")],
      notes: "Each set of points fires its own coil. With the points closed and the ignition on, the coil's current flows: switch off rather than leave it so." },
    { key: "alternator", name: "Alternator stator", system: "charging", owner: "alternator", ownerGender: "plug", ownerWhere: "on the stator lead",
      location: "behind the primary chaincase, left side", housing: "2-way 6.3 mm flat-blade", rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }],
      specs: statorSpecs(1, [0.4, 0.9], [8, 12]) },
    { key: "rectifier", name: "Rectifier and regulator", system: "charging", owner: "rectifier", ownerGender: "socket", ownerWhere: "on the rectifier",
      location: "under the seat, on the battery carrier", housing: `5-way ${o.blade}`, rows: 2, cols: 3, missing: [[2, 3]], latch: "left",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "charge" }, { cavity: "4", net: "earth" }, { cavity: "5", net: "charge-lamp" }],
      specs: [regulatedSpec(12, ["3", "4"], pos
        ? "at the battery posts (this bike is positive earth: with the black lead on the + post the meter reads minus this figure)"
        : "at the battery posts (or back-probed between cavities 3 and 4)", [13.8, 14.6])],
      notes: pos ? "Positive earth: cavity 3 is the live (−) output. A replacement unit must be made for positive earth." : "" },
    { key: "lights-switch", name: "Lights switch", system: "lighting", owner: "lights-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.blade}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "acc" }, { cavity: "2", net: "head-feed", terminal: "56" }, { cavity: "3", net: "tail-feed", terminal: "58" }] },
  ];
  const components: ComponentSpec[] = [
    battery("under the seat, on the battery carrier", 12, o.earth), frameEarth("on the frame under the seat"), crankcase(),
    fuse("main-fuse", "In-line fuse", 20, "charging", "in the battery lead", "in-line holder, 6.3 mm flat-blade"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "left side panel",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"], params: { contactA: 15 } },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "lights contact", switch: "main", positions: ["on", "park"], params: { contactA: 15 } },
      ] },
    { key: "kill-button", kind: "kill-switch", name: "Kill button", system: "ignition", location: "left handlebar",
      links: [{ from: "kill-button:1", to: "kill-button:2", kind: "contact", label: "kill button", switch: "kill", positions: ["run"], params: { contactA: 10 } }] },
    { key: "points", kind: "contact-breaker", name: "Contact breakers (two sets) and condensers", system: "ignition", location: "timing cover",
      links: [
        { from: "points:1", to: "points:3", kind: "breaker", label: "points 1", params: { duty: 0.6 } },
        { from: "points:2", to: "points:3", kind: "breaker", label: "points 2", params: { duty: 0.6 } },
      ] },
    { key: "alternator", kind: "alternator", name: "Alternator stator (single-phase)", system: "charging", location: "primary chaincase",
      links: [{ from: "alternator:1", to: "alternator:2", kind: "winding", label: "winding", params: { role: "stator", ohms: 0.6, outputA: o.outputA } }] },
    { key: "rectifier", kind: "rectifier", name: "Rectifier and regulator", system: "charging", location: "battery carrier",
      // The output's current leaves towards the battery's + post: at cavity 3 on negative earth, at the earth on positive earth.
      links: [
        pos ? { from: "rectifier:3", to: "rectifier:4", kind: "load", label: "output", params: { role: "charging-output", outputA: o.outputA } }
          : { from: "rectifier:4", to: "rectifier:3", kind: "load", label: "output", params: { role: "charging-output", outputA: o.outputA } },
        { from: "rectifier:1", to: "rectifier:4", kind: "sense", label: "AC input" },
        pos ? CHARGE_LAMP_DRIVER("rectifier:4", "rectifier:5") : CHARGE_LAMP_DRIVER("rectifier:5", "rectifier:4"),
      ] },
    { key: "lights-switch", kind: "lights-switch", name: "Lights switch", system: "lighting", location: "headlamp shell",
      links: [
        { from: "lights-switch:1", to: "lights-switch:2", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"], params: { contactA: 10 } },
        { from: "lights-switch:1", to: "lights-switch:3", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"], params: { contactA: 5 } },
      ] },
  ];
  const coilPart = (n: 1 | 2, side: string) => coil({
    key: `coil-${n}`, name: `Ignition coil, ${side} cylinder`, twoEnded: false, ohms: 4, spec: { min: 3.2, max: 4.6, source: SRC.pointsPrimary },
    secondary: { min: 6, max: 9 }, location: "under the fuel tank", housing: `2-way ${o.blade}`, feedNet: "kill-run", negNet: n === 1 ? "coil1-neg" : "coil2-neg",
    negTerminal: n === 1 ? "1a" : "1b",
  });
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: "Ignition: battery to coils and points", system: "ignition", from: live, to: earth,
      via: ["coil-1.primary", "coil-2.primary"], switches: { main: "on", kill: "run" } },
    { slug: "charging", name: "Charging: rectifier output to battery", system: "charging", from: live, to: earth, via: ["rectifier.output"], switches: { engine: "running" } },
    { slug: "stator", name: "Charging: stator winding", system: "charging", from: "rectifier:1", to: "rectifier:2", via: ["alternator.winding"], switches: {} },
  ];
  const part = merge(
    { components, nets, pairs, circuits },
    coilPart(1, "left"), coilPart(2, "right"),
    front({
      v: 12, codes: c, sizes: { lamp: 0.75, small: 0.5 }, blade: o.blade, bullet: o.bullet, headFeed: "head-feed", tailFeed: "tail-feed", sigFeed: "ign-sw",
      chargeLampNet: "charge-lamp", earth: o.earth,
      watts: { main: 50, dip: 40, indicator: 21, illumination: 4, warning: 2, highBeam: 2, horn: 3 },
    }),
    tailAndBrake({ watts: { tail: 6, brake: 21 }, housing: `3-way ${o.blade}`, latch: "top", switchLocation: "under the gearbox, right side", brakeFeed: "brake-feed", brakeFeedCode: c["brake-feed"], feed: "ign-sw", earth: o.earth }),
  );
  return family(base, ["ignition", "charging", "lighting", "signals", "instruments"], part);
}

type SingleNet = "batt" | "main-fused" | "ign-sw" | "kill-run" | "coil-neg" | "earth" | "ph1" | "ph2" | "charge" | "charge-lamp" | "acc"
  | "head-feed" | "tail-feed" | "brake-feed" | keyof FrontCodes;

/** A small 6 V single of the early seventies: one set of points, a 6 V coil, a flywheel alternator and rectifier, kick start. */
export function sixVoltSingle(base: Base, c: Codes<SingleNet>, o: { blade: string; bullet: string; outputA: number }): FamilySpec {
  const nets: Record<Exclude<SingleNet, keyof FrontCodes>, NetSpec> = {
    batt: { code: c.batt, circuit: "battery feed", hub: "battery.+", terminals: ["battery.+", "main-fuse.in"], lengthMm: 250, sizeMm2: 1.25 },
    "main-fused": { code: c["main-fused"], circuit: "fused battery feed", terminals: ["main-fuse.out"], lengthMm: 900, sizeMm2: 2 },
    "ign-sw": { code: c["ign-sw"], circuit: "switched feed (ignition on): ignition, signals, warning lamps", lengthMm: 800, sizeMm2: 1.25 },
    "kill-run": { code: c["kill-run"], circuit: "ignition feed after the kill switch", lengthMm: 700, sizeMm2: 0.85 },
    "coil-neg": { code: c["coil-neg"], circuit: "coil negative to points", lengthMm: 500, sizeMm2: 0.85 },
    earth: { code: c.earth, circuit: "earth", hub: "frame-earth.E", terminals: ["frame-earth.E", "battery.-", "crankcase.E"], lengthMm: 300, sizeMm2: 1.25,
      // 6 V: the same lamps draw twice the current, all of it back through these two.
      leadsMm2: { "battery.-": 4, "crankcase.E": 4 } },
    ph1: { code: c.ph1, circuit: "flywheel alternator, lead 1", lengthMm: 600, sizeMm2: 0.85 },
    ph2: { code: c.ph2, circuit: "flywheel alternator, lead 2", lengthMm: 600, sizeMm2: 0.85 },
    charge: { code: c.charge, circuit: "rectifier output to battery", terminals: ["battery.+"], lengthMm: 400, sizeMm2: 0.85 },
    "charge-lamp": { code: c["charge-lamp"], circuit: "charge lamp to rectifier", lengthMm: 700, sizeMm2: 0.5 },
    acc: { code: c.acc, circuit: "switched feed (lights)", lengthMm: 300, sizeMm2: 1.25 },
    "head-feed": { code: c["head-feed"], circuit: "headlamp feed to the dip switch (56)", lengthMm: 250, sizeMm2: 1.25 },
    "tail-feed": { code: c["tail-feed"], circuit: "tail and panel lamps (58)", lengthMm: 1200, sizeMm2: 0.5 },
    "brake-feed": { code: c["brake-feed"], circuit: "brake lamp", lengthMm: 500, sizeMm2: 0.5 },
  };
  const pairs: PairSpec[] = [
    { key: "main-switch", name: "Main switch", system: "ignition", owner: "main-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.bullet}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "main-fused", terminal: "30" }, { cavity: "2", net: "ign-sw", terminal: "15" }, { cavity: "3", net: "acc" }] },
    { key: "kill-switch", name: "Kill switch", system: "ignition", owner: "kill-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `2-way ${o.bullet}`, rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ign-sw" }, { cavity: "2", net: "kill-run", terminal: "15" }] },
    { key: "points", name: "Contact breaker", system: "ignition", owner: "points", ownerGender: "plug", ownerWhere: "on the points lead",
      location: "behind the flywheel, left side", housing: `2-way ${o.bullet}`, rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "coil-neg", terminal: "1" }, { cavity: "2", net: "earth", terminal: "31" }],
      specs: pointsSpecs("", "1", "2"),
      notes: "6 V: the coil's primary is about half a 12 V coil's, so it draws about as much current. A 12 V coil on this loom gives a weak spark." },
    { key: "alternator", name: "Flywheel alternator", system: "charging", owner: "alternator", ownerGender: "plug", ownerWhere: "on the stator lead",
      location: "behind the left crankcase cover", housing: `2-way ${o.bullet}`, rows: 1, cols: 2, latch: "top",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }],
      specs: statorSpecs(1, [0.3, 0.7], [4, 6]) },
    { key: "rectifier", name: "Rectifier and regulator", system: "charging", owner: "rectifier", ownerGender: "socket", ownerWhere: "on the rectifier",
      location: "under the seat", housing: `5-way ${o.blade}`, rows: 2, cols: 3, missing: [[2, 3]], latch: "left",
      pins: [{ cavity: "1", net: "ph1" }, { cavity: "2", net: "ph2" }, { cavity: "3", net: "charge" }, { cavity: "4", net: "earth" }, { cavity: "5", net: "charge-lamp" }],
      specs: [regulatedSpec(6, ["3", "4"], "at the battery posts (or back-probed between cavities 3 and 4)", [7, 7.4])] },
    { key: "lights-switch", name: "Lights switch", system: "lighting", owner: "lights-switch", ownerGender: "plug", ownerWhere: "on the switch lead",
      location: "inside the headlamp shell", housing: `3-way ${o.bullet}`, rows: 1, cols: 3, latch: "top",
      pins: [{ cavity: "1", net: "acc" }, { cavity: "2", net: "head-feed", terminal: "56" }, { cavity: "3", net: "tail-feed", terminal: "58" }] },
  ];
  const components: ComponentSpec[] = [
    battery("under the seat, left side cover", 6, "negative"), frameEarth("on the frame under the tank"), crankcase(),
    fuse("main-fuse", "Main fuse", 15, "charging", "beside the battery", "in-line holder, 4.7 mm bullet"),
    { key: "main-switch", kind: "main-switch", name: "Main switch (key)", system: "ignition", location: "headlamp shell",
      links: [
        { from: "main-switch:1", to: "main-switch:2", kind: "contact", label: "ignition contact", switch: "main", positions: ["on"], params: { contactA: 15 } },
        { from: "main-switch:1", to: "main-switch:3", kind: "contact", label: "lights contact", switch: "main", positions: ["on"], params: { contactA: 15 } },
      ] },
    { key: "kill-switch", kind: "kill-switch", name: "Kill switch", system: "ignition", location: "right handlebar",
      links: [{ from: "kill-switch:1", to: "kill-switch:2", kind: "contact", label: "kill switch", switch: "kill", positions: ["run"], params: { contactA: 10 } }] },
    { key: "points", kind: "contact-breaker", name: "Contact breaker and condenser", system: "ignition", location: "behind the flywheel",
      links: [{ from: "points:1", to: "points:2", kind: "breaker", label: "points", params: { duty: 0.6 } }] },
    { key: "alternator", kind: "alternator", name: "Flywheel alternator (single-phase)", system: "charging", location: "left crank end",
      links: [{ from: "alternator:1", to: "alternator:2", kind: "winding", label: "winding", params: { role: "stator", ohms: 0.5, outputA: o.outputA } }] },
    { key: "rectifier", kind: "rectifier", name: "Rectifier and regulator", system: "charging", location: "under the seat",
      links: [
        { from: "rectifier:4", to: "rectifier:3", kind: "load", label: "output", params: { role: "charging-output", outputA: o.outputA } },
        { from: "rectifier:1", to: "rectifier:4", kind: "sense", label: "AC input" },
        CHARGE_LAMP_DRIVER("rectifier:5", "rectifier:4"),
      ] },
    { key: "lights-switch", kind: "lights-switch", name: "Lights switch", system: "lighting", location: "headlamp shell",
      links: [
        { from: "lights-switch:1", to: "lights-switch:2", kind: "contact", label: "headlamp contact", switch: "lights", positions: ["on"], params: { contactA: 10 } },
        { from: "lights-switch:1", to: "lights-switch:3", kind: "contact", label: "tail contact", switch: "lights", positions: ["on"], params: { contactA: 5 } },
      ] },
  ];
  const circuits: CircuitSpec[] = [
    { slug: "ignition", name: "Ignition: battery to coil and points", system: "ignition", from: "battery.+", to: "battery.-", via: ["coil.primary"], switches: { main: "on", kill: "run" } },
    { slug: "charging", name: "Charging: rectifier output to battery", system: "charging", from: "battery.+", to: "battery.-", via: ["rectifier.output"], switches: { engine: "running" } },
    { slug: "stator", name: "Charging: alternator winding", system: "charging", from: "rectifier:1", to: "rectifier:2", via: ["alternator.winding"], switches: {} },
  ];
  const part = merge(
    { components, nets, pairs, circuits },
    coil({ key: "coil", name: "Ignition coil (6 V)", twoEnded: false, ohms: 1.5, spec: { min: 1.2, max: 1.8, source: SRC.sixVoltPrimary },
      secondary: { min: 5, max: 8 }, location: "under the fuel tank", housing: `2-way ${o.bullet}`, feedNet: "kill-run", negNet: "coil-neg" }),
    front({
      v: 6, codes: c, sizes: { lamp: 0.85, small: 0.5 }, blade: o.blade, bullet: o.bullet, headFeed: "head-feed", tailFeed: "tail-feed", sigFeed: "ign-sw",
      chargeLampNet: "charge-lamp", earth: "negative",
      watts: { main: 25, dip: 25, indicator: 10, illumination: 3, warning: 1.5, highBeam: 1.5, horn: 2.5 },
    }),
    tailAndBrake({ watts: { tail: 3, brake: 10 }, housing: `3-way ${o.bullet}`, latch: "top", switchLocation: "above the rear brake pedal", brakeFeed: "brake-feed", brakeFeedCode: c["brake-feed"], feed: "ign-sw", earth: "negative" }),
  );
  return family(base, ["ignition", "charging", "lighting", "signals", "instruments"], part);
}
