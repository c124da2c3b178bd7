/**
 * Submissions: the states a proposed card passes through, what a proposal must hold before it can be reviewed, and what
 * it changes against the published card. Pure: no framework, no database.
 */
import { decodeColour, type ColourSystemId, type HouseStyleId } from "./colours";
import { layoutProblems, type HousingLayout } from "./connector-face";
import { SPEC_OFF_CARD_POINTS, isOffCardPoint, specKindOf, type SpecKind, type SpecMaterial } from "./specs";

/** Our words for the states (PRODUCT.md): draft, in review, published, returned, declined. */
export const SUBMISSION_STATES = ["draft", "in_review", "returned", "declined", "published"] as const;
export type SubmissionState = (typeof SUBMISSION_STATES)[number];

export const STATE_LABELS: Readonly<Record<SubmissionState, string>> = Object.freeze({
  draft: "draft",
  in_review: "in review",
  returned: "returned",
  declined: "declined",
  published: "published",
});

/** What can happen to a submission: the author edits, submits, answers; a moderator approves, returns or declines. */
export type SubmissionEvent = "edit" | "submit" | "answer" | "approve" | "return" | "decline" | "withdraw";

const TRANSITIONS: Readonly<Record<SubmissionState, Partial<Record<SubmissionEvent, SubmissionState>>>> = Object.freeze({
  draft: { edit: "draft", submit: "in_review", withdraw: "declined" },
  in_review: { approve: "published", return: "returned", decline: "declined" },
  returned: { edit: "returned", answer: "in_review", submit: "in_review", withdraw: "declined" },
  declined: {},
  published: {},
});

/** The state after an event, or null when the event does not apply in this state. */
export function nextState(state: SubmissionState, event: SubmissionEvent): SubmissionState | null {
  return TRANSITIONS[state]?.[event] ?? null;
}

export function isSubmissionState(v: unknown): v is SubmissionState {
  return typeof v === "string" && (SUBMISSION_STATES as readonly string[]).includes(v);
}

/** Whether the author may still change the proposal. */
export function authorCanEdit(state: SubmissionState): boolean {
  return nextState(state, "edit") !== null;
}

/** How the contributor knows: required before a submission goes in for review. */
export const SOURCE_KINDS = ["traced", "manual", "measured"] as const;
export type SourceKind = (typeof SOURCE_KINDS)[number];
export const SOURCE_LABELS: Readonly<Record<SourceKind, string>> = Object.freeze({
  traced: "Traced on the bike",
  manual: "Factory manual (give the page)",
  measured: "Measured with a meter",
});

export const LATCH_SIDES = ["top", "bottom", "left", "right"] as const;

/** Size limits of a proposal (the schema in app/validation/submissions.ts enforces them; the editor shows them). */
export const LIMITS = Object.freeze({
  rows: 20,
  cols: 20,
  cavities: 200,
  pins: 200,
  specs: 50,
  photos: 12,
  notes: 20_000,
  text: 200,
  message: 4_000,
  conditions: 300,
});

/** A family's main systems (PRODUCT.md). */
export const SYSTEM_KINDS = ["ignition", "charging", "starting", "lighting", "signals", "instruments"] as const;

export interface ProposedPin {
  cavity: string;
  /** The colour as the factory writes it, in the family's notation; null for an empty cavity. */
  code: string | null;
  circuit: string;
  /** DIN 72552 terminal designation where one applies. */
  terminal: string | null;
  /** Where the wire goes: a connector of the same family and one of its cavities. */
  goesTo: { connector: string; cavity: string } | null;
}

export interface ProposedSpec {
  name: string;
  min: number;
  /** null: no upper limit (an insulation test that must read open). */
  max: number | null;
  unit: string;
  between: [string, string];
  atC: number;
  source: string;
  /** When and how it can be measured (ignition, engine, what is unplugged), so a rider can repeat it; "" on older cards. */
  conditions: string;
  kind: SpecKind;
  /** For resistances: the conductor, which decides whether the bench sheet corrects it to 20 °C; null: not stated. */
  material: SpecMaterial | null;
}

export interface ProposedPhoto {
  id: string;
  caption: string;
  credit: string;
}

/** The editable content of a card, as a submission proposes it (a published card's snapshot plus photos and goesTo). */
export interface CardProposal {
  name: string;
  location: string;
  housing: string;
  gender: "plug" | "socket";
  system: string;
  matesWith: string | null;
  layout: HousingLayout;
  pins: ProposedPin[];
  specs: ProposedSpec[];
  notes: string;
  photos: ProposedPhoto[];
}

