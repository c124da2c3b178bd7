import { useEffect, useRef, useState, type ChangeEvent, type KeyboardEvent, type MouseEvent } from "react";
import { ColourChip } from "./colour-chip";
import { FaceView, type FaceCavityPaint } from "./face-view";
import { decodeColour, describeColour, swatch, type ColourSystemId, type HouseStyleId } from "~/domain/colours";
import { faceGeometry, type FaceSide, type HousingLayout, type Latch } from "~/domain/connector-face";
import { applyEditorIntent } from "~/domain/proposal-edits";
import {
  LATCH_SIDES, SYSTEM_KINDS, isTerminalDesignation, proposalProblems, type CardProposal, type Problem, type ProposedPin, type ProposedSpec,
} from "~/domain/submissions";
import { LIMITS } from "~/domain/submissions";
import { SPEC_KINDS, SPEC_KIND_LABELS, SPEC_MATERIALS, SPEC_MATERIAL_LABELS, SPEC_OFF_CARD_POINTS, specKindOf, type SpecMaterial } from "~/domain/specs";

/** A card of the same family, for "mates with" and "goes to". */
export interface FamilyCardOption {
  slug: string;
  name: string;
  cavities: string[];
}

// The names of the editor's own inputs (as proposalFromForm reads them), which keep their own ids.
const INPUT_NAME = /^(?:name|location|housing|gender|system|matesWith|notes|paste|pasteMode|layout\.(?:rows|cols|pin1|latch|cell\.\d+\.\d+)|pins\.\d+\.(?:cavity|code|circuit|terminal|goesToConnector|goesToCavity)|specs\.\d+\.(?:name|min|max|open|unit|betweenA|betweenB|atC|source|conditions|kind|material))$/;

/**
 * The element id the editor gives a form field (its `name`, or a Problem.field such as "pins.2.goesTo" or "layout"), so a
 * page can link to it and give its own fields (sourceKind, sourceDetail …) ids that the problem summary's links reach.
 */
export function editorFieldId(field: string): string {
  const target = INPUT_NAME.test(field) ? field
    : displayKey(field).replace(/^pins\.(\d+)\.goesTo$/, "pins.$1.goesToConnector").replace(/^specs\.(\d+)\.between$/, "specs.$1.betweenA");
  return "ed-" + target.replace(/[^A-Za-z0-9_-]+/g, "-");
}

// Where a problem is shown: beside the field itself, or the part of the editor it belongs to (schema paths such as
// "layout.cavities.3.cavity" or "pins.4" have no input of their own; "goes to" and "between" are two inputs each).
function displayKey(field: string): string {
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

const SYSTEM_WORDS: Record<string, string> = {
  ignition: "Ignition", charging: "Charging", starting: "Starting", lighting: "Lighting", signals: "Signals", instruments: "Instruments",
};
const LATCH_WORDS: Record<Latch, string> = { top: "at the top", bottom: "at the bottom", left: "on the left", right: "on the right" };

type Decoded = { ok: true; words: string; baseHex: string; ink: string; tracerHexes: string[]; iec: string | null } | { ok: false; message: string };

/** The code read in the family's notation and its make's house, or the parser's message; null for an empty code. */
function decodeFor(code: string | null, system: ColourSystemId, houseStyle: HouseStyleId | null): Decoded | null {
  if (!code || !code.trim()) return null;
  const d = decodeColour(code, system, { houseStyle });
  if (!d.ok) return { ok: false, message: d.error.message };
  const [base, ...rest] = d.value.colours;
  return { ok: true, words: describeColour(d.value), baseHex: swatch(base).hex, ink: swatch(base).ink, tracerHexes: rest.map((c) => swatch(c).hex), iec: d.value.iec };
}

// The face view draws each label once: a label typed into two cells is a layout problem (reported), not two cavities.
function drawableLayout(layout: HousingLayout): HousingLayout {
  const seen = new Set<string>();
  return { ...layout, cavities: layout.cavities.filter((c) => c.cavity.trim() !== "" && !seen.has(c.cavity) && (seen.add(c.cavity), true)) };
}

function paintOf(pins: ProposedPin[], decoded: (Decoded | null)[]): FaceCavityPaint[] {
  return pins.map((p, i) => {
    const d = decoded[i];
    if (!p.code || !d) return { cavity: p.cavity, code: null, baseHex: null, tracerHexes: [] };
    if (!d.ok) return { cavity: p.cavity, code: p.code, baseHex: null, tracerHexes: [], title: `${p.code} (not understood)` };
    return { cavity: p.cavity, code: p.code, baseHex: d.baseHex, ink: d.ink, tracerHexes: d.tracerHexes, title: `${p.code}, ${d.words}` };
  });
}

function valueAt(p: CardProposal, path: string): unknown {
  let v: unknown = p;
  for (const k of path.split(".")) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<string, unknown>)[k];
  }
  return v;
}

const sameValue = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

const numText = (n: unknown) => (typeof n === "number" && Number.isFinite(n) ? String(n) : "");

// An open maximum (null) counts as blank here, as the form reader drops a row with no name, numbers or conditions.
const isBlankSpec = (s: ProposedSpec) => !s.name.trim() && !Number.isFinite(s.min) && !Number.isFinite(s.max ?? Number.NaN) && !(s.conditions ?? "").trim();

function readingOrder(cavities: HousingLayout["cavities"]) {
  return [...cavities].sort((a, b) => a.row - b.row || a.col - b.col);
}

type NumField = "min" | "max" | "atC";
type Notice = { where: "layout" | "pins" | "paste" | "specs"; text: string } | null;

// One look for every control: the ink border of the app's other forms, and a red edge when something is wrong.
const INPUT = "mt-1 block w-full rounded border-2 bg-white px-2 py-1.5 text-base disabled:bg-paper";
const inputClass = (bad: boolean) => `${INPUT} ${bad ? "border-signal" : "border-ink"}`;
const LABEL = "block text-sm font-semibold";
const SMALL_BUTTON = "rounded border-2 border-ink bg-white px-2.5 py-1 text-sm font-semibold hover:bg-paper disabled:cursor-not-allowed disabled:opacity-40";
const BUTTON = "rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold hover:bg-paper disabled:cursor-not-allowed disabled:opacity-40";

