import { SPEC_KIND_LABELS, specKindOf } from "~/domain/specs";

/** One value to measure on a card (the card's `specs`). */
export interface CardSpec {
  name: string;
  between: [string, string];
  min: number;
  max: number | null;
  unit: string;
  atC: number | null;
  source: string;
  conditions: string | null;
  kind: string | null;
}

/**
 * The card's "What it should read" table. On paper, conditions every reading shares (`sharedConditions`) are printed
 * once above the table and each row keeps only its own (`ownConditions`).
 */
export function CardSpecs({ specs, sharedConditions, ownConditions }: { specs: CardSpec[]; sharedConditions: string | null; ownConditions: string[] }) {
  return (
    <section aria-labelledby="specs-heading" className="print-avoid-break">
      <h2 id="specs-heading" className="text-xl font-bold print:text-base">
        What it should read
      </h2>
      {/* On paper, conditions every reading shares are printed once above the table rather than on every row. */}
      {sharedConditions ? (
        <p className="hidden print:mt-0.5 print:block print:text-[7.5pt] print:leading-tight" data-shared-conditions>
          <span className="font-semibold">Measure every reading with:</span> {sharedConditions}; then as each row says.
        </p>
      ) : null}
      <table className="mt-2 w-full max-w-4xl border-collapse bg-white text-left text-[0.95rem] print:mt-1 print:max-w-none print:text-[7.5pt] print:leading-tight">
        <thead className="border-b-2 border-ink">
          <tr>
            <th className="p-1.5 print:px-1 print:py-0.5">Measurement</th>
            <th className="p-1.5 print:px-1 print:py-0.5">Between cavities</th>
            <th className="p-1.5 print:px-1 print:py-0.5">Range</th>
            <th className="p-1.5 print:px-1 print:py-0.5">At</th>
            <th className="hidden p-1.5 sm:table-cell print:table-cell print:px-1 print:py-0.5">Source</th>
          </tr>
        </thead>
        <tbody>
          {specs.map((s, i) => {
            const kind = specKindOf(s.kind);
            return (
              <tr key={i} className="border-b border-rule align-top" data-spec={s.name}>
                <td className="p-1.5 print:px-1 print:py-0.5">
                  {s.name}
                  {kind !== "resistance" ? (
                    <span className="ml-1 text-sm text-muted print:text-[7.5pt]" data-kind={kind}>
                      ({SPEC_KIND_LABELS[kind]})
                    </span>
                  ) : null}
                  {/* Beside the value, so the reading can be repeated: without its conditions a value may not be measurable at all. */}
                  {s.conditions?.trim() ? (
                    <span
                      className={`mt-0.5 block text-sm print:mt-0 print:text-[7.5pt] print:leading-tight ${sharedConditions ? "print:hidden" : ""}`}
                      data-conditions
                    >
                      <span className="font-semibold">measure:</span> {s.conditions}
                    </span>
                  ) : null}
                  {sharedConditions ? <span className="hidden print:block print:text-[7.5pt] print:leading-tight">{ownConditions[i]}</span> : null}
                  <span className="mt-0.5 block text-xs text-muted sm:hidden print:hidden">{s.source}</span>
                </td>
                <td className="p-1.5 print:px-1 print:py-0.5">
                  {s.between[0]} – {s.between[1]}
                </td>
                <td className="p-1.5 print:px-1 print:py-0.5" data-range>
                  {s.max === null ? (
                    <>
                      <span className="whitespace-nowrap">
                        ≥ {s.min} {s.unit}
                      </span>{" "}
                      <span className="block text-sm print:text-[7.5pt]">open (no upper limit)</span>
                    </>
                  ) : (
                    <span className="whitespace-nowrap">
                      {s.min}–{s.max} {s.unit}
                    </span>
                  )}
                </td>
                <td className="p-1.5 whitespace-nowrap print:px-1 print:py-0.5">{s.atC} °C</td>
                <td className="hidden p-1.5 text-sm text-muted sm:table-cell print:table-cell print:w-[38%] print:px-1 print:py-0.5 print:text-[6.5pt] print:leading-tight">
                  {s.source}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-1 text-sm text-muted print:text-[8pt]">
        Measure each value under the conditions given with it; a resistance with the ignition off and the connector unplugged. A copper winding reads about 0.4
        % higher per °C above 20 °C; the bench sheet corrects for it.
      </p>
    </section>
  );
}
