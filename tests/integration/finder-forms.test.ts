// One path from form to answer: the finder page (GET /finder?…, the form without JavaScript) and
// POST /api/v1/colour-finder read the same input and check it with the same schema, so they refuse the same things
// with the same words. Source for the expected refusals: ../shared/API.md (the colour-finder body: wires 1–40, pinCount
// a whole number 1–200, gender plug|socket, family a slug).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";
import { req, where } from "../support/http";

let srv: TestServer;
beforeAll(async () => {
  srv = await startServer();
}, 60_000);
afterAll(async () => {
  await srv?.stop();
});

const decode = (s: string) =>
  s
    .replace(/<!-- -->/g, "")
    .replace(/&quot;/g, '"')
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&amp;/g, "&");
const pageError = (body: string) => decode(/<p role="alert"[^>]*>([\s\S]*?)<\/p>/.exec(body)?.[1] ?? "");

describe("the finder page and its API check the same input the same way", () => {
  it.each([
    ["pinCount 0", { wires: "R\nB", pinCount: "0" }, { wires: ["R", "B"], pinCount: 0 }],
    ["pinCount 250", { wires: "R", pinCount: "250" }, { wires: ["R"], pinCount: 250 }],
    ["pinCount not a number", { wires: "R", pinCount: "four" }, { wires: ["R"], pinCount: "four" }],
    ["gender neither", { wires: "R", gender: "both" }, { wires: ["R"], gender: "both" }],
    ["family not a slug", { wires: "R", family: "Not A Slug" }, { wires: ["R"], family: "Not A Slug" }],
    ["41 wires", { wires: Array.from({ length: 41 }, () => "R").join("\n") }, { wires: Array.from({ length: 41 }, () => "R") }],
  ])("%s: the API's 400 and the page's message say the same", async (_what, query, body) => {
    const api = await req(srv, "/api/v1/colour-finder", { json: body });
    expect(api.status, where(api)).toBe(400);
    const message = (JSON.parse(api.body) as { error: { message: string } }).error.message;
    const page = await req(srv, `/finder?${new URLSearchParams(query)}`);
    expect(page.status, where(page)).toBe(200);
    expect(pageError(page.body)).toBe(message);
  });

  it("a good query gives the page and the API the same candidates, in the same order", async () => {
    const api = await req(srv, "/api/v1/colour-finder", { json: { wires: ["R", "B", "G/Y"], pinCount: 3 } });
    expect(api.status, where(api)).toBe(200);
    const slugs = (JSON.parse(api.body) as { candidates: { connector: { slug: string } }[] }).candidates.map((c) => c.connector.slug);
    const page = await req(srv, `/finder.data?wires=${encodeURIComponent("R\nB\nG/Y")}&pinCount=3`);
    expect(page.status).toBe(200);
    for (const slug of slugs.slice(0, 3)) expect(page.body).toContain(slug);
  });
});
