/** The invented scenario: four makers, seven families. No real maker, model or diagram is described here. */
import type { MakeSpec } from "./spec.ts";
import { boxerTwin, pointsTwin, sixVoltSingle, transistorFour } from "./templates.ts";

const TCI = "transistor, battery-powered; two pickups, two double-ended coils (wasted spark)";

export const demoMakes: MakeSpec[] = [
  {
    slug: "asagiri", name: "Asagiri Motor Works", colourSystem: "jis", houseStyle: "jis-letters",
    blurb: "An invented maker whose diagrams use Japanese-style letter codes (B, Br, L, Lg, Sb …), base colour first, tracer after the slash.",
    families: [
      transistorFour(
        { slug: "rx750-four", name: "RX750 Four", modelRange: "RX750, RX750 S", yearFrom: 1977, yearTo: 1982, engine: "inline four, air-cooled, DOHC",
          displacementCc: 748, cylinders: 4, firingOrder: "1-2-4-3", crankDeg: 180, ignition: TCI, systemVoltage: 12, earth: "negative",
          blurb: "The big touring four. Its ignition runs from the battery: two pickups behind the crank cover trigger a transistor unit under the seat, which switches two double-ended coils." },
        { batt: "R", "main-fused": "R/W", "ign-sw": "Br", "ign-fused": "Br/W", "sig-fused": "Br/L", "kill-run": "O/W", "coil1-neg": "B/Y", "coil2-neg": "B/L",
          "pick1-a": "Sb", "pick1-b": "Gr", "pick2-a": "P", "pick2-b": "Lb", earth: "B", "start-sw": "Y/R", "starter-main": "R/B",
          ph1: "Y", ph2: "Y/G", ph3: "Y/L", charge: "R/Y", "charge-lamp": "W/G", acc: "Lg", "acc-fused": "Lg/R", "head-feed": "W/R", "tail-feed": "O", "brake-feed": "G/W",
          "main-beam": "L/W", "dip-beam": "W", "flash-out": "Gr/W", "ind-left": "O/G", "ind-right": "Lb/W", "horn-sw": "Lg/W", "neutral-sw": "Lg/B", "oil-sw": "G/R" },
        { unit: [2, 4], unitHousing: "8-way 2.3 mm flat-blade, two rows", blade: "2.8 mm flat-blade", bullet: "3.5 mm bullet", mainSwitch: "4.8 mm flat-blade", outputA: 14, jp: true },
      ),
      transistorFour(
        { slug: "rx400-four", name: "RX400 Four", modelRange: "RX400, RX400 Custom", yearFrom: 1979, yearTo: 1984, engine: "inline four, air-cooled, DOHC",
          displacementCc: 398, cylinders: 4, firingOrder: "1-2-4-3", crankDeg: 180, ignition: TCI, systemVoltage: 12, earth: "negative",
          blurb: "The middleweight four: the same ignition scheme as the RX750 in a lighter loom with its own colours and a single-row unit plug." },
        { batt: "R", "main-fused": "R/G", "ign-sw": "O", "ign-fused": "O/B", "sig-fused": "O/L", "kill-run": "Br/B", "coil1-neg": "Y/B", "coil2-neg": "Y/W",
          "pick1-a": "W/L", "pick1-b": "W/Y", "pick2-a": "Lg/B", "pick2-b": "Ch", earth: "G", "start-sw": "Y/G", "starter-main": "R/B",
          ph1: "W", ph2: "W/R", ph3: "W/B", charge: "R/W", "charge-lamp": "Br/W", acc: "Br/L", "acc-fused": "Br/Y", "head-feed": "L/W", "tail-feed": "Dg", "brake-feed": "Y/L",
          "main-beam": "L", "dip-beam": "L/R", "flash-out": "Gr", "ind-left": "Dg/W", "ind-right": "Sb/W", "horn-sw": "P/W", "neutral-sw": "Sb", "oil-sw": "Y/R" },
        { unit: [1, 8], unitHousing: "8-way 2.3 mm flat-blade, one row", blade: "2.3 mm flat-blade", bullet: "3.5 mm bullet", mainSwitch: "2.8 mm flat-blade", outputA: 12, jp: true },
      ),
    ],
  },
  {
    slug: "kiriyama", name: "Kiriyama Hatsudoki", colourSystem: "jis", houseStyle: "jis-bl-black",
    blurb: "An invented maker of small machines whose diagrams write Japanese-style codes in a house style of their own: Bl is black and Bu blue.",
    families: [
      sixVoltSingle(
        { slug: "komadori-125", name: "Komadori 125", modelRange: "Komadori 125, Komadori 125 Trail", yearFrom: 1971, yearTo: 1975,
          engine: "single, air-cooled, OHC", displacementCc: 124, cylinders: 1, firingOrder: "1", crankDeg: null,
          ignition: "contact breaker (points); one 6 V coil", systemVoltage: 6, earth: "negative",
          blurb: "A light 6 V commuter single: points behind the flywheel, a 6 V coil, a flywheel alternator and a small battery." },
        { batt: "R", "main-fused": "R/W", "ign-sw": "Br", "kill-run": "Bl/W", "coil-neg": "Bl/Y", earth: "G", ph1: "P", ph2: "P/W", charge: "R/Y",
          "charge-lamp": "Y", acc: "Bu/W", "head-feed": "Bu/R", "tail-feed": "Br/W", "brake-feed": "G/W", "main-beam": "Bu", "dip-beam": "W",
          "flash-out": "Gr", "ind-left": "O", "ind-right": "O/W", "horn-sw": "Lg", "neutral-sw": "Lg/R", "oil-sw": "Y/R" },
        { blade: "2.8 mm flat-blade", bullet: "3.5 mm bullet", outputA: 5 },
      ),
    ],
  },
  {
    slug: "brennwald", name: "Brennwald Fahrzeugbau", colourSystem: "din", houseStyle: "din",
    blurb: "An invented maker writing colours with German abbreviations: lower case with a slash on early diagrams (sw/rt), upper case base-then-stripe later (SWRT).",
    families: [
      boxerTwin(
        { slug: "b800-boxer", name: "B 800 Boxer", modelRange: "B 800, B 800 S", yearFrom: 1973, yearTo: 1980, engine: "flat twin, air-cooled, OHV",
          systemVoltage: 12, earth: "negative", displacementCc: 798, cylinders: 2, firingOrder: "1-2", crankDeg: 180,
          ignition: "contact breaker (points); one double-ended coil fires both plugs",
          blurb: "The early flat twin. One set of points and one double-ended coil: both plugs spark every revolution, one of them on the exhaust stroke." },
        { batt: "rt", "main-fused": "rt/ws", "ign-sw": "sw", "ign-fused": "sw/ge", "sig-fused": "sw/gn", "kill-run": "sw/rt", "coil-neg": "gn", earth: "br",
          "start-sw": "sw/bl", "starter-main": "rt/gn", charge: "rt/ge", "d-plus": "bl", field: "gr", acc: "gr/rt", "head-feed": "ws",
          "tail-feed": "gr/sw", "brake-feed": "sw/vi", "main-beam": "ws/gn", "dip-beam": "ge", "flash-out": "gn/ws", "ind-left": "bl/ws", "ind-right": "bl/sw",
          "horn-sw": "vi", "neutral-sw": "gn/rt", "oil-sw": "bl/gn" },
        { trigger: "points", blade: "6.3 mm flat-blade", bullet: "4.7 mm bullet", outputA: 20 },
      ),
      boxerTwin(
        { slug: "b1000-boxer", name: "B 1000 Boxer", modelRange: "B 1000, B 1000 RT", yearFrom: 1980, yearTo: 1988, engine: "flat twin, air-cooled, OHV",
          systemVoltage: 12, earth: "negative", displacementCc: 980, cylinders: 2, firingOrder: "1-2", crankDeg: 180,
          ignition: "transistor, one inductive pickup; one double-ended coil",
          blurb: "The later flat twin: the points gave way to a pickup and a transistor unit, and the diagrams switched to upper-case codes." },
        { batt: "RT", "main-fused": "RTWS", "ign-sw": "SW", "ign-fused": "SWGN", "sig-fused": "SWWS", "kill-run": "GNSW", "coil-neg": "GN", "trig-a": "BLGN", "trig-b": "GNBL",
          earth: "BR", "start-sw": "SWBL", "starter-main": "RTSW", charge: "RTGE", "d-plus": "BL", field: "BLSW", acc: "GRRT", "head-feed": "WS",
          "tail-feed": "GRSW", "brake-feed": "SWRT", "main-beam": "WSGN", "dip-beam": "GE", "flash-out": "GNWS", "ind-left": "BLWS", "ind-right": "BLGE",
          "horn-sw": "VI", "neutral-sw": "GNRT", "oil-sw": "BLRT" },
        { trigger: "transistor", blade: "2.8 mm flat-blade", bullet: "4.7 mm bullet", outputA: 23 },
      ),
    ],
  },
  {
    slug: "ashcombe", name: "Ashcombe & Dunmore", colourSystem: "bs", houseStyle: "bs",
    blurb: "An invented maker using the older British letter code: U blue, N brown, K pink, S slate, LG light green; base letter first, tracer after.",
    families: [
      pointsTwin(
        { slug: "sovereign-650", name: "Sovereign 650", modelRange: "Sovereign 650, Sovereign 650 Sports", yearFrom: 1966, yearTo: 1973,
          systemVoltage: 12, earth: "positive",
          engine: "parallel twin, air-cooled, OHV, 360° crank", displacementCc: 649, cylinders: 2, firingOrder: "1-2", crankDeg: 360,
          ignition: "contact breaker (points), two sets; two coils",
          blurb: "A kick-start 650 twin with a 12 V positive-earth loom, as was usual for its maker then: the battery's + post goes to the frame. Two sets of points, two coils, a single-phase alternator and a rectifier." },
        { batt: "N", "main-fused": "NW", "ign-sw": "W", "kill-run": "WY", "coil1-neg": "WU", "coil2-neg": "WK", earth: "B", ph1: "GY", ph2: "GW",
          charge: "NG", "charge-lamp": "NY", acc: "U", "head-feed": "UW", "tail-feed": "RS", "brake-feed": "GP",
          "main-beam": "UR", "dip-beam": "UP", "flash-out": "LGN", "ind-left": "GR", "ind-right": "GU", "horn-sw": "PU", "neutral-sw": "GB", "oil-sw": "WG" },
        { blade: "4.7 mm bullet", bullet: "4.7 mm bullet", earth: "positive", outputA: 10 },
      ),
      pointsTwin(
        { slug: "marquis-500", name: "Marquis 500", modelRange: "Marquis 500, Marquis 500 Trail", yearFrom: 1969, yearTo: 1976,
          systemVoltage: 12, earth: "negative",
          engine: "parallel twin, air-cooled, OHV, 180° crank", displacementCc: 497, cylinders: 2, firingOrder: "1-2", crankDeg: 180,
          ignition: "contact breaker (points), two sets; two coils (one per cylinder)",
          blurb: "The smaller twin with the 180° crank: its cylinders never reach top dead centre together, so each has its own coil and points." },
        { batt: "N", "main-fused": "N/Y", "ign-sw": "W/N", "kill-run": "W/G", "coil1-neg": "S/W", "coil2-neg": "S/Y", earth: "B", ph1: "LG/N", ph2: "LG/W",
          charge: "N/U", "charge-lamp": "N/K", acc: "U/W", "head-feed": "U/R", "tail-feed": "R/W", "brake-feed": "P/W",
          "main-beam": "U/Y", "dip-beam": "U/K", "flash-out": "LG/B", "ind-left": "G/R", "ind-right": "G/U", "horn-sw": "P/N", "neutral-sw": "G/B", "oil-sw": "W/B" },
        { blade: "2.8 mm flat-blade", bullet: "3.5 mm bullet", earth: "negative", outputA: 9 },
      ),
    ],
  },
];
