/**
 * Edits to a proposed card's pin map, specs and housing layout. Pure and immutable (every function returns a new
 * proposal and never changes its input): the editor runs them in the browser, and the server runs the same ones when a
 * form without JavaScript posts an editor button (`intent`), so both paths give the same result.
 */
import Papa from "papaparse";
import { LIMITS } from "~/domain/submissions";
import { pinsFromTable, type CardProposal, type Problem, type ProposedPin, type ProposedSpec } from "./submissions";

type Layout = CardProposal["layout"];

/** A pin row with nothing in it but (perhaps) its cavity. */
const blankPin = (cavity: string): ProposedPin => ({ cavity, code: null, circuit: "", terminal: null, goesTo: null });

/** A spec row not filled in yet: its numbers are NaN, which the editor shows as empty boxes. */
const blankSpec = (): ProposedSpec => ({
  name: "",
  min: Number.NaN,
  max: Number.NaN,
  unit: "",
  between: ["", ""],
  atC: 20,
  source: "",
  conditions: "",
  kind: "resistance",
  material: null,
});

const isPlaceholder = (pin: ProposedPin) => !pin.code && !pin.circuit.trim() && !pin.terminal && !pin.goesTo;

const inRange = (i: number, length: number) => Number.isInteger(i) && i >= 0 && i < length;

const clamp = (n: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, n));

/** The layout's cavities in reading order (row by row, left to right): the order the form's grid posts them in. */
function readingOrder(cavities: Layout["cavities"]): Layout["cavities"] {
  return [...cavities].sort((a, b) => a.row - b.row || a.col - b.col);
}

/** Append an empty pin row, on the first layout cavity that has no row yet (or no cavity). Unchanged at LIMITS.pins. */
export function addPinRow(p: CardProposal): CardProposal {
  if (p.pins.length >= LIMITS.pins) return p;
  const used = new Set(p.pins.map((pin) => pin.cavity.trim()));
  const free = readingOrder(p.layout.cavities).find((c) => !used.has(c.cavity));
  return { ...p, pins: [...p.pins, blankPin(free?.cavity ?? "")] };
}

/** Remove pin row `i`; an index out of range changes nothing. */
export function removePinRow(p: CardProposal, i: number): CardProposal {
  if (!inRange(i, p.pins.length)) return p;
  return { ...p, pins: p.pins.filter((_, j) => j !== i) };
}

/** Move pin row `i` by `delta` places (−1 up, +1 down), stopping at either end; an index out of range changes nothing. */
export function movePinRow(p: CardProposal, i: number, delta: number): CardProposal {
  if (!inRange(i, p.pins.length) || !Number.isFinite(delta)) return p;
  const to = clamp(i + Math.trunc(delta), 0, p.pins.length - 1);
  if (to === i) return p;
  const pins = [...p.pins];
  const [row] = pins.splice(i, 1);
  pins.splice(to, 0, row!); // i was checked to be in range, so one row came out
  return { ...p, pins };
}

/** Append an empty spec row (numbers NaN until typed). Unchanged at LIMITS.specs. */
export function addSpecRow(p: CardProposal): CardProposal {
  if (p.specs.length >= LIMITS.specs) return p;
  return { ...p, specs: [...p.specs, blankSpec()] };
}

/** Remove spec row `i`; an index out of range changes nothing. */
export function removeSpecRow(p: CardProposal, i: number): CardProposal {
  if (!inRange(i, p.specs.length)) return p;
  return { ...p, specs: p.specs.filter((_, j) => j !== i) };
}

/**
 * Redraw the housing grid at `rows` × `cols` (whole numbers, clamped to 1…LIMITS.rows / LIMITS.cols; a value that is not
 * a number keeps the current one). Cavities that still fit are kept where they are, the rest are dropped; new cells are
 * empty. Pin 1 moves to the first remaining cavity when its own was dropped. The pin map is left alone, so rows for a
 * dropped cavity stay visible (and are reported) rather than vanish.
 */
export function resizeLayout(p: CardProposal, rows: number, cols: number): CardProposal {
  const size = (n: number, current: number, max: number) => (Number.isFinite(n) ? clamp(Math.trunc(n), 1, max) : clamp(current, 1, max));
  const r = size(rows, p.layout.rows, LIMITS.rows);
  const c = size(cols, p.layout.cols, LIMITS.cols);
  const cavities = readingOrder(p.layout.cavities.filter((cav) => cav.row >= 1 && cav.row <= r && cav.col >= 1 && cav.col <= c)).slice(0, LIMITS.cavities);
  const pin1 = cavities.some((cav) => cav.cavity === p.layout.pin1) ? p.layout.pin1 : (cavities[0]?.cavity ?? "");
  return { ...p, layout: { ...p.layout, rows: r, cols: c, cavities, pin1 } };
}

