import { useId, type JSX, type ReactNode } from "react";
import { ColourChip } from "~/components/colour-chip";
import { FaceView } from "~/components/face-view";
import { faceGeometry, type FaceGeometry, type HousingLayout } from "~/domain/connector-face";
import { facePaint } from "~/domain/face-paint";
import { SYSTEM_NAMES, decodeColour, describeColour, swatch, type ColourSystemId, type HouseStyleId } from "~/domain/colours";
import { SPEC_KIND_LABELS, SPEC_MATERIAL_LABELS, specKindOf, specRangeText } from "~/domain/specs";
import type { CardDiff, PinDiffRow, ProposedPhoto, ProposedPin, ProposedSpec, RowChange } from "~/domain/submissions";

/**
 * What a submission changes against the published card, laid out for a moderator: published on the left, proposed on
 * the right. Every marking is a symbol and a word as well as a tint, so it reads on a phone, to a screen reader and in a
 * black-and-white print. Only `notesHtml` (already sanitised on the server) is inserted as HTML; everything else is text.
 */

/** Our words for a row's fate, each with a symbol that survives a monochrome print. */
const MARKS: Readonly<Record<RowChange, { symbol: string; word: string }>> = Object.freeze({
  added: { symbol: "+", word: "new row" },
  removed: { symbol: "−", word: "row taken out" },
  changed: { symbol: "Δ", word: "changed" },
  same: { symbol: "=", word: "unchanged" },
});

/** Row tints (our workshop palette: sky for what arrives, stone for what goes, the caution yellow for what moves). */
const ROW_TINT: Readonly<Record<RowChange, string>> = Object.freeze({
  added: "bg-sky-50",
  removed: "bg-stone-100 text-muted",
  changed: "bg-caution/60",
  same: "",
});

/** A bar down the row's first cell: solid for new, dashed for taken out, double for changed; none when unchanged. */
const ROW_BAR: Readonly<Record<RowChange, string>> = Object.freeze({
  added: "border-l-4 border-solid border-l-sky-700",
  removed: "border-l-4 border-dashed border-l-stone-500",
  changed: "border-l-4 border-double border-l-caution-edge",
  same: "border-l-4 border-solid border-l-transparent",
});

/** The same marks drawn on the face views: ring colour and dash pattern (in pitch units). */
const FACE_MARK: Readonly<Record<Exclude<RowChange, "same">, { stroke: string; dash: [number, number] | null }>> = Object.freeze({
  added: { stroke: "#0369a1", dash: null },
  removed: { stroke: "#57534e", dash: [0.12, 0.08] },
  changed: { stroke: "#8a6a04", dash: [0.04, 0.06] },
});

const FIELD_LABELS: Readonly<Record<CardDiff["fields"][number]["field"], string>> = Object.freeze({
  name: "Name",
  location: "Where it sits",
  housing: "Housing",
  gender: "Plug or socket",
  system: "System",
  matesWith: "Mates with",
});

const LATCH_WORDS = { top: "latch at the top", bottom: "latch at the bottom", left: "latch on the left", right: "latch on the right" } as const;

const CELL = "p-1.5 print:px-1 print:py-0.5";
const cx = (...parts: (string | false | null | undefined)[]) => parts.filter(Boolean).join(" ");
/** A cell whose value changed: framed, so it stands out without the tint (and in print). */
const CHANGED_CELL = "outline-2 -outline-offset-2 outline-caution-edge";
const TABLE = "mt-2 w-full border-collapse bg-white text-left text-[0.95rem] print:mt-1 print:text-[8pt] print:leading-tight";

/** A pin's colour decoded for display: swatches for the chip and the face, and the words. */
interface ColourView {
  code: string | null;
  baseHex: string | null;
  tracerHexes: string[];
  ink?: string;
  words: string;
}

/** How the family writes colours: its notation and its make's house within it. */
type Notation = { system: ColourSystemId; houseStyle: HouseStyleId | null };

