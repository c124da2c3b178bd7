/**
 * QUALITY.md §1, tests S1–S9, plus the account mail journeys, over HTTP against the production build
 * (startServer({ mail: true }): fresh seeded database, NODE_ENV=production, a mail stand-in).
 *
 * The client here is Node's fetch, which keeps no cookies: every request carries the session cookie it means to use,
 * and every POST sends `Origin: <server url>` as a browser would (S4 forges it on purpose).
 *
 * General rule (QUALITY.md): a denied or failed request leaves the database unchanged. `digest()` hashes, per table,
 * users, sessions, tokens, garage_items, bike_checks, mistake_reports, audit_log and mail_outbox through a read-only
 * sqlite3 handle on server.dbPath. Two column groups are left out on purpose, because something other than the
 * request under test writes them:
 *   - sessions.last_seen_at: any signed-in request touches it at most once a minute (auth.server.ts TOUCH_EVERY_MS);
 *   - mail_outbox status/attempts/next_attempt_at/lease_until/last_error/sent_at: the background delivery worker.
 * A new session row, a revoked one, a new mail, token use, an audit row: all are in the digest.
 *
 * Demo accounts (db/seeders/demo.ts DEMO_ACCOUNTS) are written out here as data; the rider is unverified.
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import { DomUtils, parseDocument } from "htmlparser2";
import sqlite3 from "sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";
import { ACTORS, DEMO, req, signIn, where, type Actor, type Reply, type ReqOptions, type Role } from "../support/http";
import { execSql } from "./helpers";

const root = path.resolve(import.meta.dirname, "../..");

const FAMILY = "rx750-four";
const CARD = "rx750-four-ignition-unit-plug";
const CARD_B = "rx750-four-stator-plug";
const CARD_C = "rx750-four-tail-lamp-plug";
const EVIL = "https://evil.example";

// ---------------------------------------------------------------------------------------------------------------------
// HTTP

/** GET /api/v1/me with a session: its status (200 signed in, 401 not). */
async function meStatus(srv: TestServer, session: string | null): Promise<number> {
  return (await req(srv, "/api/v1/me", { session })).status;
}

async function me(srv: TestServer, session: string) {
  const r = await req(srv, "/api/v1/me", { session });
  expect(r.status, where(r)).toBe(200);
  return (JSON.parse(r.body) as { user: { id: number; displayName: string; role: Role; verified?: boolean } }).user;
}

// HTML: htmlparser2 (jsdom 31 needs Node ≥ 22.22 and fails to load on this machine's Node 20).
type El = ReturnType<typeof DomUtils.findAll>[number];
/** A parsed page with the few queries these tests need. */
function doc(html: string) {
  const nodes = parseDocument(html).children;
  const main = DomUtils.findOne((e) => e.name === "main", nodes);
  const scope = main ? [main] : nodes;
  return {
    /** Elements inside <main> (or the whole page without one) matching a tag and attributes. */
    all: (tag: string | null, attrs: Record<string, string> = {}, within: El[] | typeof scope = scope) =>
      DomUtils.findAll((e) => (tag === null || e.name === tag) && Object.entries(attrs).every(([k, v]) => e.attribs[k] === v), within),
    one: (tag: string | null, attrs: Record<string, string> = {}, within: El[] | typeof scope = scope) =>
      DomUtils.findOne((e) => (tag === null || e.name === tag) && Object.entries(attrs).every(([k, v]) => e.attribs[k] === v), within) ?? null,
    byId: (id: string) => DomUtils.findOne((e) => e.attribs.id === id, nodes) ?? null,
    /** Every <a href> of the page, header included. */
    hrefs: () => DomUtils.findAll((e) => e.name === "a" && typeof e.attribs.href === "string", nodes).map((e) => e.attribs.href),
  };
}
const text = (el: El | null | undefined) => (el ? DomUtils.textContent(el).trim() : null);
/** The page's form-level alert, or "". */
const alertText = (html: string) => text(doc(html).one(null, { role: "alert" })) ?? "";
const fieldError = (html: string, name: string) => text(doc(html).byId(`${name}-error`));

// ---------------------------------------------------------------------------------------------------------------------
// Database, read-only

function openDb(dbPath: string): Promise<sqlite3.Database> {
  return new Promise((resolve, reject) => {
    const d = new sqlite3.Database(dbPath, sqlite3.OPEN_READONLY, (err) => (err ? reject(err) : resolve(d)));
  });
}

async function query<T = Record<string, unknown>>(srv: TestServer, sql: string, params: unknown[] = []): Promise<T[]> {
  const db = await openDb(srv.dbPath);
  try {
    return await new Promise<T[]>((resolve, reject) => db.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  } finally {
    await new Promise<void>((resolve) => db.close(() => resolve()));
  }
}

const DIGEST_TABLES: Record<string, string> = {
  users: "*",
  sessions: "id, token_hash, user_id, created_at, expires_at, revoked_at, user_agent",
  tokens: "*",
  garage_items: "*",
  bike_checks: "*",
  mistake_reports: "*",
  audit_log: "*",
  mail_outbox: "id, message_id, kind, to_addr, subject, text, html, created_at",
};

/** Per-table SHA-256 of the account tables (a failed comparison names the table that changed). */
async function digest(srv: TestServer): Promise<Record<string, string>> {
  const db = await openDb(srv.dbPath);
  try {
    const out: Record<string, string> = {};
    for (const [table, cols] of Object.entries(DIGEST_TABLES)) {
      const rows = await new Promise<unknown[]>((resolve, reject) =>
        db.all(`SELECT ${cols} FROM ${table} ORDER BY rowid`, (err, r) => (err ? reject(err) : resolve(r))),
      );
      const h = createHash("sha256");
      for (const row of rows) h.update(JSON.stringify(row) + "\n");
      out[table] = `${rows.length}:${h.digest("hex").slice(0, 16)}`;
    }
    return out;
  } finally {
    await new Promise<void>((resolve) => db.close(() => resolve()));
  }
}

async function userId(srv: TestServer, email: string): Promise<number> {
  const [row] = await query<{ id: number }>(srv, "SELECT id FROM users WHERE email = ?", [email]);
  expect(row, `user ${email}`).toBeDefined();
  return row.id;
}

// ---------------------------------------------------------------------------------------------------------------------
// Mail (the stand-in's JSON list, newest first)

interface Mail {
  id: string;
  to: string;
  subject: string;
  text: string;
  receivedAt: string;
}

async function inbox(srv: TestServer, to: string): Promise<Mail[]> {
  const r = await fetch(`${srv.mailHttp}/messages?to=${encodeURIComponent(to)}`);
  expect(r.status).toBe(200);
  return (await r.json()) as Mail[];
}

/**
 * Wait for a mail to `to` (newest first) matching `match`, then for the outbox to be idle again (the worker has
 * settled the row), so each test starts with a quiet outbox.
 */
async function waitForMail(srv: TestServer, to: string, match: (m: Mail) => boolean = () => true, timeoutMs = 15_000): Promise<Mail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const m = (await inbox(srv, to)).find(match);
    if (m) {
      while (Date.now() < deadline) {
        const [busy] = await query<{ n: number }>(srv, "SELECT count(*) AS n FROM mail_outbox WHERE status IN ('queued', 'sending')");
        if (busy.n === 0) break;
        await sleep(50);
      }
      return m;
    }
    if (Date.now() > deadline) throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
    await sleep(100);
  }
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The path and query of the first link to `route` in a mail (links point at APP_URL; we call our own server). */
function mailLink(m: Mail, route: "verify" | "reset"): { path: string; token: string } {
  const match = new RegExp(`https?://[^\\s]+/${route}\\?token=[A-Za-z0-9_-]+`).exec(m.text);
  expect(match, `a /${route}?token= link in "${m.subject}"`).not.toBeNull();
  const url = new URL(match![0]);
  return { path: url.pathname + url.search, token: url.searchParams.get("token")! };
}

