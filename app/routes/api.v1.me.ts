import type { Route } from "./+types/api.v1.me";
import { apiError, methodNotAllowed } from "~/services/http.server";
import { optionalUser } from "~/services/guards.server";

/** Who is signed in: {user: {id, displayName, role}} or 401. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await optionalUser(request);
  if (!user) return apiError(401, "not_signed_in", "Sign in first.", undefined, { "Cache-Control": "no-store" });
  return Response.json(
    { user: { id: user.id, displayName: user.displayName, role: user.role, verified: user.verified } },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}

export const action = () => methodNotAllowed();
