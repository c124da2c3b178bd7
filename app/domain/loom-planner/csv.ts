// The loom planner's cut list as a spreadsheet file.

import { awgLabel } from "../wire-size";
import type { PlanResult } from "./types";

// ---------------------------------------------------------------------------------------------
// CSV

const CSV_HEADER = [
  "wire",
  "from",
  "to",
  "colour",
  "colours",
  "length_m",
  "length_source",
  "current_a",
  "continuous_a",
  "peak_a",
  "role",
  "circuits",
  "size_mm2",
  "awg",
  "drop_v",
  "drop_pct",
  "decided_by",
  "notes",
] as const;

function csvCell(v: string | number | null): string {
  const s = v === null ? "" : String(v);
  // A leading =, +, -, @, tab or CR would make a spreadsheet run the cell as a formula.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replaceAll('"', '""')}"` : safe;
}

const num = (x: number, decimals: number) => String(Number(x.toFixed(decimals)));

/** The cut list as CSV (header row; RFC 4180 quoting; formula-looking cells defused). */
export function cutListCsv(plan: PlanResult): string {
  const lines = [CSV_HEADER.join(",")];
  for (const r of plan.rows) {
    lines.push(
      [
        r.wire,
        r.from,
        r.to,
        r.colour,
        r.colours.join("/"),
        num(r.lengthM, 3),
        r.lengthSource,
        num(r.currentA, 2),
        num(r.continuousA, 2),
        num(r.peakA, 2),
        r.role,
        r.circuits.join("; "),
        num(r.sizeMm2, 2),
        r.awg === null ? null : awgLabel(r.awg).replace(" AWG", ""),
        num(r.dropV, 3),
        num(r.dropPct, 2),
        r.decidedBy,
        r.notes.join(" "),
      ]
        .map(csvCell)
        .join(","),
    );
  }
  return lines.join("\r\n") + "\r\n";
}
