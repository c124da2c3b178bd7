import type { ReactNode } from "react";
import { ColourChip } from "~/components/colour-chip";
import { decodeColour, describeColour, swatch } from "~/domain/colours";
import type { PinDiffRow, ProposedPin } from "~/domain/submissions";
import { CELL, CHANGED_CELL, Mark, ROW_BAR, ROW_TINT, TABLE, WasProposed, cx, orDash, type Notation } from "./marks";

/** A pin's colour decoded for display: swatches for the chip and the face, and the words. */
interface ColourView {
  code: string | null;
  baseHex: string | null;
  tracerHexes: string[];
  ink?: string;
  words: string;
}

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

export function PinTable({ rows, notation, caption, idFor }: { rows: PinDiffRow[]; notation: Notation; caption: string; idFor: (cavity: string) => string }) {
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
            <th scope="col" className={CELL}>
              Cavity
            </th>
            <th scope="col" className={CELL}>
              What happens
            </th>
            {cols.map((c) => (
              <th key={c.field} scope="col" className={CELL} title={c.title}>
                {c.label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => (
            <tr
              key={`${i}:${row.change}:${row.cavity}`}
              id={idFor(row.cavity)}
              data-cavity={row.cavity}
              data-change={row.change}
              className={cx("border-b border-rule align-top", ROW_TINT[row.change])}
            >
              <th scope="row" className={cx(CELL, ROW_BAR[row.change], "font-bold")}>
                {row.change === "removed" ? <del className="decoration-2">{row.cavity}</del> : row.cavity}
              </th>
              <td className={CELL}>
                <Mark change={row.change} />
              </td>
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
