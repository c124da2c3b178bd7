import type { Route } from "./+types/api.v1.families.$slug.plan";
import { cautionTexts, cautionsFor } from "~/domain/cautions";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";
import { parsePlanQuery, planFor } from "~/services/planner.server";

/** The loom planner's cut list as JSON: ?keep=a,b (or keep repeated; default every circuit)&scheme=factory|simple&year=&tempC=&len_<wire>=. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const { query, errors } = parsePlanQuery(url);
  const firstError = Object.entries(errors)[0];
  if (firstError) return apiError(400, "bad_request", firstError[1], firstError[0]);
  const keep = url.searchParams
    .getAll("keep")
    .flatMap((k) => k.split(","))
    .map((k) => k.trim())
    .filter(Boolean);
  const planned = await planFor({ ...query, family: params.slug, keep: url.searchParams.has("keep") ? keep : null });
  if (!planned) return apiError(404, "not_found", `There is no family "${params.slug}" in the library.`);
  if (planned.yearError) return apiError(400, "bad_request", planned.yearError, "year");
  if (!planned.result) return apiError(400, "bad_request", "Keep at least one circuit.", "keep");
  if (!planned.result.ok) return apiError(400, "bad_request", planned.result.error.message, planned.result.error.field);
  const p = planned.result.plan;
  return cachedJson(request, {
    family: planned.family,
    keep: planned.keep,
    scheme: query.scheme,
    wires: p.rows.map((r) => ({
      id: r.wire,
      from: r.from,
      to: r.to,
      colour: r.colour,
      colours: r.colours,
      net: r.net,
      role: r.role,
      currentA: round(r.currentA),
      continuousA: round(r.continuousA),
      peakA: round(r.peakA),
      momentary: r.momentary,
      lengthM: r.lengthM,
      lengthSource: r.lengthSource,
      sizeMm2: r.sizeMm2,
      awg: r.awg,
      dropV: round(r.dropV, 3),
      decidedBy: r.decidedBy,
      fittings: r.fittings,
      circuits: r.circuits,
      notes: r.notes,
    })),
    fuses: p.fuses.map((f) => ({ ...f, continuousA: round(f.continuousA), peakA: round(f.peakA) })),
    circuitDrops: p.circuitDrops,
    legend: p.legend,
    parts: p.parts,
    dropped: p.dropped,
    totals: p.totals,
    assumptions: p.assumptions,
    warnings: p.warnings,
    cautions: cautionTexts(cautionsFor("planner")),
  });
}

const round = (x: number, d = 2) => Math.round(x * 10 ** d) / 10 ** d;

export const action = () => methodNotAllowed();
