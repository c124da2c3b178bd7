/**
 * The outbox (app/services/mail.server.ts) against the mail stand-in (mail/server.ts), in-process: QUALITY.md F3 "SMTP down".
 * DB_PATH and SMTP_URL are set before the database and mail modules are imported (the Sequelize instance reads DB_PATH
 * at import). Each fault mode of the stand-in is injected, the outbox row must stay queued with attempts+1 and a backoff,
 * 550 must fail without retry, and after the relay is back every mail arrives exactly once per Message-ID.
 */
import { spawn } from "node:child_process";
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { Op } from "sequelize";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { startMailStandIn, type FaultMode, type MailStandIn, type StoredMessage } from "../../mail/server.ts";

type MailModule = typeof import("../../app/services/mail.server.ts");
type Models = typeof import("../../db/models/index.ts");
type Db = typeof import("../../db/index.server.ts");

const root = path.resolve(import.meta.dirname, "../..");
const dir = mkdtempSync(path.join(tmpdir(), "loomlore-mail-"));
const dbPath = path.join(dir, "mail.sqlite");
const MINUTE = 60_000;
const HOUR = 60 * MINUTE;

let standIn: MailStandIn;
let api: string;
let mail: MailModule;
let m: Models;
let db: Db;
let warn: ReturnType<typeof vi.spyOn>;
/** The app's settings (read once from the environment at load): a case that changes one sets it here. */
let settings: typeof import("../../app/env.server.ts").env;

beforeAll(async () => {
  standIn = await startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir: path.join(dir, "stand-in") });
  api = `http://127.0.0.1:${standIn.httpPort}`;
  process.env.DB_PATH = dbPath;
  process.env.SMTP_URL = `smtp://127.0.0.1:${standIn.smtpPort}`;
  process.env.MAIL_TIMEOUT_MS = "1000"; // the slow-greeting case gives up after 1 s instead of 5
  delete process.env.MAIL_FROM;
  db = await import("../../db/index.server.ts");
  expect(db.databasePath()).toBe(dbPath); // not a Sequelize instance left over from another import
  const { setupDatabase } = await import("../../db/setup.ts");
  await setupDatabase({ seed: false });
  mail = await import("../../app/services/mail.server.ts");
  settings = (await import("../../app/env.server.ts")).env;
  m = await import("../../db/models/index.ts");
  // Every failed try logs a line; keep the output readable (the secrets test reads these calls).
  warn = vi.spyOn(console, "warn").mockImplementation(() => {});
});

afterAll(async () => {
  await mail?.stopMailWorker();
  warn?.mockRestore();
  await standIn?.close();
  await db?.sequelize.close();
  rmSync(dir, { recursive: true, force: true });
});

beforeEach(async () => {
  await fault("none");
  await fetch(`${api}/messages`, { method: "DELETE" });
  await m.MailOutbox.destroy({ where: {} });
  await m.AuditLog.destroy({ where: {} });
});

// ---------------------------------------------------------------------------------------------------------------------

async function fault(mode: FaultMode) {
  const r = await fetch(`${api}/fault`, { method: "POST", body: JSON.stringify({ mode }) });
  expect(r.status, await r.clone().text()).toBe(200);
}
async function inbox(query = ""): Promise<StoredMessage[]> {
  return (await fetch(`${api}/messages${query}`)).json();
}
async function health(): Promise<{ status: string; mode: string; messages: number; duplicates: number }> {
  return (await fetch(`${api}/health`)).json();
}

let seq = 0;
function sample(over: Partial<import("../../app/services/mail.server.ts").OutgoingMail> = {}) {
  seq += 1;
  return { kind: "test", to: `rider${seq}@example.invalid`, subject: `Test mail ${seq}`, text: `Plain body ${seq}`, html: `<p>HTML body ${seq}</p>`, ...over };
}
const rowFor = async (to: string) => (await m.MailOutbox.findOne({ where: { toAddr: to } }))!;
const zero = { sent: 0, retried: 0, failed: 0 };
const copiesOf = (list: StoredMessage[], messageId: string) => list.filter((x) => x.messageId === messageId).length;

