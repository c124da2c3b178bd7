/** HTTP with a session cookie for integration tests: the demo accounts, a request helper and sign-in through the form. */
import { expect } from "vitest";
import type { TestServer } from "./server";

export const COOKIE = "__Host-loomlore"; // production name (auth.server.ts SESSION_COOKIE)

export type Role = "rider" | "contributor" | "moderator" | "admin";
export type Actor = "anonymous" | Role;
export const ACTORS: Actor[] = ["anonymous", "rider", "contributor", "moderator", "admin"];
export const DEMO: Record<Role, { email: string; password: string; displayName: string }> = {
  rider: { email: "rider@loomlore.invalid", password: "throttle-cable-42", displayName: "Demo Rider" },
  contributor: { email: "contributor@loomlore.invalid", password: "crimp-and-solder-7", displayName: "Demo Contributor" },
  moderator: { email: "moderator@loomlore.invalid", password: "review-queue-lamp", displayName: "Demo Moderator" },
  admin: { email: "admin@loomlore.invalid", password: "spark-gap-0.6mm", displayName: "Demo Admin" },
};

export interface Reply {
  status: number;
  headers: Headers;
  body: string;
  location: string | null;
  /** The session cookie's new value if the reply set one ("" when it clears it), else null. */
  session: string | null;
  setCookie: string | null;
}

export interface ReqOptions {
  method?: string;
  form?: Record<string, string>;
  json?: unknown;
  /** Session token to send as the cookie. */
  session?: string | null;
  /** Origin header on a POST: default the server's own origin; null sends none. */
  origin?: string | null;
  headers?: Record<string, string>;
  /** Do not retry a 500 caused by SQLITE_BUSY (the join-race test wants to see it). */
  noBusyRetry?: boolean;
}

export async function req(srv: TestServer, pathAndQuery: string, o: ReqOptions = {}): Promise<Reply> {
  const method = o.method ?? (o.form || o.json !== undefined ? "POST" : "GET");
  const headers: Record<string, string> = { ...o.headers };
  if (o.session) headers.Cookie = `${COOKIE}=${o.session}`;
  if (method === "POST" && o.origin !== null) headers.Origin = o.origin ?? srv.url;
  let body: string | undefined;
  if (o.form) {
    headers["Content-Type"] = "application/x-www-form-urlencoded";
    body = new URLSearchParams(o.form).toString();
  } else if (o.json !== undefined) {
    headers["Content-Type"] = "application/json";
    body = JSON.stringify(o.json);
  }
  const res = await fetch(srv.url + pathAndQuery, { method, headers, body, redirect: "manual" });
  const text = await res.text();

  const setCookie = res.headers.getSetCookie().find((c) => c.startsWith(`${COOKIE}=`)) ?? null;
  const session = setCookie ? setCookie.slice(COOKIE.length + 1).split(";")[0] : null;
  return { status: res.status, headers: res.headers, body: text, location: res.headers.get("location"), session, setCookie };
}

export const where = (r: Reply) => `${r.status} ${r.location ?? ""} ${r.body.slice(0, 300)}`;

/** Sign in through the login form; returns the new session token. */
export async function signIn(srv: TestServer, email: string, password: string, session?: string | null): Promise<string> {
  const r = await req(srv, "/login", { form: { email, password }, session });
  expect(r.status, `sign in ${email}: ${where(r)}`).toBe(302);
  expect(r.session, `sign in ${email} sets a session cookie`).toBeTruthy();
  return r.session!;
}
