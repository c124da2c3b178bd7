import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";

// QUALITY S4(c): behind a proxy (Host: 127.0.0.1:port, X-Forwarded-Host: loomlore.test, browser Origin
// https://loomlore.test) legitimate posts still succeed when the proxy is trusted — and a foreign origin is still refused.
// React Router 7.18 derives the expected origin from request.url, which our Express entry builds from the forwarded
// headers only when TRUST_PROXY is set.
describe("S4c: behind a trusted proxy", () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startServer({ TRUST_PROXY: "loopback", APP_URL: "https://loomlore.test" });
  }, 60_000);
  afterAll(async () => server?.stop());

  const post = (path: string, origin: string, form: Record<string, string>) =>
    fetch(server.url + path, {
      method: "POST",
      redirect: "manual",
      headers: {
        "Content-Type": "application/x-www-form-urlencoded",
        Origin: origin,
        "X-Forwarded-Host": "loomlore.test",
        "X-Forwarded-Proto": "https",
      },
      body: new URLSearchParams(form).toString(),
    });

  it("a sign-in posted from the public origin succeeds", async () => {
    const r = await post("/login", "https://loomlore.test", { email: "rider@loomlore.invalid", password: "throttle-cable-42" });
    expect(r.status).toBe(302);
    expect(r.headers.get("location")).toBe("/garage");
    expect(r.headers.get("set-cookie") ?? "").toMatch(/^__Host-loomlore=/);
  });

  it("a computation posted from the public origin passes our own origin check", async () => {
    const r = await fetch(server.url + "/api/v1/wire-size", {
      method: "POST",
      headers: { "Content-Type": "application/json", Origin: "https://loomlore.test", "X-Forwarded-Host": "loomlore.test", "X-Forwarded-Proto": "https" },
      body: JSON.stringify({ currentA: 5, lengthM: 1 }),
    });
    expect(r.status).toBe(200);
  });

  it("a foreign origin is still refused on page actions and resource routes", async () => {
    const page = await post("/login", "https://evil.example", { email: "rider@loomlore.invalid", password: "throttle-cable-42" });
    expect(page.status).toBeGreaterThanOrEqual(400);
    expect(page.headers.get("set-cookie")).toBeNull();
    const api = await fetch(server.url + "/api/v1/wire-size", {
      method: "POST",
      headers: { "Content-Type": "application/json", Origin: "https://evil.example", "X-Forwarded-Host": "loomlore.test", "X-Forwarded-Proto": "https" },
      body: JSON.stringify({ currentA: 5, lengthM: 1 }),
    });
    expect(api.status).toBe(403);
  });
});

describe("S4c: without a trusted proxy, forwarded headers are ignored", () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startServer();
  }, 60_000);
  afterAll(async () => server?.stop());

  it("a post claiming X-Forwarded-Host with a matching Origin is still cross-site", async () => {
    const r = await fetch(server.url + "/api/v1/wire-size", {
      method: "POST",
      headers: { "Content-Type": "application/json", Origin: "https://loomlore.test", "X-Forwarded-Host": "loomlore.test", "X-Forwarded-Proto": "https" },
      body: JSON.stringify({ currentA: 5, lengthM: 1 }),
    });
    expect(r.status).toBe(403);
  });
});
