import { SPEC_KIND_LABELS, SPEC_MATERIAL_LABELS, specKindOf, specRangeText } from "~/domain/specs";
import type { CardDiff, ProposedSpec } from "~/domain/submissions";
import { CELL, CHANGED_CELL, Mark, ROW_BAR, ROW_TINT, TABLE, WasProposed, cx } from "./marks";

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

export function SpecTable({ rows, caption }: { rows: CardDiff["specs"]; caption: string }) {
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
            <th scope="col" className={CELL}>
              What happens
            </th>
            {cols.map((c) => (
              <th key={c.key} scope="col" className={CELL}>
                {c.label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => {
            const a = row.after ? specCells(row.after) : null;
            const b = row.before ? specCells(row.before) : null;
            return (
              <tr
                key={i}
                data-spec={(row.after ?? row.before)?.name}
                data-change={row.change}
                className={cx("border-b border-rule align-top", ROW_TINT[row.change])}
              >
                <td className={cx(CELL, ROW_BAR[row.change])}>
                  <Mark change={row.change} />
                </td>
                {cols.map((c) => {
                  if (!a)
                    return (
                      <td key={c.key} className={CELL} data-field={c.key}>
                        <del className="decoration-2">{b![c.key]}</del>
                      </td>
                    );
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
