import type { Route } from "./+types/api.v1.colour-finder";
import { assertSameOrigin } from "~/services/guards.server";
import { apiError, methodNotAllowed, readJson } from "~/services/http.server";
import { findByColours } from "~/services/finder.server";
import { finderBody } from "~/validation/workshop";

export const loader = () => methodNotAllowed("POST");

/** The plug is gone; some colours are left: rank the library's connectors, each with its wire-to-cavity match. */
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const body = await readJson(request, finderBody);
  if (!body.ok) return body.response;
  const { result, tookMs } = await findByColours(body.data);
  if (!result.ok) return apiError(400, result.error.code, result.error.message, result.error.field);
  return Response.json({
    candidates: result.candidates.map((c) => ({
      connector: c.connector,
      score: Math.round(c.score * 1000) / 1000,
      // readAs: which reading of the typed code the match used (notation, house, colours base first, in words).
      matches: c.matches.map((m) => ({ wire: m.wire, cavity: m.cavity, pinColour: m.pinColour, quality: m.quality, readAs: m.readAs })),
    })),
    considered: result.stats.considered,
    tookMs,
  });
}
