// The colour finder's reading of the typed wires: every plausible decoding of each code, base first.

import {
  COLOUR_SYSTEM_IDS,
  JIS_HOUSE_ORDER,
  decodeColour,
  houseStyleOf,
  isEnglishColourWords,
  type ColourName,
  type ColourSystemId,
  type HouseStyleId,
} from "../colours";
import type { ReadingOrigin } from "./types";

// ---- Reading the typed wires ----------------------------------------------------------------

/** Base-first readings of one decoded code: IEC 60757 names colours without a base, so each colour is tried as the base. */
function readingsOf(colours: ColourName[], hasBase: boolean): ColourName[][] {
  if (hasBase || colours.length < 2) return [colours];
  return colours.map((base, i) => [base, ...colours.filter((_, j) => j !== i)]);
}

const BLUE: ColourName = "blue";
const LIGHT_BLUE: ColourName = "light blue";
const MAX_SHADES = 4;

/**
 * IEC 60757's BU row is "blue (incl. light blue)" (REFERENCE-FACTS 1.1), so an IEC BU may be a
 * light-blue wire: both shades are readings. Yields the decoded colours and each variant.
 */
function iecShades(colours: ColourName[], system: ColourSystemId): ColourName[][] {
  const out: ColourName[][] = [colours];
  if (system !== "iec") return out;
  // Capped: "BUBUBU…" must not multiply into thousands of readings.
  for (let i = 0; i < colours.length && out.length < MAX_SHADES; i++) {
    if (colours[i] !== BLUE) continue;
    for (const v of [...out]) out.push(v.map((c, j) => (j === i ? LIGHT_BLUE : c)));
  }
  return out;
}

type ReadError = { code: "unknown_colour"; message: string; field: string };

/** One way of decoding a typed code: a notation, and for jis a house (every jis house is one way). */
type Reader = { system: ColourSystemId | "auto"; houseStyle: HouseStyleId | null };

function readersFor(notation: ColourSystemId | "auto", houseStyle: HouseStyleId | null): Reader[] {
  if (houseStyle) return [{ system: houseStyleOf(houseStyle)!.notation, houseStyle }];
  const bySystem = (system: ColourSystemId): Reader[] =>
    system === "jis" ? JIS_HOUSE_ORDER.map((h) => ({ system, houseStyle: h })) : [{ system, houseStyle: null }];
  return notation === "auto" ? [{ system: "auto", houseStyle: null }, ...COLOUR_SYSTEM_IDS.flatMap(bySystem)] : bySystem(notation);
}

/**
 * Read each typed wire in every plausible notation ("auto" first, each Japanese-style house on its own), or in one
 * notation, or in one house style; a wire of English colour words is read as English only. Unknown codes → error naming
 * the wire. `origins[w][r]` says where `readings[w][r]` comes from.
 */
export function readWires(
  wires: string[],
  notation: ColourSystemId | "auto" = "auto",
  options: { houseStyle?: HouseStyleId | null } = {},
): { ok: true; readings: ColourName[][][]; origins: ReadingOrigin[][] } | { ok: false; error: ReadError } {
  if (notation !== "auto" && !(COLOUR_SYSTEM_IDS as readonly string[]).includes(notation)) {
    return {
      ok: false,
      error: {
        code: "unknown_colour",
        message: `"${String(notation)}" is not a colour notation; use auto or one of ${COLOUR_SYSTEM_IDS.join(", ")}`,
        field: "notation",
      },
    };
  }
  const house = houseStyleOf(options.houseStyle);
  const readers = readersFor(house ? house.notation : notation, house?.id ?? null);
  const readings: ColourName[][][] = [];
  const origins: ReadingOrigin[][] = [];
  for (let w = 0; w < wires.length; w++) {
    const wire = wires[w];
    const label = `Wire ${w + 1} (${JSON.stringify(typeof wire === "string" ? wire : String(wire))})`;
    if (typeof wire !== "string") {
      return {
        ok: false,
        error: { code: "unknown_colour", message: `${label} is not a colour code; send each wire as text such as "W/R"`, field: `wires.${w}` },
      };
    }
    const mine: ColourName[][] = [];
    const from: ReadingOrigin[] = [];
    const keys = new Set<string>();
    let firstError: string | null = null;
    // "brown" is the colour brown in every family's notation: a rider describing the wire, not copying a code.
    for (const reader of isEnglishColourWords(wire) ? [{ system: "en" as const, houseStyle: null }] : readers) {
      const r = decodeColour(wire, reader.system, { houseStyle: reader.houseStyle });
      if (!r.ok) {
        firstError ??= r.error.message;
        continue;
      }
      const origin = { system: r.value.system, houseStyle: r.value.houseStyle };
      for (const reading of iecShades(r.value.colours, r.value.system).flatMap((cs) => readingsOf(cs, r.value.base !== null))) {
        const key = reading.join("/");
        if (keys.has(key)) continue;
        keys.add(key);
        mine.push(reading);
        from.push(origin);
      }
    }
    if (mine.length === 0) {
      return { ok: false, error: { code: "unknown_colour", message: `${label}: ${firstError ?? "not a colour code"}`, field: `wires.${w}` } };
    }
    readings.push(mine);
    origins.push(from);
  }
  return { ok: true, readings, origins };
}
