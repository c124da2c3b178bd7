/** The loom planner over the library: a family's circuits and wires fed to the pure planner. */
import { cutListCsv, planLoom } from "~/domain/loom-planner";
import type { ColourSystemId } from "~/domain/colours";
import { plannerData } from "./circuits.server";

export interface PlanQuery { family: string; keep: string[] | null; scheme: "factory" | "simple"; tempC: number; lengthsM: Record<string, number> }

/** Parse the planner's query string: ?family=&keep=…&keep=…&scheme=&tempC=&len_w12=1.4 (planned=<family> marks a submitted form). */
export function parsePlanQuery(url: URL): { query: PlanQuery; errors: Record<string, string> } {
  const q = url.searchParams;
  const errors: Record<string, string> = {};
  const lengthsM: Record<string, number> = {};
  for (const [k, v] of q) {
    if (!k.startsWith("len_") || v.trim() === "") continue;
    const n = Number(v.replace(",", "."));
    if (!Number.isFinite(n) || n <= 0 || n > 10) errors[k] = "Enter a length in metres, more than 0 and at most 10.";
    else lengthsM[k.slice(4)] = n;
  }
  const tempC = Number(q.get("tempC") ?? 20);
  return {
    query: {
      family: q.get("family") ?? "",
      // The boxes count only when they were shown for this same family; otherwise every circuit is kept.
      keep: q.get("planned") && q.get("planned") === q.get("family") ? q.getAll("keep") : null,
      scheme: q.get("scheme") === "simple" ? "simple" : "factory",
      tempC: Number.isFinite(tempC) && tempC >= -30 && tempC <= 120 ? tempC : 20,
      lengthsM,
    },
    errors,
  };
}

/** Plan a minimal loom for a family: null for an unknown family. */
export async function planFor(query: PlanQuery) {
  const data = await plannerData(query.family);
  if (!data) return null;
  const keep = query.keep ?? data.circuits.map((c) => c.slug);
  const result = keep.length
    ? planLoom({
        circuits: data.circuits, wires: data.wires, keep, scheme: query.scheme,
        notation: data.family.colourSystem as ColourSystemId, lengthsM: query.lengthsM, tempC: query.tempC,
      })
    : null;
  return { family: data.family, circuits: data.circuits, keep, result };
}

export { cutListCsv };
