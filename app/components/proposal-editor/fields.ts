import type { MouseEvent, ReactNode } from "react";
import { decodeColour, describeColour, swatch, type ColourSystemId, type HouseStyleId } from "~/domain/colours";
import type { HousingLayout } from "~/domain/connector-face";
import type { CardProposal, ProposedSpec } from "~/domain/submissions";

/** A card of the same family, for "mates with" and "goes to". */
export interface FamilyCardOption {
  slug: string;
  name: string;
  cavities: string[];
}

// The names of the editor's own inputs (as proposalFromForm reads them), which keep their own ids.
const INPUT_NAME =
  /^(?:name|location|housing|gender|system|matesWith|notes|paste|pasteMode|layout\.(?:rows|cols|pin1|latch|cell\.\d+\.\d+)|pins\.\d+\.(?:cavity|code|circuit|terminal|goesToConnector|goesToCavity)|specs\.\d+\.(?:name|min|max|open|unit|betweenA|betweenB|atC|source|conditions|kind|material))$/;

/**
 * The element id the editor gives a form field (its `name`, or a Problem.field such as "pins.2.goesTo" or "layout"), so a
 * page can link to it and give its own fields (sourceKind, sourceDetail …) ids that the problem summary's links reach.
 */
export function editorFieldId(field: string): string {
  const target = INPUT_NAME.test(field)
    ? field
    : displayKey(field)
        .replace(/^pins\.(\d+)\.goesTo$/, "pins.$1.goesToConnector")
        .replace(/^specs\.(\d+)\.between$/, "specs.$1.betweenA");
  return "ed-" + target.replace(/[^A-Za-z0-9_-]+/g, "-");
}

// Where a problem is shown: beside the field itself, or the part of the editor it belongs to (schema paths such as
// "layout.cavities.3.cavity" or "pins.4" have no input of their own; "goes to" and "between" are two inputs each).
export function displayKey(field: string): string {
  let m = /^pins\.(\d+)\.goesTo/.exec(field);
  if (m) return `pins.${m[1]}.goesTo`;
  if ((m = /^specs\.(\d+)\.between/.exec(field))) return `specs.${m[1]}.between`;
  if (INPUT_NAME.test(field)) return field;
  if (field === "layout" || field.startsWith("layout.")) return "layout";
  if ((m = /^pins\.(\d+)\.(cavity|code|circuit|terminal)(?:\.|$)/.exec(field))) return `pins.${m[1]}.${m[2]}`;
  if ((m = /^pins\.(\d+)(?:\.|$)/.exec(field))) return `pins.${m[1]}.cavity`;
  if (field === "pins" || field.startsWith("pins.")) return "pins";
  if ((m = /^specs\.(\d+)\.(name|min|max|unit|atC|source|conditions|kind|material)(?:\.|$)/.exec(field))) return `specs.${m[1]}.${m[2]}`;
  if ((m = /^specs\.(\d+)(?:\.|$)/.exec(field))) return `specs.${m[1]}.name`;
  if (field === "specs" || field.startsWith("specs.")) return "specs";
  return field;
}

export type Decoded = { ok: true; words: string; baseHex: string; ink: string; tracerHexes: string[]; iec: string | null } | { ok: false; message: string };

/** The code read in the family's notation and its make's house, or the parser's message; null for an empty code. */
export function decodeFor(code: string | null, system: ColourSystemId, houseStyle: HouseStyleId | null): Decoded | null {
  if (!code || !code.trim()) return null;
  const d = decodeColour(code, system, { houseStyle });
  if (!d.ok) return { ok: false, message: d.error.message };
  const [base, ...rest] = d.value.colours;
  return {
    ok: true,
    words: describeColour(d.value),
    baseHex: swatch(base).hex,
    ink: swatch(base).ink,
    tracerHexes: rest.map((c) => swatch(c).hex),
    iec: d.value.iec,
  };
}

export const numText = (n: unknown) => (typeof n === "number" && Number.isFinite(n) ? String(n) : "");

// An open maximum (null) counts as blank here, as the form reader drops a row with no name, numbers or conditions.
export const isBlankSpec = (s: ProposedSpec) =>
  !s.name.trim() && !Number.isFinite(s.min) && !Number.isFinite(s.max ?? Number.NaN) && !(s.conditions ?? "").trim();

export function readingOrder(cavities: HousingLayout["cavities"]) {
  return [...cavities].sort((a, b) => a.row - b.row || a.col - b.col);
}

export type NumField = "min" | "max" | "atC";
export type Notice = { where: "layout" | "pins" | "paste" | "specs"; text: string } | null;

// One look for every control: the ink border of the app's other forms, and a red edge when something is wrong.
export const INPUT = "mt-1 block w-full rounded border-2 bg-white px-2 py-1.5 text-base disabled:bg-paper";
export const inputClass = (bad: boolean) => `${INPUT} ${bad ? "border-signal" : "border-ink"}`;
export const LABEL = "block text-sm font-semibold";
export const SMALL_BUTTON =
  "rounded border-2 border-ink bg-white px-2.5 py-1 text-sm font-semibold hover:bg-paper disabled:cursor-not-allowed disabled:opacity-40";
export const BUTTON = "rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold hover:bg-paper disabled:cursor-not-allowed disabled:opacity-40";

// The two lists the inputs point at: the layout's cavity labels (pins) and those plus the off-card points (specs).
export const cavityListId = "ed-cavity-list";
export const pointListId = "ed-point-list";

/** What every part of the editor is handed by the shell: where problems are shown, and the button runner. */
export interface EditorKit {
  problemsOf: (field: string) => string[];
  describedBy: (field: string, ...more: (string | false | null | undefined)[]) => string | undefined;
  problemText: (field: string) => ReactNode;
  /** An editor button: posts `intent` without JavaScript; with it, the same edit happens here. */
  run: (intent: string, focus?: (next: CardProposal) => string | null) => (e: MouseEvent<HTMLButtonElement>) => void;
}
