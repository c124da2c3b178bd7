import { useState, type Dispatch, type SetStateAction } from "react";
import { FaceView, type FaceCavityPaint } from "../face-view";
import { faceGeometry, type FaceSide, type HousingLayout, type Latch } from "~/domain/connector-face";
import { LATCH_SIDES, LIMITS, type CardProposal, type ProposedPin } from "~/domain/submissions";
import { BUTTON, LABEL, editorFieldId, inputClass, type Decoded, type EditorKit, type Notice } from "./fields";

const LATCH_WORDS: Record<Latch, string> = { top: "at the top", bottom: "at the bottom", left: "on the left", right: "on the right" };

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

/** The housing layout: the grid of cavity labels, pin 1 and the latch, beside the face view as drawn so far. */
export function LayoutGrid(props: {
  kit: EditorKit;
  draft: CardProposal;
  grid: { rows: string; cols: string };
  setGrid: Dispatch<SetStateAction<{ rows: string; cols: string }>>;
  setCell: (row: number, col: number, text: string) => void;
  update: (f: (d: CardProposal) => CardProposal) => void;
  layoutLabels: string[];
  decoded: (Decoded | null)[];
  activeRow: number | null;
  hydrated: boolean;
  notice: Notice;
}) {
  const {
    kit: { problemsOf, describedBy, problemText, run },
    draft,
    grid,
    setGrid,
    setCell,
    update,
    layoutLabels,
    decoded,
    activeRow,
    hydrated,
    notice,
  } = props;
  const [view, setView] = useState<FaceSide>("mating");
  const geometry = faceGeometry(drawableLayout(draft.layout), { view });
  const paint = paintOf(draft.pins, decoded);
  const activeCavity = activeRow !== null ? (draft.pins[activeRow]?.cavity ?? null) : null;
  return (
    <section id={editorFieldId("layout")} tabIndex={-1} aria-labelledby="ed-layout-heading" className="space-y-3">
      <h2 id="ed-layout-heading" className="text-xl font-bold">
        Housing layout
      </h2>
      <p className="text-sm text-muted">
        Type each cavity&apos;s label into its cell as you see it <strong>looking into the mating face</strong>; leave a cell empty where the housing has no
        cavity.
      </p>
      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_minmax(260px,380px)]">
        <div className="min-w-0 space-y-3">
          <div className="flex flex-wrap items-end gap-3">
            {(["rows", "cols"] as const).map((k) => (
              <div key={k}>
                <label htmlFor={editorFieldId(`layout.${k}`)} className={LABEL}>
                  {k === "rows" ? "Rows" : "Columns"}
                </label>
                <input
                  id={editorFieldId(`layout.${k}`)}
                  name={`layout.${k}`}
                  type="number"
                  inputMode="numeric"
                  min={1}
                  max={k === "rows" ? LIMITS.rows : LIMITS.cols}
                  value={grid[k]}
                  onChange={(e) => setGrid((g) => ({ ...g, [k]: e.target.value }))}
                  aria-describedby={describedBy(`layout.${k}`)}
                  className={`${inputClass(problemsOf(`layout.${k}`).length > 0)} w-20`}
                />
              </div>
            ))}
            <button type="submit" name="intent" value="layout" formNoValidate onClick={run("layout")} className={BUTTON}>
              Redraw the grid
            </button>
          </div>
          {problemText("layout.rows")}
          {problemText("layout.cols")}
          <div className="overflow-x-auto pb-1">
            <table className="border-separate border-spacing-1">
              <caption className="sr-only">Cavity labels by row and column, as seen looking into the mating face</caption>
              <thead>
                <tr>
                  <td />
                  {Array.from({ length: draft.layout.cols }, (_, c) => (
                    <th key={c} scope="col" className="text-center text-xs font-semibold text-muted">
                      {c + 1}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {Array.from({ length: draft.layout.rows }, (_, r) => (
                  <tr key={r}>
                    <th scope="row" className="pr-1 text-right text-xs font-semibold text-muted">
                      {r + 1}
                    </th>
                    {Array.from({ length: draft.layout.cols }, (_, c) => {
                      const cell = draft.layout.cavities.find((x) => x.row === r + 1 && x.col === c + 1);
                      const name = `layout.cell.${r + 1}.${c + 1}`;
                      return (
                        <td key={c}>
                          <input
                            id={editorFieldId(name)}
                            name={name}
                            value={cell?.cavity ?? ""}
                            maxLength={12}
                            onChange={(e) => setCell(r + 1, c + 1, e.target.value)}
                            aria-label={`Cavity label, row ${r + 1}, column ${c + 1}`}
                            autoComplete="off"
                            spellCheck={false}
                            className={`w-12 rounded border-2 px-1 py-1 text-center font-mono text-base ${cell ? "border-ink bg-white" : "border-dashed border-rule bg-paper"}`}
                          />
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
              <label htmlFor={editorFieldId("layout.pin1")} className={LABEL}>
                Pin 1
              </label>
              <select
                id={editorFieldId("layout.pin1")}
                name="layout.pin1"
                value={draft.layout.pin1}
                onChange={(e) => update((d) => ({ ...d, layout: { ...d.layout, pin1: e.target.value } }))}
                aria-describedby={describedBy("layout.pin1")}
                className={`${inputClass(problemsOf("layout.pin1").length > 0)} w-auto min-w-24`}
              >
                {layoutLabels.includes(draft.layout.pin1) ? null : (
                  <option value={draft.layout.pin1}>{draft.layout.pin1 ? `${draft.layout.pin1} (not in the grid)` : "Choose…"}</option>
                )}
                {layoutLabels.map((l) => (
                  <option key={l} value={l}>
                    {l}
                  </option>
                ))}
              </select>
              {problemText("layout.pin1")}
            </div>
            <div>
              <label htmlFor={editorFieldId("layout.latch")} className={LABEL}>
                Latch
              </label>
              <select
                id={editorFieldId("layout.latch")}
                name="layout.latch"
                value={draft.layout.latch}
                onChange={(e) => update((d) => ({ ...d, layout: { ...d.layout, latch: e.target.value as Latch } }))}
                aria-describedby={describedBy("layout.latch")}
                className={`${inputClass(problemsOf("layout.latch").length > 0)} w-auto`}
              >
                {LATCH_SIDES.map((s) => (
                  <option key={s} value={s}>
                    {LATCH_WORDS[s]}
                  </option>
                ))}
              </select>
              {problemText("layout.latch")}
            </div>
          </div>
          <p role="status" className="text-sm">
            {notice?.where === "layout" ? notice.text : ""}
          </p>
          {problemText("layout")}
        </div>

        <div className="min-w-0">
          {hydrated ? (
            <div role="group" aria-label="Which side the drawing shows" className="mb-2 inline-flex overflow-hidden rounded border-2 border-ink">
              {(["mating", "wire"] as const).map((v) => (
                <button
                  key={v}
                  type="button"
                  aria-pressed={view === v}
                  onClick={() => setView(v)}
                  className={`px-3 py-1.5 font-semibold ${view === v ? "bg-ink text-paper" : "bg-white text-ink hover:bg-paper"}`}
                >
                  {v === "mating" ? "Mating face" : "Wire side"}
                </button>
              ))}
            </div>
          ) : null}
          <div className="rounded-md border border-rule bg-white p-2" data-testid="editor-face-view">
            {geometry.cavities.length > 0 ? (
              <FaceView
                geometry={geometry}
                paint={paint}
                highlight={activeCavity}
                caption={`${view === "mating" ? "Mating face" : "Wire side"} of ${draft.name.trim() || "this connector"}, as drawn so far`}
              />
            ) : (
              <p className="p-4 text-sm text-muted">Give at least one cell a label to see the face view.</p>
            )}
          </div>
          <p className="mt-2 text-sm">
            {view === "mating" ? "Seen from the mating face." : "Seen from the wire side: the mirror image of the mating face."} Pin 1 is marked ▼; latch{" "}
            {LATCH_WORDS[draft.layout.latch] ?? draft.layout.latch}.
          </p>
        </div>
      </div>
    </section>
  );
}
