/**
 * The colour finder: the plug is gone and some cut wires are left. Given the colours seen on
 * them (any notation, any order), rank the library's connectors by how well each explains them,
 * with the optimal wire → cavity assignment (Hungarian algorithm, `munkres` package) per connector.
 *
 * Pure TypeScript, no I/O: POST /api/v1/colour-finder builds the index once from the library and
 * calls findConnectors per request; the { ok, error } results carry the API's error shape.
 *
 * Which reading of a typed code: each connector is compared using the code read in its own family's notation and
 * its make's house style (a rider who copied the codes off that family's diagram wrote them that way), when every
 * typed code reads there; otherwise, and for connectors with no notation, every plausible reading is tried. English
 * words are English everywhere. Each match says which reading it used (`readAs`).
 *
 * Speed (10 000+ connectors per query): every distinct pin colour in the library is interned once
 * at build time, so a query first fills a small wires × distinct-colours cost table; each connector
 * then gets a cheap lower bound (each wire's cheapest pin, ignoring that two wires cannot share a
 * cavity), connectors are visited best bound first, and munkres runs only while a connector's
 * bound can still beat the current k-th best. A connector's bound is never below its true score,
 * so the ranking is the same as running munkres on every connector (a unit test checks this).
 */

// The one entry point (import from "~/domain/colour-finder"); the parts live in colour-finder/, one job each.

export type {
  FinderCandidate,
  FinderConnector,
  FinderError,
  FinderMatch,
  FinderPin,
  FinderQuery,
  FinderResult,
  ReadingOrigin,
  WireQuality,
  WireReading,
} from "./colour-finder/types";
export {
  DEFAULT_LIMIT,
  FADING_PAIRS,
  FAMILY_BOOST,
  FINDER_COSTS,
  MAX_LIMIT,
  MAX_WIRES,
  UNUSED_PIN_PENALTY,
  UNUSED_PIN_PENALTY_MAX,
  areConfusable,
  wireCost,
} from "./colour-finder/costs";
export { readWires } from "./colour-finder/readings";
export { buildFinderIndex, type FinderIndex } from "./colour-finder/build-index";
export { findConnectors } from "./colour-finder/rank";
