import { redirect } from "react-router";
import type { Route } from "./+types/logout";
import { endSession } from "~/services/auth.server";
import { assertSameOrigin } from "~/services/guards.server";
import { methodNotAllowed } from "~/services/http.server";

/** Signing out changes state, so it is POST only; GET answers 405 (a link or an image cannot sign anyone out). */
export const loader = () => methodNotAllowed("POST");

export async function action({ request }: Route.ActionArgs) {
  assertSameOrigin(request);
  const setCookie = await endSession(request);
  throw redirect("/login?notice=signed-out", { headers: { "Set-Cookie": setCookie } });
}
