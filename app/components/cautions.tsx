import { CAUTION_DEFERRAL, cautionTexts, type CautionKind } from "~/domain/cautions";

export type { CautionKind };

/** A compact caution panel for the kinds given (texts in app/domain/cautions.ts); defers to the factory manual, local rules and a qualified mechanic. */
export function Cautions({ kinds, className = "" }: { kinds: readonly CautionKind[]; className?: string }) {
  return (
    <aside
      aria-label="Safety cautions"
      className={`print-avoid-break rounded-md border-l-4 border-caution-edge bg-caution px-4 py-3 text-[0.95rem] ${className}`}
    >
      <p className="font-bold">⚠ Before you start</p>
      <ul className="mt-1 space-y-1 print:grid print:grid-cols-2 print:space-y-0 print:gap-x-4">
        {cautionTexts(kinds).map((c) => (
          <li key={c.kind} data-caution={c.kind}>
            <span className="font-semibold">{c.title}:</span> {c.text}
          </li>
        ))}
      </ul>
      <p className="mt-1 text-sm print:text-[8pt]">{CAUTION_DEFERRAL}</p>
    </aside>
  );
}