/** Add an empty pin row for every layout cavity that has none, in the layout's order, after the existing rows (which are kept). */
export function syncPinsToLayout(p: CardProposal): CardProposal {
  const used = new Set(p.pins.map((pin) => pin.cavity.trim()));
  const added: ProposedPin[] = [];
  for (const c of p.layout.cavities) {
    if (p.pins.length + added.length >= LIMITS.pins) break;
    if (used.has(c.cavity)) continue;
    used.add(c.cavity); // a label drawn twice in the grid still gets one row
    added.push(blankPin(c.cavity));
  }
  return added.length === 0 ? p : { ...p, pins: [...p.pins, ...added] };
}

export interface PasteResult {
  proposal: CardProposal;
  /** Rows that went into the pin map. */
  added: number;
  /** Data rows that did not (no cavity, a cavity already filled in, past the row limit). */
  skipped: number;
  /** Why rows were skipped or the text could not be read; field "paste". */
  problems: Problem[];
}

/** More than a full pin map of long rows: anything bigger is not a pasted table. */
export const MAX_PASTE_CHARS = 100_000;

// Our CSV export puts an apostrophe before a leading = + - @ so a spreadsheet does not run the cell as a formula;
// reading our own export back takes it off again.
const undefuse = (cell: string) => (/^'[=+\-@]/.test(cell) ? cell.slice(1) : cell);

const isBlankRow = (row: readonly string[]) => row.every((c) => c.trim() === "");

/**
 * Read pin-map rows pasted from a spreadsheet (tab-separated) or as CSV (comma or semicolon, quoted fields allowed; the
 * delimiter is detected), header row optional (see pinsFromTable). "replace" puts the pasted rows in place of the pin
 * map; "append" adds them after it, filling in existing rows that hold nothing but their cavity. A pasted row with no
 * cavity, or for a cavity that already has a filled-in row, is skipped and said so. Nothing pasted leaves the map as it was.
 */
export function pastePins(p: CardProposal, text: string, mode: "replace" | "append"): PasteResult {
  const none = (message: string): PasteResult => ({ proposal: p, added: 0, skipped: 0, problems: [{ field: "paste", message }] });
  if (text.length > MAX_PASTE_CHARS)
    return none(`The pasted text is longer than ${MAX_PASTE_CHARS.toLocaleString("en-GB")} characters; paste the pin map only.`);
  const input = text.replace(/^\uFEFF/, "");
  if (input.trim() === "") return none("There is nothing in the paste box.");

  // A spreadsheet copy is tab-separated; a tab on the first line settles it. Otherwise papaparse guesses.
  const firstLine = input.split(/\r\n|\r|\n/).find((l) => l.trim() !== "") ?? "";
  const parsed = Papa.parse<string[]>(input, {
    delimiter: firstLine.includes("\t") ? "\t" : "",
    delimitersToGuess: [",", ";", "\t", "|"],
    skipEmptyLines: false,
  });
  const problems: Problem[] = [];
  for (const e of parsed.errors) {
    if (e.code === "UndetectableDelimiter") continue; // one column only: read as cavities, which is fine
    problems.push({
      field: "paste",
      message:
        e.code === "MissingQuotes" || e.code === "InvalidQuotes"
          ? `Line ${(e.row ?? 0) + 1}: a quoted cell is not closed.`
          : `Line ${(e.row ?? 0) + 1}: ${e.message}.`,
    });
  }
  const raw = parsed.data.map((row) => row.map((c) => undefuse(String(c ?? ""))));
  const lineOf = raw.map((row, i) => (isBlankRow(row) ? -1 : i + 1)).filter((n) => n > 0);
  const table = raw.filter((row) => !isBlankRow(row));
  const rows = pinsFromTable(table);
  const offset = table.length - rows.length; // 1 when the first row was a header

  const pins = mode === "replace" ? [] : [...p.pins];
  const byCavity = new Map<string, number>();
  pins.forEach((pin, i) => {
    if (!byCavity.has(pin.cavity.trim())) byCavity.set(pin.cavity.trim(), i);
  });
  const filled = new Set<string>(); // cavities this paste has put a row on
  let added = 0;
  let skipped = 0;
  rows.forEach((row, k) => {
    const line = lineOf[k + offset];
    const skip = (message: string) => {
      skipped++;
      problems.push({ field: "paste", message: `Line ${line}: ${message}` });
    };
    if (!row.cavity) return skip("no cavity, so the row was left out.");
    const at = byCavity.get(row.cavity);
    if (at !== undefined) {
      if (filled.has(row.cavity)) return skip(`cavity “${row.cavity}” is pasted twice; the first one was kept.`);
      if (!isPlaceholder(pins[at]!)) return skip(`cavity “${row.cavity}” already has a row in the pin map; remove it first or paste with “replace”.`);
      pins[at] = row;
    } else {
      if (pins.length >= LIMITS.pins) return skip(`the pin map holds at most ${LIMITS.pins} rows.`);
      byCavity.set(row.cavity, pins.length);
      pins.push(row);
    }
    filled.add(row.cavity);
    added++;
  });
  if (added === 0) {
    if (rows.length === 0) problems.push({ field: "paste", message: "No pin rows were found in the pasted text." });
    return { proposal: p, added, skipped, problems };
  }
  return { proposal: { ...p, pins }, added, skipped, problems };
}

const INDEXED = /^(remove-row|move-up|move-down|remove-spec):(\d{1,4})$/;

const rowsWord = (n: number) => `${n} ${n === 1 ? "row" : "rows"}`;

/**
 * Apply one editor button (`intent`, as posted by the form without JavaScript or clicked with it): add-row,
 * remove-row:<i>, move-up:<i>, move-down:<i>, add-spec, remove-spec:<i>, paste (form.paste, form.pasteMode),
 * layout (form.rows × form.cols), sync-pins. Returns the new proposal with a notice for the contributor, or null for an
 * intent that is not an editor button (the page handles it, e.g. save or submit).
 */
export function applyEditorIntent(
  p: CardProposal,
  intent: string,
  form: { paste?: string; pasteMode?: string; rows?: string; cols?: string } = {},
): { proposal: CardProposal; notice?: string } | null {
  const gone = { proposal: p, notice: "That row is no longer there; nothing was changed." };
  switch (intent) {
    case "add-row": {
      const next = addPinRow(p);
      return next === p ? { proposal: p, notice: `The pin map holds at most ${LIMITS.pins} rows.` } : { proposal: next };
    }
    case "add-spec": {
      const next = addSpecRow(p);
      return next === p ? { proposal: p, notice: `A card holds at most ${LIMITS.specs} specs.` } : { proposal: next };
    }
    case "sync-pins": {
      const next = syncPinsToLayout(p);
      const n = next.pins.length - p.pins.length;
      if (n > 0) return { proposal: next, notice: `Added ${rowsWord(n)}, one for each cavity that had none.` };
      const free = p.layout.cavities.some((c) => !p.pins.some((pin) => pin.cavity.trim() === c.cavity));
      return { proposal: p, notice: free ? `The pin map holds at most ${LIMITS.pins} rows.` : "Every cavity in the layout already has a row." };
    }
    case "layout": {
      const num = (s: string | undefined, current: number) => (s === undefined || s.trim() === "" ? current : Number(s));
      const next = resizeLayout(p, num(form.rows, p.layout.rows), num(form.cols, p.layout.cols));
      const dropped = p.layout.cavities.length - next.layout.cavities.length;
      const size = `${next.layout.rows} × ${next.layout.cols}`;
      return {
        proposal: next,
        notice:
          dropped > 0
            ? `The grid is now ${size}; ${dropped} ${dropped === 1 ? "cavity" : "cavities"} outside it ${dropped === 1 ? "was" : "were"} dropped.`
            : `The grid is now ${size}.`,
      };
    }
    case "paste": {
      const r = pastePins(p, form.paste ?? "", form.pasteMode === "append" ? "append" : "replace");
      const parts = [r.added > 0 ? `Put ${rowsWord(r.added)} in the pin map.` : "Nothing was added to the pin map."];
      if (r.skipped > 0) parts.push(`Skipped ${rowsWord(r.skipped)}.`);
      const shown = r.problems.slice(0, 5).map((x) => x.message);
      if (r.problems.length > shown.length) shown.push(`… and ${r.problems.length - shown.length} more.`);
      return { proposal: r.proposal, notice: [...parts, ...shown].join(" ") };
    }
  }
  const m = INDEXED.exec(intent);
  if (!m) return null;
  const i = Number(m[2]);
  const next =
    m[1] === "remove-row" ? removePinRow(p, i) : m[1] === "move-up" ? movePinRow(p, i, -1) : m[1] === "move-down" ? movePinRow(p, i, 1) : removeSpecRow(p, i);
  const list = m[1] === "remove-spec" ? p.specs : p.pins;
  if (!inRange(i, list.length)) return gone;
  return { proposal: next };
}
