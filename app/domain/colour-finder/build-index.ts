// The colour finder's index: the library's connectors laid out once in flat arrays, every pin colour interned.

import { COLOUR_SYSTEM_IDS, houseStyleOf, type ColourSystemId, type HouseStyleId } from "../colours";
import { toIndices } from "./costs";
import type { FinderConnector } from "./types";

// ---- The index ------------------------------------------------------------------------------

/** Precomputed, reusable data for findConnectors. Treat as opaque; build it once per library version. */
export interface FinderIndex {
  readonly size: number;
  /** @internal The connectors, as given. */
  readonly connectors: readonly FinderConnector[];
  /** @internal Distinct pin colours (toIndices form); 0 is the empty cavity. */
  readonly combos: readonly (readonly number[])[];
  /** @internal Pins of connector c are pinCombo[pinStart[c] … pinStart[c + 1]). */
  readonly pinStart: Int32Array;
  readonly pinCombo: Int32Array;
  /** @internal Cavities with a wire, per connector. */
  readonly wired: Int32Array;
  readonly familyOf: Int32Array;
  readonly systemOf: Int32Array;
  /** @internal 0 plug, 1 socket. */
  readonly genderOf: Uint8Array;
  readonly familyIds: ReadonlyMap<string, number>;
  readonly systemIds: ReadonlyMap<string, number>;
  /** @internal The ways connectors read typed codes (notation + house); 0 is "every reading". */
  readonly contexts: readonly ({ notation: ColourSystemId; houseStyle: HouseStyleId | null } | null)[];
  /** @internal Context per connector. */
  readonly contextOf: Uint16Array;
  /** @internal Per-query scratch, reused (findConnectors is synchronous). */
  readonly scratch: { cand: Int32Array; bound: Float64Array; order: Int32Array };
}

export const keyOf = (s: string) => s.trim().toLowerCase();

// A house of another notation than the connector's is ignored, as for a make (houseFor in the colours module).
function contextKey(con: FinderConnector): { notation: ColourSystemId; houseStyle: HouseStyleId | null } | null {
  const house = houseStyleOf(con.houseStyle);
  const notation = con.notation && (COLOUR_SYSTEM_IDS as readonly string[]).includes(con.notation) ? con.notation : house?.notation;
  if (!notation) return null;
  return { notation, houseStyle: house && house.notation === notation ? house.id : null };
}

/** Build a reusable index (precompute per-connector data) so repeated queries over 10k connectors are fast. */
export function buildFinderIndex(connectors: FinderConnector[]): FinderIndex {
  const n = connectors.length;
  const comboIds = new Map<string, number>([["", 0]]);
  const combos: number[][] = [[]];
  let totalPins = 0;
  for (const c of connectors) totalPins += c.pins.length;
  const pinStart = new Int32Array(n + 1);
  const pinCombo = new Int32Array(totalPins);
  const wired = new Int32Array(n);
  const familyOf = new Int32Array(n);
  const systemOf = new Int32Array(n);
  const genderOf = new Uint8Array(n);
  const familyIds = new Map<string, number>();
  const systemIds = new Map<string, number>();
  const contextOf = new Uint16Array(n);
  const contextIds = new Map<string, number>([["", 0]]);
  const contexts: FinderIndex["contexts"][number][] = [null];
  const intern = (map: Map<string, number>, s: string) => {
    const k = keyOf(s);
    let id = map.get(k);
    if (id === undefined) map.set(k, (id = map.size));
    return id;
  };
  let p = 0;
  for (let c = 0; c < n; c++) {
    const con = connectors[c]!; // c < n = connectors.length
    pinStart[c] = p;
    for (const pin of con.pins) {
      const idx = toIndices(pin.colours ?? []);
      const key = idx.join(",");
      let id = comboIds.get(key);
      if (id === undefined) {
        id = combos.length;
        comboIds.set(key, id);
        combos.push(idx);
      }
      pinCombo[p++] = id;
      if (id !== 0) wired[c]!++;
    }
    familyOf[c] = intern(familyIds, con.family);
    systemOf[c] = intern(systemIds, con.system);
    genderOf[c] = con.gender === "socket" ? 1 : 0;
    const ctx = contextKey(con);
    if (ctx) {
      const key = `${ctx.notation}/${ctx.houseStyle ?? ""}`;
      let id = contextIds.get(key);
      if (id === undefined) {
        contextIds.set(key, (id = contexts.length));
        contexts.push(ctx);
      }
      contextOf[c] = id;
    }
  }
  pinStart[n] = p;
  return {
    size: n,
    connectors,
    combos,
    pinStart,
    pinCombo,
    wired,
    familyOf,
    systemOf,
    genderOf,
    familyIds,
    systemIds,
    contexts,
    contextOf,
    scratch: { cand: new Int32Array(n), bound: new Float64Array(n), order: new Int32Array(n) },
  };
}