function colourOf(code: string | null, notation: Notation): ColourView {
  if (!code) return { code: null, baseHex: null, tracerHexes: [], words: "empty cavity" };
  const d = decodeColour(code, notation.system, { houseStyle: notation.houseStyle });
  if (!d.ok) return { code, baseHex: null, tracerHexes: [], words: "not understood in this notation" };
  const [base, ...tracers] = d.value.colours;
  return {
    code,
    baseHex: base ? swatch(base).hex : null,
    ink: base ? swatch(base).ink : undefined,
    tracerHexes: tracers.map((c) => swatch(c).hex),
    words: describeColour(d.value),
  };
}


const goesToText = (g: ProposedPin["goesTo"]): string => (g ? `${g.connector}, cavity ${g.cavity}` : "—");
const orDash = (v: string | null | undefined): string => (v === null || v === undefined || v === "" ? "—" : v);

function layoutWords(l: HousingLayout): string {
  return `${l.rows}×${l.cols} grid, ${l.cavities.length} ${l.cavities.length === 1 ? "cavity" : "cavities"}, pin 1 is cavity ${l.pin1}, ${LATCH_WORDS[l.latch]}`;
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** The marking a row carries: symbol and word, never the tint alone. */
function Mark({ change, className = "" }: { change: RowChange; className?: string }) {
  const m = MARKS[change];
  return (
    <span data-mark={change} className={cx("inline-flex items-baseline gap-1 whitespace-nowrap", change === "same" ? "font-normal text-muted" : "font-semibold", className)}>
      <span aria-hidden="true" className="inline-block w-[1.1em] text-center font-bold">{m.symbol}</span>{" "}
      {m.word}
    </span>
  );
}

/** A changed value: the proposed one emphasised, the published one beside it, struck through after "was". */
function WasProposed({ proposed, was }: { proposed: ReactNode; was: ReactNode }) {
  return (
    <span className="block">
      <ins className="font-bold no-underline" data-proposed="true">{proposed}</ins>{" "}
      <span className="mt-0.5 block text-sm font-normal" data-was="true">
        was <del className="decoration-2">{was}</del>
      </span>
    </span>
  );
}

type PinField = "code" | "colour" | "circuit" | "terminal" | "goesTo";

/** One pin-map cell for a row of the comparison. */
function pinCell(row: PinDiffRow, field: PinField, notation: Notation): { node: ReactNode; changed: boolean } {
  const render = (p: ProposedPin): ReactNode => {
    switch (field) {
      case "code":
        return <code className="font-semibold">{orDash(p.code)}</code>;
      case "colour": {
        const c = colourOf(p.code, notation);
        return <ColourChip baseHex={c.baseHex} tracerHexes={c.tracerHexes} words={c.words} />;
      }
      case "circuit":
        return orDash(p.circuit);
      case "terminal":
        return orDash(p.terminal);
      case "goesTo":
        return goesToText(p.goesTo);
    }
  };
  if (row.change === "removed" && row.before) return { node: <del className="decoration-2">{render(row.before)}</del>, changed: false };
  if (!row.after) return { node: "—", changed: false };
  const source: keyof ProposedPin = field === "colour" ? "code" : field;
  const changed = row.change === "changed" && row.before !== null && row.fields.includes(source);
  if (changed) return { node: <WasProposed proposed={render(row.after)} was={render(row.before!)} />, changed: true };
  return { node: render(row.after), changed: false };
}

function PinTable({ rows, notation, caption, idFor }: { rows: PinDiffRow[]; notation: Notation; caption: string; idFor: (cavity: string) => string }) {
  const cols: { field: PinField; label: string; title?: string }[] = [
    { field: "code", label: "Code as written" },
    { field: "colour", label: "Colour" },
    { field: "circuit", label: "Circuit" },
    { field: "terminal", label: "Terminal", title: "DIN 72552 terminal designation" },
    { field: "goesTo", label: "Goes to" },
  ];
  return (
    <div className="overflow-x-auto">
      <table className={TABLE}>
        <caption className="sr-only">{caption}</caption>
        <thead className="border-b-2 border-ink">
          <tr>
            <th scope="col" className={CELL}>Cavity</th>
            <th scope="col" className={CELL}>What happens</th>
            {cols.map((c) => <th key={c.field} scope="col" className={CELL} title={c.title}>{c.label}</th>)}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => (
            <tr key={`${i}:${row.change}:${row.cavity}`} id={idFor(row.cavity)} data-cavity={row.cavity} data-change={row.change}
              className={cx("border-b border-rule align-top", ROW_TINT[row.change])}>
              <th scope="row" className={cx(CELL, ROW_BAR[row.change], "font-bold")}>
                {row.change === "removed" ? <del className="decoration-2">{row.cavity}</del> : row.cavity}
              </th>
              <td className={CELL}><Mark change={row.change} /></td>
              {cols.map((c) => {
                const cell = pinCell(row, c.field, notation);
                return (
                  <td key={c.field} className={cx(CELL, cell.changed && CHANGED_CELL)} data-field={c.field} data-changed={cell.changed ? "true" : undefined}>
                    {cell.node}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/**
 * Change rings over a FaceView, one per marked cavity. FaceView takes a single `highlight`; this overlay frames its
 * drawing the same way (same viewBox and sizing as face-view.tsx draws a full-size face) so several cavities can be
 * marked at once. Hidden from assistive technology: the same list is given in words under the drawing.
 */
function FaceMarks({ geometry: g, marks }: { geometry: FaceGeometry; marks: ReadonlyMap<string, Exclude<RowChange, "same">> }) {
  const p = g.pitch;
  const tab = 0.95 * p;
  const edge = 0.15 * p;
  const [left, right, top, bottom] = [g.latch === "left" ? tab : edge, g.latch === "right" ? tab : edge, g.latch === "top" ? tab : edge, g.latch === "bottom" ? tab : edge];
  const vb = [-g.width / 2 - left, -g.height / 2 - top, g.width + left + right, g.height + top + bottom];
  const fmt = (n: number) => String(Math.round(n * 1000) / 1000);
  const s = 0.52 * p; // cavity square of a full-size face
  const dy = -0.13 * p; // cavity sits in the upper part of its cell
  const half = s / 2 + 0.13 * p;
  return (
    <svg xmlns="http://www.w3.org/2000/svg" viewBox={vb.map(fmt).join(" ")} width="100%" aria-hidden="true" focusable="false"
      className="pointer-events-none absolute left-0 top-0 block" style={{ maxWidth: `min(100%, ${Math.round(vb[2] * 7)}px)`, height: "auto" }}>
      {g.cavities.filter((c) => marks.has(c.cavity)).map((c) => {
        const kind = marks.get(c.cavity)!;
        const m = FACE_MARK[kind];
        return (
          <g key={c.cavity} transform={`translate(${fmt(c.x)} ${fmt(c.y + dy)})`} data-face-mark={kind} data-cavity={c.cavity}>
            <rect x={fmt(-half)} y={fmt(-half)} width={fmt(2 * half)} height={fmt(2 * half)} rx={fmt(0.16 * s + 0.13 * p)} fill="none"
              stroke={m.stroke} strokeWidth={fmt(0.08 * p)} strokeDasharray={m.dash ? m.dash.map((d) => fmt(d * p)).join(" ") : undefined} />
            <circle cx={fmt(half)} cy={fmt(-half)} r={fmt(0.13 * p)} fill="#ffffff" stroke="#1b1b1b" strokeWidth={fmt(0.03 * p)} />
            <text x={fmt(half)} y={fmt(-half + 0.075 * p)} fontSize={fmt(0.2 * p)} fontWeight={800} textAnchor="middle" fill="#1b1b1b">{MARKS[kind].symbol}</text>
          </g>
        );
      })}
    </svg>
  );
}

function FacePanel(props: { label: string; cardName: string; layout: HousingLayout; pins: readonly ProposedPin[]; notation: Notation; marks: Map<string, Exclude<RowChange, "same">>; idFor: (cavity: string) => string }) {
  const { label, cardName, layout, pins, notation, marks, idFor } = props;
  const geometry = faceGeometry(layout);
  const inLayout = new Set(layout.cavities.map((c) => c.cavity));
  const listed = [...marks].filter(([cavity]) => inLayout.has(cavity));
  const paint = facePaint(pins, notation.system, notation.houseStyle).map((pc) => ({ ...pc, href: `#${encodeURIComponent(idFor(pc.cavity))}` }));
  return (
    <figure className="print-avoid-break min-w-0 rounded-md border border-rule bg-white p-2" data-face={label.toLowerCase()}>
      <figcaption className="mb-1 font-bold">{label}</figcaption>
      <div className="relative">
        <FaceView geometry={geometry} paint={paint} className="block" caption={`${label} mating face of ${cardName || "this card"}`} />
        {listed.length > 0 ? <FaceMarks geometry={geometry} marks={marks} /> : null}
      </div>
      <p className="mt-1 text-sm print:text-[8pt]">{layoutWords(layout)}.</p>
      <p className="mt-1 text-sm print:text-[8pt]" data-face-marks={listed.length}>
        {listed.length === 0 ? "No cavity marked here." : (
          <>Marked here:{" "}
            {listed.map(([cavity, kind], i) => (
              <span key={cavity}>{i > 0 ? "; " : ""}cavity <span className="font-semibold">{cavity}</span> ({MARKS[kind].symbol} {MARKS[kind].word})</span>
            ))}
          </>
        )}
      </p>
    </figure>
  );
}

function specCells(s: ProposedSpec) {
  const kind = specKindOf(s.kind);
  return {
    name: s.name,
    between: `${s.between[0]} – ${s.between[1]}`,
    range: specRangeText(s.min, s.max ?? null, s.unit),
    at: `${s.atC} °C`,
    // A moderator must see what a spec measures and under which conditions, or a changed condition slips through.
    what: [SPEC_KIND_LABELS[kind], s.material ? SPEC_MATERIAL_LABELS[s.material] : null].filter(Boolean).join(" · "),
    conditions: (s.conditions ?? "").trim() || "— (not stated)",
    source: s.source,
  };
}

function SpecTable({ rows, caption }: { rows: CardDiff["specs"]; caption: string }) {
  const cols = [
    { key: "name", label: "Measurement" },
    { key: "between", label: "Between cavities" },
    { key: "range", label: "Range" },
    { key: "at", label: "At" },
    { key: "what", label: "What it measures" },
    { key: "conditions", label: "Measured how" },
    { key: "source", label: "Source" },
  ] as const;
  return (
    <div className="overflow-x-auto">
      <table className={TABLE}>
        <caption className="sr-only">{caption}</caption>
        <thead className="border-b-2 border-ink">
          <tr>
            <th scope="col" className={CELL}>What happens</th>
            {cols.map((c) => <th key={c.key} scope="col" className={CELL}>{c.label}</th>)}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => {
            const a = row.after ? specCells(row.after) : null;
            const b = row.before ? specCells(row.before) : null;
            return (
              <tr key={i} data-spec={(row.after ?? row.before)?.name} data-change={row.change} className={cx("border-b border-rule align-top", ROW_TINT[row.change])}>
                <td className={cx(CELL, ROW_BAR[row.change])}><Mark change={row.change} /></td>
                {cols.map((c) => {
                  if (!a) return <td key={c.key} className={CELL} data-field={c.key}><del className="decoration-2">{b![c.key]}</del></td>;
                  const changed = row.change === "changed" && b !== null && b[c.key] !== a[c.key];
                  return (
                    <td key={c.key} className={cx(CELL, changed && CHANGED_CELL)} data-field={c.key} data-changed={changed ? "true" : undefined}>
                      {changed ? <WasProposed proposed={a[c.key]} was={b[c.key]} /> : a[c.key]}
                    </td>
                  );
                })}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function PhotoGroup(props: { title: string; change: "added" | "removed" | "kept"; photos: ProposedPhoto[]; startAt: number; photoUrl: (id: string, thumb: boolean) => string }) {
  const { title, change, photos, startAt, photoUrl } = props;
  if (photos.length === 0) return null;
  const mark = change === "added" ? { symbol: "+", word: "new photo" } : change === "removed" ? { symbol: "−", word: "photo taken out" } : { symbol: "=", word: "kept" };
  const tint = change === "added" ? "border-sky-700 border-solid" : change === "removed" ? "border-stone-500 border-dashed" : "border-rule border-solid";
  return (
    <div data-photos={change}>
      <h4 className="mt-3 font-semibold">{title} ({photos.length})</h4>
      <ul className="mt-1 grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4 print:grid-cols-4">
        {photos.map((ph, i) => {
          const alt = ph.caption.trim() || `Photo ${startAt + i}`;
          return (
            <li key={ph.id} className="print-avoid-break">
              <figure className={cx("rounded-md border-2 bg-white p-1.5", tint)} data-photo={ph.id} data-change={change}>
                <a href={photoUrl(ph.id, false)} className="block">
                  <img src={photoUrl(ph.id, true)} alt={alt} loading="lazy" className={cx("h-28 w-full object-cover", change === "removed" && "opacity-60 grayscale")} />
                </a>
                <figcaption className="mt-1 text-sm">
                  <span className="block font-semibold"><span aria-hidden="true">{mark.symbol} </span>{mark.word}</span>
                  {change === "removed" ? <del className="decoration-2">{ph.caption || `Photo ${startAt + i}`}</del> : <span>{ph.caption || `Photo ${startAt + i}`}</span>}
                  {ph.credit ? <span className="block text-muted">Credit: {ph.credit}</span> : null}
                </figcaption>
              </figure>
            </li>
          );
        })}
      </ul>
    </div>
  );
}

function NotesBox({ label, html }: { label: string; html: string }) {
  return (
    <div className="min-w-0 rounded-md border border-rule bg-white p-3" data-notes={label.toLowerCase()}>
      <h4 className="font-semibold">{label}</h4>
      {html ? <div className="prose prose-sm mt-1 max-w-none print:text-[8.5pt] print:leading-snug" dangerouslySetInnerHTML={{ __html: html }} /> : <p className="mt-1 text-muted">No notes.</p>}
    </div>
  );
}

/** The comparison a moderator reads before deciding: card fields, face views, pin map, specs, notes and photos. */
export function CardDiffView(props: {
  diff: CardDiff;
  colourSystem: ColourSystemId;
  /** The make's house style within that notation (null: the notation's usual reading). */
  houseStyle?: HouseStyleId | null;
  photoUrl: (id: string, thumb: boolean) => string;
  notesHtml: { before: string; after: string };
}): JSX.Element {
  const { diff, colourSystem, houseStyle = null, photoUrl, notesHtml } = props;
  const notation: Notation = { system: colourSystem, houseStyle };
  const uid = "cd" + useId().replace(/[^A-Za-z0-9_-]/g, "");
  const idFor = (cavity: string) => `${uid}-pin-${cavity}`;
  const isNew = diff.layout.before === null;

  if (!diff.any) {
    return (
      <section aria-labelledby={`${uid}-h`} className="rounded-md border border-rule bg-white p-4" data-diff="none">
        <h2 id={`${uid}-h`} className="text-xl font-bold">What this proposal changes</h2>
        <p className="mt-1 font-semibold" data-nothing-changed="true">
          <span aria-hidden="true">= </span>This proposal changes nothing: it matches the published card as it stands.
        </p>
      </section>
    );
  }

  const moved = diff.pins.filter((r) => r.change !== "same");
  const same = diff.pins.filter((r) => r.change === "same");
  const count = (c: RowChange) => diff.pins.filter((r) => r.change === c).length;
  const beforePins = diff.pins.flatMap((r) => (r.before ? [r.before] : []));
  const afterPins = diff.pins.flatMap((r) => (r.after ? [r.after] : []));
  const beforeMarks = new Map<string, Exclude<RowChange, "same">>();
  const afterMarks = new Map<string, Exclude<RowChange, "same">>();
  // Every row that moves is ringed on each face whose housing has that cavity: a new row on the published face marks a
  // cavity that was empty, a row taken out on the proposed face one that is left empty.
  for (const r of diff.pins) {
    if (r.change === "same") continue;
    beforeMarks.set(r.cavity, r.change);
    afterMarks.set(r.cavity, r.change);
  }
  const nameAfter = diff.fields.find((f) => f.field === "name")?.after;
  const nameBefore = diff.fields.find((f) => f.field === "name")?.before;
  const cardName = (nameAfter ?? "").trim();
  const specsMoved = diff.specs.filter((s) => s.change !== "same");
  const specsSame = diff.specs.filter((s) => s.change === "same");

  const rowWords: Record<Exclude<RowChange, "same">, (n: number) => string> = {
    added: (n) => plural(n, "new row", "new rows"),
    removed: (n) => `${plural(n, "row", "rows")} taken out`,
    changed: (n) => `${n} changed`,
  };
  const summary: string[] = [];
  if (!isNew && diff.fields.length) summary.push(plural(diff.fields.length, "card detail", "card details"));
  if (!isNew && diff.layout.changed) summary.push("the housing layout");
  if (moved.length) {
    const parts = (["added", "removed", "changed"] as const).filter((c) => count(c) > 0).map((c) => rowWords[c](count(c)));
    summary.push(isNew ? plural(moved.length, "pin-map row", "pin-map rows") : `${plural(moved.length, "pin-map row", "pin-map rows")} (${parts.join(", ")})`);
  }
  if (specsMoved.length) summary.push(plural(specsMoved.length, "spec", "specs"));
  if (diff.notes.changed && !isNew) summary.push("the notes");
  if (diff.photos.added.length) summary.push(isNew ? plural(diff.photos.added.length, "photo", "photos") : plural(diff.photos.added.length, "new photo", "new photos"));
  if (diff.photos.removed.length) summary.push(`${plural(diff.photos.removed.length, "photo", "photos")} taken out`);

  return (
    <section aria-labelledby={`${uid}-h`} className="space-y-5 print:space-y-3" data-diff={isNew ? "new-card" : "changes"}>
      <header>
        <h2 id={`${uid}-h`} className="text-xl font-bold print:text-base">What this proposal changes</h2>
        <p className="mt-1" data-summary="true">
          {isNew
            ? `A new card: there is no published version to compare with, so everything below is proposed${summary.length ? ` (${summary.join("; ")})` : ""}.`
            : `Against the published card it changes: ${summary.join("; ")}.`}
        </p>
        <p className="mt-1 text-sm text-muted print:text-[8pt]">
          Markings: <Mark change="added" />, <Mark change="removed" />, <Mark change="changed" /> (the proposed value in bold, the published one after “was”), <Mark change="same" />.
        </p>
      </header>

      {diff.fields.length > 0 ? (
        <section aria-labelledby={`${uid}-fields`}>
          <h3 id={`${uid}-fields`} className="text-lg font-bold print:text-sm">Card details</h3>
          <div className="overflow-x-auto">
            <table className={`${TABLE} max-w-3xl`}>
              <caption className="sr-only">{isNew ? "Card details proposed for the new card" : "Card details: published and proposed"}</caption>
              <thead className="border-b-2 border-ink">
                <tr>
                  <th scope="col" className={CELL}>Detail</th>
                  {isNew ? null : <th scope="col" className={CELL}>Published (was)</th>}
                  <th scope="col" className={CELL}>Proposed</th>
                </tr>
              </thead>
              <tbody>
                {diff.fields.map((f) => (
                  <tr key={f.field} data-field={f.field} className="border-b border-rule align-top">
                    <th scope="row" className={`${CELL} font-semibold`}>{FIELD_LABELS[f.field]}</th>
                    {isNew ? null : <td className={`${CELL} text-muted`}>{f.before === null ? "none" : <del className="decoration-2">{orDash(f.before)}</del>}</td>}
                    <td className={`${CELL} font-bold`}>{f.after === null ? "none" : <ins className="no-underline">{orDash(f.after)}</ins>}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}

      <section aria-labelledby={`${uid}-faces`}>
        <h3 id={`${uid}-faces`} className="text-lg font-bold print:text-sm">Face view</h3>
        <p className="text-sm print:text-[8pt]">
          Mating face, as the pin map colours it. Pin 1 is marked ▼. Cavities whose rows change are ringed, with the row&apos;s symbol beside them.
          {!isNew ? (diff.layout.changed ? " The housing layout changes." : " The housing layout stays the same.") : null}
        </p>
        <div className={cx("mt-2 grid gap-4", isNew ? "max-w-md" : "sm:grid-cols-2 print:grid-cols-2")}>
          {!isNew && diff.layout.before ? (
            <FacePanel label="Published" cardName={(nameBefore ?? cardName) || ""} layout={diff.layout.before} pins={beforePins} notation={notation} marks={beforeMarks} idFor={idFor} />
          ) : null}
          <FacePanel label="Proposed" cardName={cardName} layout={diff.layout.after} pins={afterPins} notation={notation} marks={afterMarks} idFor={idFor} />
        </div>
      </section>

      <section aria-labelledby={`${uid}-pins`} className="min-w-0">
        <h3 id={`${uid}-pins`} className="text-lg font-bold print:text-sm">Pin map</h3>
        {moved.length > 0 ? (
          <PinTable rows={moved} notation={notation} idFor={idFor}
            caption={isNew ? "Pin map rows of the new card" : "Pin map rows this proposal changes, with the published value after “was”"} />
        ) : (
          <p className="mt-1" data-pins-unchanged="true">No pin-map row changes.</p>
        )}
        {same.length > 0 ? (
          <details className="mt-2" data-unchanged-rows={same.length}>
            <summary className="cursor-pointer font-semibold underline">{plural(same.length, "unchanged row", "unchanged rows")}: show</summary>
            <PinTable rows={same} notation={notation} idFor={idFor} caption="Pin map rows this proposal leaves as they are" />
          </details>
        ) : null}
        <p className="mt-1 text-xs text-muted">Codes in {SYSTEM_NAMES[colourSystem]}, base colour first.</p>
      </section>

      {diff.specs.length > 0 ? (
        <section aria-labelledby={`${uid}-specs`}>
          <h3 id={`${uid}-specs`} className="text-lg font-bold print:text-sm">What it should read</h3>
          {specsMoved.length > 0 ? <SpecTable rows={specsMoved} caption="Spec values this proposal changes" /> : <p className="mt-1">No spec value changes.</p>}
          {specsSame.length > 0 ? (
            <details className="mt-2" data-unchanged-specs={specsSame.length}>
              <summary className="cursor-pointer font-semibold underline">{plural(specsSame.length, "unchanged spec", "unchanged specs")}: show</summary>
              <SpecTable rows={specsSame} caption="Spec values this proposal leaves as they are" />
            </details>
          ) : null}
        </section>
      ) : null}

      <section aria-labelledby={`${uid}-notes`}>
        <h3 id={`${uid}-notes`} className="text-lg font-bold print:text-sm">Notes</h3>
        {isNew ? (
          <div className="mt-2 max-w-3xl"><NotesBox label="Proposed" html={notesHtml.after} /></div>
        ) : diff.notes.changed ? (
          <div className="mt-2 grid gap-4 sm:grid-cols-2 print:grid-cols-2" data-notes-changed="true">
            <NotesBox label="Published" html={notesHtml.before} />
            <NotesBox label="Proposed" html={notesHtml.after} />
          </div>
        ) : (
          <p className="mt-1" data-notes-changed="false">The notes do not change.</p>
        )}
      </section>

      <section aria-labelledby={`${uid}-photos`}>
        <h3 id={`${uid}-photos`} className="text-lg font-bold print:text-sm">Photos</h3>
        {diff.photos.added.length + diff.photos.removed.length + diff.photos.kept.length === 0 ? <p className="mt-1">No photos, before or after.</p> : (
          <>
            {diff.photos.added.length === 0 && diff.photos.removed.length === 0 ? <p className="mt-1">The photos do not change.</p> : null}
            <PhotoGroup title="New photos" change="added" photos={diff.photos.added} startAt={1} photoUrl={photoUrl} />
            <PhotoGroup title="Photos taken out" change="removed" photos={diff.photos.removed} startAt={1 + diff.photos.added.length} photoUrl={photoUrl} />
            <PhotoGroup title="Photos kept" change="kept" photos={diff.photos.kept} startAt={1 + diff.photos.added.length + diff.photos.removed.length} photoUrl={photoUrl} />
          </>
        )}
      </section>
    </section>
  );
}