// ---------------------------------------------------------------------------------------------------------------------

describe("enqueueMail", () => {
  it("commits with the action that causes it and sends nothing itself; Message-ID from MAIL_FROM's domain", async () => {
    const x = sample();
    await db.sequelize.transaction(async (transaction) => {
      await m.AuditLog.create({ actorId: null, action: "test.action", subjectType: "test", subjectId: "1", detail: "{}", at: new Date() }, { transaction });
      await mail.enqueueMail(x, transaction);
    });
    const row = await rowFor(x.to);
    expect(row.status).toBe("queued");
    expect(row.attempts).toBe(0);
    expect(row.messageId).toMatch(/^<[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}@loomlore\.invalid>$/);
    expect([row.kind, row.subject, row.text, row.html]).toEqual([x.kind, x.subject, x.text, x.html]);
    expect(await m.AuditLog.count({ where: { action: "test.action" } })).toBe(1);
    expect(await inbox()).toEqual([]);

    const from = settings.MAIL_FROM;
    settings.MAIL_FROM = "Loomlore workshop <post@mail.loomlore.invalid>";
    try {
      const y = sample();
      await mail.enqueueMail(y);
      expect((await rowFor(y.to)).messageId).toMatch(/@mail\.loomlore\.invalid>$/);
    } finally {
      settings.MAIL_FROM = from;
    }
  });

  it("inside a rolled-back transaction leaves no row", async () => {
    const x = sample();
    await expect(
      db.sequelize.transaction(async (transaction) => {
        await m.AuditLog.create({ actorId: null, action: "test.action", subjectType: "test", subjectId: "1", detail: "{}", at: new Date() }, { transaction });
        await mail.enqueueMail(x, transaction);
        throw new Error("the action failed");
      }),
    ).rejects.toThrow("the action failed");
    expect(await m.MailOutbox.count()).toBe(0);
    expect(await m.AuditLog.count()).toBe(0);
    expect(await mail.deliverDueMail()).toEqual(zero);
  });

  it("refuses header injection (CR/LF in to or subject) and address lists", async () => {
    await expect(mail.enqueueMail(sample({ to: "a@example.invalid\r\nBcc: b@example.invalid" }))).rejects.toThrow(/line break/);
    await expect(mail.enqueueMail(sample({ to: "a@example.invalid\nBcc: b@example.invalid" }))).rejects.toThrow(/line break/);
    await expect(mail.enqueueMail(sample({ subject: "Hello\r\nBcc: b@example.invalid" }))).rejects.toThrow(/line break/);
    await expect(mail.enqueueMail(sample({ subject: "Hello\nX-Extra: 1" }))).rejects.toThrow(/line break/);
    await expect(mail.enqueueMail(sample({ to: "a@example.invalid, b@example.invalid" }))).rejects.toThrow(/one plain/);
    await expect(mail.enqueueMail(sample({ to: "Rider <a@example.invalid>" }))).rejects.toThrow(/one plain/);
    expect(await m.MailOutbox.count()).toBe(0);
  });
});

