// The error page speaks for each status with its own words and a next step (issue "one way in"): 400, 401, 403,
// 404, 405, 409, 413 and 429 each have a title of their own; a 5xx shows only an error id (security.test.ts).
// Sources: RFC 9110 §15.5 (the 4xx statuses' meanings: 403 "understood but refuses", 405 "method not supported by the
// target resource", 409 "conflict with the current state", 413 "content larger than the server is willing to process").
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";
import { DEMO, req, signIn, where } from "../support/http";

let srv: TestServer;
let rider: string;
beforeAll(async () => {
  srv = await startServer();
  rider = await signIn(srv, DEMO.rider.email, DEMO.rider.password);
}, 60_000);
afterAll(async () => {
  await srv?.stop();
});

const h1 = (body: string) => /<h1[^>]*>([^<]*)<\/h1>/.exec(body)?.[1];

describe("the error page, status by status", () => {
  it("403 for a rider on a moderator's page: 'Not open to you yet', the reason, and the account page as next step", async () => {
    const r = await req(srv, "/review", { session: rider });
    expect(r.status, where(r)).toBe(403);
    expect(h1(r.body)).toBe("Not open to you yet");
    expect(r.body).toContain("This needs the moderator role.");
    expect(r.body).toContain('href="/account"');
    expect(r.body).not.toContain("Try again in a moment");
  });

  it("403 for contributing before the address is confirmed: says so, and points to the account page", async () => {
    // A rider is an account whose address is not yet confirmed (app/domain/roles.ts: verifying makes a contributor).
    const r = await req(srv, "/contribute", { session: rider });
    expect(r.status, where(r)).toBe(403);
    expect(r.body).toMatch(/Confirm your e-mail address first/);
    expect(r.body).toMatch(/href="\/account"[^>]*>Confirm your address/);
  });

  it("404: 'Nothing here' with the way back", async () => {
    const r = await req(srv, "/families/no-such-family");
    expect(r.status).toBe(404);
    expect(h1(r.body)).toBe("Nothing here");
  });

  it("400: a search address that cannot be run says what is wrong", async () => {
    const r = await req(srv, "/search?q=plug&type=nonsense");
    expect(r.status, where(r)).toBe(400);
    expect(h1(r.body)).toBe("That could not be read");
    expect(r.body).toMatch(/This search cannot be run/);
  });

  it("405: a POST to a page that takes none", async () => {
    const r = await req(srv, "/colours", { form: { x: "1" } });
    expect(r.status, where(r)).toBe(405);
    expect(h1(r.body)).toBe("Not something this page does");
  });
});