/** An empty proposal to start a new card from. */
export function blankProposal(system = "ignition"): CardProposal {
  return {
    name: "",
    location: "",
    housing: "",
    gender: "socket",
    system,
    matesWith: null,
    layout: {
      rows: 1,
      cols: 2,
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "2", row: 1, col: 2 },
      ],
      pin1: "1",
      latch: "top",
    },
    pins: [
      { cavity: "1", code: null, circuit: "", terminal: null, goesTo: null },
      { cavity: "2", code: null, circuit: "", terminal: null, goesTo: null },
    ],
    specs: [],
    notes: "",
    photos: [],
  };
}

export interface Problem {
  /** Dotted path of the offending field, e.g. "pins.2.code". */
  field: string;
  message: string;
}

/**
 * DIN 72552 terminal designations: a number with an optional letter suffix (1, 1a, 4b, 15, 30, 31b, 31d, 49a, 56b, 58L,
 * 87a…), the lettered charging terminals (B+, B-, D+, D-, DF) and the flasher's L, R and C. Source: DIN 72552 as listed in
 * ../shared/REFERENCE-FACTS.md §2.
 */
export function isTerminalDesignation(value: string): boolean {
  return /^(?:\d{1,3}(?:[a-d]|[LR])?|B[+-]|D[+-]|DF|[LRC])$/.test(value.trim());
}

/**
 * Everything that keeps a proposal from review, in reading order. `cards` maps a connector slug of the same family to
 * its cavities, so "where the wire goes" can be checked. An empty list means it may be submitted.
 */
export function proposalProblems(
  p: CardProposal,
  colourSystem: ColourSystemId,
  cards: ReadonlyMap<string, readonly string[]> = new Map(),
  opts: {
    requireSource?: { kind: string; detail: string };
    /**
     * The published card's specs (empty for a new card) when the proposal is about to go in for review: every spec that
     * is new or changed against them must state the conditions it can be measured under. Omitted: not checked (a draft
     * being saved, a decision re-checking what was already sent), so older cards' specs without conditions still publish.
     */
    specsBefore?: readonly ProposedSpec[];
    houseStyle?: HouseStyleId | null;
  } = {},
): Problem[] {
  const out: Problem[] = [];
  if (!p.name.trim()) out.push({ field: "name", message: "Give the card a name, e.g. “Pickup coil plug”." });
  if (!p.location.trim()) out.push({ field: "location", message: "Say where the connector sits on the bike." });
  for (const m of layoutProblems(p.layout)) out.push({ field: "layout", message: m });
  const cavities = new Set(p.layout.cavities.map((c) => c.cavity));
  const seen = new Set<string>();
  p.pins.forEach((pin, i) => {
    const at = `pins.${i}`;
    if (!pin.cavity.trim()) out.push({ field: `${at}.cavity`, message: `Row ${i + 1} has no cavity.` });
    else if (!cavities.has(pin.cavity)) out.push({ field: `${at}.cavity`, message: `Row ${i + 1}: cavity “${pin.cavity}” is not in the housing layout.` });
    else if (seen.has(pin.cavity)) out.push({ field: `${at}.cavity`, message: `Row ${i + 1}: cavity “${pin.cavity}” is listed twice.` });
    seen.add(pin.cavity);
    if (pin.code) {
      const d = decodeColour(pin.code, colourSystem, { houseStyle: opts.houseStyle });
      if (!d.ok) out.push({ field: `${at}.code`, message: `Row ${i + 1}: “${pin.code}” is not a colour in this family's notation (${d.error.message}).` });
    }
    if (pin.terminal && !isTerminalDesignation(pin.terminal)) {
      out.push({ field: `${at}.terminal`, message: `Row ${i + 1}: “${pin.terminal}” is not a DIN 72552 terminal designation (e.g. 15, 30, 31, 1).` });
    }
    if (pin.goesTo) {
      const there = cards.get(pin.goesTo.connector);
      if (!there) out.push({ field: `${at}.goesTo`, message: `Row ${i + 1}: “${pin.goesTo.connector}” is not a card in this family.` });
      else if (!there.includes(pin.goesTo.cavity)) {
        out.push({ field: `${at}.goesTo`, message: `Row ${i + 1}: that connector has no cavity “${pin.goesTo.cavity}”.` });
      }
    }
  });
  if (p.pins.length === 0) out.push({ field: "pins", message: "The pin map has no rows." });
  const unchanged = new Set((opts.specsBefore ?? []).map(specFingerprint));
  p.specs.forEach((s, i) => {
    const at = `specs.${i}`;
    if (!s.name.trim()) out.push({ field: `${at}.name`, message: `Spec ${i + 1} has no name.` });
    if (!Number.isFinite(s.min) || (s.max !== null && (!Number.isFinite(s.max) || s.min > s.max))) {
      out.push({ field: `${at}.min`, message: `Spec ${i + 1}: the least value must not be above the greatest.` });
    }
    for (const c of s.between) {
      if (!cavities.has(c) && !isOffCardPoint(c)) {
        out.push({
          field: `${at}.between`,
          message: `Spec ${i + 1}: “${c}” is neither a cavity of the layout nor ${SPEC_OFF_CARD_POINTS.map((x) => `“${x}”`).join(", ")}.`,
        });
      }
    }
    if (opts.specsBefore && !unchanged.has(specFingerprint(s))) {
      if (!(s.conditions ?? "").trim()) {
        out.push({
          field: `${at}.conditions`,
          message: `Spec ${i + 1}: say when and how it can be measured (ignition off or on, engine stopped or at what rpm, what is unplugged), so a rider can repeat it.`,
        });
      }
      if (specKindOf(s.kind) === "insulation" && s.max !== null) {
        out.push({
          field: `${at}.max`,
          message: `Spec ${i + 1}: an insulation test has no upper limit (it must read open): tick “no upper limit” and give the least it must read.`,
        });
      }
    }
  });
  if (opts.requireSource) {
    if (!(SOURCE_KINDS as readonly string[]).includes(opts.requireSource.kind)) {
      out.push({ field: "sourceKind", message: "Say how you know: traced on the bike, factory manual or measured." });
    } else if (opts.requireSource.kind === "manual" && !opts.requireSource.detail.trim()) {
      out.push({ field: "sourceDetail", message: "Give the manual and page you read it from." });
    }
  }
  return out;
}