describe("delivery and the stand-in's list", () => {
  it("sends each due mail once with its stored Message-ID; GET /messages is newest first with the documented shape", async () => {
    const mails = [sample(), sample(), sample()];
    for (const x of mails) await mail.enqueueMail(x);
    expect(await mail.deliverDueMail()).toEqual({ sent: 3, retried: 0, failed: 0 });

    const rows = await m.MailOutbox.findAll({ order: [["id", "ASC"]] });
    for (const row of rows) {
      expect(row.status).toBe("sent");
      expect(row.attempts).toBe(1);
      expect(row.sentAt).toBeInstanceOf(Date);
      expect(row.leaseUntil).toBeNull();
      expect(row.lastError).toBeNull();
    }
    const list = await inbox();
    expect(list.map((x) => x.messageId)).toEqual(rows.map((r) => r.messageId).reverse()); // newest first
    for (const x of list) expect(Object.keys(x).sort()).toEqual(["from", "html", "id", "messageId", "receivedAt", "subject", "text", "to"]);
    const first = list[2];
    expect(first.to).toBe(mails[0].to);
    expect(first.from).toContain("no-reply@loomlore.invalid");
    expect(first.subject).toBe(mails[0].subject);
    expect(first.text.trim()).toBe(mails[0].text);
    expect(first.html).toContain(mails[0].html);
    expect(new Date(first.receivedAt).toISOString()).toBe(first.receivedAt);
    expect(list.map((x) => x.receivedAt)).toEqual(
      list
        .map((x) => x.receivedAt)
        .sort()
        .reverse(),
    );

    const filtered = await inbox(`?to=${encodeURIComponent(mails[1].to.toUpperCase())}`);
    expect(filtered.map((x) => x.messageId)).toEqual([rows[1].messageId]);
    expect(await (await fetch(`${api}/messages/${list[0].id}`)).json()).toEqual(list[0]);
    expect((await fetch(`${api}/messages/nope`)).status).toBe(404);

    // A second pass finds nothing to do; nothing arrives twice.
    expect(await mail.deliverDueMail()).toEqual(zero);
    expect((await inbox()).length).toBe(3);
    expect((await health()).duplicates).toBe(0);
  });

  it("leaves rows that are not due yet alone", async () => {
    const x = sample();
    await mail.enqueueMail(x);
    await m.MailOutbox.update({ nextAttemptAt: new Date(Date.now() + HOUR) }, { where: { toAddr: x.to } });
    expect(await mail.deliverDueMail()).toEqual(zero);
    expect(await mail.deliverDueMail(new Date(Date.now() + HOUR + 1000))).toEqual({ sent: 1, retried: 0, failed: 0 });
  });

  it("the stand-in answers 400 to an unknown fault mode and 404/405 off its routes", async () => {
    expect((await fetch(`${api}/fault`, { method: "POST", body: '{"mode":"melt"}' })).status).toBe(400);
    expect((await fetch(`${api}/fault`, { method: "POST", body: "not json" })).status).toBe(400);
    expect((await fetch(`${api}/nowhere`)).status).toBe(404);
    expect((await fetch(`${api}/health`, { method: "POST" })).status).toBe(405);
    expect(await health()).toMatchObject({ status: "ok", mode: "none" });
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("F3 SMTP down", () => {
  const temporary: { mode: FaultMode; error: RegExp }[] = [
    { mode: "refuse", error: /ECONNECTION|ECONNREFUSED/ },
    { mode: "temporary", error: /451/ },
    { mode: "drop", error: /ECONNECTION|closed|ECONNRESET|EPIPE/i },
    { mode: "slow-greeting", error: /ETIMEDOUT|Greeting/i },
  ];

  it.for(temporary)(
    "$mode: the action commits, the row stays queued with attempts+1 and a backoff; after restore it arrives exactly once",
    async ({ mode, error }) => {
      const before = (await health()).duplicates;
      await fault(mode);
      const x = sample({ kind: "review-outcome" });
      await db.sequelize.transaction(async (transaction) => {
        await m.AuditLog.create(
          { actorId: null, action: "review.publish", subjectType: "card", subjectId: "7", detail: "{}", at: new Date() },
          { transaction },
        );
        await mail.enqueueMail(x, transaction);
      });
      expect(await m.AuditLog.count({ where: { action: "review.publish" } })).toBe(1); // the decision commits regardless

      const t0 = new Date();
      const started = Date.now();
      expect(await mail.deliverDueMail(t0)).toEqual({ sent: 0, retried: 1, failed: 0 });
      const took = Date.now() - started;
      expect(took, "a dead relay must not block the worker for long").toBeLessThan(3_000);
      let row = await rowFor(x.to);
      expect(row.status).toBe("queued");
      expect(row.attempts).toBe(1);
      expect(row.leaseUntil).toBeNull();
      expect(row.lastError).toMatch(error);
      expect(row.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(t0.getTime() + MINUTE);
      expect(row.nextAttemptAt.getTime()).toBeLessThanOrEqual(t0.getTime() + MINUTE + took + 50);

      // Back up, but not due yet: nothing is tried early.
      await fault("none");
      expect(await mail.deliverDueMail(new Date(t0.getTime() + 30_000))).toEqual(zero);
      expect(await mail.deliverDueMail(new Date(row.nextAttemptAt.getTime() + 1))).toEqual({ sent: 1, retried: 0, failed: 0 });
      row = await rowFor(x.to);
      expect(row.status).toBe("sent");
      expect(row.attempts).toBe(2);
      expect(copiesOf(await inbox(), row.messageId)).toBe(1);
      // Only "drop" can make the relay see a message twice (it took the first copy, we never heard 250): it is deduplicated
      // by Message-ID and counted.
      expect((await health()).duplicates - before).toBe(mode === "drop" ? 1 : 0);
      expect(await mail.deliverDueMail(new Date(t0.getTime() + 10 * HOUR))).toEqual(zero);
    },
  );

  it("550 permanent: failed at once, flagged for an admin, never retried", async () => {
    await fault("permanent");
    const x = sample();
    await mail.enqueueMail(x);
    warn.mockClear();
    expect(await mail.deliverDueMail()).toEqual({ sent: 0, retried: 0, failed: 1 });
    const row = await rowFor(x.to);
    expect(row.status).toBe("failed");
    expect(row.attempts).toBe(1);
    expect(row.lastError).toMatch(/550/);
    expect(row.lastError).toContain(x.to); // the relay's reply, kept for the admin
    expect(warn).toHaveBeenCalled();
    for (const call of warn.mock.calls) expect(call.join(" ")).not.toContain(x.to); // but no addresses in the log
    const flag = await m.AuditLog.findOne({ where: { action: "mail.failed", subjectId: String(row.id) } });
    expect(flag).not.toBeNull();
    expect(JSON.parse(flag!.detail)).toMatchObject({ reason: "rejected", kind: "test" });
    expect(flag!.detail).not.toContain(x.to); // no address in the audit trail

    await fault("none");
    expect(await mail.deliverDueMail(new Date(Date.now() + 5 * 24 * HOUR))).toEqual(zero);
    expect(copiesOf(await inbox(), row.messageId)).toBe(0);
    expect((await rowFor(x.to)).status).toBe("failed");
  });

  it("backs off 1 m, 5 m, 30 m, 2 h, 6 h, then every 12 h, and gives up after 4 days (failed, flagged)", async () => {
    await fault("temporary");
    const x = sample();
    await mail.enqueueMail(x);
    const created = (await rowFor(x.to)).createdAt.getTime();
    const delays: number[] = [];
    let now = new Date();
    for (let i = 0; i < 30; i++) {
      const r = await mail.deliverDueMail(now);
      const row = await rowFor(x.to);
      if (row.status === "failed") {
        expect(r).toEqual({ sent: 0, retried: 0, failed: 1 });
        break;
      }
      expect(r).toEqual({ sent: 0, retried: 1, failed: 0 });
      delays.push(Math.round((row.nextAttemptAt.getTime() - now.getTime()) / MINUTE));
      now = new Date(row.nextAttemptAt.getTime() + 1);
    }
    const row = await rowFor(x.to);
    expect(delays.slice(0, 7)).toEqual([1, 5, 30, 120, 360, 720, 720]);
    expect(delays.slice(5).every((d) => d === 720)).toBe(true);
    expect(row.status).toBe("failed");
    expect(row.lastError).toMatch(/^gave up after 4 days: .*451/);
    // Tries at 0, 1 m, 6 m, 36 m, 2 h 36 m, 8 h 36 m, then every 12 h: the 14th (104 h 36 m) is the first after 96 h.
    expect(row.attempts).toBe(14);
    expect(now.getTime() - created).toBeGreaterThanOrEqual(4 * 24 * HOUR);
    const flag = await m.AuditLog.findOne({ where: { action: "mail.failed", subjectId: String(row.id) } });
    expect(JSON.parse(flag!.detail)).toMatchObject({ reason: "gave-up", attempts: 14 });
  });

  it("a lease left by a crashed sender is claimed again once it expires; a live lease is left alone", async () => {
    const now = new Date();
    const base = {
      kind: "test",
      subject: "Crash",
      text: "t",
      html: "<p>t</p>",
      attempts: 1,
      lastError: null,
      sentAt: null,
      createdAt: now,
      nextAttemptAt: now,
    };
    await m.MailOutbox.create({
      ...base,
      messageId: "<crashed-1@loomlore.invalid>",
      toAddr: "crashed@example.invalid",
      status: "sending",
      leaseUntil: new Date(now.getTime() - 1000),
    });
    await m.MailOutbox.create({
      ...base,
      messageId: "<live-1@loomlore.invalid>",
      toAddr: "live@example.invalid",
      status: "sending",
      leaseUntil: new Date(now.getTime() + 30_000),
    });
    expect(await mail.deliverDueMail(now)).toEqual({ sent: 1, retried: 0, failed: 0 });
    expect((await rowFor("crashed@example.invalid")).status).toBe("sent");
    expect((await rowFor("live@example.invalid")).status).toBe("sending");
    // The live sender died too: after its lease the row is taken over.
    expect(await mail.deliverDueMail(new Date(now.getTime() + 31_000))).toEqual({ sent: 1, retried: 0, failed: 0 });
    const list = await inbox();
    expect(copiesOf(list, "<crashed-1@loomlore.invalid>")).toBe(1);
    expect(copiesOf(list, "<live-1@loomlore.invalid>")).toBe(1);
  });

  it("SIGKILL during a send leaves the row unsent but claimable: after the lease it is sent, once", async () => {
    await fault("slow-greeting"); // the sender hangs waiting for the greeting: a send in progress
    const x = sample();
    await mail.enqueueMail(x);
    const script = `const m = await import(${JSON.stringify(path.join(root, "app/services/mail.server.ts"))}); await m.deliverDueMail();`;
    const child = spawn(process.execPath, ["--import", "tsx", "--input-type=module", "-e", script], {
      cwd: root,
      env: { ...process.env, MAIL_TIMEOUT_MS: "30000" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let output = "";
    child.stdout!.on("data", (d) => (output += d));
    child.stderr!.on("data", (d) => (output += d));
    const exited = new Promise((r) => child.once("exit", r));
    try {
      const deadline = Date.now() + 15_000;
      while ((await rowFor(x.to)).status !== "sending") {
        expect(child.exitCode, `the sender exited before claiming:\n${output}`).toBeNull();
        expect(Date.now(), "the sender never claimed the row").toBeLessThan(deadline);
        await new Promise((r) => setTimeout(r, 50));
      }
      await new Promise((r) => setTimeout(r, 200)); // let it get into the SMTP conversation
    } finally {
      child.kill("SIGKILL");
      await exited;
    }
    const row = await rowFor(x.to);
    expect(row.status).toBe("sending");
    expect(row.leaseUntil!.getTime()).toBeGreaterThan(Date.now());
    await fault("none");
    expect(await mail.deliverDueMail(), "a live lease is not taken over").toEqual(zero);
    expect(await mail.deliverDueMail(new Date(row.leaseUntil!.getTime() + 1))).toEqual({ sent: 1, retried: 0, failed: 0 });
    expect(copiesOf(await inbox(), row.messageId)).toBe(1);
  });

  it("concurrent passes never send a mail twice", async () => {
    const mails = Array.from({ length: 14 }, () => sample());
    for (const x of mails) await mail.enqueueMail(x);
    const results = await Promise.all([mail.deliverDueMail(), mail.deliverDueMail(), mail.deliverDueMail()]);
    let sent = results.reduce((n, r) => n + r.sent, 0);
    sent += (await mail.deliverDueMail()).sent; // a batch is 10: whatever a pass did not take
    expect(sent).toBe(14);
    const list = await inbox();
    expect(list.length).toBe(14);
    expect(new Set(list.map((x) => x.messageId)).size).toBe(14);
    expect((await health()).duplicates).toBe(0);
  });

  it("never writes the relay's password to the log or to last_error", async () => {
    const url = settings.SMTP_URL;
    settings.SMTP_URL = url.replace("smtp://", "smtp://outbox:hunter2-secret@");
    warn.mockClear();
    try {
      const x = sample();
      await mail.enqueueMail(x);
      // The stand-in has no logins: a bad login is a configuration problem, retried (not the message's fault).
      expect(await mail.deliverDueMail()).toEqual({ sent: 0, retried: 1, failed: 0 });
      const row = await rowFor(x.to);
      expect(row.lastError).toMatch(/EAUTH/);
      expect(row.lastError).not.toContain("hunter2");
      expect(warn).toHaveBeenCalled();
      for (const call of warn.mock.calls) expect(call.join(" ")).not.toContain("hunter2");
      expect(await mail.mailHealthy()).toBe(false);
    } finally {
      settings.SMTP_URL = url;
    }
  });

  it("200 randomized runs (enqueue N, random faults, delivery passes) lose zero mails and send none twice", async () => {
    let seed = 20261201;
    const rand = () => {
      // mulberry32: reproducible; the seed is in the failure message
      seed = (seed + 0x6d2b79f5) | 0;
      let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
      t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
      return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
    };
    const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)];
    const modes: FaultMode[] = ["none", "none", "temporary", "temporary", "refuse", "refuse", "drop", "drop", "permanent"];
    const problems: string[] = []; // mails neither delivered exactly once nor rejected by a 550: lost or doubled
    let total = 0;
    for (let run = 0; run < 200; run++) {
      const label = `run ${run} (seed ${seed})`;
      // Each run starts at the real time (mails are created at the real time) and moves its own clock forward.
      let clock = Date.now();
      await fetch(`${api}/messages`, { method: "DELETE" });
      const queued: string[] = [];
      const rolledBack: string[] = [];
      const n = 1 + Math.floor(rand() * 4);
      for (let i = 0; i < n; i++) {
        const x = sample({ kind: "random" });
        if (rand() < 0.15) {
          await db.sequelize
            .transaction(async (t) => {
              await mail.enqueueMail(x, t);
              throw new Error("rolled back");
            })
            .catch(() => {});
          rolledBack.push(x.to);
        } else {
          if (rand() < 0.5) await mail.enqueueMail(x);
          else await db.sequelize.transaction((t) => mail.enqueueMail(x, t));
          queued.push(x.to);
        }
      }
      let drops = 0;
      let permanent = false;
      const passes = 1 + Math.floor(rand() * 3);
      for (let p = 0; p < passes; p++) {
        const mode = pick(modes);
        permanent ||= mode === "permanent";
        await fault(mode);
        clock += Math.floor(rand() * 3 * HOUR);
        const r = await mail.deliverDueMail(new Date(clock));
        if (mode === "drop") drops += r.retried; // each of these reached the relay before the connection was cut
      }
      // The relay is back: keep passing (jumping to the next due time) until nothing is waiting.
      await fault("none");
      for (let guard = 0; ; guard++) {
        const waiting = await m.MailOutbox.findAll({ where: { status: { [Op.in]: ["queued", "sending"] } } });
        if (waiting.length === 0) break;
        expect(guard, `${label}: mail still waiting after 20 passes`).toBeLessThan(20);
        clock = Math.max(clock, ...waiting.map((w) => w.nextAttemptAt.getTime())) + 1;
        await mail.deliverDueMail(new Date(clock));
      }
      const list = await inbox();
      const rows = await m.MailOutbox.findAll({ where: { toAddr: [...queued, ...rolledBack] } });
      expect(rows.length, `${label}: a committed mail has no row, or a rolled-back one has`).toBe(queued.length);
      for (const row of rows) {
        total += 1;
        const copies = copiesOf(list, row.messageId);
        const delivered = row.status === "sent" && copies === 1;
        const rejected = row.status === "failed" && permanent && /550/.test(row.lastError ?? "");
        if (!delivered && !rejected) problems.push(`${label}: ${row.messageId} ended ${row.status} with ${copies} copies (${row.lastError})`);
      }
      const known = new Set(rows.map((r) => r.messageId));
      for (const x of list) expect(known.has(x.messageId!), `${label}: unexpected message ${x.messageId}`).toBe(true);
      expect((await health()).duplicates, `${label}: duplicates only come from dropped replies`).toBeLessThanOrEqual(drops);
    }
    expect(problems).toEqual([]);
    expect(total).toBeGreaterThan(300);
  }, 60_000);
});

// ---------------------------------------------------------------------------------------------------------------------

describe("health and the worker loop", () => {
  it("mailHealthy: true when the relay answers, false within ~1.5 s when it refuses or stalls", async () => {
    expect(await mail.mailHealthy()).toBe(true);
    await fault("refuse");
    expect(await mail.mailHealthy()).toBe(false);
    await fault("slow-greeting");
    const t = Date.now();
    expect(await mail.mailHealthy()).toBe(false);
    expect(Date.now() - t).toBeLessThan(2_500);
    await fault("none");
    expect(await mail.mailHealthy()).toBe(true);
  });

  it("startMailWorker delivers in the background (idempotent), stopMailWorker stops it", async () => {
    const poll = settings.MAIL_POLL_MS;
    settings.MAIL_POLL_MS = 50;
    try {
      mail.startMailWorker();
      mail.startMailWorker();
      const a = sample();
      const b = sample();
      await mail.enqueueMail(a);
      await mail.enqueueMail(b);
      const deadline = Date.now() + 5_000;
      while ((await inbox()).length < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 25));
      expect((await inbox()).map((x) => x.to).sort()).toEqual([a.to, b.to].sort());
      await mail.stopMailWorker();
      const c = sample();
      await mail.enqueueMail(c);
      await new Promise((r) => setTimeout(r, 300));
      expect((await rowFor(c.to)).status).toBe("queued");
      expect((await inbox()).length).toBe(2);
    } finally {
      await mail.stopMailWorker();
      settings.MAIL_POLL_MS = poll;
    }
  });
});

describe("the stand-in keeps its messages across a restart", () => {
  it("persists to messages.json (atomically, no temp files left) and dedupes by Message-ID", async () => {
    const dataDir = path.join(dir, "restart");
    let s = await startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir });
    const t = nodemailer.createTransport({ host: "127.0.0.1", port: s.smtpPort, secure: false, ignoreTLS: true });
    const send = (messageId: string, to: string) =>
      t.sendMail({ from: "Loomlore <no-reply@loomlore.invalid>", to, subject: `About ${messageId}`, text: "kept", html: "<p>kept</p>", messageId });
    await send("<one@loomlore.invalid>", "one@example.invalid");
    await send("<two@loomlore.invalid>", "two@example.invalid");
    await send("<one@loomlore.invalid>", "one@example.invalid"); // a resend: counted, not stored twice
    const list = (await (await fetch(`http://127.0.0.1:${s.httpPort}/messages`)).json()) as StoredMessage[];
    expect(list.map((x) => x.messageId)).toEqual(["<two@loomlore.invalid>", "<one@loomlore.invalid>"]);
    await s.close();
    expect(readdirSync(dataDir)).toEqual(["messages.json"]);

    s = await startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir });
    const base = `http://127.0.0.1:${s.httpPort}`;
    try {
      expect(await (await fetch(`${base}/messages`)).json()).toEqual(list);
      expect(await (await fetch(`${base}/health`)).json()).toMatchObject({ messages: 2, duplicates: 1 });
      await fetch(`${base}/messages`, { method: "DELETE" });
    } finally {
      await s.close();
      t.close();
    }
    s = await startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir });
    try {
      expect(await (await fetch(`http://127.0.0.1:${s.httpPort}/messages`)).json()).toEqual([]);
    } finally {
      await s.close();
    }
  });
});
