// The colour finder's ranking: bound every connector cheaply, then run munkres only where a bound can still reach the top.

import { munkres } from "munkres";
import { COLOUR_SYSTEM_IDS, describeColour, type ColourName } from "../colours";
import { keyOf, type FinderIndex } from "./build-index";
import {
  DEFAULT_LIMIT,
  FAMILY_BOOST,
  FINDER_COSTS,
  MAX_LIMIT,
  MAX_WIRES,
  NO_CAVITY,
  QUALITIES,
  Q_NONE,
  SCALE,
  UNUSED_PIN_PENALTY,
  UNUSED_PIN_PENALTY_MAX,
  costIndices,
  lastQuality,
  toIndices,
} from "./costs";
import { readWires } from "./readings";
import type { FinderCandidate, FinderMatch, FinderQuery, FinderResult } from "./types";

// ---- Ranking --------------------------------------------------------------------------------

const bad = (message: string, field: string): FinderResult => ({ ok: false, error: { code: "bad_request", message, field } });

const penalty = (unused: number) => UNUSED_PIN_PENALTY * Math.min(Math.max(unused, 0), UNUSED_PIN_PENALTY_MAX);

interface Ranked {
  c: number;
  key: number;
  unused: number;
  /** Pin offset (within the connector) per wire, or -1 for no partner. */
  assign: Int32Array;
}

const BINS = 1024;

