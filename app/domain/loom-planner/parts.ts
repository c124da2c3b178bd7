// The loom planner's shopping list: wire by size and colour, fuses, terminals and splices.

import { parseFitting } from "../terminals";
import { CUTTING_ALLOWANCE, round3 } from "./rules";
import type { CutRow, FuseRow, PartRow, PlannerInput } from "./types";

// ---------------------------------------------------------------------------------------------
// Parts

export function partsList(rows: CutRow[], fuses: FuseRow[], input: PlannerInput): PartRow[] {
  const parts: PartRow[] = [];
  const wire = new Map<string, number>();
  for (const r of rows) wire.set(`${r.sizeMm2} mm² ${r.colour}`, (wire.get(`${r.sizeMm2} mm² ${r.colour}`) ?? 0) + r.lengthM);
  for (const [item, m] of [...wire].sort())
    parts.push({
      kind: "wire",
      item,
      quantity: round3(m * (1 + CUTTING_ALLOWANCE)),
      unit: "m",
      notes: `${round3(m)} m plus ${CUTTING_ALLOWANCE * 100} % for cutting (common practice)`,
    });
  const ratings = new Map<number, number>();
  for (const f of fuses) ratings.set(f.ratingA, (ratings.get(f.ratingA) ?? 0) + 1);
  for (const [a, n] of [...ratings].sort((x, y) => x[0] - y[0]))
    parts.push({ kind: "fuse", item: `${a} A fuse and holder`, quantity: n, unit: "pcs", notes: "plus a spare of each rating" });
  const ends = new Map<string, number>();
  let splices = 0;
  for (const r of rows) {
    const w = input.wires.find((x) => x.id === r.wire)!;
    for (const f of [w.fromFitting, w.toFitting]) {
      const fit = parseFitting(f);
      if (fit.family === "splice") splices++;
      else if (fit.family !== "unknown") ends.set(fit.words, (ends.get(fit.words) ?? 0) + 1);
    }
  }
  for (const [item, n] of [...ends].sort())
    parts.push({ kind: "terminal", item: `${item} terminal`, quantity: n, unit: "pcs", notes: "one per wire end, crimped with the die for the wire's size" });
  if (splices)
    parts.push({
      kind: "splice",
      item: "crimped splice with heat-shrink",
      quantity: new Set(
        rows
          .filter((r) =>
            [input.wires.find((x) => x.id === r.wire)!.fromFitting, input.wires.find((x) => x.id === r.wire)!.toFitting].some(
              (f) => parseFitting(f).family === "splice",
            ),
          )
          .map((r) => r.net),
      ).size,
      unit: "pcs",
      notes: "one per splice point",
    });
  return parts;
}