async function join(srv: TestServer, email: string, displayName: string, password: string, noBusyRetry = false): Promise<Reply> {
  return req(srv, "/join", { form: { displayName, email, password }, noBusyRetry });
}

/** Join and return the verify link from the mail. */
async function joinAndReadMail(srv: TestServer, email: string, displayName: string, password: string) {
  const r = await join(srv, email, displayName, password);
  expect(r.status, `join ${email}: ${where(r)}`).toBe(200);
  return mailLink(await waitForMail(srv, email, (m) => /confirm/i.test(m.subject)), "verify");
}

/** Open the verify page as the mail link does, and press its button: POST the token from the page's own form. */
async function confirmFromPage(srv: TestServer, linkPath: string, session?: string): Promise<Reply> {
  const page = await req(srv, linkPath, { session });
  expect(page.status, where(page)).toBe(200);
  const d = doc(page.body);
  const form = d.one("form", { method: "post" });
  expect(form, "the verify page has a POST form").not.toBeNull();
  expect(text(d.one("button", {}, [form!]))).toMatch(/Confirm my address/);
  const token = d.one("input", { name: "token" }, [form!])?.attribs.value ?? "";
  return req(srv, "/verify", { form: { token }, session });
}

/**
 * What two answers must share to count as the same page: everything but the values made fresh for each response —
 * the script nonce (S14) and the request id in the root data (shown only on an error page).
 */
const samePage = (html: string) => html.replace(/nonce="[^"]*"/g, 'nonce="N"').replace(/(\\?"requestId\\?",\\?")[0-9a-f]{8}/g, "$1ID");

/** Replace an address in a page so two answers that differ only by the typed address compare equal. */
const withoutAddress = (html: string, ...addresses: string[]) => samePage(addresses.reduce((h, a) => h.split(a).join("ADDRESS"), html));

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

// ---------------------------------------------------------------------------------------------------------------------
// The route manifest (app/routes.ts) and every route file's exports

interface ManifestRoute {
  pattern: string;
  file: string;
  source: string;
  hasAction: boolean;
  hasLoader: boolean;
  isApi: boolean;
}