/** Rank the connectors for a query: optimal wire→cavity assignment per connector, best first. */
export function findConnectors(index: FinderIndex, query: FinderQuery): FinderResult {
  if (!query || typeof query !== "object") return bad("Send a JSON object with a wires list", "");
  const { wires } = query;
  if (!Array.isArray(wires) || wires.length === 0) {
    return bad('List the colours seen on the cut wires, one code per wire, e.g. ["W/R", "B"]', "wires");
  }
  if (wires.length > MAX_WIRES) return bad(`At most ${MAX_WIRES} wires at a time; ${wires.length} were sent`, "wires");
  if (query.pinCount !== undefined && (!Number.isInteger(query.pinCount) || query.pinCount < 1)) {
    return bad("pinCount must be a whole number of cavities, 1 or more", "pinCount");
  }
  if (query.gender !== undefined && query.gender !== "plug" && query.gender !== "socket") {
    return bad('gender must be "plug" or "socket"', "gender");
  }
  if (query.familyMode !== undefined && query.familyMode !== "filter" && query.familyMode !== "boost") {
    return bad('familyMode must be "filter" or "boost"', "familyMode");
  }
  if (query.limit !== undefined && (!Number.isInteger(query.limit) || query.limit < 1)) {
    return bad(`limit must be a whole number from 1 to ${MAX_LIMIT}`, "limit");
  }
  if (query.notation !== undefined && query.notation !== "auto" && !(COLOUR_SYSTEM_IDS as readonly string[]).includes(query.notation)) {
    return bad(`notation must be auto or one of ${COLOUR_SYSTEM_IDS.join(", ")}`, "notation");
  }
  const limit = Math.min(query.limit ?? DEFAULT_LIMIT, MAX_LIMIT);
  const explicit = query.notation !== undefined && query.notation !== "auto";
  const every = readWires(wires, query.notation ?? "auto");
  if (!every.ok) return every;
  // One set of readings per way of reading; a connector whose notation (and house) does not read every typed code
  // keeps to every reading (set 0): the rider did not copy its diagram. A notation named in the query reads for all.
  const sets = [every];
  const setOf = new Int32Array(index.contexts.length);
  if (!explicit) {
    for (let x = 1; x < index.contexts.length; x++) {
      const ctx = index.contexts[x]!;
      const own = readWires(wires, ctx.notation, { houseStyle: ctx.houseStyle });
      if (!own.ok) continue;
      setOf[x] = sets.length;
      sets.push(own);
    }
  }

  const W = wires.length;
  const nC = index.combos.length;
  const TABLE = W * nC;

  // Cost of each wire against each distinct pin colour of the library, cheapest reading, one table per set of
  // readings; laid out colour-major (cell k * W + w) so a pin's W costs sit side by side for the bound loop.
  const cost = new Int32Array(sets.length * TABLE);
  const quality = new Uint8Array(sets.length * TABLE);
  const readingOf = new Uint16Array(sets.length * TABLE);
  for (let t = 0; t < sets.length; t++) {
    const readings = sets[t].readings.map((rs) => rs.map(toIndices));
    const off = t * TABLE;
    for (let w = 0; w < W; w++) {
      cost[off + w] = NO_CAVITY;
      quality[off + w] = Q_NONE;
      for (let k = 1; k < nC; k++) {
        const pin = index.combos[k];
        const cell = off + k * W + w;
        let best = Infinity;
        for (let r = 0; r < readings[w].length; r++) {
          const c = costIndices(readings[w][r], pin);
          if (c < best) {
            best = c;
            quality[cell] = lastQuality;
            readingOf[cell] = r;
          }
        }
        cost[cell] = best;
      }
    }
  }
  const { contextOf } = index;

  // Filters.
  const familyKey = query.family ? keyOf(query.family) : "";
  const familyId = familyKey ? (index.familyIds.get(familyKey) ?? -2) : -1;
  const boostMode = query.familyMode === "boost";
  const systemId = query.system ? (index.systemIds.get(keyOf(query.system)) ?? -2) : -1;
  const genderId = query.gender === undefined ? -1 : query.gender === "socket" ? 1 : 0;
  const pinCount = query.pinCount ?? -1;

  // Pass 1: lower bound on each connector's total cost → upper bound on its ranking key.
  const { pinStart, pinCombo, wired } = index;
  const { cand, bound, order } = index.scratch;
  const mins = new Int32Array(W);
  let m = 0;
  let hi = -Infinity;
  let lo = Infinity;
  for (let c = 0; c < index.size; c++) {
    const start = pinStart[c];
    const P = pinStart[c + 1] - start;
    if (pinCount >= 0 && P !== pinCount) continue;
    if (genderId >= 0 && index.genderOf[c] !== genderId) continue;
    if (systemId !== -1 && index.systemOf[c] !== systemId) continue;
    if (familyId !== -1 && !boostMode && index.familyOf[c] !== familyId) continue;
    mins.fill(NO_CAVITY);
    const off = setOf[contextOf[c]] * TABLE;
    for (let p = start; p < start + P; p++) {
      const cell = off + pinCombo[p] * W;
      for (let w = 0; w < W; w++) {
        const v = cost[cell + w];
        if (v < mins[w]) mins[w] = v;
      }
    }
    let lb = 0;
    for (let w = 0; w < W; w++) lb += mins[w];
    if (W > P) lb = boundWithTooFewPins(mins, W, P);
    const boost = boostMode && index.familyOf[c] === familyId ? FAMILY_BOOST : 0;
    const ub = 1 - lb / (SCALE * W) - penalty(wired[c] - W) + boost;
    cand[m] = c;
    bound[m] = ub;
    m++;
    if (ub > hi) hi = ub;
    if (ub < lo) lo = ub;
  }

  if (m === 0) return { ok: true, candidates: [], stats: { considered: 0, assigned: 0 } };

  // Pass 2: bucket the candidates by bound, best first (counting sort, no comparisons).
  const span = hi - lo || 1;
  const binOf = (ub: number) => Math.min(BINS - 1, Math.floor(((hi - ub) / span) * BINS));
  const starts = new Int32Array(BINS + 1);
  for (let i = 0; i < m; i++) starts[binOf(bound[i]) + 1]++;
  for (let b = 0; b < BINS; b++) starts[b + 1] += starts[b];
  const fill = starts.slice(0, BINS);
  for (let i = 0; i < m; i++) order[fill[binOf(bound[i])]++] = i;

  // Pass 3: exact optimal assignment while a bound can still reach the top `limit`.
  const top: Ranked[] = [];
  const slugOf = (c: number) => index.connectors[c].slug;
  const better = (a: Ranked, b: Ranked) => (a.key !== b.key ? a.key > b.key : a.unused !== b.unused ? a.unused < b.unused : slugOf(a.c) < slugOf(b.c));
  const matrices = new Map<number, number[][]>();
  let assigned = 0;
  for (let b = 0; b < BINS; b++) {
    const threshold = top.length < limit ? -Infinity : top[top.length - 1].key;
    // Everything from this bin on is bounded by its top edge (a hair of slack for rounding).
    if (hi - (b * span) / BINS < threshold - 1e-9) break;
    for (let o = starts[b]; o < starts[b + 1]; o++) {
      const i = order[o];
      const t = top.length < limit ? -Infinity : top[top.length - 1].key;
      if (bound[i] < t) continue;
      const c = cand[i];
      const ranked = assign(index, c, W, cost, setOf[contextOf[c]] * TABLE, matrices);
      assigned++;
      ranked.key += boostMode && index.familyOf[c] === familyId ? FAMILY_BOOST : 0;
      if (top.length === limit && !better(ranked, top[top.length - 1])) continue;
      let at = top.length === limit ? limit - 1 : top.length;
      top[at] = ranked;
      while (at > 0 && better(top[at], top[at - 1])) {
        [top[at - 1], top[at]] = [top[at], top[at - 1]];
        at--;
      }
    }
  }

  const candidates = top.map((r): FinderCandidate => {
    const con = index.connectors[r.c];
    const start = pinStart[r.c];
    const t = setOf[contextOf[r.c]];
    const matches = wires.map((wire, w): FinderMatch => {
      const p = r.assign[w];
      const k = p < 0 ? 0 : pinCombo[start + p];
      if (k === 0) return { wire, cavity: null, pinColour: null, quality: "none", cost: FINDER_COSTS.noCavity, reading: [], readAs: null };
      const pin = con.pins[p];
      const cell = t * TABLE + k * W + w;
      const colours = sets[t].readings[w][readingOf[cell]];
      return {
        wire,
        cavity: pin.cavity,
        pinColour: pin.code ?? pin.colours.join("/"),
        quality: QUALITIES[quality[cell]],
        cost: cost[cell] / SCALE,
        reading: [...colours],
        readAs: { ...sets[t].origins[w][readingOf[cell]], colours: [...colours], words: wordsOf(colours) },
      };
    });
    const connector: FinderCandidate["connector"] = { slug: con.slug, name: con.name, family: con.family };
    if (con.familyName !== undefined) connector.familyName = con.familyName;
    return { connector, score: Math.round(Math.min(1, Math.max(0, r.key)) * 10_000) / 10_000, matches };
  });
  return { ok: true, candidates, stats: { considered: m, assigned } };
}

