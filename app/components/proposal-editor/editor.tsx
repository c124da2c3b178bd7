import { useEffect, useRef, useState, type KeyboardEvent, type MouseEvent } from "react";
import type { ColourSystemId, HouseStyleId } from "~/domain/colours";
import { applyEditorIntent } from "~/domain/proposal-edits";
import { SYSTEM_KINDS, type CardProposal, type Problem, type ProposedPin, type ProposedSpec } from "~/domain/submissions";
import { LIMITS } from "~/domain/submissions";
import { specKindOf } from "~/domain/specs";
import { LABEL, decodeFor, editorFieldId, inputClass, readingOrder, type EditorKit, type FamilyCardOption, type Notice, type NumField } from "./fields";
import { LayoutGrid } from "./layout-grid";
import { PasteBox } from "./paste-box";
import { PinsTable } from "./pins-table";
import { editorProblems } from "./problems";
import { SpecsTable } from "./specs-table";

const SYSTEM_WORDS: Record<string, string> = {
  ignition: "Ignition",
  charging: "Charging",
  starting: "Starting",
  lighting: "Lighting",
  signals: "Signals",
  instruments: "Instruments",
};

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

  const { fromServer, problemsOf, serverCodeProblem } = editorProblems({ draft, proposal, problems, colourSystem, houseStyle, cards, specText });

  // ---- edits ---------------------------------------------------------------------------------------------------------
  const update = (f: (d: CardProposal) => CardProposal) => setDraft((d) => f(d));
  const setField = <K extends "name" | "location" | "housing" | "gender" | "system" | "matesWith" | "notes">(k: K, v: CardProposal[K]) =>
    update((d) => ({ ...d, [k]: v }));
  const setPin = (i: number, patch: Partial<ProposedPin>) => update((d) => ({ ...d, pins: d.pins.map((p, j) => (j === i ? { ...p, ...patch } : p)) }));
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
  const setSpec = (i: number, patch: Partial<ProposedSpec>) => update((d) => ({ ...d, specs: d.specs.map((s, j) => (j === i ? { ...s, ...patch } : s)) }));
  // Ticking "no upper limit" clears what was typed as the greatest value; unticking leaves the box empty to fill in.
  const setOpen = (i: number, open: boolean) => {
    setSpecText((t) => {
      const next = [...t];
      next[i] = { ...next[i], max: undefined };
      return next;
    });
    setSpec(i, { max: open ? null : Number.NaN });
  };
  // An insulation test must read open, so choosing it ticks "no upper limit" as well.
  const setKind = (i: number, value: string) => {
    const kind = specKindOf(value);
    setSpec(i, { kind });
    if (kind === "insulation") setOpen(i, true);
  };
  const setSpecNumber = (i: number, f: NumField, text: string) => {
    setSpecText((t) => {
      const next = [...t];
      next[i] = { ...next[i], [f]: text };
      return next;
    });
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
        {list.map((m, k) => (
          <p key={k}>{m}</p>
        ))}
      </div>
    );
  };
  const text = (name: "name" | "location" | "housing", label: string, hint: string, maxLength: number) => (
    <div>
      <label htmlFor={editorFieldId(name)} className={LABEL}>
        {label}
      </label>
      <input
        id={editorFieldId(name)}
        name={name}
        value={draft[name]}
        maxLength={maxLength}
        onChange={(e) => setField(name, e.target.value)}
        aria-invalid={problemsOf(name).length ? true : undefined}
        aria-describedby={describedBy(name, `${editorFieldId(name)}-hint`)}
        className={inputClass(problemsOf(name).length > 0)}
        autoComplete="off"
      />
      <p id={`${editorFieldId(name)}-hint`} className="mt-1 text-sm text-muted">
        {hint}
      </p>
      {problemText(name)}
    </div>
  );
  const kit: EditorKit = { problemsOf, describedBy, problemText, run };

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
          <h2 id="ed-about-heading" className="text-xl font-bold">
            The connector
          </h2>
          <div className="grid gap-4 sm:grid-cols-2">
            {text("name", "Name", "What riders call it, e.g. “Pickup coil plug”.", 120)}
            {text("location", "Where it sits", "Where to find it on the bike, e.g. “under the tank, left of the frame spine”.", LIMITS.text)}
            {text("housing", "Housing", "Shape and size of the housing, e.g. “4-way, 2 × 2, white nylon”.", LIMITS.text)}
            <div>
              <label htmlFor={editorFieldId("system")} className={LABEL}>
                System
              </label>
              <select
                id={editorFieldId("system")}
                name="system"
                value={draft.system}
                onChange={(e) => setField("system", e.target.value)}
                aria-describedby={describedBy("system")}
                className={inputClass(problemsOf("system").length > 0)}
              >
                {(SYSTEM_KINDS as readonly string[]).includes(draft.system) ? null : <option value={draft.system}>{draft.system || "Choose a system"}</option>}
                {SYSTEM_KINDS.map((k) => (
                  <option key={k} value={k}>
                    {SYSTEM_WORDS[k] ?? k}
                  </option>
                ))}
              </select>
              {problemText("system")}
            </div>
            <fieldset id={editorFieldId("gender")} tabIndex={-1} aria-describedby={describedBy("gender")} className="m-0 min-w-0 border-0 p-0">
              <legend className={LABEL}>This half is a</legend>
              <div className="mt-1 flex flex-wrap gap-4">
                {(["plug", "socket"] as const).map((g) => (
                  <label key={g} className="inline-flex items-center gap-2 py-1">
                    <input
                      type="radio"
                      name="gender"
                      value={g}
                      checked={draft.gender === g}
                      onChange={() => setField("gender", g)}
                      className="size-4 accent-ink"
                    />
                    {g === "plug" ? "Plug" : "Socket"}
                  </label>
                ))}
              </div>
              {problemText("gender")}
            </fieldset>
            <div>
              <label htmlFor={editorFieldId("matesWith")} className={LABEL}>
                Mates with
              </label>
              <select
                id={editorFieldId("matesWith")}
                name="matesWith"
                value={draft.matesWith ?? ""}
                onChange={(e) => setField("matesWith", e.target.value || null)}
                aria-describedby={describedBy("matesWith")}
                className={inputClass(problemsOf("matesWith").length > 0)}
              >
                <option value="">None, or not in the library yet</option>
                {draft.matesWith && !cards.has(draft.matesWith) ? <option value={draft.matesWith}>{draft.matesWith} (not in this family)</option> : null}
                {familyCards.map((c) => (
                  <option key={c.slug} value={c.slug}>
                    {c.name}
                  </option>
                ))}
              </select>
              {problemText("matesWith")}
            </div>
          </div>
        </section>
        <LayoutGrid
          kit={kit}
          draft={draft}
          grid={grid}
          setGrid={setGrid}
          setCell={setCell}
          update={update}
          layoutLabels={layoutLabels}
          decoded={decoded}
          activeRow={activeRow}
          hydrated={hydrated}
          notice={notice}
        />

        <PinsTable
          kit={kit}
          draft={draft}
          colourSystem={colourSystem}
          decoded={decoded}
          cards={cards}
          familyCards={familyCards}
          layoutLabels={layoutLabels}
          hydrated={hydrated}
          activeRow={activeRow}
          setActiveRow={setActiveRow}
          setPin={setPin}
          setGoesTo={setGoesTo}
          afterMove={afterMove}
          afterRemove={afterRemove}
          serverCodeProblem={serverCodeProblem}
          notice={notice}
        >
          <PasteBox run={run} paste={paste} setPaste={setPaste} pasteMode={pasteMode} setPasteMode={setPasteMode} notice={notice} />
        </PinsTable>

        <SpecsTable
          kit={kit}
          draft={draft}
          specText={specText}
          hydrated={hydrated}
          setSpec={setSpec}
          setSpecNumber={setSpecNumber}
          setOpen={setOpen}
          setKind={setKind}
          afterRemove={afterRemove}
          notice={notice}
        />

        <section aria-labelledby="ed-notes-heading" className="space-y-2">
          <h2 id="ed-notes-heading" className="text-xl font-bold">
            <label htmlFor={editorFieldId("notes")}>Notes</label>
          </h2>
          <p id="ed-notes-hint" className="text-sm text-muted">
            Anything a rider should know: variants by year, what to look out for. Markdown is allowed (**bold**, lists, links); it is shown formatted once
            saved.
          </p>
          <textarea
            id={editorFieldId("notes")}
            name="notes"
            rows={6}
            maxLength={LIMITS.notes}
            value={draft.notes}
            onChange={(e) => setField("notes", e.target.value)}
            aria-describedby={describedBy("notes", "ed-notes-hint")}
            className={inputClass(problemsOf("notes").length > 0)}
          />
          {problemText("notes")}
        </section>
      </fieldset>
    </div>
  );
}

/** The editor's props, for pages that pass them through. */
export type ProposalEditorProps = Parameters<typeof ProposalEditor>[0];