function manifest(): ManifestRoute[] {
  const text = readFileSync(path.join(root, "app/routes.ts"), "utf8");
  const out: ManifestRoute[] = [];
  for (const m of text.matchAll(/\b(?:index\(\s*"([^"]+)"|route\(\s*"([^"]+)",\s*"([^"]+)")/g)) {
    const pattern = m[1] ? "" : m[2];
    const file = m[1] ?? m[3];
    const source = readFileSync(path.join(root, "app", file), "utf8");
    out.push({
      pattern,
      file,
      source,
      hasAction: /export\s+(?:async\s+)?(?:function|const)\s+action\b/.test(source),
      hasLoader: /export\s+(?:async\s+)?(?:function|const)\s+loader\b/.test(source),
      isApi: pattern.startsWith("api/"),
    });
  }
  return out;
}

/** A concrete URL path for a route pattern, with demo data in its parameters. */
function fill(pattern: string): string {
  const p = pattern
    .replace(/^api\/v1\/connectors\/:slug/, `api/v1/connectors/${CARD}`)
    .replace(":slug", FAMILY)
    .replace(":make", "asagiri")
    .replace(":family", FAMILY)
    .replace(":circuit", "ignition")
    .replace(":connector", CARD)
    .replace(":id", "1")
    .replace(":file", "00000000-0000-4000-8000-000000000000.webp")
    .replace(/\*$/, "nothing-declared-here");
  expect(p, `every parameter of ${pattern} has a value`).not.toMatch(/:/);
  return `/${p}`;
}

// =====================================================================================================================

let srv: TestServer;
const sessions: Record<Actor, string | null> = { anonymous: null, rider: null, contributor: null, moderator: null, admin: null };
const passwords: Record<Role, string> = {
  rider: DEMO.rider.password,
  contributor: DEMO.contributor.password,
  moderator: DEMO.moderator.password,
  admin: DEMO.admin.password,
};
/** A joined, unconfirmed account: the target of the admin's role change and revocation; its verify link is never used (S4a forges a POST with it, S4d opens it). */
const BYSTANDER = { email: "bystander@loomlore.invalid", displayName: "Bystander Brook", password: "seven-pin-din-plug" };
let bystanderVerify: { path: string; token: string };
/** Rider B for S2: joined and confirmed through the stand-in's mail. */
const RIDER_B = { email: "second-rider@loomlore.invalid", displayName: "Second Rider", password: "points-gap-fourteen-thou" };
let riderB: string;

/** S9's own server (its worker polls every 50 ms for the join race), booted alongside the main one. */
let s9Boot: Promise<TestServer> | null = null;

beforeAll(async () => {
  s9Boot = startServer({ mail: true, env: { MAIL_POLL_MS: "50" } });
  s9Boot.catch(() => {}); // awaited (and reported) in S9's beforeAll
  srv = await startServer({ mail: true });
  for (const role of ["rider", "contributor", "moderator", "admin"] as Role[]) sessions[role] = await signIn(srv, DEMO[role].email, DEMO[role].password);
  bystanderVerify = await joinAndReadMail(srv, BYSTANDER.email, BYSTANDER.displayName, BYSTANDER.password);
  const bLink = await joinAndReadMail(srv, RIDER_B.email, RIDER_B.displayName, RIDER_B.password);
  expect((await confirmFromPage(srv, bLink.path)).status).toBe(200);
  riderB = await signIn(srv, RIDER_B.email, RIDER_B.password);
}, 60_000);

afterAll(async () => {
  await srv?.stop();
  await (await s9Boot?.catch(() => null))?.stop();
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S1 role matrix: every action × every actor, enforced on the server", () => {
  const LOGIN = "→ /login" as const;
  type Expected = 200 | 401 | 403 | typeof LOGIN | 302;
  const cells = (anonymous: Expected, rider: Expected, contributor: Expected, moderator: Expected, admin: Expected) =>
    ({ anonymous, rider, contributor, moderator, admin }) satisfies Record<Actor, Expected>;

  /** A cell after a known-bug cell may find its actor signed out: sign in again first (outside the cell's digest). */
  async function stillSignedIn(actor: Actor) {
    if (actor === "anonymous" || (await meStatus(srv, sessions[actor])) === 200) return;
    sessions[actor] = await signIn(srv, DEMO[actor].email, passwords[actor]);
  }

  async function latestBike(actor: Actor): Promise<string> {
    const email = DEMO[actor === "anonymous" ? "rider" : actor].email; // anonymous aims at the rider's bike
    const [row] = await query<{ id: number | null }>(
      srv,
      "SELECT max(g.id) AS id FROM garage_items g JOIN users u ON u.id = g.user_id WHERE u.email = ? AND g.kind = 'bike'",
      [email],
    );
    expect(row.id, `${email} has a bike to remove`).not.toBeNull();
    return String(row.id);
  }
  const bystanderId = () => userId(srv, BYSTANDER.email);

  // The table: what each actor gets. Writes: whether an allowed cell must change the digest (GETs never may).
  const MATRIX: {
    action: string;
    method: "GET" | "POST";
    path: string;
    writes: boolean;
    form?: (a: Actor) => Promise<Record<string, string>> | Record<string, string>;
    expect: Record<Actor, Expected>;
    /** Cells that fail today because of an app bug (it.fails); see the KNOWN BUG comment on the row. */
    knownBug?: Actor[];
  }[] = [
    {
      action: "save a card (intent=save)",
      method: "POST",
      path: `/connectors/${CARD}`,
      writes: true,
      form: () => ({ intent: "save" }),
      expect: cells(LOGIN, 200, 200, 200, 200),
    },
    {
      action: "mark a card bike-checked (intent=check)",
      method: "POST",
      path: `/connectors/${CARD}`,
      writes: true,
      form: () => ({ intent: "check", year: "1979" }),
      expect: cells(LOGIN, 200, 200, 200, 200),
    },
    {
      action: "report a mistake (intent=report)",
      method: "POST",
      path: `/connectors/${CARD}`,
      writes: true,
      form: () => ({ intent: "report", text: "Cavity 3 is yellow with a red tracer on my 1979 bike, not blue." }),
      expect: cells(LOGIN, 200, 200, 200, 200),
    },
    {
      action: "add a bike to the garage",
      method: "POST",
      path: "/garage",
      writes: true,
      form: () => ({ intent: "bike", family: FAMILY, year: "1979", label: "matrix bike" }),
      expect: cells(LOGIN, 200, 200, 200, 200),
    },
    {
      action: "remove a bike from the garage",
      method: "POST",
      path: "/garage",
      writes: true,
      form: async (a) => ({ intent: "remove", id: await latestBike(a) }),
      expect: cells(LOGIN, 200, 200, 200, 200),
    },
    {
      action: "change password (same password again, others kept)",
      method: "POST",
      path: "/account",
      writes: true,
      // Success redirects back to /account with the new session cookie (the old session is ended first).
      form: (a) => {
        const pw = passwords[a === "anonymous" ? "rider" : a];
        return { intent: "password", current: pw, password: pw };
      },
      expect: cells(LOGIN, 302, 302, 302, 302),
    },
    {
      action: "admin: change a role",
      method: "POST",
      path: "/admin",
      writes: true,
      form: async () => ({ intent: "role", userId: String(await bystanderId()), role: "rider" }),
      expect: cells(LOGIN, 403, 403, 403, 200),
    },
    {
      action: "admin: set one's own role to admin (the admin's cell sets the rider's role to rider)",
      method: "POST",
      path: "/admin",
      writes: true,
      form: async (a) => ({
        intent: "role",
        userId: String(await userId(srv, DEMO[a === "anonymous" || a === "admin" ? "rider" : a].email)),
        role: a === "admin" ? "rider" : "admin",
      }),
      expect: cells(LOGIN, 403, 403, 403, 200),
    },
    {
      action: "admin: sign someone out everywhere",
      method: "POST",
      path: "/admin",
      writes: true,
      form: async () => ({ intent: "revoke", userId: String(await bystanderId()) }),
      expect: cells(LOGIN, 403, 403, 403, 200),
    },
    { action: "GET /admin", method: "GET", path: "/admin", writes: false, expect: cells(LOGIN, 403, 403, 403, 200) },
    { action: "GET /garage", method: "GET", path: "/garage", writes: false, expect: cells(LOGIN, 200, 200, 200, 200) },
    { action: "GET /api/v1/me", method: "GET", path: "/api/v1/me", writes: false, expect: cells(401, 200, 200, 200, 200) },
  ];

  for (const row of MATRIX) {
    describe(`${row.method} ${row.path}: ${row.action}`, () => {
      for (const actor of ACTORS) {
        const expected = row.expect[actor];
        const test = row.knownBug?.includes(actor) ? it.fails : it;
        test(`${row.knownBug?.includes(actor) ? "KNOWN BUG: " : ""}${actor} → ${expected}`, async () => {
          await stillSignedIn(actor);
          const form = row.form ? await row.form(actor) : undefined;
          const before = await digest(srv);
          const r = await req(srv, row.path, { method: row.method, form, session: sessions[actor] });
          const after = await digest(srv);
          if (expected === LOGIN) {
            expect(r.status, where(r)).toBe(302);
            expect(new URL(r.location!, srv.url).pathname).toBe("/login");
            expect(new URL(r.location!, srv.url).searchParams.get("next")).toBe(row.path); // comes back afterwards
          } else {
            expect(r.status, where(r)).toBe(expected);
          }
          if (expected === 401) expect(JSON.parse(r.body).error.code).toBe("not_signed_in");
          const allowed = expected === 200 || expected === 302;
          if (allowed && row.writes) {
            expect(after, "an allowed action writes").not.toEqual(before);
          } else {
            expect(after, allowed ? "a GET writes nothing" : "a denied request writes nothing (no row, no audit, no mail)").toEqual(before);
          }
          if (row.path === "/api/v1/me" && expected === 200) {
            const body = JSON.parse(r.body);
            expect(body.user).toMatchObject({ id: expect.any(Number), displayName: DEMO[actor as Role].displayName, role: actor });
          }
          // A password change rotates the caller's session (startSession): carry on with the new cookie.
          if (r.session && allowed) sessions[actor] = r.session;
        });
      }
    });
  }

  it("after the matrix every demo account still has its seeded role (the admin's own change went through the audit log)", async () => {
    const rows = await query<{ email: string; role: string }>(
      srv,
      "SELECT email, role FROM users WHERE email LIKE '%@loomlore.invalid' AND email IN (?, ?, ?, ?)",
      Object.values(DEMO).map((d) => d.email),
    );
    const roles = Object.fromEntries(rows.map((r) => [r.email, r.role]));
    // The admin's "make oneself admin" cell demoted the rider to rider (no-op); nobody else could change a role.
    expect(roles).toEqual({
      [DEMO.rider.email]: "rider",
      [DEMO.contributor.email]: "contributor",
      [DEMO.moderator.email]: "moderator",
      [DEMO.admin.email]: "admin",
    });
    const audits = await query<{ action: string; n: number }>(
      srv,
      "SELECT action, count(*) AS n FROM audit_log WHERE action IN ('user.role', 'user.sessions-revoked') GROUP BY action",
    );
    expect(Object.fromEntries(audits.map((a) => [a.action, a.n]))).toEqual({ "user.role": 2, "user.sessions-revoked": 1 });
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S2 IDOR: one rider's garage items are not another's to remove", () => {
  it("rider B removing each of rider A's item ids (and their neighbours) changes nothing and answers exactly as for an id that does not exist", async () => {
    const a = sessions.rider!;
    expect((await req(srv, `/connectors/${CARD_B}`, { form: { intent: "save" }, session: a })).status).toBe(200);
    expect((await req(srv, "/garage", { form: { intent: "bike", family: FAMILY, year: "1980", label: "A's own bike" }, session: a })).status).toBe(200);
    const aItems = (
      await query<{ id: number }>(srv, "SELECT g.id FROM garage_items g JOIN users u ON u.id = g.user_id WHERE u.email = ? ORDER BY g.id", [DEMO.rider.email])
    ).map((r) => r.id);
    expect(aItems.length).toBeGreaterThanOrEqual(2);
    const [{ top }] = await query<{ top: number }>(srv, "SELECT max(id) AS top FROM garage_items");

    const before = await digest(srv);
    const missing = await req(srv, "/garage", { form: { intent: "remove", id: String(top + 1000) }, session: riderB });
    expect(missing.status, where(missing)).toBe(200);
    const tries = [...new Set([...aItems, ...aItems.map((id) => id - 1), ...aItems.map((id) => id + 1)])].filter((id) => id > 0);
    for (const id of tries) {
      const r = await req(srv, "/garage", { form: { intent: "remove", id: String(id) }, session: riderB });
      expect(r.status, `remove ${id} as B: ${where(r)}`).toBe(missing.status);
      expect(samePage(r.body), `remove ${id} as B answers like a non-existent id`).toBe(samePage(missing.body));
    }
    expect(await digest(srv)).toEqual(before);
    // B's own garage never shows A's bike.
    const bGarage = await req(srv, "/garage", { session: riderB });
    expect(bGarage.body).not.toContain("A&#x27;s own bike");
    expect(bGarage.body).not.toContain("A's own bike");
    const aGarage = await req(srv, "/garage", { session: a });
    expect(aGarage.body).toMatch(/A(&#x27;|')s own bike/);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S3 every action guards itself: POST with no session, without visiting the page first", () => {
  const routes = manifest().filter((r) => r.hasAction);
  // A body that would write if the action forgot its guard; public forms get a body their own validation refuses.
  const BODY: Record<string, ReqOptions> = {
    "connectors/:connector": { form: { intent: "report", text: "Anonymous report that must not be stored." } },
    garage: { form: { intent: "bike", family: FAMILY, year: "1979", label: "anonymous bike" } },
    account: { form: { intent: "password", current: DEMO.rider.password, password: "anonymous-new-password" } },
    admin: { form: { intent: "role", userId: "1", role: "admin" } },
  };
  // Allowed answers. Default: 302 (to sign in), 400, 401, 403, 405. Exceptions named with the reason.
  const DEFAULT = [302, 400, 401, 403, 405];
  const EXCEPTIONS: Record<string, { statuses: number[]; why: string }> = {
    "families/:family/circuits/:circuit": { statuses: [200], why: "public circuit-walk calculator: reads the typed readings, stores nothing" },
    "api/*": { statuses: [404], why: "catch-all: nothing answers there" },
  };

  it("the manifest has the account routes with actions", () => {
    const names = routes.map((r) => r.pattern);
    expect(names).toEqual(
      expect.arrayContaining(["connectors/:connector", "join", "login", "logout", "verify", "forgot", "reset", "account", "garage", "admin", "api/v1/me"]),
    );
  });

  for (const route of routes) {
    it(`POST /${route.pattern} (${route.file})`, async () => {
      const url = fill(route.pattern);
      const opts: ReqOptions = BODY[route.pattern] ?? (route.isApi ? { json: {} } : { form: {} });
      const before = await digest(srv);
      const r = await req(srv, url, opts);
      expect(await digest(srv), `POST ${url} wrote`).toEqual(before);
      const allowed = EXCEPTIONS[route.pattern]?.statuses ?? DEFAULT;
      expect(allowed, `POST ${url} → ${where(r)}`).toContain(r.status);
      if (r.status === 302) {
        const loc = new URL(r.location!, srv.url);
        expect(loc.pathname, "a redirect goes to sign in").toBe("/login");
      }
      if (route.isApi) expect(r.headers.get("content-type")).toMatch(/^application\/json/);
    });
  }
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S4 cross-site requests", () => {
  it("(a) page actions refuse a forged Origin even with a valid session cookie, and write nothing", async () => {
    const cases: { what: string; path: string; session: string | null; form: Record<string, string> }[] = [
      {
        what: "report a mistake",
        path: `/connectors/${CARD_C}`,
        session: sessions.rider,
        form: { intent: "report", text: "Forged report from another site." },
      },
      { what: "mark bike-checked", path: `/connectors/${CARD_C}`, session: sessions.rider, form: { intent: "check", year: "1981" } },
      { what: "save a card", path: `/connectors/${CARD_C}`, session: sessions.rider, form: { intent: "save" } },
      { what: "add a bike", path: "/garage", session: sessions.rider, form: { intent: "bike", family: FAMILY, year: "1981", label: "forged" } },
      {
        what: "change password",
        path: "/account",
        session: sessions.rider,
        form: { intent: "password", current: DEMO.rider.password, password: "forged-new-password-1" },
      },
      { what: "admin makes the rider an admin", path: "/admin", session: sessions.admin, form: { intent: "role", userId: "1", role: "admin" } },
      { what: "sign in (login CSRF)", path: "/login", session: null, form: { email: DEMO.moderator.email, password: DEMO.moderator.password } },
      {
        what: "join",
        path: "/join",
        session: null,
        form: { displayName: "Forged Join", email: "forged-join@loomlore.invalid", password: "forged-but-long-enough" },
      },
      { what: "forgot (mail someone)", path: "/forgot", session: null, form: { email: DEMO.contributor.email } },
      { what: "confirm an address", path: "/verify", session: null, form: { token: bystanderVerify.token } },
    ];
    for (const c of cases) {
      const before = await digest(srv);
      const r = await req(srv, c.path, { form: c.form, session: c.session, origin: EVIL });
      expect(r.status, `${c.what}: ${where(r)}`).toBeGreaterThanOrEqual(400);
      expect(r.status, `${c.what}: ${where(r)}`).toBeLessThan(500);
      expect(r.session, `${c.what}: no cookie handed out`).toBeNull();
      expect(await digest(srv), `${c.what} wrote`).toEqual(before);
    }
    // Control: the same report from our own origin goes through, so the refusal above was the Origin check.
    const ok = await req(srv, `/connectors/${CARD_C}`, { form: cases[0].form, session: sessions.rider });
    expect(ok.status, where(ok)).toBe(200);
  });

  it("(b) /logout refuses another site's POST with 403 forbidden (JSON) and the session stays signed in", async () => {
    const session = await signIn(srv, DEMO.moderator.email, DEMO.moderator.password);
    for (const headers of [{ Origin: EVIL }, { Origin: "null" }, { "Sec-Fetch-Site": "cross-site" }] as Record<string, string>[]) {
      const before = await digest(srv);
      const r = await req(srv, "/logout", { method: "POST", session, origin: null, headers });
      expect(r.status, `${JSON.stringify(headers)}: ${where(r)}`).toBe(403);
      expect(r.headers.get("content-type")).toMatch(/^application\/json/);
      expect(JSON.parse(r.body).error.code).toBe("forbidden");
      expect(r.session, "no cookie cleared").toBeNull();
      expect(await digest(srv)).toEqual(before);
      expect(await meStatus(srv, session)).toBe(200);
    }
  });

  it("(b) every /api/v1 POST endpoint refuses another site's POST with 403 forbidden, before reading the body", async () => {
    const api = manifest().filter((r) => r.isApi && r.hasAction && r.pattern !== "api/*");
    const postOnly: string[] = [];
    for (const route of api) {
      const url = fill(route.pattern);
      const probe = await req(srv, url);
      if (probe.status === 405 && /POST/.test(probe.headers.get("allow") ?? "")) postOnly.push(url);
    }
    expect(postOnly.length, `POST endpoints found: ${postOnly.join(", ")}`).toBeGreaterThanOrEqual(4);
    for (const url of postOnly) {
      for (const headers of [{ Origin: EVIL }, { "Sec-Fetch-Site": "cross-site" }] as Record<string, string>[]) {
        const before = await digest(srv);
        const r = await req(srv, url, { json: {}, session: sessions.admin, origin: null, headers });
        expect(r.status, `POST ${url} ${JSON.stringify(headers)}: ${where(r)}`).toBe(403);
        expect(JSON.parse(r.body).error.code).toBe("forbidden");
        expect(await digest(srv)).toEqual(before);
      }
    }
    // Read-only API routes answer 405 to any POST, from anywhere.
    for (const route of api) {
      const url = fill(route.pattern);
      if (postOnly.includes(url)) continue;
      const r = await req(srv, url, { json: {}, session: sessions.admin, origin: EVIL });
      expect([403, 405], `POST ${url} from another site: ${where(r)}`).toContain(r.status);
    }
  });

  it("(d) a crawl GETting every page and API route (and the links on them), signed out, as rider and as admin, changes nothing", async () => {
    // An unused reset link joins the crawl: opening it (like a mail scanner would) must not use it up.
    expect((await req(srv, "/forgot", { form: { email: BYSTANDER.email } })).status).toBe(200);
    const reset = mailLink(await waitForMail(srv, BYSTANDER.email, (m) => /reset/i.test(m.subject)), "reset");
    const seeds = manifest().map((r) => fill(r.pattern));
    seeds.push(bystanderVerify.path, reset.path, "/logout", "/login?next=%2Fadmin");
    const before = await digest(srv);
    const seen = new Set<string>();
    for (const who of ["anonymous", "rider", "admin"] as Actor[]) {
      const queue = [...seeds];
      const visited = new Set<string>();
      while (queue.length && visited.size < 120) {
        const url = queue.shift()!;
        if (visited.has(url)) continue;
        visited.add(url);
        const r = await req(srv, url, { session: sessions[who] });
        expect(r.status, `GET ${url} as ${who}: ${where(r)}`).toBeLessThan(500);
        if (r.status === 200 && /text\/html/.test(r.headers.get("content-type") ?? "")) {
          for (const href of doc(r.body).hrefs()) {
            // Our own links, and the mail links the admin page shows (absolute, to APP_URL = localhost on our port).
            const u = new URL(href, srv.url);
            const ours = u.origin === srv.url || (u.hostname === "localhost" && u.port === new URL(srv.url).port);
            if (!ours || u.pathname.startsWith("/assets/")) continue;
            const next = u.pathname + u.search;
            if (!visited.has(next)) queue.push(next);
          }
        }
        seen.add(url);
      }
      expect(await meStatus(srv, sessions[who]), `${who} is still ${who === "anonymous" ? "signed out" : "signed in"} after GET /logout`).toBe(
        who === "anonymous" ? 401 : 200,
      );
    }
    expect(seen.size).toBeGreaterThan(40);
    expect(await digest(srv), "GET changed the account tables").toEqual(before);
    // The links still work once (nothing above used them up): the reset page still offers its form with the token.
    const [tokenRow] = await query<{ used: number }>(srv, "SELECT count(*) AS used FROM tokens WHERE used_at IS NOT NULL AND user_id = ?", [
      await userId(srv, BYSTANDER.email),
    ]);
    expect(tokenRow.used, "no token of the bystander was used by a GET").toBe(0);
  }, 90_000);

  it("(e) the lockfile pins react-router ≥ 7.12.0 (CVE-2026-22030: CSRF on UI-route actions before 7.12.0)", () => {
    const lock = JSON.parse(readFileSync(path.join(root, "package-lock.json"), "utf8")) as { packages: Record<string, { version?: string }> };
    const names = Object.keys(lock.packages).filter((k) => /(^|\/)node_modules\/(react-router|@react-router\/[a-z-]+)$/.test(k));
    expect(names).toContain("node_modules/react-router");
    const atLeast = (v: string, min: [number, number, number]) => {
      const [a, b, c] = v.split(/[.-]/).map(Number);
      return a !== min[0] ? a > min[0] : b !== min[1] ? b > min[1] : c >= min[2];
    };
    for (const n of names) expect(atLeast(lock.packages[n].version!, [7, 12, 0]), `${n}@${lock.packages[n].version}`).toBe(true);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S5 session cookie attributes (production)", () => {
  it("the login response sets __Host-loomlore; HttpOnly; Secure; SameSite=Lax; Path=/; no Domain; ≤ 4096 bytes; the value is in no URL, page or log line", async () => {
    const r = await req(srv, "/login?next=%2Faccount", { form: { email: DEMO.contributor.email, password: DEMO.contributor.password } });
    expect(r.status).toBe(302);
    const cookies = r.headers.getSetCookie();
    expect(
      cookies.filter((c) => /^__Host-loomlore=/.test(c)),
      cookies.join(" | "),
    ).toHaveLength(1);
    const [nameValue, ...attrs] = r.setCookie!.split(";").map((s) => s.trim());
    const attr = new Map(
      attrs.map((a) => {
        const [k, ...v] = a.split("=");
        return [k.toLowerCase(), v.join("=")];
      }),
    );
    expect(nameValue.startsWith("__Host-")).toBe(true);
    expect(attr.has("httponly")).toBe(true);
    expect(attr.has("secure")).toBe(true);
    expect(attr.get("samesite")?.toLowerCase()).toBe("lax");
    expect(attr.get("path")).toBe("/");
    expect(attr.has("domain")).toBe(false);
    expect(Buffer.byteLength(nameValue)).toBeLessThanOrEqual(4096);
    const token = r.session!;
    expect(token.length).toBeGreaterThanOrEqual(32); // 32 random bytes, base64url

    expect(r.location).toBe("/account");
    expect(r.location).not.toContain(token);
    for (const url of ["/account", "/garage", "/api/v1/me", `/connectors/${CARD}`]) {
      const page = await req(srv, url, { session: token });
      expect(page.status, url).toBe(200);
      expect(page.body, `${url} shows the session value`).not.toContain(token);
      expect(page.location ?? "").not.toContain(token);
    }
    const admin = await req(srv, "/admin", { session: sessions.admin });
    expect(admin.body, "the admin page (audit log, outbox) shows the session value").not.toContain(token);
    expect(srv.output(), "a log line carries the session value").not.toContain(token);
    const [stored] = await query<{ n: number }>(srv, "SELECT count(*) AS n FROM sessions WHERE token_hash = ?", [token]);
    expect(stored.n, "the raw token is stored (only its hash should be)").toBe(0);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S6 a new session id on sign-in", () => {
  it("two sign-ins from two clients get different values, and both work", async () => {
    const a = await signIn(srv, DEMO.contributor.email, DEMO.contributor.password);
    const b = await signIn(srv, DEMO.contributor.email, DEMO.contributor.password);
    expect(a).not.toBe(b);
    expect(await meStatus(srv, a)).toBe(200);
    expect(await meStatus(srv, b)).toBe(200);
  });

  it("signing in with cookie A present ends A: replaying A afterwards is 401", async () => {
    const a = await signIn(srv, DEMO.moderator.email, DEMO.moderator.password);
    const b = await signIn(srv, DEMO.moderator.email, DEMO.moderator.password, a);
    expect(b).not.toBe(a);
    expect(await meStatus(srv, a)).toBe(401);
    expect(await meStatus(srv, b)).toBe(200);
  });

  it("a cookie value chosen by someone else before sign-in is never adopted (session fixation)", async () => {
    const planted = "planted-by-an-attacker-0123456789abcdefABCDEF";
    const b = await signIn(srv, DEMO.moderator.email, DEMO.moderator.password, planted);
    expect(b).not.toBe(planted);
    expect(await meStatus(srv, planted)).toBe(401);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S7 sign-out, password change and reset end sessions", () => {
  const USER = { email: "two-clients@loomlore.invalid", displayName: "Two Clients", password: "first-password-for-s7" };
  /** Change the password with the account page's plain form: a success redirects to /account with a new session cookie. */
  const changePassword = async (session: string, form: Record<string, string>) => {
    const r = await req(srv, "/account", { form: { intent: "password", ...form }, session });
    expect(r.status, where(r)).toBe(302);
    expect(r.location).toBe("/account?notice=password");
    const page = r.session ? await req(srv, "/account?notice=password", { session: r.session }) : null;
    return { ...r, status: page?.status ?? r.status, body: page?.body ?? r.body };
  };

  beforeAll(async () => {
    await joinAndReadMail(srv, USER.email, USER.displayName, USER.password);
  }, 30_000);

  it("a copied cookie replayed after sign-out is 401; the sign-out clears the cookie with the same attributes", async () => {
    const s = await signIn(srv, DEMO.contributor.email, DEMO.contributor.password);
    const copy = s;
    const out = await req(srv, "/logout", { method: "POST", session: s });
    expect(out.status, where(out)).toBe(302);
    expect(out.location).toBe("/login?notice=signed-out");
    expect(out.setCookie).toMatch(/^__Host-loomlore=;/);
    expect(out.setCookie).toMatch(/Max-Age=0/);
    expect(out.setCookie).toMatch(/Path=\//);
    expect(out.setCookie).toMatch(/Secure/);
    expect(await meStatus(srv, copy)).toBe(401);
    expect((await req(srv, "/garage", { session: copy })).status).toBe(302);
  });

  it("change password with “Sign out everywhere else”: the other client is 401, the changing client gets a new cookie that works", async () => {
    const one = await signIn(srv, USER.email, USER.password);
    const two = await signIn(srv, USER.email, USER.password);
    const next = "second-password-for-s7";
    const r = await changePassword(one, { current: USER.password, password: next, signOutOthers: "on" });
    expect(r.status, where(r)).toBe(200);
    expect(r.body).toContain("Your password is changed.");
    expect(r.session).toBeTruthy();
    expect(r.session).not.toBe(one);
    expect(await meStatus(srv, two), "the other client").toBe(401);
    expect(await meStatus(srv, one), "the changing client's old cookie (rotated)").toBe(401);
    expect(await meStatus(srv, r.session), "the changing client's new cookie").toBe(200);
    USER.password = next;
  });

  it("change password without the checkbox: the other client stays signed in", async () => {
    const one = await signIn(srv, USER.email, USER.password);
    const two = await signIn(srv, USER.email, USER.password);
    const next = "third-password-for-s7";
    const r = await changePassword(one, { current: USER.password, password: next });
    expect(r.status, where(r)).toBe(200);
    expect(r.body).toContain("Your password is changed.");
    expect(await meStatus(srv, two)).toBe(200);
    expect(await meStatus(srv, r.session)).toBe(200);
    USER.password = next;
  });

  // A plain form POST (no JavaScript) keeps the rider signed in: the redirect carries the new cookie.
  it("change password by a plain form POST (no JavaScript): the redirect carries a new cookie that works and the notice shows", async () => {
    const one = await signIn(srv, USER.email, USER.password);
    const r = await changePassword(one, { current: USER.password, password: USER.password, signOutOthers: "on" });
    expect(r.status).toBe(200);
    expect(r.body).toContain("Your password is changed.");
    expect(r.session).toBeTruthy();
    expect(await meStatus(srv, r.session)).toBe(200);
  });

  it("a wrong current password changes nothing and the error is beside the current-password field", async () => {
    const one = await signIn(srv, USER.email, USER.password);
    const before = await digest(srv);
    const r = await req(srv, "/account", {
      form: { intent: "password", current: "not-my-password-at-all", password: "fourth-password-for-s7", signOutOthers: "on" },
      session: one,
    });
    expect(r.status).toBe(400);
    expect(fieldError(r.body, "current")).toMatch(/current password/i);
    expect(await digest(srv)).toEqual(before);
  });

  it("reset via the mailed link ends every session; the link works once", async () => {
    const one = await signIn(srv, USER.email, USER.password);
    const two = await signIn(srv, USER.email, USER.password);
    const f = await req(srv, "/forgot", { form: { email: USER.email } });
    expect(f.status).toBe(200);
    const link = mailLink(await waitForMail(srv, USER.email, (m) => /reset/i.test(m.subject)), "reset");
    const page = await req(srv, link.path);
    expect(page.status).toBe(200);
    const hidden = doc(page.body).one("input", { name: "token" })?.attribs.value;
    expect(hidden, "the reset page carries the token in its form").toBe(link.token);
    // A refused new password leaves the link usable (the token use is rolled back) and the error is beside the field.
    const short = await req(srv, "/reset", { form: { token: hidden!, password: "short-pw" } });
    expect(short.status, where(short)).toBe(400);
    expect(fieldError(short.body, "password")).toMatch(/at least 12 characters/);
    expect(await meStatus(srv, one), "a refused reset ends no session").toBe(200);
    const next = "reset-password-for-s7";
    const r = await req(srv, "/reset", { form: { token: hidden!, password: next } });
    expect(r.status, where(r)).toBe(302);
    expect(r.location).toBe("/login?notice=reset");
    expect(await meStatus(srv, one)).toBe(401);
    expect(await meStatus(srv, two)).toBe(401);
    const old = await req(srv, "/login", { form: { email: USER.email, password: USER.password } });
    expect(old.status, "the old password").toBe(401);
    await signIn(srv, USER.email, next);

    const before = await digest(srv);
    const again = await req(srv, "/reset", { form: { token: link.token, password: "another-reset-password" } });
    expect(again.status, where(again)).toBe(400);
    expect(alertText(again.body)).toMatch(/expired or was already used/);
    expect(await digest(srv)).toEqual(before);
    await signIn(srv, USER.email, next);
    USER.password = next;
  }, 30_000);
});

// ---------------------------------------------------------------------------------------------------------------------

describe("S8 password storage and policy", () => {
  const values = (html: string) => {
    const d = doc(html);
    const v = (n: string) => {
      const i = d.one("input", { name: n });
      return i ? (i.attribs.value ?? "") : null;
    };
    return { email: v("email"), displayName: v("displayName"), password: v("password") };
  };

  /** A rejected join: 400, the message beside the password field, other fields kept, the password not echoed, nothing stored. */
  async function expectRejected(email: string, displayName: string, password: string, message: RegExp) {
    const before = await digest(srv);
    const r = await join(srv, email, displayName, password);
    expect(r.status, where(r)).toBe(400);
    const d = doc(r.body);
    const input = d.one("input", { name: "password" })!;
    const err = d.byId("password-error");
    expect(text(err), "the error is beside the password field").toMatch(message);
    expect(err!.parent, "error and input share the field").toBe(input.parent);
    expect(input.attribs["aria-invalid"]).toBe("true");
    expect(input.attribs["aria-describedby"] ?? "").toContain("password-error");
    expect(d.byId("email-error"), "no error on the e-mail field").toBeNull();
    expect(d.byId("displayName-error"), "no error on the name field").toBeNull();
    expect(values(r.body)).toEqual({ email, displayName, password: "" });
    expect(r.body, "the rejected password is not echoed").not.toContain(password);
    expect(await digest(srv)).toEqual(before);
  }

  async function expectAccepted(email: string, displayName: string, password: string) {
    const r = await join(srv, email, displayName, password);
    expect(r.status, where(r)).toBe(200);
    expect(text(doc(r.body).one("h1"))).toBe("Check your inbox");
    await waitForMail(srv, email);
    await signIn(srv, email, password);
  }

  it("stored hashes are bcrypt with cost ≥ 10 (12 here), for a seeded and a joined account", async () => {
    const rows = await query<{ email: string; password_hash: string }>(srv, "SELECT email, password_hash FROM users WHERE email IN (?, ?)", [
      DEMO.rider.email,
      RIDER_B.email,
    ]);
    expect(rows).toHaveLength(2);
    for (const row of rows) {
      const m = /^\$2[aby]\$(\d\d)\$[./A-Za-z0-9]{53}$/.exec(row.password_hash);
      expect(m, `${row.email}: ${row.password_hash.slice(0, 7)}…`).not.toBeNull();
      expect(Number(m![1])).toBeGreaterThanOrEqual(10);
      expect(Number(m![1])).toBe(12);
    }
  });

  it("two passwords equal in their first 72 bytes but different after do not both sign in", async () => {
    const p1 = "a".repeat(80) + "1";
    const p2 = "a".repeat(80) + "2";
    await expectAccepted("long-password@loomlore.invalid", "Long Password", p1);
    const wrong = await req(srv, "/login", { form: { email: "long-password@loomlore.invalid", password: p2 } });
    expect(wrong.status, "the 81-character sibling must not sign in").toBe(401);
    expect(wrong.session).toBeNull();
  }, 20_000);

  it("11 characters: rejected, the error beside the password field, e-mail and name kept", async () => {
    await expectRejected("eleven@loomlore.invalid", "Eleven Chars", "abcdefghijk", /at least 12 characters/);
  });

  it("129 characters: rejected", async () => {
    await expectRejected("too-long@loomlore.invalid", "Too Long", "wiring-loom ".repeat(11).slice(0, 129), /at most 128 characters/);
  });

  it("a common password (password1234): rejected", async () => {
    await expectRejected("common@loomlore.invalid", "Common Choice", "password1234", /most common/);
  });

  it("64 characters: accepted (and signs in)", async () => {
    const p = "bullet-connector-".repeat(4).slice(0, 64);
    expect(p).toHaveLength(64);
    await expectAccepted("sixty-four@loomlore.invalid", "Sixty Four", p);
  }, 20_000);

  it("12 emoji: accepted (and signs in)", async () => {
    const p = "🔧🔩⚡🔋🔌💡🧰🔥🏁🧲🚦🛠";
    expect([...p]).toHaveLength(12);
    await expectAccepted("emoji@loomlore.invalid", "Emoji Rider", p);
  }, 20_000);
});

// ---------------------------------------------------------------------------------------------------------------------

describe("account mail through the stand-in", () => {
  const NEW = { email: "new-rider@loomlore.invalid", displayName: "New Rider", password: "magneto-timing-marks" };
  let joinPage = "";

  it("join sends a verify mail; its page confirms the address with a POST; the rider becomes a contributor; the link works once", async () => {
    const r = await join(srv, NEW.email, NEW.displayName, NEW.password);
    expect(r.status, where(r)).toBe(200);
    joinPage = r.body;
    const mail = await waitForMail(srv, NEW.email);
    expect(mail.subject).toMatch(/Confirm your e-mail address/);
    expect(mail.text).toContain(NEW.displayName);
    const link = mailLink(mail, "verify");
    const session = await signIn(srv, NEW.email, NEW.password);
    expect(await me(srv, session)).toMatchObject({ role: "rider", displayName: NEW.displayName });

    const first = await confirmFromPage(srv, link.path, session);
    expect(first.status, where(first)).toBe(200);
    expect(text(doc(first.body).one("h1"))).toBe("Address confirmed");
    expect(await me(srv, session)).toMatchObject({ role: "contributor" });

    const before = await digest(srv);
    const second = await confirmFromPage(srv, link.path, session);
    expect(second.status, where(second)).toBe(400);
    expect(text(doc(second.body).one("h1"))).toBe("This link doesn't work");
    expect(await digest(srv)).toEqual(before);
    expect(await me(srv, session)).toMatchObject({ role: "contributor" });
  }, 30_000);

  it("forgot for an unknown address answers exactly like a known one, and sends nothing", async () => {
    const known = await req(srv, "/forgot", { form: { email: NEW.email } });
    const unknown = await req(srv, "/forgot", { form: { email: "nobody-here@loomlore.invalid" } });
    expect(unknown.status).toBe(known.status);
    expect(known.status).toBe(200);
    expect(withoutAddress(unknown.body, "nobody-here@loomlore.invalid")).toBe(withoutAddress(known.body, NEW.email));
    await waitForMail(srv, NEW.email, (m) => /reset/i.test(m.subject));
    expect(await inbox(srv, "nobody-here@loomlore.invalid")).toEqual([]);
    expect(await query(srv, "SELECT id FROM mail_outbox WHERE to_addr = ?", ["nobody-here@loomlore.invalid"])).toEqual([]);
  }, 30_000);

  it("joining with an existing address answers the same page, creates nothing and mails the owner instead", async () => {
    expect(joinPage).not.toBe("");
    const owner = DEMO.contributor.email;
    const usersBefore = await query(srv, "SELECT * FROM users ORDER BY id");
    const r = await join(srv, owner, "Someone Else", "a-different-password-here");
    expect(r.status, where(r)).toBe(200);
    expect(withoutAddress(r.body, owner)).toBe(withoutAddress(joinPage, NEW.email));
    const mail = await waitForMail(srv, owner, (m) => /Joining Loomlore/.test(m.subject));
    expect(mail.text).not.toMatch(/verify\?token=/);
    expect(await query(srv, "SELECT * FROM users ORDER BY id"), "no account created or changed").toEqual(usersBefore);
    const wrong = await req(srv, "/login", { form: { email: owner, password: "a-different-password-here" } });
    expect(wrong.status, "the joiner's password does not open the owner's account").toBe(401);
  }, 30_000);
});

// ---------------------------------------------------------------------------------------------------------------------
// S9 and the join race run on their own server: the per-account limit they trip would get in the others' way.

describe("S9 brute force and enumeration (own server)", () => {
  let s9: TestServer;
  beforeAll(async () => {
    s9 = await s9Boot!;
    await signIn(s9, DEMO.admin.email, DEMO.admin.password); // warm: database ready, first bcrypt done
  }, 60_000);

  it("unknown address vs wrong password: same status, same text, median time within 20 ms", async () => {
    const wrongFor = DEMO.contributor.email;
    const known: number[] = [];
    const unknown: number[] = [];
    let knownBody = "";
    let unknownBody = "";
    for (let i = 0; i < 33; i++) {
      const nobody = `nobody-${i}@loomlore.invalid`;
      const t0 = performance.now();
      const a = await req(s9, "/login", { form: { email: wrongFor, password: `wrong-password-${i}` } });
      const t1 = performance.now();
      const b = await req(s9, "/login", { form: { email: nobody, password: `wrong-password-${i}` } });
      const t2 = performance.now();
      expect(a.status).toBe(401);
      expect(b.status).toBe(401);
      if (i < 3) continue; // warm-up (the dummy hash is made on first use)
      known.push(t1 - t0);
      unknown.push(t2 - t1);
      expect(doc(b.body).one("input", { name: "email" })?.attribs.value, "the failed form keeps the address").toBe(nobody);
      knownBody = withoutAddress(a.body, wrongFor);
      unknownBody = withoutAddress(b.body, nobody);
      expect(unknownBody).toBe(knownBody);
    }
    expect(alertText(knownBody)).toBe("That e-mail address and password don't match an account.");
    const diff = Math.abs(median(known) - median(unknown));
    expect(diff, `median wrong password ${median(known).toFixed(1)} ms, unknown address ${median(unknown).toFixed(1)} ms`).toBeLessThan(20);
  }, 60_000);

  it("120 wrong passwords for one account from one address: at most 100 evaluated, the rest 429 with Retry-After; other accounts unaffected", async () => {
    const victim = DEMO.moderator.email;
    const counts: Record<number, number> = {};
    const limitedMs: number[] = [];
    const evaluatedMs: number[] = [];
    for (let i = 0; i < 120; i++) {
      const t0 = performance.now();
      const r = await req(s9, "/login", { form: { email: victim, password: `guess-number-${i}` } });
      const ms = performance.now() - t0;
      counts[r.status] = (counts[r.status] ?? 0) + 1;
      if (r.status === 429) {
        limitedMs.push(ms);
        expect(alertText(r.body)).toMatch(/Too many attempts. Try again in \d+ minute/);
      } else evaluatedMs.push(ms);
    }
    expect(Object.keys(counts).map(Number).sort()).toEqual([401, 429]);
    expect(counts[401], "evaluated (401)").toBeLessThanOrEqual(100);
    expect(counts[401], "evaluated (401)").toBeGreaterThan(0);
    expect(counts[429], "limited (429)").toBeGreaterThanOrEqual(20);
    // Limits come before bcrypt: a limited answer is much faster than an evaluated one.
    expect(median(limitedMs)).toBeLessThan(median(evaluatedMs) / 3);
    // Even the right password is not evaluated while the account is limited (else the limit would leak it).
    const right = await req(s9, "/login", { form: { email: victim, password: DEMO.moderator.password } });
    expect(right.status).toBe(429);
    expect(right.session).toBeNull();
    // Another account from the same address signs in fine.
    await signIn(s9, DEMO.rider.email, DEMO.rider.password);
  }, 90_000);

  // ASVS / API.md: a 429 says when to come back (Retry-After, seconds); the routes pass the action's header on.
  it("a limited sign-in (429) carries Retry-After in seconds", async () => {
    const r = await req(s9, "/login", { form: { email: DEMO.moderator.email, password: "still-guessing" } });
    expect(r.status).toBe(429); // the account is limited by the test above
    const retry = r.headers.get("retry-after");
    expect(retry ?? "(none)", "429 carries Retry-After").toMatch(/^\d+$/);
    expect(Number(retry)).toBeGreaterThan(0);
    expect(Number(retry)).toBeLessThanOrEqual(3600);
  });

  // Transactions begin IMMEDIATE (db/index.server.ts): a write waits for the mail worker's lock instead of failing at once.
  it("20 sequential joins while the mail worker runs all answer 200 (none fails with SQLITE_BUSY → 500)", async () => {
    for (let i = 0; i < 20; i++) {
      const r = await join(s9, `race-${i}@loomlore.invalid`, `Race ${i}`, `race-condition-password-${i}`, true);
      expect(r.status, `join #${i + 1}: ${where(r)}`).toBe(200); // stops at the first 500
    }
    expect(s9.output()).not.toContain("SQLITE_BUSY");
  }, 60_000);
});

// QUALITY S14 (ASVS V14.4): "Every HTML response: CSP with per-request nonce present on all inline scripts (React Router
// security doc), frame-ancestors 'none', nosniff, Referrer-Policy; no X-Powered-By."
describe("S14 response headers and the script nonce", () => {
  const PAGES = ["/", `/families/${FAMILY}`, `/connectors/${CARD}`, "/search?q=pickup", "/login", "/colours", "/no-such-page"];
  const scriptNonce = (csp: string) => /script-src [^;]*'nonce-([A-Za-z0-9+/=]+)'/.exec(csp)?.[1] ?? null;

  for (const page of PAGES) {
    it(`${page}: one policy with a fresh nonce that every <script> carries; framing refused; nosniff; Referrer-Policy; no X-Powered-By`, async () => {
      const r = await req(srv, page);
      expect([200, 404]).toContain(r.status);
      expect(r.headers.get("content-type")).toMatch(/^text\/html/);
      const csp = r.headers.get("content-security-policy") ?? "";
      expect(csp, "a single policy, not two joined").not.toContain(",");
      expect(csp).toContain("frame-ancestors 'none'");
      expect(csp).toMatch(/script-src 'self' 'nonce-/);
      expect(csp, "no unsafe-inline or unsafe-eval for scripts").not.toMatch(/unsafe-(inline|eval)/);
      const nonce = scriptNonce(csp);
      expect(nonce, csp).toBeTruthy();
      expect(Buffer.from(nonce!, "base64").length, "128 random bits").toBeGreaterThanOrEqual(16);
      const scripts = DomUtils.getElementsByTagName("script", parseDocument(r.body));
      expect(scripts.length, "the page has React Router's scripts").toBeGreaterThan(0);
      expect(scripts.filter((s) => s.attribs.nonce !== nonce).map((s) => DomUtils.getOuterHTML(s).slice(0, 120))).toEqual([]);
      expect(r.headers.get("x-content-type-options")).toBe("nosniff");
      expect(r.headers.get("referrer-policy")).toBeTruthy();
      expect(r.headers.get("x-powered-by")).toBeNull();
    });
  }

  it("each response has its own nonce", async () => {
    const nonces = new Set<string | null>();
    for (let i = 0; i < 5; i++) nonces.add(scriptNonce((await req(srv, "/")).headers.get("content-security-policy") ?? ""));
    expect(nonces.size).toBe(5);
  });

  // S14 / ASVS V7.4.1: "A thrown error in a loader yields a generic page with an error id, no stack trace."
  it("a loader that throws: a generic 500 page with an error id and no detail; the server's log line has the same id", async () => {
    const s = await startServer();
    try {
      expect((await req(s, "/")).status).toBe(200);
      await execSql(s.dbPath, "ALTER TABLE makes RENAME TO makes_gone"); // the home page's loader now fails
      const r = await req(s, "/");
      expect(r.status, where(r)).toBe(500);
      expect(r.body).toContain("Something went wrong");
      const id = /Error id (?:<!-- -->)?<code>([0-9a-f]{8})<\/code>/.exec(r.body)?.[1];
      expect(id, "the page shows an error id").toBeTruthy();
      expect(r.body, "no error text, SQL or stack on the page").not.toMatch(
        /SQLITE|no such table|makes_gone|SequelizeDatabaseError|\bat \S+ \(|\.(?:ts|js):\d+/,
      );
      await expect.poll(() => s.output(), { timeout: 5_000 }).toContain(`[error ${id}] GET /:`);
      expect(r.headers.get("content-security-policy")).toMatch(/script-src 'self' 'nonce-/);
      const other = /Error id (?:<!-- -->)?<code>([0-9a-f]{8})<\/code>/.exec((await req(s, "/")).body)?.[1];
      expect(other, "each failing request has its own id").not.toBe(id);
    } finally {
      await s.stop();
    }
  });

  it("JSON and files keep the base policy (no framing, nosniff) without a script nonce", async () => {
    for (const p of ["/api/v1/health", "/favicon.svg"]) {
      const r = await req(srv, p);
      expect(r.status, p).toBe(200);
      expect(r.headers.get("content-security-policy"), p).toContain("frame-ancestors 'none'");
      expect(r.headers.get("x-content-type-options"), p).toBe("nosniff");
      expect(r.headers.get("x-powered-by"), p).toBeNull();
    }
  });
});
