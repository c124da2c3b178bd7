import type { Route } from "./+types/api.v1.colours.decode";
import { decodeForMake } from "~/services/colours.server";
import { apiError, cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { decodeQuery, searchParams } from "~/validation/library";

/** Decode one colour code in a given notation, in a make's house style (make=<slug>), or guess the notation and list the other readings. */
export async function loader({ request }: Route.LoaderArgs) {
  const q = decodeQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const r = await decodeForMake(q.data);
  if (!r.ok) return apiError(r.status, r.code, r.message, r.field);
  return cachedJson(request, r.value);
}

export const action = () => methodNotAllowed();