export type RowChange = "added" | "removed" | "changed" | "same";

export interface PinDiffRow {
  cavity: string;
  change: RowChange;
  before: ProposedPin | null;
  after: ProposedPin | null;
  /** Which fields differ, for a changed row. */
  fields: (keyof ProposedPin)[];
}

export interface SpecDiffRow {
  change: RowChange;
  before: ProposedSpec | null;
  after: ProposedSpec | null;
  /** Which fields differ, for a changed row (conditions, kind and material included). */
  fields: (keyof ProposedSpec)[];
}

export interface CardDiff {
  fields: { field: "name" | "location" | "housing" | "gender" | "system" | "matesWith"; before: string | null; after: string | null }[];
  layout: { changed: boolean; before: HousingLayout | null; after: HousingLayout };
  pins: PinDiffRow[];
  specs: SpecDiffRow[];
  notes: { changed: boolean; before: string; after: string };
  photos: { added: ProposedPhoto[]; removed: ProposedPhoto[]; kept: ProposedPhoto[] };
  /** Whether anything at all differs. */
  any: boolean;
}

const sameGoesTo = (a: ProposedPin["goesTo"], b: ProposedPin["goesTo"]) =>
  (a?.connector ?? null) === (b?.connector ?? null) && (a?.cavity ?? null) === (b?.cavity ?? null);

const PIN_FIELDS = ["code", "circuit", "terminal", "goesTo"] as const;

function pinFieldsDiffer(a: ProposedPin, b: ProposedPin): (keyof ProposedPin)[] {
  return PIN_FIELDS.filter((f) => (f === "goesTo" ? !sameGoesTo(a.goesTo, b.goesTo) : (a[f] ?? null) !== (b[f] ?? null)));
}

const specKey = (s: ProposedSpec) => `${s.name.trim().toLowerCase()}|${s.between.join("-")}`;
const SPEC_FIELDS = ["min", "max", "unit", "atC", "source", "conditions", "kind", "material"] as const;
// Revisions written before specs had conditions, a kind and a material read as "", resistance and not stated.
const specValue = (s: ProposedSpec, f: (typeof SPEC_FIELDS)[number]) =>
  f === "conditions"
    ? (s.conditions ?? "")
    : f === "kind"
      ? specKindOf(s.kind)
      : f === "material"
        ? (s.material ?? null)
        : f === "max"
          ? (s.max ?? null)
          : s[f];
const specFieldsDiffer = (a: ProposedSpec, b: ProposedSpec): (keyof ProposedSpec)[] => SPEC_FIELDS.filter((f) => specValue(a, f) !== specValue(b, f));
const specFingerprint = (s: ProposedSpec) => JSON.stringify([specKey(s), ...SPEC_FIELDS.map((f) => specValue(s, f))]);

function sameLayout(a: HousingLayout, b: HousingLayout): boolean {
  if (a.rows !== b.rows || a.cols !== b.cols || a.pin1 !== b.pin1 || a.latch !== b.latch) return false;
  const key = (l: HousingLayout) =>
    l.cavities
      .map((c) => `${c.cavity}@${c.row},${c.col}`)
      .sort()
      .join(";");
  return key(a) === key(b);
}

/**
 * What a proposal changes against the published card (`before` null for a new card): pin map row by row (matched by
 * cavity, in the proposal's order with removed rows after), layout, specs (matched by name and pins), notes and photos.
 */
