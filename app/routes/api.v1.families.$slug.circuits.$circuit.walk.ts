import type { Route } from "./+types/api.v1.families.$slug.circuits.$circuit.walk";
import { cautionTexts, cautionsFor } from "~/domain/cautions";
import { parseSwitches, walkFor } from "~/services/circuits.server";
import { apiError, cachedJson, methodNotAllowed } from "~/services/http.server";

/** The probe points of a circuit in order, with what each should read in the given state (?switches=…&engine=…&points=…). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const q = new URL(request.url).searchParams;
  const sw = parseSwitches(q.get("switches"));
  if (!sw.ok) return apiError(400, "bad_request", sw.error, "switches");
  const w = await walkFor(params.slug, params.circuit, sw.value, "riding", { engine: q.get("engine"), points: q.get("points") });
  if (!w.ok) return apiError(w.error.status, w.error.code, w.error.message, w.error.field);
  return cachedJson(request, {
    circuit: w.circuit,
    switches: w.walk.switches,
    state: w.state,
    reference: w.walk.reference,
    battery: w.walk.battery,
    loaded: w.walk.loaded,
    notes: w.walk.notes,
    cautions: cautionTexts(cautionsFor("walk", w.state.engine)),
    probePoints: w.walk.probePoints.map((p) => ({
      step: p.step,
      connector: p.connector,
      cavity: p.cavity,
      colour: p.colour,
      expect: p.expect,
      how: p.how,
      label: p.label,
      side: p.side,
      after: p.after,
      elementsBefore: p.elementsBefore,
    })),
    segments: w.walk.segments.map((s) => ({ from: s.from, to: s.to, contacts: s.contacts, loaded: s.loaded, allowedV: s.allowedV, elements: s.elements })),
  });
}

export const action = () => methodNotAllowed();
