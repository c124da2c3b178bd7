// The colour finder's public shapes: what a caller passes in (connectors, a query) and what comes back.

import type { ColourName, ColourSystemId, HouseStyleId } from "../colours";

export interface FinderPin {
  cavity: string;
  /** The pin's colour as the card writes it (family notation), e.g. "W/R"; null if the card has none. */
  code: string | null;
  /** Base first, decoded in the family's notation; [] if the cavity has no wire. */
  colours: ColourName[];
}

export interface FinderConnector {
  slug: string;
  name: string;
  /** Family slug. */
  family: string;
  familyName?: string;
  /** Electrical system the connector belongs to (ignition, lighting, charging …). */
  system: string;
  gender: "plug" | "socket";
  pins: FinderPin[];
  /** The family's notation; typed codes are read in it (and in houseStyle) for this connector. Absent: every reading. */
  notation?: ColourSystemId;
  /** The make's house style within that notation; null or absent: the notation's usual reading (every house for jis). */
  houseStyle?: HouseStyleId | null;
}

export interface FinderQuery {
  /** Colours seen on the cut wires, one code per wire, any notation and order. 1 … MAX_WIRES. */
  wires: string[];
  /** Only connectors with exactly this many cavities. */
  pinCount?: number;
  gender?: "plug" | "socket";
  /** Family slug: a filter (default) or, with familyMode "boost", a FAMILY_BOOST bonus. */
  family?: string;
  familyMode?: "filter" | "boost";
  system?: string;
  /** How the wires are written; "auto" (default) tries every notation and keeps the cheapest reading. */
  notation?: ColourSystemId | "auto";
  /** Candidates returned, default DEFAULT_LIMIT, at most MAX_LIMIT (larger values are clamped). */
  limit?: number;
}

export type WireQuality = "exact" | "tracer-missing" | "faded" | "none";

/** Where a reading of a typed code comes from: a notation and, where it has several, the house table. */
export interface ReadingOrigin {
  system: ColourSystemId;
  houseStyle: HouseStyleId | null;
}

/** The reading of a typed code that a match used: its origin, the colours base first, and in words. */
export interface WireReading extends ReadingOrigin {
  colours: ColourName[];
  words: string;
}

export interface FinderMatch {
  /** The wire as typed. */
  wire: string;
  /** Cavity the wire is assigned to; null when the card has no partner for it. */
  cavity: string | null;
  /** That cavity's colour as the card writes it; null with cavity null. */
  pinColour: string | null;
  quality: WireQuality;
  /** 0 (exact) … 1 (no partner on the card); see FINDER_COSTS. */
  cost: number;
  /** The reading of the typed code that explains the pin best (base first); [] with cavity null. */
  reading: ColourName[];
  /** That reading with where it comes from (notation, house); null with cavity null. */
  readAs: WireReading | null;
}

export interface FinderCandidate {
  connector: { slug: string; name: string; family: string; familyName?: string };
  /** 0 … 1: 1 − mean wire cost, less the unexplained-pin penalty, plus the family boost. */
  score: number;
  /** One per seen wire, in the order given. */
  matches: FinderMatch[];
}

export interface FinderError {
  code: "unknown_colour" | "bad_request";
  message: string;
  field: string;
}

export type FinderResult =
  | {
      ok: true;
      candidates: FinderCandidate[];
      /** How much work the query took: connectors past the filters, and how many needed munkres. */
      stats: { considered: number; assigned: number };
    }
  | { ok: false; error: FinderError };
