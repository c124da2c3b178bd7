// Issue "Hold under attack and contention": each finding as a test against the built server on loopback.
// Sources beside the checks: OWASP ASVS 4.0.3 V5.1.5 (redirects only to allowed destinations), OWASP Unvalidated
// Redirects and Forwards Cheat Sheet, WHATWG URL Standard (tab and newline stripped, "\" read as "/"), RFC 9110 §15.5.6
// (405 carries Allow).
import http from "node:http";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";
import { DEMO, req, signIn, where } from "../support/http";

let srv: TestServer;
let rider: string;

beforeAll(async () => {
  srv = await startServer();
  rider = await signIn(srv, DEMO.rider.email, DEMO.rider.password);
}, 60_000);
afterAll(async () => { await srv?.stop(); });

/** Where a browser on our page would land after following the redirect (the WHATWG parser, as the browser does). */
const landing = (location: string | null | undefined) => new URL(location ?? "", srv.url);

/** A raw request, for methods fetch() refuses to send (TRACE). */
function raw(method: string, path: string): Promise<{ status: number; allow: string | undefined; body: string }> {
  return new Promise((resolve, reject) => {
    const u = new URL(path, srv.url);
    const r = http.request({ host: u.hostname, port: u.port, path: u.pathname + u.search, method }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode!, allow: res.headers.allow, body }));
    });
    r.on("error", reject);
    r.end();
  });
}

describe("open redirect through ?next= (ASVS V5.1.5)", () => {
  // Each of these once sent a signed-in browser off-site, or would: the tab is dropped by the browser.
  const offSite = ["/%09/evil.example", "//evil.example", "/%5Cevil.example", "/%5C%5Cevil.example", "https://evil.example/", "/..//evil.example", "%E3%80%82evil.example"];

  it("a signed-in visit to /login?next=… never leaves our origin, nor gives a 500", async () => {
    for (const n of offSite) {
      const r = await req(srv, `/login?next=${n}`, { session: rider });
      expect([302, 400], `${n}: ${where(r)}`).toContain(r.status);
      if (r.status === 302) expect(landing(r.location).origin, n).toBe(new URL(srv.url).origin);
    }
  });

  it("signing in with such a next lands on our own site", async () => {
    for (const n of offSite) {
      const r = await req(srv, `/login?next=${n}`, { form: { email: DEMO.rider.email, password: DEMO.rider.password } });
      expect([302, 400], `${n}: ${where(r)}`).toContain(r.status);
      if (r.status === 302) expect(landing(r.location).origin, n).toBe(new URL(srv.url).origin);
    }
  });

  it("control and space characters in next are a 400, signed in or not, never a 500", async () => {
    for (const n of ["/%09/evil.example", "/%0B", "/%0C", "/%00", "/%0D%0ASet-Cookie:x=1", "/%7F", "/%C2%85", "/%E3%80%80x", "/%20x"]) {
      for (const session of [rider, null]) {
        const r = await req(srv, `/login?next=${n}`, { session });
        expect(r.status, `${n} ${session ? "signed in" : "anonymous"}: ${where(r)}`).toBe(400);
      }
      const posted = await req(srv, `/login?next=${n}`, { form: { email: DEMO.rider.email, password: DEMO.rider.password } });
      expect(posted.status, `POST ${n}: ${where(posted)}`).toBe(400);
      expect(posted.setCookie ?? null, "no session is issued on a refused sign-in").toBeNull();
    }
  });

  it("a local next is kept, with its query, and non-ASCII in it is encoded rather than a 500", async () => {
    const r = await req(srv, "/login?next=%2Fsearch%3Fq%3DW%2FR", { session: rider });
    expect(r.status, where(r)).toBe(302);
    expect(r.location).toBe("/search?q=W/R");
    const u = await req(srv, "/login?next=%2F%E3%80%82evil.example", { session: rider });
    expect(u.status, where(u)).toBe(302);
    expect(landing(u.location).origin).toBe(new URL(srv.url).origin);
    expect(u.location).toBe("/%E3%80%82evil.example");
  });
});

describe("methods the site does not answer", () => {
  it("TRACE and other methods the site does not answer get 405 with Allow, on pages and the API, never a 500", async () => {
    // Node's HTTP parser itself answers 400 to a method it does not know at all (TRACK): never reaching the app.
    const unknown = await raw("TRACK", "/");
    expect([400, 405]).toContain(unknown.status);
    for (const method of ["TRACE", "PROPFIND", "MKCOL"]) {
      for (const path of ["/", "/login", "/api/v1/families"]) {
        const r = await raw(method, path);
        expect(r.status, `${method} ${path}: ${r.body.slice(0, 200)}`).toBe(405);
        expect(r.allow).toMatch(/\bGET\b/);
      }
    }
    const api = await raw("TRACE", "/api/v1/families");
    expect(JSON.parse(api.body)).toMatchObject({ error: { code: "method_not_allowed" } });
  });
});
