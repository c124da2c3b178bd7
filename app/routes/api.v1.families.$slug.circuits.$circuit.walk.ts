import type { Route } from "./+types/api.v1.families.$slug.circuits.$circuit.walk";
import { parseSwitches, walkFor } from "~/services/circuits.server";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";

/** The probe points of a circuit in order, with what each should read in the given switch positions. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const sw = parseSwitches(new URL(request.url).searchParams.get("switches"));
  if (!sw.ok) return apiError(400, "bad_request", sw.error, "switches");
  const w = await walkFor(params.slug, params.circuit, sw.value);
  if (!w.ok) return apiError(w.error.status, w.error.code, w.error.message, w.error.field);
  return cachedJson(request, {
    circuit: w.circuit,
    switches: w.walk.switches,
    probePoints: w.walk.probePoints.map((p) => ({
      step: p.step, connector: p.connector, cavity: p.cavity, colour: p.colour, expect: p.expect, how: p.how,
      label: p.label, side: p.side, after: p.after, elementsBefore: p.elementsBefore,
    })),
  });
}

export const action = () => methodNotAllowed();
