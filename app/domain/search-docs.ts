/**
 * What the search index holds: one document per family, connector card and pin, built from the published library.
 * Pure: the service feeds it rows; the same documents go to the search service and to the database's fallback index.
 */
import { COLOUR_SYSTEM_IDS, decodeColour, describeColour, encodeColour, type ColourSystemId } from "./colours";

export type SearchDocType = "family" | "connector" | "pin";
export const SEARCH_DOC_TYPES: readonly SearchDocType[] = ["family", "connector", "pin"];

export interface SearchDoc {
  /** `family-<slug>`, `connector-<slug>`, `pin-<connector slug>-<cavity>` (cavity made id-safe). */
  id: string;
  type: SearchDocType;
  /** The family's slug for a family; the connector card's slug for a card and for each of its pins. */
  slug: string;
  /** A pin's cavity (null otherwise). */
  cavity: string | null;
  title: string;
  subtitle: string;
  url: string;
  make: string;
  makeSlug: string;
  family: string;
  familySlug: string;
  system: string | null;
  /** A card's number of pins (its card's, for a pin); null for a family. */
  pinCount: number | null;
  years: number[];
  /** Colour codes as written and translated into every notation (e.g. W/R, ws/rt, WR, wht/red, RDWH). */
  codes: string[];
  /** Decoded colour words ("white with red tracer"). */
  colours: string[];
  circuits: string[];
  /** DIN 72552 terminal designations. */
  terminals: string[];
  /** Everything else worth matching: location, housing, engine, ignition, model range. */
  text: string;
  /** The card's revision (families: 1): lets reconciliation compare the index with the database. */
  version: number;
}

/** Attributes in ranking order (earlier matters more), and the ones filters, facets and sort may use. */
export const SEARCH_SETTINGS = Object.freeze({
  searchableAttributes: ["title", "codes", "terminals", "circuits", "family", "colours", "make", "subtitle", "text", "years"],
  filterableAttributes: ["type", "slug", "makeSlug", "familySlug", "system", "pinCount", "years"],
  sortableAttributes: ["title", "pinCount"],
  // The service counts hits exactly only up to maxTotalHits (1000 by default); the library has more documents than that,
  // and the database fallback counts them all, so both must say the same total.
  pagination: { maxTotalHits: 100_000 },
});

/** A code as written plus the same colours in every notation, and its IEC 60757 designation; [] when it does not parse. */
export function codeVariants(code: string | null, system: ColourSystemId): string[] {
  if (!code) return [];
  const d = decodeColour(code, system);
  if (!d.ok) return [code];
  const out = new Set<string>([code]);
  const base = d.value.base?.name ?? d.value.colours[0];
  const tracers = d.value.base ? d.value.tracers.map((t) => t.name) : d.value.colours.slice(1);
  if (base)
    for (const s of COLOUR_SYSTEM_IDS) {
      const c = encodeColour(base, tracers, s);
      if (c) out.add(c);
    }
  if (d.value.iec) out.add(d.value.iec);
  return [...out];
}

/** The decoded words of a code ("white with red tracer"), or null. */
export function colourWords(code: string | null, system: ColourSystemId): string | null {
  if (!code) return null;
  const d = decodeColour(code, system);
  return d.ok ? describeColour(d.value) : null;
}

const years = (from: number, to: number) => Array.from({ length: Math.max(0, to - from + 1) }, (_, i) => from + i);
const idPart = (s: string) => s.toLowerCase().replace(/[^a-z0-9_-]+/g, "_");

export interface FamilyInput {
  slug: string;
  name: string;
  modelRange: string;
  yearFrom: number;
  yearTo: number;
  engine: string;
  ignition: string;
  make: { slug: string; name: string };
}
export interface ConnectorInput {
  slug: string;
  name: string;
  location: string;
  housing: string;
  system: string;
  revision: number;
  pins: { cavity: string; code: string | null; circuit: string; terminal: string | null; goesTo: string | null }[];
}

/** The family's own document. */
export function familyDoc(f: FamilyInput): SearchDoc {
  return {
    id: `family-${f.slug}`,
    type: "family",
    slug: f.slug,
    cavity: null,
    title: `${f.make.name} ${f.name}`,
    subtitle: `${f.yearFrom}–${f.yearTo} · ${f.engine} · ${f.ignition}`,
    url: `/families/${f.slug}`,
    make: f.make.name,
    makeSlug: f.make.slug,
    family: f.name,
    familySlug: f.slug,
    system: null,
    pinCount: null,
    years: years(f.yearFrom, f.yearTo),
    codes: [],
    colours: [],
    circuits: [],
    terminals: [],
    text: `${f.modelRange} ${f.engine} ${f.ignition}`,
    version: 1,
  };
}

/** A connector card's document and one per pin. */
export function connectorDocs(f: FamilyInput, c: ConnectorInput, colourSystem: ColourSystemId): SearchDoc[] {
  const base = {
    make: f.make.name,
    makeSlug: f.make.slug,
    family: f.name,
    familySlug: f.slug,
    system: c.system,
    pinCount: c.pins.length,
    slug: c.slug,
    years: years(f.yearFrom, f.yearTo),
    version: c.revision,
  };
  const codes = (p: ConnectorInput["pins"][number]) => codeVariants(p.code, colourSystem);
  const card: SearchDoc = {
    ...base,
    id: `connector-${c.slug}`,
    type: "connector",
    cavity: null,
    title: c.name,
    subtitle: `${f.make.name} ${f.name} · ${c.system} · ${c.location}`,
    url: `/connectors/${c.slug}`,
    codes: [...new Set(c.pins.flatMap(codes))],
    colours: [...new Set(c.pins.map((p) => colourWords(p.code, colourSystem)).filter((x): x is string => !!x))],
    circuits: [...new Set(c.pins.map((p) => p.circuit).filter(Boolean))],
    terminals: [...new Set(c.pins.map((p) => p.terminal).filter((x): x is string => !!x))],
    text: `${c.location} ${c.housing}`,
  };
  const pins = c.pins.map((p): SearchDoc => ({
    ...base,
    id: `pin-${c.slug}-${idPart(p.cavity)}`,
    type: "pin",
    cavity: p.cavity,
    title: `${c.name}, cavity ${p.cavity}`,
    subtitle: [p.code, colourWords(p.code, colourSystem), p.circuit, p.terminal ? `terminal ${p.terminal}` : null].filter(Boolean).join(" · "),
    url: `/connectors/${c.slug}?cavity=${encodeURIComponent(p.cavity)}#pin-${encodeURIComponent(p.cavity)}`,
    codes: codes(p),
    colours: [colourWords(p.code, colourSystem)].filter((x): x is string => !!x),
    circuits: p.circuit ? [p.circuit] : [],
    terminals: p.terminal ? [p.terminal] : [],
    text: p.goesTo ?? "",
  }));
  return [card, ...pins];
}
