import type { Route } from "./+types/api.v1.colours.decode";
import { decodeColour, type ColourSystemId } from "~/domain/colours";
import { apiError, cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { decodeQuery, searchParams } from "~/validation/library";

/** Decode one colour code in a given notation, or guess the notation and list the other readings. */
export function loader({ request }: Route.LoaderArgs) {
  const q = decodeQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const r = decodeColour(q.data.code, q.data.system as ColourSystemId | "auto");
  if (!r.ok) return apiError(400, "unknown_colour", r.error.message, "code");
  return cachedJson(request, r.value);
}

export const action = () => methodNotAllowed();
