import type { Route } from "./+types/api.v1.bench";
import { assertSameOrigin } from "~/services/guards.server";
import { benchSheet } from "~/domain/bench";
import { cautionsFor, cautionTexts } from "~/domain/cautions";
import { domainError, methodNotAllowed, readJson } from "~/services/http.server";
import { benchBody } from "~/validation/workshop";

export const loader = () => methodNotAllowed("POST");

/** Measured resistances against their 20 °C ranges, copper windings corrected for temperature, with the bench's cautions. */
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const body = await readJson(request, benchBody);
  if (!body.ok) return body.response;
  try {
    // Results never hold Infinity (JSON has none): an open circuit stays "OL" in measured and at20C.
    return Response.json({ ...benchSheet(body.data.readings), cautions: cautionTexts(cautionsFor("bench")) });
  } catch (e) {
    return domainError(e);
  }
}