/**
 * The editable connector card, rendered inside a <form> the page provides (the page adds version / idempotency fields and
 * the Save and Submit buttons). Every input is named as proposalFromForm reads it, so Save posts the whole card. Without
 * JavaScript the row buttons post `intent` (add-row, remove-row:<i>, move-up:<i>, move-down:<i>, add-spec,
 * remove-spec:<i>, paste, layout, sync-pins) and the server applies it with applyEditorIntent; once hydrated the same
 * edits happen here and nothing is posted until Save.
 */
export function ProposalEditor(props: {
  proposal: CardProposal;
  colourSystem: ColourSystemId;
  /** The make's house style within that notation (null: the notation's usual reading). */
  houseStyle?: HouseStyleId | null;
  familyCards: FamilyCardOption[];
  problems: Problem[];
  disabled?: boolean;
}) {
  const { proposal, colourSystem, houseStyle = null, familyCards, problems, disabled = false } = props;

  // The draft follows the page's proposal whenever the page hands over a different one (after a save or a server-side
  // edit); compared by content, so a page that builds the object afresh on each render does not wipe the edits.
  const proposalKey = JSON.stringify(proposal);
  const [base, setBase] = useState(proposalKey);
  const [draft, setDraft] = useState(proposal);
  const [grid, setGrid] = useState({ rows: String(proposal.layout.rows), cols: String(proposal.layout.cols) });
  const [specText, setSpecText] = useState<Partial<Record<NumField, string>>[]>([]);
  const [paste, setPaste] = useState("");
  const [pasteMode, setPasteMode] = useState<"replace" | "append">("replace");
  const [notice, setNotice] = useState<Notice>(null);
  if (base !== proposalKey) {
    setBase(proposalKey);
    setDraft(proposal);
    setGrid({ rows: String(proposal.layout.rows), cols: String(proposal.layout.cols) });
    setSpecText([]);
    setNotice(null);
  }

  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  const [view, setView] = useState<FaceSide>("mating");
  const [activeRow, setActiveRow] = useState<number | null>(null);

  const focusNext = useRef<string | null>(null);
  useEffect(() => {
    if (!focusNext.current) return;
    document.getElementById(focusNext.current)?.focus();
    focusNext.current = null;
  });
  // New problems from the server (after a save or submit): move focus to their summary, once per set of problems.
  const summaryRef = useRef<HTMLHeadingElement>(null);
  const problemsKey = JSON.stringify(problems);
  useEffect(() => {
    if (problemsKey !== "[]") summaryRef.current?.focus();
  }, [problemsKey]);

  const cards = new Map(familyCards.map((c) => [c.slug, c.cavities] as const));
  const layoutLabels = [...new Set(readingOrder(draft.layout.cavities).map((c) => c.cavity))];
  const decoded = draft.pins.map((p) => decodeFor(p.code, colourSystem, houseStyle));

  // Problems from the server stay next to their field until that field is changed; the domain's own checks of the
  // layout, cavities, terminals, "goes to" and spec pins run live on the draft as well.
  const fromServer = problems.filter((p) => sameValue(valueAt(draft, p.field), valueAt(proposal, p.field)));
  const live = proposalProblems(draft, colourSystem, cards, { houseStyle }).filter((p) => {
    const m = /^(?:layout|pins|pins\.(\d+)\.(cavity|terminal|goesTo)|specs\.(\d+)\.(between|min))$/.exec(p.field);
    if (!m) return false;
    if (m[3] !== undefined) {
      // An unfinished spec row gets the plain requests below, not "cavity “” is not in the layout".
      const s = draft.specs[Number(m[3])];
      if (isBlankSpec(s)) return false;
      return m[4] === "between" ? s.between.every((c) => c.trim() !== "") : Number.isFinite(s.min) && (s.max === null || Number.isFinite(s.max));
    }
    if (m[2] === "goesTo") { const g = draft.pins[Number(m[1])].goesTo; return Boolean(g?.connector && g.cavity); }
    return true;
  });
  draft.pins.forEach((pin, i) => {
    const g = pin.goesTo;
    if (g && g.connector && !g.cavity) live.push({ field: `pins.${i}.goesTo`, message: `Row ${i + 1}: choose the cavity at the other end too.` });
    if (g && !g.connector && g.cavity) live.push({ field: `pins.${i}.goesTo`, message: `Row ${i + 1}: choose the connector at the other end too.` });
  });
  draft.specs.forEach((s, i) => {
    let typo = false;
    for (const f of ["min", "max", "atC"] as const) {
      const t = specText[i]?.[f];
      if (t !== undefined && t.trim() !== "" && !Number.isFinite(Number(t))) {
        typo = true;
        live.push({ field: `specs.${i}.${f}`, message: `“${t}” is not a number${t.includes(",") ? " (write decimals with a point, e.g. 0.9)" : ""}.` });
      }
    }
    if (isBlankSpec(s)) return;
    if (!typo && !(Number.isFinite(s.min) && (s.max === null || Number.isFinite(s.max)))) live.push({ field: `specs.${i}.min`, message: `Spec ${i + 1}: give the least and the greatest value.` });
    if (s.between.some((c) => c.trim() === "")) live.push({ field: `specs.${i}.between`, message: `Spec ${i + 1}: give both cavities to measure between.` });
  });
  const byField = new Map<string, string[]>();
  for (const p of [...fromServer, ...live]) {
    const at = displayKey(p.field);
    const list = byField.get(at) ?? [];
    if (!list.includes(p.message)) list.push(p.message);
    byField.set(at, list);
  }
  const problemsOf = (field: string) => byField.get(field) ?? [];
  const serverCodeProblem = (i: number) => fromServer.some((p) => displayKey(p.field) === `pins.${i}.code`);

  // ---- edits ---------------------------------------------------------------------------------------------------------
  const update = (f: (d: CardProposal) => CardProposal) => setDraft((d) => f(d));
  const setField = <K extends "name" | "location" | "housing" | "gender" | "system" | "matesWith" | "notes">(k: K, v: CardProposal[K]) =>
    update((d) => ({ ...d, [k]: v }));
  const setPin = (i: number, patch: Partial<ProposedPin>) =>
    update((d) => ({ ...d, pins: d.pins.map((p, j) => (j === i ? { ...p, ...patch } : p)) }));
  const setGoesTo = (i: number, part: "connector" | "cavity", value: string) =>
    update((d) => ({
      ...d,
      pins: d.pins.map((p, j) => {
        if (j !== i) return p;
        const next = { connector: p.goesTo?.connector ?? "", cavity: p.goesTo?.cavity ?? "", [part]: value };
        // A new connector keeps the cavity only if that connector has it.
        if (part === "connector" && next.cavity && !(cards.get(value) ?? []).includes(next.cavity)) next.cavity = "";
        return { ...p, goesTo: next.connector || next.cavity ? next : null };
      }),
    }));
  const setSpec = (i: number, patch: Partial<ProposedSpec>) =>
    update((d) => ({ ...d, specs: d.specs.map((s, j) => (j === i ? { ...s, ...patch } : s)) }));
  // Ticking "no upper limit" clears what was typed as the greatest value; unticking leaves the box empty to fill in.
  const setOpen = (i: number, open: boolean) => {
    setSpecText((t) => { const next = [...t]; next[i] = { ...next[i], max: undefined }; return next; });
    setSpec(i, { max: open ? null : Number.NaN });
  };
  // An insulation test must read open, so choosing it ticks "no upper limit" as well.
  const setKind = (i: number, value: string) => {
    const kind = specKindOf(value);
    setSpec(i, { kind });
    if (kind === "insulation") setOpen(i, true);
  };
  const setSpecNumber = (i: number, f: NumField, text: string) => {
    setSpecText((t) => { const next = [...t]; next[i] = { ...next[i], [f]: text }; return next; });
    setSpec(i, { [f]: text.trim() === "" ? Number.NaN : Number(text) });
  };
  const setCell = (row: number, col: number, text: string) =>
    update((d) => {
      const old = d.layout.cavities.find((c) => c.row === row && c.col === col);
      const rest = d.layout.cavities.filter((c) => !(c.row === row && c.col === col));
      const cavities = text.trim() ? readingOrder([...rest, { cavity: text, row, col }]) : rest;
      // Renaming pin 1's cell keeps pin 1 on that cell.
      const pin1 = old && text.trim() && d.layout.pin1 === old.cavity ? text : d.layout.pin1;
      return { ...d, layout: { ...d.layout, cavities, pin1 } };
    });

  /** An editor button: posts `intent` without JavaScript; with it, the same edit happens here. */
  const run = (intent: string, focus?: (next: CardProposal) => string | null) => (e: MouseEvent<HTMLButtonElement>) => {
    e.preventDefault();
    const r = applyEditorIntent(draft, intent, { paste, pasteMode, rows: grid.rows, cols: grid.cols });
    if (!r) return;
    setDraft(r.proposal);
    const where: NonNullable<Notice>["where"] = intent === "layout" ? "layout" : intent === "paste" ? "paste" : intent.includes("spec") ? "specs" : "pins";
    setNotice(r.notice ? { where, text: r.notice } : null);
    if (intent === "layout") setGrid({ rows: String(r.proposal.layout.rows), cols: String(r.proposal.layout.cols) });
    if (intent === "paste" && r.proposal !== draft) setPaste("");
    if (intent === "add-spec") setSpecText((t) => t.slice(0, draft.specs.length));
    const m = /^remove-spec:(\d+)$/.exec(intent);
    if (m && r.proposal !== draft) setSpecText((t) => t.filter((_, j) => j !== Number(m[1])));
    const target = focus?.(r.proposal);
    if (target) focusNext.current = target;
  };
  const afterRemove = (kind: "pins" | "specs", i: number) => (next: CardProposal) => {
    const n = next[kind].length;
    if (n === 0) return kind === "pins" ? "ed-add-row" : "ed-add-spec";
    return `ed-${kind}-${Math.min(i, n - 1)}-remove`;
  };
  // Focus follows the moved row, on the same button unless that one is now disabled (top or bottom of the list).
  const afterMove = (from: number, dir: "up" | "down") => (next: CardProposal) => {
    const to = Math.min(Math.max(from + (dir === "up" ? -1 : 1), 0), next.pins.length - 1);
    const end = dir === "up" ? to === 0 : to === next.pins.length - 1;
    return `ed-pins-${to}-${end ? (dir === "up" ? "down" : "up") : dir}`;
  };

  // With JavaScript, Enter in a one-line box does not fire the first editor button (the form's default button).
  const onKeyDown = (e: KeyboardEvent<HTMLDivElement>) => {
    const t = e.target as HTMLElement;
    if (e.key === "Enter" && t.tagName === "INPUT" && (t as HTMLInputElement).type !== "submit") e.preventDefault();
  };
  const jump = (e: MouseEvent<HTMLAnchorElement>, id: string) => {
    const el = document.getElementById(id);
    if (!el) return;
    e.preventDefault();
    el.scrollIntoView({ block: "center" });
    el.focus();
  };

  // ---- pieces ----------------------------------------------------------------------------------------------------------
  const problemIdOf = (field: string) => `${editorFieldId(field)}-problem`;
  const describedBy = (field: string, ...more: (string | false | null | undefined)[]) =>
    [...more, problemsOf(field).length ? problemIdOf(field) : null].filter(Boolean).join(" ") || undefined;
  const problemText = (field: string) => {
    const list = problemsOf(field);
    if (list.length === 0) return null;
    return (
      <div id={problemIdOf(field)} className="mt-1 space-y-0.5 text-sm font-semibold text-signal-dark" data-problem-for={field}>
        {list.map((m, k) => <p key={k}>{m}</p>)}
      </div>
    );
  };
  const text = (name: "name" | "location" | "housing", label: string, hint: string, maxLength: number) => (
    <div>
      <label htmlFor={editorFieldId(name)} className={LABEL}>{label}</label>
      <input id={editorFieldId(name)} name={name} value={draft[name]} maxLength={maxLength} onChange={(e) => setField(name, e.target.value)}
        aria-invalid={problemsOf(name).length ? true : undefined} aria-describedby={describedBy(name, `${editorFieldId(name)}-hint`)}
        className={inputClass(problemsOf(name).length > 0)} autoComplete="off" />
      <p id={`${editorFieldId(name)}-hint`} className="mt-1 text-sm text-muted">{hint}</p>
      {problemText(name)}
    </div>
  );

  const geometry = faceGeometry(drawableLayout(draft.layout), { view });
  const paint = paintOf(draft.pins, decoded);
  const activeCavity = activeRow !== null ? draft.pins[activeRow]?.cavity ?? null : null;
  const cavityListId = "ed-cavity-list";
  const pointListId = "ed-point-list";

  return (
    <div className="space-y-6" onKeyDown={onKeyDown}>
      <fieldset disabled={disabled} className="m-0 min-w-0 space-y-6 border-0 p-0">
        {fromServer.length > 0 ? (
          <section aria-labelledby="ed-problems-heading" className="rounded-md border-l-4 border-signal bg-white px-4 py-3" data-testid="problem-summary">
            <h2 id="ed-problems-heading" ref={summaryRef} tabIndex={-1} className="text-lg font-bold text-signal-dark">
              {fromServer.length === 1 ? "One thing to put right" : `${fromServer.length} things to put right`}
            </h2>
            <ul className="mt-1 list-disc space-y-0.5 pl-6">
              {fromServer.map((p, k) => (
                <li key={k}>
                  <a href={`#${editorFieldId(p.field)}`} onClick={(e) => jump(e, editorFieldId(p.field))} className="font-semibold text-signal-dark underline">
                    {p.message}
                  </a>
                </li>
              ))}
            </ul>
          </section>
        ) : null}

        <section aria-labelledby="ed-about-heading" className="space-y-4">
          <h2 id="ed-about-heading" className="text-xl font-bold">The connector</h2>
          <div className="grid gap-4 sm:grid-cols-2">
            {text("name", "Name", "What riders call it, e.g. “Pickup coil plug”.", 120)}
            {text("location", "Where it sits", "Where to find it on the bike, e.g. “under the tank, left of the frame spine”.", LIMITS.text)}
            {text("housing", "Housing", "Shape and size of the housing, e.g. “4-way, 2 × 2, white nylon”.", LIMITS.text)}
            <div>
              <label htmlFor={editorFieldId("system")} className={LABEL}>System</label>
              <select id={editorFieldId("system")} name="system" value={draft.system} onChange={(e) => setField("system", e.target.value)}
                aria-describedby={describedBy("system")} className={inputClass(problemsOf("system").length > 0)}>
                {(SYSTEM_KINDS as readonly string[]).includes(draft.system) ? null : <option value={draft.system}>{draft.system || "Choose a system"}</option>}
                {SYSTEM_KINDS.map((k) => <option key={k} value={k}>{SYSTEM_WORDS[k] ?? k}</option>)}
              </select>
              {problemText("system")}
            </div>
            <fieldset id={editorFieldId("gender")} tabIndex={-1} aria-describedby={describedBy("gender")} className="m-0 min-w-0 border-0 p-0">
              <legend className={LABEL}>This half is a</legend>
              <div className="mt-1 flex flex-wrap gap-4">
                {(["plug", "socket"] as const).map((g) => (
                  <label key={g} className="inline-flex items-center gap-2 py-1">
                    <input type="radio" name="gender" value={g} checked={draft.gender === g} onChange={() => setField("gender", g)} className="size-4 accent-ink" />
                    {g === "plug" ? "Plug" : "Socket"}
                  </label>
                ))}
              </div>
              {problemText("gender")}
            </fieldset>
            <div>
              <label htmlFor={editorFieldId("matesWith")} className={LABEL}>Mates with</label>
              <select id={editorFieldId("matesWith")} name="matesWith" value={draft.matesWith ?? ""} onChange={(e) => setField("matesWith", e.target.value || null)}
                aria-describedby={describedBy("matesWith")} className={inputClass(problemsOf("matesWith").length > 0)}>
                <option value="">None, or not in the library yet</option>
                {draft.matesWith && !cards.has(draft.matesWith) ? <option value={draft.matesWith}>{draft.matesWith} (not in this family)</option> : null}
                {familyCards.map((c) => <option key={c.slug} value={c.slug}>{c.name}</option>)}
              </select>
              {problemText("matesWith")}
            </div>
          </div>
        </section>

        <section id={editorFieldId("layout")} tabIndex={-1} aria-labelledby="ed-layout-heading" className="space-y-3">
          <h2 id="ed-layout-heading" className="text-xl font-bold">Housing layout</h2>
          <p className="text-sm text-muted">
            Type each cavity&apos;s label into its cell as you see it <strong>looking into the mating face</strong>; leave a cell empty where the housing has no cavity.
          </p>
          <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(260px,380px)]">
            <div className="min-w-0 space-y-3">
              <div className="flex flex-wrap items-end gap-3">
                {(["rows", "cols"] as const).map((k) => (
                  <div key={k}>
                    <label htmlFor={editorFieldId(`layout.${k}`)} className={LABEL}>{k === "rows" ? "Rows" : "Columns"}</label>
                    <input id={editorFieldId(`layout.${k}`)} name={`layout.${k}`} type="number" inputMode="numeric" min={1} max={k === "rows" ? LIMITS.rows : LIMITS.cols}
                      value={grid[k]} onChange={(e) => setGrid((g) => ({ ...g, [k]: e.target.value }))}
                      aria-describedby={describedBy(`layout.${k}`)} className={`${inputClass(problemsOf(`layout.${k}`).length > 0)} w-20`} />
                  </div>
                ))}
                <button type="submit" name="intent" value="layout" formNoValidate onClick={run("layout")} className={BUTTON}>Redraw the grid</button>
              </div>
              {problemText("layout.rows")}
              {problemText("layout.cols")}
              <div className="overflow-x-auto pb-1">
                <table className="border-separate border-spacing-1">
                  <caption className="sr-only">Cavity labels by row and column, as seen looking into the mating face</caption>
                  <thead>
                    <tr>
                      <td />
                      {Array.from({ length: draft.layout.cols }, (_, c) => <th key={c} scope="col" className="text-center text-xs font-semibold text-muted">{c + 1}</th>)}
                    </tr>
                  </thead>
                  <tbody>
                    {Array.from({ length: draft.layout.rows }, (_, r) => (
                      <tr key={r}>
                        <th scope="row" className="pr-1 text-right text-xs font-semibold text-muted">{r + 1}</th>
                        {Array.from({ length: draft.layout.cols }, (_, c) => {
                          const cell = draft.layout.cavities.find((x) => x.row === r + 1 && x.col === c + 1);
                          const name = `layout.cell.${r + 1}.${c + 1}`;
                          return (
                            <td key={c}>
                              <input id={editorFieldId(name)} name={name} value={cell?.cavity ?? ""} maxLength={12} onChange={(e) => setCell(r + 1, c + 1, e.target.value)}
                                aria-label={`Cavity label, row ${r + 1}, column ${c + 1}`} autoComplete="off" spellCheck={false}
                                className={`w-12 rounded border-2 px-1 py-1 text-center font-mono text-base ${cell ? "border-ink bg-white" : "border-dashed border-rule bg-paper"}`} />
                            </td>
                          );
                        })}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              <div className="flex flex-wrap gap-4">
                <div>
                  <label htmlFor={editorFieldId("layout.pin1")} className={LABEL}>Pin 1</label>
                  <select id={editorFieldId("layout.pin1")} name="layout.pin1" value={draft.layout.pin1} onChange={(e) => update((d) => ({ ...d, layout: { ...d.layout, pin1: e.target.value } }))}
                    aria-describedby={describedBy("layout.pin1")} className={`${inputClass(problemsOf("layout.pin1").length > 0)} w-auto min-w-24`}>
                    {layoutLabels.includes(draft.layout.pin1) ? null : <option value={draft.layout.pin1}>{draft.layout.pin1 ? `${draft.layout.pin1} (not in the grid)` : "Choose…"}</option>}
                    {layoutLabels.map((l) => <option key={l} value={l}>{l}</option>)}
                  </select>
                  {problemText("layout.pin1")}
                </div>
                <div>
                  <label htmlFor={editorFieldId("layout.latch")} className={LABEL}>Latch</label>
                  <select id={editorFieldId("layout.latch")} name="layout.latch" value={draft.layout.latch}
                    onChange={(e) => update((d) => ({ ...d, layout: { ...d.layout, latch: e.target.value as Latch } }))}
                    aria-describedby={describedBy("layout.latch")} className={`${inputClass(problemsOf("layout.latch").length > 0)} w-auto`}>
                    {LATCH_SIDES.map((s) => <option key={s} value={s}>{LATCH_WORDS[s]}</option>)}
                  </select>
                  {problemText("layout.latch")}
                </div>
              </div>
              <p role="status" className="text-sm">{notice?.where === "layout" ? notice.text : ""}</p>
              {problemText("layout")}
            </div>

            <div className="min-w-0">
              {hydrated ? (
                <div role="group" aria-label="Which side the drawing shows" className="mb-2 inline-flex overflow-hidden rounded border-2 border-ink">
                  {(["mating", "wire"] as const).map((v) => (
                    <button key={v} type="button" aria-pressed={view === v} onClick={() => setView(v)}
                      className={`px-3 py-1.5 font-semibold ${view === v ? "bg-ink text-paper" : "bg-white text-ink hover:bg-paper"}`}>
                      {v === "mating" ? "Mating face" : "Wire side"}
                    </button>
                  ))}
                </div>
              ) : null}
              <div className="rounded-md border border-rule bg-white p-2" data-testid="editor-face-view">
                {geometry.cavities.length > 0 ? (
                  <FaceView geometry={geometry} paint={paint} highlight={activeCavity}
                    caption={`${view === "mating" ? "Mating face" : "Wire side"} of ${draft.name.trim() || "this connector"}, as drawn so far`} />
                ) : (
                  <p className="p-4 text-sm text-muted">Give at least one cell a label to see the face view.</p>
                )}
              </div>
              <p className="mt-2 text-sm">
                {view === "mating" ? "Seen from the mating face." : "Seen from the wire side: the mirror image of the mating face."} Pin 1 is marked ▼; latch {LATCH_WORDS[draft.layout.latch] ?? draft.layout.latch}.
              </p>
            </div>
          </div>
        </section>

        <section id={editorFieldId("pins")} tabIndex={-1} aria-labelledby="ed-pins-heading" className="space-y-3">
          <h2 id="ed-pins-heading" className="text-xl font-bold">Pin map</h2>
          <p className="text-sm text-muted">
            One row per cavity. Write the colour as the factory does in this family&apos;s notation ({colourSystem.toUpperCase()}), base colour first, then the tracer: the decoded colour shows beside it.
          </p>
          {problemText("pins")}
          <p role="status" className="text-sm font-semibold">{notice?.where === "pins" ? notice.text : ""}</p>
          <ol className="space-y-3" aria-label="Pin map rows">
            {draft.pins.map((pin, i) => {
              const at = `pins.${i}`;
              const d = decoded[i];
              const card = pin.goesTo?.connector ? cards.get(pin.goesTo.connector) : undefined;
              const there = card ?? [];
              const goesCavity = pin.goesTo?.cavity ?? "";
              const statusId = `${editorFieldId(`${at}.code`)}-status`;
              const codeBad = Boolean(d && !d.ok) || problemsOf(`${at}.code`).length > 0;
              const terminalHint = pin.terminal && !isTerminalDesignation(pin.terminal) && problemsOf(`${at}.terminal`).length === 0;
              return (
                <li key={i} data-row={i} onFocus={() => setActiveRow(i)}
                  className={`rounded-md border bg-white p-3 ${activeRow === i ? "border-ink" : "border-rule"}`}>
                  <div role="group" aria-labelledby={`ed-pins-${i}-label`}
                    className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-[5.5rem_minmax(9rem,12rem)_minmax(8rem,1fr)_5.5rem_minmax(8rem,1fr)_6.5rem]">
                    <p id={`ed-pins-${i}-label`} className="text-sm font-bold sm:col-span-2 lg:col-span-6">
                      Row {i + 1}{pin.cavity.trim() ? ` · cavity ${pin.cavity}` : ""}{pin.cavity && pin.cavity === draft.layout.pin1 ? " ▼" : ""}
                    </p>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.cavity`)} className={LABEL}>Cavity</label>
                      <input id={editorFieldId(`${at}.cavity`)} name={`${at}.cavity`} value={pin.cavity} maxLength={12} list={cavityListId} autoComplete="off" spellCheck={false}
                        onChange={(e) => setPin(i, { cavity: e.target.value })} aria-invalid={problemsOf(`${at}.cavity`).length ? true : undefined}
                        aria-describedby={describedBy(`${at}.cavity`)} className={`${inputClass(problemsOf(`${at}.cavity`).length > 0)} font-mono`} />
                      {problemText(`${at}.cavity`)}
                    </div>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.code`)} className={LABEL}>Colour code</label>
                      <input id={editorFieldId(`${at}.code`)} name={`${at}.code`} value={pin.code ?? ""} maxLength={40} autoComplete="off" spellCheck={false}
                        placeholder="empty cavity" onChange={(e) => setPin(i, { code: e.target.value.trim() ? e.target.value : null })}
                        aria-invalid={codeBad ? true : undefined} aria-describedby={describedBy(`${at}.code`, statusId)}
                        className={`${inputClass(codeBad)} font-mono font-semibold`} />
                      <p id={statusId} role="status" aria-live="polite" className="mt-1 min-h-5 text-sm" data-decoded-for={at}>
                        {d === null ? null : d.ok ? (
                          <ColourChip baseHex={d.baseHex} tracerHexes={d.tracerHexes} words={d.words} />
                        ) : serverCodeProblem(i) ? null : (
                          <span className="font-semibold text-signal-dark">{d.message}</span>
                        )}
                      </p>
                      {problemText(`${at}.code`)}
                    </div>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.circuit`)} className={LABEL}>Circuit</label>
                      <input id={editorFieldId(`${at}.circuit`)} name={`${at}.circuit`} value={pin.circuit} maxLength={120} autoComplete="off"
                        onChange={(e) => setPin(i, { circuit: e.target.value })} aria-describedby={describedBy(`${at}.circuit`)}
                        className={inputClass(problemsOf(`${at}.circuit`).length > 0)} />
                      {problemText(`${at}.circuit`)}
                    </div>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.terminal`)} className={LABEL} title="DIN 72552 terminal designation">Terminal</label>
                      <input id={editorFieldId(`${at}.terminal`)} name={`${at}.terminal`} value={pin.terminal ?? ""} maxLength={8} autoComplete="off" spellCheck={false}
                        placeholder="15, 30, 31…" onChange={(e) => setPin(i, { terminal: e.target.value.trim() ? e.target.value : null })}
                        aria-invalid={problemsOf(`${at}.terminal`).length || terminalHint ? true : undefined}
                        aria-describedby={describedBy(`${at}.terminal`, terminalHint && `${editorFieldId(`${at}.terminal`)}-hint`)}
                        className={`${inputClass(problemsOf(`${at}.terminal`).length > 0 || Boolean(terminalHint))} font-mono`} />
                      {terminalHint ? <p id={`${editorFieldId(`${at}.terminal`)}-hint`} className="mt-1 text-sm text-signal-dark">Not a DIN 72552 number (e.g. 15, 30, 31).</p> : null}
                      {problemText(`${at}.terminal`)}
                    </div>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.goesToConnector`)} className={LABEL}>Goes to connector</label>
                      <select id={editorFieldId(`${at}.goesToConnector`)} name={`${at}.goesToConnector`} value={pin.goesTo?.connector ?? ""}
                        onChange={(e) => setGoesTo(i, "connector", e.target.value)} aria-describedby={describedBy(`${at}.goesTo`)}
                        aria-invalid={problemsOf(`${at}.goesTo`).length ? true : undefined} className={inputClass(problemsOf(`${at}.goesTo`).length > 0)}>
                        <option value="">—</option>
                        {pin.goesTo?.connector && !card ? <option value={pin.goesTo.connector}>{pin.goesTo.connector} (not in this family)</option> : null}
                        {familyCards.map((c) => <option key={c.slug} value={c.slug}>{c.name}</option>)}
                      </select>
                    </div>
                    <div>
                      <label htmlFor={editorFieldId(`${at}.goesToCavity`)} className={LABEL}>Its cavity</label>
                      {hydrated ? (
                        <select id={editorFieldId(`${at}.goesToCavity`)} name={`${at}.goesToCavity`} value={goesCavity} disabled={!pin.goesTo?.connector && !goesCavity}
                          onChange={(e) => setGoesTo(i, "cavity", e.target.value)} aria-describedby={describedBy(`${at}.goesTo`)}
                          className={`${inputClass(problemsOf(`${at}.goesTo`).length > 0)} font-mono`}>
                          <option value="">—</option>
                          {goesCavity && !there.includes(goesCavity) ? <option value={goesCavity}>{goesCavity} (not on that card)</option> : null}
                          {there.map((c) => <option key={c} value={c}>{c}</option>)}
                        </select>
                      ) : (
                        <>
                          <input id={editorFieldId(`${at}.goesToCavity`)} name={`${at}.goesToCavity`} value={goesCavity} maxLength={12} autoComplete="off" spellCheck={false}
                            list={there.length ? `ed-pins-${i}-goesToCavity-list` : undefined} onChange={(e) => setGoesTo(i, "cavity", e.target.value)}
                            aria-describedby={describedBy(`${at}.goesTo`)} className={`${inputClass(problemsOf(`${at}.goesTo`).length > 0)} font-mono`} />
                          {there.length ? (
                            <datalist id={`ed-pins-${i}-goesToCavity-list`}>{there.map((c) => <option key={c} value={c} />)}</datalist>
                          ) : null}
                        </>
                      )}
                    </div>
                    {problemsOf(`${at}.goesTo`).length ? <div className="sm:col-span-2 lg:col-span-6">{problemText(`${at}.goesTo`)}</div> : null}
                  </div>
                  <div className="mt-3 flex flex-wrap gap-2">
                    <button id={`ed-pins-${i}-up`} type="submit" name="intent" value={`move-up:${i}`} formNoValidate disabled={i === 0}
                      onClick={run(`move-up:${i}`, afterMove(i, "up"))} aria-label={`Move row ${i + 1} up`} className={SMALL_BUTTON}>↑ Up</button>
                    <button id={`ed-pins-${i}-down`} type="submit" name="intent" value={`move-down:${i}`} formNoValidate disabled={i === draft.pins.length - 1}
                      onClick={run(`move-down:${i}`, afterMove(i, "down"))} aria-label={`Move row ${i + 1} down`} className={SMALL_BUTTON}>↓ Down</button>
                    <button id={`ed-pins-${i}-remove`} type="submit" name="intent" value={`remove-row:${i}`} formNoValidate
                      onClick={run(`remove-row:${i}`, afterRemove("pins", i))} aria-label={`Remove row ${i + 1}`} className={SMALL_BUTTON}>Remove</button>
                  </div>
                </li>
              );
            })}
          </ol>
          <datalist id={cavityListId}>{layoutLabels.map((l) => <option key={l} value={l} />)}</datalist>
          <datalist id={pointListId}>{[...layoutLabels, ...SPEC_OFF_CARD_POINTS.filter((x) => !layoutLabels.includes(x))].map((l) => <option key={l} value={l} />)}</datalist>
          <div className="flex flex-wrap gap-2">
            <button id="ed-add-row" type="submit" name="intent" value="add-row" formNoValidate disabled={draft.pins.length >= LIMITS.pins}
              onClick={run("add-row", (next) => `ed-pins-${next.pins.length - 1}-cavity`)} className={BUTTON}>Add a row</button>
            <button type="submit" name="intent" value="sync-pins" formNoValidate onClick={run("sync-pins")} className={BUTTON}>Add a row per cavity</button>
          </div>

          <div className="rounded-md border border-rule bg-white p-3">
            <h3 className="font-bold"><label htmlFor="ed-paste">Paste from a spreadsheet</label></h3>
            <p id="ed-paste-hint" className="mt-1 text-sm text-muted">
              Copy the rows straight from a spreadsheet, or paste CSV. Columns: cavity, colour code, circuit, terminal — or start with a header row
              (cavity, colour, circuit, terminal, goes to connector, goes to cavity; a Loomlore CSV download works as it is).
            </p>
            <textarea id="ed-paste" name="paste" rows={4} value={paste} onChange={(e: ChangeEvent<HTMLTextAreaElement>) => setPaste(e.target.value)}
              aria-describedby="ed-paste-hint" spellCheck={false} className={`${inputClass(false)} font-mono text-sm`} />
            <div className="mt-2 flex flex-wrap items-end gap-3">
              <div>
                <label htmlFor="ed-pasteMode" className={LABEL}>The pasted rows</label>
                <select id="ed-pasteMode" name="pasteMode" value={pasteMode} onChange={(e) => setPasteMode(e.target.value === "append" ? "append" : "replace")} className={`${inputClass(false)} w-auto`}>
                  <option value="replace">replace the pin map</option>
                  <option value="append">go after the rows above</option>
                </select>
              </div>
              <button type="submit" name="intent" value="paste" formNoValidate onClick={run("paste")} className={BUTTON}>Read the pasted rows</button>
            </div>
            <p role="status" className="mt-2 text-sm">{notice?.where === "paste" ? notice.text : ""}</p>
          </div>
        </section>

        <section id={editorFieldId("specs")} tabIndex={-1} aria-labelledby="ed-specs-heading" className="space-y-3">
          <h2 id="ed-specs-heading" className="text-xl font-bold">What it should read</h2>
          <p className="text-sm text-muted">
            Values a rider can check with a meter, with the two cavities to measure between and the conditions that make the reading possible (a coil primary
            measured through the loom with the ignition off floats and reads open: say “plug apart, across the coil&apos;s own terminals”). Leave a row empty to drop it.
          </p>
          {problemText("specs")}
          <p role="status" className="text-sm font-semibold">{notice?.where === "specs" ? notice.text : ""}</p>
          {draft.specs.length > 0 ? (
            <ol className="space-y-3" aria-label="Spec rows">
              {draft.specs.map((s, i) => {
                const at = `specs.${i}`;
                const spec = (f: "name" | "unit" | "source" | "conditions", label: string, max: number, cls = "", hint?: string) => (
                  <div className={cls}>
                    <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>{label}</label>
                    <input id={editorFieldId(`${at}.${f}`)} name={`${at}.${f}`} value={s[f] ?? ""} maxLength={max} autoComplete="off" onChange={(e) => setSpec(i, { [f]: e.target.value })}
                      aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined}
                      aria-describedby={describedBy(`${at}.${f}`, hint && `${editorFieldId(`${at}.${f}`)}-hint`)} className={inputClass(problemsOf(`${at}.${f}`).length > 0)} />
                    {hint ? <p id={`${editorFieldId(`${at}.${f}`)}-hint`} className="mt-1 text-sm text-muted">{hint}</p> : null}
                    {problemText(`${at}.${f}`)}
                  </div>
                );
                // With no upper limit the greatest-value box is switched off once hydrated; without JavaScript it stays
                // usable (the server cannot re-enable it) and the ticked box wins when the form is read.
                const open = s.max === null;
                const num = (f: NumField, label: string) => (
                  <div>
                    <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>{label}</label>
                    <input id={editorFieldId(`${at}.${f}`)} name={`${at}.${f}`} inputMode="decimal" autoComplete="off" value={specText[i]?.[f] ?? numText(s[f])}
                      disabled={f === "max" && open && hydrated ? true : undefined}
                      onChange={(e) => setSpecNumber(i, f, e.target.value)} aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined}
                      aria-describedby={describedBy(`${at}.${f}`)} className={`${inputClass(problemsOf(`${at}.${f}`).length > 0)} font-mono`} />
                    {f === "max" ? (
                      <label htmlFor={editorFieldId(`${at}.open`)} className="mt-1 flex items-center gap-1.5 text-sm">
                        <input id={editorFieldId(`${at}.open`)} type="checkbox" name={`${at}.open`} value="1" checked={open}
                          onChange={(e) => setOpen(i, e.target.checked)} className="h-4 w-4" />
                        no upper limit (must read open)
                      </label>
                    ) : null}
                    {problemText(`${at}.${f}`)}
                  </div>
                );
                const choice = (f: "kind" | "material", label: string, value: string, options: readonly (readonly [string, string])[]) => (
                  <div className="sm:col-span-2 lg:col-span-2">
                    <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>{label}</label>
                    <select id={editorFieldId(`${at}.${f}`)} name={`${at}.${f}`} value={value} onChange={(e) => (f === "kind" ? setKind(i, e.target.value) : setSpec(i, { material: (e.target.value || null) as SpecMaterial | null }))}
                      aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined} aria-describedby={describedBy(`${at}.${f}`)} className={inputClass(problemsOf(`${at}.${f}`).length > 0)}>
                      {options.map(([v, words]) => <option key={v} value={v}>{words}</option>)}
                    </select>
                    {problemText(`${at}.${f}`)}
                  </div>
                );
                const between = (k: 0 | 1, label: string) => {
                  const name = `${at}.between${k === 0 ? "A" : "B"}`;
                  return (
                    <div>
                      <label htmlFor={editorFieldId(name)} className={LABEL}>{label}</label>
                      <input id={editorFieldId(name)} name={name} value={s.between[k]} maxLength={12} list={pointListId} autoComplete="off" spellCheck={false}
                        onChange={(e) => setSpec(i, { between: (k === 0 ? [e.target.value, s.between[1]] : [s.between[0], e.target.value]) as [string, string] })}
                        aria-describedby={describedBy(`${at}.between`)} className={`${inputClass(problemsOf(`${at}.between`).length > 0)} font-mono`} />
                    </div>
                  );
                };
                return (
                  <li key={i} className="rounded-md border border-rule bg-white p-3">
                    <div role="group" aria-labelledby={`ed-specs-${i}-label`} className="grid grid-cols-1 gap-3 sm:grid-cols-4 lg:grid-cols-8">
                      <p id={`ed-specs-${i}-label`} className="text-sm font-bold sm:col-span-4 lg:col-span-8">Spec {i + 1}</p>
                      {spec("name", "Measurement", 80, "sm:col-span-2 lg:col-span-2")}
                      {between(0, "Between (cavity, earth, HT, cap)")}
                      {between(1, "and")}
                      {num("min", "Least")}
                      {num("max", "Greatest")}
                      {spec("unit", "Unit", 12)}
                      {num("atC", "At °C")}
                      {choice("kind", "What it measures", specKindOf(s.kind), SPEC_KINDS.map((k) => [k, SPEC_KIND_LABELS[k]] as const))}
                      {choice("material", "Material (resistances)", s.material ?? "", [["", "not stated (the bench sheet reads the name)"], ...SPEC_MATERIALS.map((m) => [m, SPEC_MATERIAL_LABELS[m]] as const)])}
                      {spec("conditions", "Measured how (conditions)", LIMITS.conditions, "sm:col-span-4 lg:col-span-4",
                        "e.g. ignition off, plug apart, meter on the 2 kΩ range; or engine at 5000 rpm, headlamp on.")}
                      {spec("source", "Source (manual and page, or how measured)", 120, "sm:col-span-4 lg:col-span-8")}
                      {problemsOf(`${at}.between`).length ? <div className="sm:col-span-4 lg:col-span-8">{problemText(`${at}.between`)}</div> : null}
                    </div>
                    <div className="mt-3">
                      <button id={`ed-specs-${i}-remove`} type="submit" name="intent" value={`remove-spec:${i}`} formNoValidate
                        onClick={run(`remove-spec:${i}`, afterRemove("specs", i))} aria-label={`Remove spec ${i + 1}`} className={SMALL_BUTTON}>Remove</button>
                    </div>
                  </li>
                );
              })}
            </ol>
          ) : null}
          <button id="ed-add-spec" type="submit" name="intent" value="add-spec" formNoValidate disabled={draft.specs.length >= LIMITS.specs}
            onClick={run("add-spec", (next) => `ed-specs-${next.specs.length - 1}-name`)} className={BUTTON}>Add a spec</button>
        </section>

        <section aria-labelledby="ed-notes-heading" className="space-y-2">
          <h2 id="ed-notes-heading" className="text-xl font-bold"><label htmlFor={editorFieldId("notes")}>Notes</label></h2>
          <p id="ed-notes-hint" className="text-sm text-muted">
            Anything a rider should know: variants by year, what to look out for. Markdown is allowed (**bold**, lists, links); it is shown formatted once saved.
          </p>
          <textarea id={editorFieldId("notes")} name="notes" rows={6} maxLength={LIMITS.notes} value={draft.notes} onChange={(e) => setField("notes", e.target.value)}
            aria-describedby={describedBy("notes", "ed-notes-hint")} className={inputClass(problemsOf("notes").length > 0)} />
          {problemText("notes")}
        </section>
      </fieldset>
    </div>
  );
}

/** The editor's props, for pages that pass them through. */
export type ProposalEditorProps = Parameters<typeof ProposalEditor>[0];
