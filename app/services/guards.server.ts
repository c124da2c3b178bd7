/** Guards every loader and action runs first: who is signed in, what their role allows, and where a POST came from. */
import { redirect } from "react-router";
import { can, roleNeeded, type Action } from "~/domain/roles";
import { currentSession, type SessionUser } from "./auth.server";
import { apiError } from "./http.server";
import { env } from "~/env.server";

/** The signed-in user, or null. */
export async function optionalUser(request: Request): Promise<SessionUser | null> {
  return (await currentSession(request))?.user ?? null;
}

const isApi = (request: Request) => new URL(request.url).pathname.startsWith("/api/");

/** The signed-in user; pages redirect to sign-in (coming back afterwards), API routes get 401. */
export async function requireUser(request: Request): Promise<{ user: SessionUser; sessionId: number }> {
  const s = await currentSession(request);
  if (s) return s;
  if (isApi(request)) throw apiError(401, "not_signed_in", "Sign in first.");
  const url = new URL(request.url);
  throw redirect(`/login?next=${encodeURIComponent(url.pathname + url.search)}`);
}

/** The signed-in user whose role allows `action`; otherwise 401/redirect (not signed in) or 403 (role too low). */
export async function requireCan(request: Request, action: Action): Promise<{ user: SessionUser; sessionId: number }> {
  const s = await requireUser(request);
  if (can(s.user.role, action)) return s;
  const need = roleNeeded(action);
  const message = need === "contributor" ? "Confirm your e-mail address first: contributing needs a verified address." : `This needs the ${need} role.`;
  if (isApi(request)) throw apiError(403, "forbidden", message);
  throw new Response(message, { status: 403, headers: { "Content-Type": "text/plain; charset=utf-8" } });
}

/**
 * Origins allowed to POST: this server's own origin (from the request URL, as React Router 7.18 derives it) and
 * any configured in ALLOWED_ORIGINS (comma-separated, exact origins; never a wildcard), e.g. behind a proxy.
 */
export function allowedOrigins(request: Request): string[] {
  const own = new URL(request.url).origin;
  const configured = (env.ALLOWED_ORIGINS ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter((s) => s && s !== "*" && !s.includes("*"));
  return [own, ...configured];
}

/**
 * Cross-site POST check for resource routes (React Router's own check covers page actions only): a browser
 * always sends Origin on a POST; a foreign one, or Sec-Fetch-Site: cross-site, is refused with 403.
 */
export function assertSameOrigin(request: Request): void {
  const origin = request.headers.get("Origin");
  const site = request.headers.get("Sec-Fetch-Site");
  const bad = origin ? origin === "null" || !allowedOrigins(request).includes(origin) : site === "cross-site";
  if (bad) throw apiError(403, "forbidden", "Requests from other sites are not accepted.");
}
