import type { Route } from "./+types/api.v1.wire-size";
import { assertSameOrigin } from "~/services/guards.server";
import { wireSize } from "~/domain/wire-size";
import { domainError, methodNotAllowed, readJson } from "~/services/http.server";
import { wireSizeBody } from "~/validation/workshop";

export const loader = () => methodNotAllowed("POST");

/** Size one run: the smallest metric and AWG sizes within the voltage-drop target and the ampacity rule of thumb. */
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const body = await readJson(request, wireSizeBody);
  if (!body.ok) return body.response;
  try {
    const r = wireSize(body.data);
    return Response.json({
      minAreaMm2: r.minAreaMm2,
      metric: r.metric,
      awg: r.awg,
      fuseA: r.fuseA,
      basis: r.basis,
      decidedBy: r.decidedBy,
      ampacityMinAreaMm2: r.ampacityMinAreaMm2,
      conductorLengthM: r.conductorLengthM,
      allowedDropV: r.allowedDropV,
      warnings: r.warnings,
    });
  } catch (e) {
    return domainError(e);
  }
}
