import type { ReactNode } from "react";
import { ColourChip } from "../colour-chip";
import type { ColourSystemId } from "~/domain/colours";
import { LIMITS, isTerminalDesignation, type CardProposal, type ProposedPin } from "~/domain/submissions";
import { SPEC_OFF_CARD_POINTS } from "~/domain/specs";
import {
  BUTTON,
  LABEL,
  SMALL_BUTTON,
  cavityListId,
  editorFieldId,
  inputClass,
  pointListId,
  type Decoded,
  type EditorKit,
  type FamilyCardOption,
  type Notice,
} from "./fields";

/**
 * The pin map: one row per cavity with its colour decoded as it is typed, the row buttons, and the two lists the cavity
 * boxes offer. `children` (the paste box) ends the section.
 */
export function PinsTable(props: {
  kit: EditorKit;
  draft: CardProposal;
  colourSystem: ColourSystemId;
  decoded: (Decoded | null)[];
  cards: Map<string, string[]>;
  familyCards: FamilyCardOption[];
  layoutLabels: string[];
  hydrated: boolean;
  activeRow: number | null;
  setActiveRow: (i: number) => void;
  setPin: (i: number, patch: Partial<ProposedPin>) => void;
  setGoesTo: (i: number, part: "connector" | "cavity", value: string) => void;
  afterMove: (from: number, dir: "up" | "down") => (next: CardProposal) => string;
  afterRemove: (kind: "pins" | "specs", i: number) => (next: CardProposal) => string;
  serverCodeProblem: (i: number) => boolean;
  notice: Notice;
  children?: ReactNode;
}) {
  const {
    kit: { problemsOf, describedBy, problemText, run },
    draft,
    colourSystem,
    decoded,
    cards,
    familyCards,
    layoutLabels,
    hydrated,
    activeRow,
    setActiveRow,
  } = props;
  const { setPin, setGoesTo, afterMove, afterRemove, serverCodeProblem, notice, children } = props;
  return (
    <section id={editorFieldId("pins")} tabIndex={-1} aria-labelledby="ed-pins-heading" className="space-y-3">
      <h2 id="ed-pins-heading" className="text-xl font-bold">
        Pin map
      </h2>
      <p className="text-sm text-muted">
        One row per cavity. Write the colour as the factory does in this family&apos;s notation ({colourSystem.toUpperCase()}), base colour first, then the
        tracer: the decoded colour shows beside it.
      </p>
      {problemText("pins")}
      <p role="status" className="text-sm font-semibold">
        {notice?.where === "pins" ? notice.text : ""}
      </p>
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
            <li
              key={i}
              data-row={i}
              onFocus={() => setActiveRow(i)}
              className={`rounded-md border bg-white p-3 ${activeRow === i ? "border-ink" : "border-rule"}`}
            >
              <div
                role="group"
                aria-labelledby={`ed-pins-${i}-label`}
                className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-[5.5rem_minmax(9rem,12rem)_minmax(8rem,1fr)_5.5rem_minmax(8rem,1fr)_6.5rem]"
              >
                <p id={`ed-pins-${i}-label`} className="text-sm font-bold sm:col-span-2 lg:col-span-6">
                  Row {i + 1}
                  {pin.cavity.trim() ? ` · cavity ${pin.cavity}` : ""}
                  {pin.cavity && pin.cavity === draft.layout.pin1 ? " ▼" : ""}
                </p>
                <div>
                  <label htmlFor={editorFieldId(`${at}.cavity`)} className={LABEL}>
                    Cavity
                  </label>
                  <input
                    id={editorFieldId(`${at}.cavity`)}
                    name={`${at}.cavity`}
                    value={pin.cavity}
                    maxLength={12}
                    list={cavityListId}
                    autoComplete="off"
                    spellCheck={false}
                    onChange={(e) => setPin(i, { cavity: e.target.value })}
                    aria-invalid={problemsOf(`${at}.cavity`).length ? true : undefined}
                    aria-describedby={describedBy(`${at}.cavity`)}
                    className={`${inputClass(problemsOf(`${at}.cavity`).length > 0)} font-mono`}
                  />
                  {problemText(`${at}.cavity`)}
                </div>
                <div>
                  <label htmlFor={editorFieldId(`${at}.code`)} className={LABEL}>
                    Colour code
                  </label>
                  <input
                    id={editorFieldId(`${at}.code`)}
                    name={`${at}.code`}
                    value={pin.code ?? ""}
                    maxLength={40}
                    autoComplete="off"
                    spellCheck={false}
                    placeholder="empty cavity"
                    onChange={(e) => setPin(i, { code: e.target.value.trim() ? e.target.value : null })}
                    aria-invalid={codeBad ? true : undefined}
                    aria-describedby={describedBy(`${at}.code`, statusId)}
                    className={`${inputClass(codeBad)} font-mono font-semibold`}
                  />
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
                  <label htmlFor={editorFieldId(`${at}.circuit`)} className={LABEL}>
                    Circuit
                  </label>
                  <input
                    id={editorFieldId(`${at}.circuit`)}
                    name={`${at}.circuit`}
                    value={pin.circuit}
                    maxLength={120}
                    autoComplete="off"
                    onChange={(e) => setPin(i, { circuit: e.target.value })}
                    aria-describedby={describedBy(`${at}.circuit`)}
                    className={inputClass(problemsOf(`${at}.circuit`).length > 0)}
                  />
                  {problemText(`${at}.circuit`)}
                </div>
                <div>
                  <label htmlFor={editorFieldId(`${at}.terminal`)} className={LABEL} title="DIN 72552 terminal designation">
                    Terminal
                  </label>
                  <input
                    id={editorFieldId(`${at}.terminal`)}
                    name={`${at}.terminal`}
                    value={pin.terminal ?? ""}
                    maxLength={8}
                    autoComplete="off"
                    spellCheck={false}
                    placeholder="15, 30, 31…"
                    onChange={(e) => setPin(i, { terminal: e.target.value.trim() ? e.target.value : null })}
                    aria-invalid={problemsOf(`${at}.terminal`).length || terminalHint ? true : undefined}
                    aria-describedby={describedBy(`${at}.terminal`, terminalHint && `${editorFieldId(`${at}.terminal`)}-hint`)}
                    className={`${inputClass(problemsOf(`${at}.terminal`).length > 0 || Boolean(terminalHint))} font-mono`}
                  />
                  {terminalHint ? (
                    <p id={`${editorFieldId(`${at}.terminal`)}-hint`} className="mt-1 text-sm text-signal-dark">
                      Not a DIN 72552 number (e.g. 15, 30, 31).
                    </p>
                  ) : null}
                  {problemText(`${at}.terminal`)}
                </div>
                <div>
                  <label htmlFor={editorFieldId(`${at}.goesToConnector`)} className={LABEL}>
                    Goes to connector
                  </label>
                  <select
                    id={editorFieldId(`${at}.goesToConnector`)}
                    name={`${at}.goesToConnector`}
                    value={pin.goesTo?.connector ?? ""}
                    onChange={(e) => setGoesTo(i, "connector", e.target.value)}
                    aria-describedby={describedBy(`${at}.goesTo`)}
                    aria-invalid={problemsOf(`${at}.goesTo`).length ? true : undefined}
                    className={inputClass(problemsOf(`${at}.goesTo`).length > 0)}
                  >
                    <option value="">—</option>
                    {pin.goesTo?.connector && !card ? <option value={pin.goesTo.connector}>{pin.goesTo.connector} (not in this family)</option> : null}
                    {familyCards.map((c) => (
                      <option key={c.slug} value={c.slug}>
                        {c.name}
                      </option>
                    ))}
                  </select>
                </div>
                <div>
                  <label htmlFor={editorFieldId(`${at}.goesToCavity`)} className={LABEL}>
                    Its cavity
                  </label>
                  {hydrated ? (
                    <select
                      id={editorFieldId(`${at}.goesToCavity`)}
                      name={`${at}.goesToCavity`}
                      value={goesCavity}
                      disabled={!pin.goesTo?.connector && !goesCavity}
                      onChange={(e) => setGoesTo(i, "cavity", e.target.value)}
                      aria-describedby={describedBy(`${at}.goesTo`)}
                      className={`${inputClass(problemsOf(`${at}.goesTo`).length > 0)} font-mono`}
                    >
                      <option value="">—</option>
                      {goesCavity && !there.includes(goesCavity) ? <option value={goesCavity}>{goesCavity} (not on that card)</option> : null}
                      {there.map((c) => (
                        <option key={c} value={c}>
                          {c}
                        </option>
                      ))}
                    </select>
                  ) : (
                    <>
                      <input
                        id={editorFieldId(`${at}.goesToCavity`)}
                        name={`${at}.goesToCavity`}
                        value={goesCavity}
                        maxLength={12}
                        autoComplete="off"
                        spellCheck={false}
                        list={there.length ? `ed-pins-${i}-goesToCavity-list` : undefined}
                        onChange={(e) => setGoesTo(i, "cavity", e.target.value)}
                        aria-describedby={describedBy(`${at}.goesTo`)}
                        className={`${inputClass(problemsOf(`${at}.goesTo`).length > 0)} font-mono`}
                      />
                      {there.length ? (
                        <datalist id={`ed-pins-${i}-goesToCavity-list`}>
                          {there.map((c) => (
                            <option key={c} value={c} />
                          ))}
                        </datalist>
                      ) : null}
                    </>
                  )}
                </div>
                {problemsOf(`${at}.goesTo`).length ? <div className="sm:col-span-2 lg:col-span-6">{problemText(`${at}.goesTo`)}</div> : null}
              </div>
              <div className="mt-3 flex flex-wrap gap-2">
                <button
                  id={`ed-pins-${i}-up`}
                  type="submit"
                  name="intent"
                  value={`move-up:${i}`}
                  formNoValidate
                  disabled={i === 0}
                  onClick={run(`move-up:${i}`, afterMove(i, "up"))}
                  aria-label={`Move row ${i + 1} up`}
                  className={SMALL_BUTTON}
                >
                  ↑ Up
                </button>
                <button
                  id={`ed-pins-${i}-down`}
                  type="submit"
                  name="intent"
                  value={`move-down:${i}`}
                  formNoValidate
                  disabled={i === draft.pins.length - 1}
                  onClick={run(`move-down:${i}`, afterMove(i, "down"))}
                  aria-label={`Move row ${i + 1} down`}
                  className={SMALL_BUTTON}
                >
                  ↓ Down
                </button>
                <button
                  id={`ed-pins-${i}-remove`}
                  type="submit"
                  name="intent"
                  value={`remove-row:${i}`}
                  formNoValidate
                  onClick={run(`remove-row:${i}`, afterRemove("pins", i))}
                  aria-label={`Remove row ${i + 1}`}
                  className={SMALL_BUTTON}
                >
                  Remove
                </button>
              </div>
            </li>
          );
        })}
      </ol>
      <datalist id={cavityListId}>
        {layoutLabels.map((l) => (
          <option key={l} value={l} />
        ))}
      </datalist>
      <datalist id={pointListId}>
        {[...layoutLabels, ...SPEC_OFF_CARD_POINTS.filter((x) => !layoutLabels.includes(x))].map((l) => (
          <option key={l} value={l} />
        ))}
      </datalist>
      <div className="flex flex-wrap gap-2">
        <button
          id="ed-add-row"
          type="submit"
          name="intent"
          value="add-row"
          formNoValidate
          disabled={draft.pins.length >= LIMITS.pins}
          onClick={run("add-row", (next) => `ed-pins-${next.pins.length - 1}-cavity`)}
          className={BUTTON}
        >
          Add a row
        </button>
        <button type="submit" name="intent" value="sync-pins" formNoValidate onClick={run("sync-pins")} className={BUTTON}>
          Add a row per cavity
        </button>
      </div>

      {children}
    </section>
  );
}
