import type { ReactNode } from "react";
import type { ColourSystemId, HouseStyleId } from "~/domain/colours";
import type { RowChange } from "~/domain/submissions";

// The comparison's shared marks and looks: a row's symbol and word, its tint and bar, the table cells, "was" beside a changed value.

/** Our words for a row's fate, each with a symbol that survives a monochrome print. */
export const MARKS: Readonly<Record<RowChange, { symbol: string; word: string }>> = Object.freeze({
  added: { symbol: "+", word: "new row" },
  removed: { symbol: "−", word: "row taken out" },
  changed: { symbol: "Δ", word: "changed" },
  same: { symbol: "=", word: "unchanged" },
});

/** Row tints (our workshop palette: sky for what arrives, stone for what goes, the caution yellow for what moves). */
export const ROW_TINT: Readonly<Record<RowChange, string>> = Object.freeze({
  added: "bg-sky-50",
  removed: "bg-stone-100 text-muted",
  changed: "bg-caution/60",
  same: "",
});

/** A bar down the row's first cell: solid for new, dashed for taken out, double for changed; none when unchanged. */
export const ROW_BAR: Readonly<Record<RowChange, string>> = Object.freeze({
  added: "border-l-4 border-solid border-l-sky-700",
  removed: "border-l-4 border-dashed border-l-stone-500",
  changed: "border-l-4 border-double border-l-caution-edge",
  same: "border-l-4 border-solid border-l-transparent",
});

export const CELL = "p-1.5 print:px-1 print:py-0.5";
export const cx = (...parts: (string | false | null | undefined)[]) => parts.filter(Boolean).join(" ");
/** A cell whose value changed: framed, so it stands out without the tint (and in print). */
export const CHANGED_CELL = "outline-2 -outline-offset-2 outline-caution-edge";
export const TABLE = "mt-2 w-full border-collapse bg-white text-left text-[0.95rem] print:mt-1 print:text-[8pt] print:leading-tight";

/** How the family writes colours: its notation and its make's house within it. */
export type Notation = { system: ColourSystemId; houseStyle: HouseStyleId | null };

export const orDash = (v: string | null | undefined): string => (v === null || v === undefined || v === "" ? "—" : v);

export function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** The marking a row carries: symbol and word, never the tint alone. */
export function Mark({ change, className = "" }: { change: RowChange; className?: string }) {
  const m = MARKS[change];
  return (
    <span
      data-mark={change}
      className={cx("inline-flex items-baseline gap-1 whitespace-nowrap", change === "same" ? "font-normal text-muted" : "font-semibold", className)}
    >
      <span aria-hidden="true" className="inline-block w-[1.1em] text-center font-bold">
        {m.symbol}
      </span>{" "}
      {m.word}
    </span>
  );
}

/** A changed value: the proposed one emphasised, the published one beside it, struck through after "was". */
export function WasProposed({ proposed, was }: { proposed: ReactNode; was: ReactNode }) {
  return (
    <span className="block">
      <ins className="font-bold no-underline" data-proposed="true">
        {proposed}
      </ins>{" "}
      <span className="mt-0.5 block text-sm font-normal" data-was="true">
        was <del className="decoration-2">{was}</del>
      </span>
    </span>
  );
}
