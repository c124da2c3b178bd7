import type { Route } from "./+types/api.v1.families.$slug.circuits.$circuit.diagnose";
import { cautionTexts, cautionsFor } from "~/domain/cautions";
import { assertSameOrigin } from "~/services/guards.server";
import { diagnoseFor } from "~/services/circuits.server";
import { apiError, methodNotAllowed, readJson } from "~/services/http.server";
import { diagnoseBody } from "~/validation/workshop";

export const loader = () => methodNotAllowed("POST");

/** From the readings a rider enters: between which two probe points the fault lies, and where to measure next. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const body = await readJson(request, diagnoseBody);
  if (!body.ok) return body.response;
  const d = await diagnoseFor(params.slug, params.circuit, body.data.switches, body.data.readings, "riding", {
    engine: body.data.engine,
    points: body.data.points,
  });
  if (!d.ok) return apiError(d.error.status, d.error.code, d.error.message, d.error.field);
  return Response.json({
    fault: d.diagnosis.fault,
    next: d.diagnosis.next,
    state: d.state,
    battery: d.diagnosis.battery,
    notes: [...d.walk.notes, ...d.diagnosis.notes],
    cautions: cautionTexts(cautionsFor("walk", d.state.engine)),
    checked: d.diagnosis.checked.map((c) => ({ ...c, value: Number.isFinite(c.value) ? c.value : "OL" })),
  });
}
