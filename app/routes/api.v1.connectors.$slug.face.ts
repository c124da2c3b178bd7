import type { Route } from "./+types/api.v1.connectors.$slug.face";
import { apiError, cachedJson, methodNotAllowed, validationError } from "~/services/http.server";
import { cardFace, getConnectorLayout } from "~/services/library.server";
import { faceQuery, searchParams } from "~/validation/library";

/** The face geometry the card draws: mating face or wire side, of this connector or of its mate. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const q = faceQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const c = await getConnectorLayout(params.slug);
  if (!c) return apiError(404, "not_found", `There is no connector card "${params.slug}" in the library.`);
  return cachedJson(request, cardFace(c, q.data.view, q.data.half), `${c.slug}-r${c.revision}-${q.data.view}-${q.data.half}`);
}

export const action = () => methodNotAllowed();
