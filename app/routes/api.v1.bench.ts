import type { Route } from "./+types/api.v1.bench";
import { assertSameOrigin } from "~/services/guards.server";
import { benchSheet } from "~/domain/bench";
import { domainError, methodNotAllowed, readJson } from "~/services/http.server";
import { benchBody } from "~/validation/workshop";

export const loader = () => methodNotAllowed("POST");

/** Measured resistances against their 20 °C ranges, copper windings corrected for temperature. */
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const body = await readJson(request, benchBody);
  if (!body.ok) return body.response;
  try {
    return Response.json(benchSheet(body.data.readings));
  } catch (e) {
    return domainError(e);
  }
}
