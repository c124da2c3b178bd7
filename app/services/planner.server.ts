/** The loom planner over the library: a family's network, circuits and wires fed to the pure planner. */
import { cutListCsv, planLoom, type PlanResult } from "~/domain/loom-planner";
import type { ColourSystemId } from "~/domain/colours";
import { plannerData } from "./circuits.server";

export interface PlanQuery {
  family: string;
  keep: string[] | null;
  scheme: "factory" | "simple";
  tempC: number;
  lengthsM: Record<string, number>;
  year: number | null;
}

/** Parse the planner's query string: ?family=&keep=…&keep=…&scheme=&tempC=&year=&len_w12=1.4 (planned=<family> marks a submitted form). */
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
  const yearRaw = q.get("year");
  let year: number | null = null;
  if (yearRaw !== null && yearRaw.trim() !== "") {
    if (!/^\d{4}$/.test(yearRaw.trim())) errors.year = "Give the model year as four digits, e.g. 1979.";
    else year = Number(yearRaw);
  }
  const scheme = q.get("scheme");
  if (scheme !== null && scheme !== "" && scheme !== "factory" && scheme !== "simple") errors.scheme = 'Use "factory" or "simple".';
  return {
    query: {
      family: q.get("family") ?? "",
      // The boxes count only when they were shown for this same family; otherwise every circuit is kept.
      keep: q.get("planned") && q.get("planned") === q.get("family") ? q.getAll("keep") : null,
      scheme: scheme === "simple" ? "simple" : "factory",
      tempC: Number.isFinite(tempC) && tempC >= -30 && tempC <= 120 ? tempC : 20,
      lengthsM,
      year,
    },
    errors,
  };
}

// Plans depend only on the published loom and the query; a small cache per loaded network (a publish loads a new one)
// keeps repeated prints and CSV downloads cheap.
type Planned = { ok: true; plan: PlanResult } | { ok: false; error: { field: string; message: string } };
const caches = new WeakMap<object, Map<string, Planned>>();
const CACHE_MAX = 100;

/** Plan a minimal loom for a family: null for an unknown family. */
export async function planFor(query: PlanQuery) {
  const data = await plannerData(query.family);
  if (!data) return null;
  const keep = query.keep ?? data.circuits.map((c) => c.slug);
  const yearError =
    query.year !== null && (query.year < data.family.yearFrom || query.year > data.family.yearTo)
      ? `The ${data.family.name} was built ${data.family.yearFrom}–${data.family.yearTo}; ${query.year} is outside that.`
      : null;
  let result = null as ReturnType<typeof planLoom> | null;
  if (keep.length && data.input && !yearError) {
    const key = JSON.stringify([[...keep].sort(), query.scheme, query.tempC, query.lengthsM]);
    let cache = caches.get(data.input.network);
    if (!cache) caches.set(data.input.network, (cache = new Map()));
    result = cache.get(key) ?? null;
    if (!result) {
      result = planLoom({
        ...data.input,
        keep,
        scheme: query.scheme,
        notation: data.family.colourSystem as ColourSystemId,
        lengthsM: query.lengthsM,
        tempC: query.tempC,
      });
      if (cache.size >= CACHE_MAX) cache.delete(cache.keys().next().value!);
      cache.set(key, result);
    }
  }
  return { family: data.family, circuits: data.circuits.map((c) => ({ slug: c.slug, name: c.name, system: c.system })), keep, result, yearError };
}

export { cutListCsv };