export function diffCards(before: CardProposal | null, after: CardProposal): CardDiff {
  const fields: CardDiff["fields"] = [];
  for (const f of ["name", "location", "housing", "gender", "system", "matesWith"] as const) {
    const b = before ? (before[f] ?? null) : null;
    const a = after[f] ?? null;
    if (b !== a) fields.push({ field: f, before: b, after: a });
  }
  const beforePins = new Map((before?.pins ?? []).map((p) => [p.cavity, p]));
  const afterCavities = new Set(after.pins.map((p) => p.cavity));
  const pins: PinDiffRow[] = after.pins.map((p) => {
    const b = beforePins.get(p.cavity) ?? null;
    if (!b) return { cavity: p.cavity, change: "added", before: null, after: p, fields: [] };
    const f = pinFieldsDiffer(b, p);
    return { cavity: p.cavity, change: f.length ? "changed" : "same", before: b, after: p, fields: f };
  });
  for (const b of before?.pins ?? []) {
    if (!afterCavities.has(b.cavity)) pins.push({ cavity: b.cavity, change: "removed", before: b, after: null, fields: [] });
  }
  const beforeSpecs = new Map((before?.specs ?? []).map((s) => [specKey(s), s]));
  const afterSpecKeys = new Set(after.specs.map(specKey));
  const specs: CardDiff["specs"] = after.specs.map((s) => {
    const b = beforeSpecs.get(specKey(s)) ?? null;
    if (!b) return { change: "added", before: null, after: s, fields: [] };
    const f = specFieldsDiffer(b, s);
    return { change: f.length ? "changed" : "same", before: b, after: s, fields: f };
  });
  for (const b of before?.specs ?? []) if (!afterSpecKeys.has(specKey(b))) specs.push({ change: "removed", before: b, after: null, fields: [] });
  const beforePhotos = before?.photos ?? [];
  const afterIds = new Set(after.photos.map((p) => p.id));
  const beforeIds = new Set(beforePhotos.map((p) => p.id));
  const photos = {
    added: after.photos.filter((p) => !beforeIds.has(p.id)),
    removed: beforePhotos.filter((p) => !afterIds.has(p.id)),
    kept: after.photos.filter((p) => beforeIds.has(p.id)),
  };
  const layoutChanged = !before || !sameLayout(before.layout, after.layout);
  const notesChanged = (before?.notes ?? "") !== after.notes;
  const any =
    fields.length > 0 ||
    layoutChanged ||
    notesChanged ||
    pins.some((r) => r.change !== "same") ||
    specs.some((s) => s.change !== "same") ||
    photos.added.length > 0 ||
    photos.removed.length > 0;
  return {
    fields,
    layout: { changed: layoutChanged, before: before?.layout ?? null, after: after.layout },
    pins,
    specs,
    notes: { changed: notesChanged, before: before?.notes ?? "", after: after.notes },
    photos,
    any,
  };
}

const HEADER_ALIASES: Record<string, keyof ProposedPin | "goesToConnector" | "goesToCavity"> = {
  cavity: "cavity",
  pin: "cavity",
  "#": "cavity",
  no: "cavity",
  colour: "code",
  color: "code",
  code: "code",
  colour_code: "code",
  "colour code": "code",
  wire: "code",
  circuit: "circuit",
  function: "circuit",
  signal: "circuit",
  terminal: "terminal",
  din: "terminal",
  "din 72552": "terminal",
  goes_to_connector: "goesToConnector",
  "goes to connector": "goesToConnector",
  connector: "goesToConnector",
  goes_to_cavity: "goesToCavity",
  "goes to cavity": "goesToCavity",
};

/**
 * Pin-map rows from a pasted table (cells already split by a CSV parser). A first row of known headers
 * (cavity, colour, circuit, terminal, goes to connector, goes to cavity — our own CSV export's names too) maps the
 * columns; without one the columns are taken as cavity, colour, circuit, terminal. Blank rows are skipped.
 */
export function pinsFromTable(cells: readonly (readonly string[])[]): ProposedPin[] {
  const rows = cells.filter((r) => r.some((c) => c.trim() !== ""));
  if (rows.length === 0) return [];
  const head = rows[0]!.map((h) => HEADER_ALIASES[h.trim().toLowerCase()]);
  const hasHeader = head.filter(Boolean).length >= 2;
  const columns = hasHeader ? head : (["cavity", "code", "circuit", "terminal"] as const);
  const body = hasHeader ? rows.slice(1) : rows;
  return body.map((r) => {
    const get = (name: string) => {
      const i = (columns as readonly (string | undefined)[]).indexOf(name);
      return i >= 0 ? (r[i] ?? "").trim() : "";
    };
    const connector = get("goesToConnector");
    const cavity = get("goesToCavity");
    return {
      cavity: get("cavity"),
      code: get("code") || null,
      circuit: get("circuit"),
      terminal: get("terminal") || null,
      goesTo: connector && cavity ? { connector, cavity } : null,
    };
  });
}