/**
 * With more wires than cavities at most P wires get one: the P cheapest minima plus NO_CAVITY for
 * the rest. Sorts `mins` in place (insertion sort: W ≤ MAX_WIRES, and no allocation in the loop).
 */
function boundWithTooFewPins(mins: Int32Array, W: number, P: number): number {
  for (let i = 1; i < W; i++) {
    const v = mins[i];
    let j = i - 1;
    while (j >= 0 && mins[j] > v) {
      mins[j + 1] = mins[j];
      j--;
    }
    mins[j + 1] = v;
  }
  let lb = 0;
  for (let w = 0; w < W; w++) lb += w < P ? mins[w] : NO_CAVITY;
  return lb;
}

// A reading is base first even where it came from IEC (readingsOf chose the base), so it is worded as base and tracers.
function wordsOf(colours: readonly ColourName[]): string {
  const [base, ...tracers] = colours;
  return describeColour({ base: { name: base, iec: null }, tracers: tracers.map((name) => ({ name, iec: null })), colours: [...colours] });
}

/** Optimal assignment of the W wires to connector c's cavities (munkres on the W × P matrix of cost table `off`). */
function assign(index: FinderIndex, c: number, W: number, cost: Int32Array, off: number, matrices: Map<number, number[][]>): Ranked {
  const start = index.pinStart[c];
  const P = index.pinStart[c + 1] - start;
  const out = new Int32Array(W).fill(-1);
  let total = 0;
  let explained = 0;
  if (P > 0) {
    let matrix = matrices.get(P);
    if (!matrix) {
      matrix = Array.from({ length: W }, () => new Array<number>(P).fill(0));
      matrices.set(P, matrix);
    }
    for (let w = 0; w < W; w++) {
      const row = matrix[w];
      for (let p = 0; p < P; p++) row[p] = cost[off + index.pinCombo[start + p] * W + w];
    }
    for (const [w, p] of munkres(matrix)) out[w] = p;
  }
  for (let w = 0; w < W; w++) {
    const p = out[w];
    if (p < 0 || index.pinCombo[start + p] === 0) {
      out[w] = -1;
      total += NO_CAVITY;
    } else {
      total += cost[off + index.pinCombo[start + p] * W + w];
      explained++;
    }
  }
  const unused = index.wired[c] - explained;
  return { c, key: 1 - total / (SCALE * W) - penalty(unused), unused, assign: out };
}
