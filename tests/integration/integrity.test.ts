/**
 * Data integrity (QUALITY.md §2 D1, D2, D5, D8, D9, D10, and §4 F9, F10), in-process against a fresh seeded SQLite file
 * (DB_PATH is set before the database modules are imported) plus real second processes (tests/support/integrity-child.ts,
 * `node --import tsx`) on the same file where the test is about concurrency or crashes.
 *
 * Anchors: sqlite.org/wal.html (one writer at a time, readers never blocked), sqlite.org/pragma.html#pragma_synchronous
 * ("durable across application crashes regardless of the synchronous setting"), sqlite.org/c3ref/busy_timeout.html,
 * sqlite.org/lang_transaction.html (SQLITE_FULL may roll back; answer with an explicit ROLLBACK), sqlite.org/atomiccommit.html
 * and the crash-test shape of sqlite.org/testing.html (kill the writer at random, check all-or-nothing).
 * Every figure the suite measures is printed; the only timed assertions are the ones QUALITY gives (D2: p99 wait ≤
 * busy_timeout/2; F9: the decision waits about busy_timeout, no longer).
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import sqlite3 from "sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mulberry32 } from "../fixtures/random";
import { batchChecksum, batchPins, RIG_CAVITIES } from "../support/integrity-child";
import { stateDigest } from "./helpers";

const root = path.resolve(import.meta.dirname, "../..");
const CHILD = path.join(root, "tests/support/integrity-child.ts");
const dir = mkdtempSync(path.join(tmpdir(), "loomlore-integrity-"));
const dbPath = path.join(dir, "integrity.sqlite");

const CARD = "rx750-four-pickups-socket"; // a demo card (loom half)
const SEED = Number(process.env.INTEGRITY_SEED ?? 20261201);

type Db = typeof import("../../db/index.server.ts");
type Models = typeof import("../../db/models/index.ts");
type Svc = typeof import("../../app/services/submissions.server");
let db: Db;
let m: Models;
let svc: Svc;
let http: typeof import("../../app/services/submission-http.server");
let lib: typeof import("../../app/services/library.server");
let contributor: { id: number; role: "contributor" };
let moderator: { id: number; role: "moderator" };

beforeAll(async () => {
  process.env.DB_PATH = dbPath;
  process.env.MAIL_WORKER = "off";
  process.env.PHOTO_SWEEPER = "off";
  process.env.SEARCH_WORKER = "off"; // F9 runs its drain by hand, at a known moment
  process.env.SEARCH_URL = "http://127.0.0.1:1"; // no search service: a drain fails at once and counts the attempt
  process.env.SMTP_URL = "smtp://127.0.0.1:1";
  delete process.env.DB_BUSY_TIMEOUT_MS;
  delete process.env.SEED_DEMO;
  db = await import("../../db/index.server.ts");
  expect(db.databasePath()).toBe(dbPath);
  m = await import("../../db/models/index.ts");
  await (await import("../../db/setup.ts")).setupDatabase();
  svc = await import("../../app/services/submissions.server");
  http = await import("../../app/services/submission-http.server");
  lib = await import("../../app/services/library.server");
  const user = async (email: string, role: "contributor" | "moderator") => {
    const u =
      (await m.User.findOne({ where: { email } })) ??
      (await m.User.create({
        email,
        displayName: email.split("@")[0],
        passwordHash: "x",
        role,
        emailVerifiedAt: new Date(),
        passwordChangedAt: new Date(),
        createdAt: new Date(),
        disabledAt: null,
      }));
    return { id: u.id, role };
  };
  contributor = (await user("contributor@loomlore.invalid", "contributor")) as typeof contributor;
  moderator = (await user("moderator@loomlore.invalid", "moderator")) as typeof moderator;
}, 60_000);

afterAll(async () => {
  await db?.sequelize.close();
  rmSync(dir, { recursive: true, force: true });
});

// ---------------------------------------------------------------------------------------------------------------------
// Helpers

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** p-quantile of a sorted list (nearest rank). */
const quantile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil(p * sorted.length) - 1)];
const ms = (x: number) => `${x.toFixed(1)} ms`;

interface Child {
  proc: ChildProcess;
  lines: string[];
  stderr: () => string;
  /** The first line (already read or still to come) matching `pattern`. */
  waitFor(pattern: RegExp, timeoutMs?: number): Promise<string>;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  send(text: string): void;
}

/** A child process running tests/support/integrity-child.ts with `cfg`, on DB_PATH = `file`. */
function spawnChild(cfg: Record<string, unknown>, file = dbPath, env: Record<string, string> = {}): Child {
  const proc = spawn(process.execPath, ["--import", "tsx", CHILD, JSON.stringify(cfg)], {
    cwd: root,
    stdio: ["pipe", "pipe", "pipe"],
    env: {
      ...process.env,
      DB_PATH: file,
      MAIL_WORKER: "off",
      PHOTO_SWEEPER: "off",
      SEARCH_WORKER: "off",
      SEARCH_URL: "http://127.0.0.1:1",
      SMTP_URL: "smtp://127.0.0.1:1",
      ...env,
    },
  });
  const lines: string[] = [];
  let err = "";
  let partial = "";
  const waiters: { pattern: RegExp; resolve: (l: string) => void }[] = [];
  proc.stdout!.setEncoding("utf8");
  proc.stdout!.on("data", (chunk: string) => {
    partial += chunk;
    const parts = partial.split("\n");
    partial = parts.pop()!;
    for (const line of parts) {
      lines.push(line);
      for (const w of waiters.splice(0).filter((x) => (x.pattern.test(line) ? (x.resolve(line), false) : true))) waiters.push(w);
    }
  });
  proc.stderr!.setEncoding("utf8");
  proc.stderr!.on("data", (chunk: string) => {
    err += chunk;
  });
  proc.stdin!.on("error", () => {}); // a killed child's closed pipe
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    proc.on("close", (code, signal) => resolve({ code, signal })),
  );
  return {
    proc,
    lines,
    exited,
    stderr: () => err,
    send: (text) => {
      proc.stdin!.write(text);
    },
    waitFor(pattern, timeoutMs = 30_000) {
      const seen = lines.find((l) => pattern.test(l));
      if (seen) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(
          () => reject(new Error(`child (${cfg.mode}) printed no ${pattern} in ${timeoutMs} ms; stderr:\n${err.slice(-2000)}`)),
          timeoutMs,
        );
        waiters.push({
          pattern,
          resolve: (l) => {
            clearTimeout(timer);
            resolve(l);
          },
        });
        void exited.then(({ code, signal }) => {
          clearTimeout(timer);
          reject(new Error(`child (${cfg.mode}) exited (${code ?? signal}) before printing ${pattern}; stderr:\n${err.slice(-2000)}`));
        });
      });
    },
  };
}

async function kill(c: Child) {
  if (c.proc.exitCode === null && c.proc.signalCode === null) c.proc.kill("SIGKILL");
  return c.exited;
}

/** A plain sqlite3 handle on a file (what a fresh process sees: after a crash it runs WAL recovery). */
async function raw(file: string, mode = sqlite3.OPEN_READWRITE) {
  const handle = await new Promise<sqlite3.Database>((resolve, reject) => {
    const d = new sqlite3.Database(file, mode, (err) => (err ? reject(err) : resolve(d)));
  });
  const all = <T = Record<string, unknown>>(sql: string, params: unknown[] = []) =>
    new Promise<T[]>((resolve, reject) => handle.all(sql, params, (err, rows) => (err ? reject(err) : resolve(rows as T[]))));
  const close = () => new Promise<void>((resolve) => handle.close(() => resolve()));
  return { handle, all, close };
}

/** PRAGMA integrity_check and foreign_key_check on a fresh handle. */
async function checkFile(file: string) {
  const r = await raw(file);
  try {
    const integrity = (await r.all<{ integrity_check: string }>("PRAGMA integrity_check")).map((x) => x.integrity_check);
    const fk = await r.all("PRAGMA foreign_key_check");
    return { integrity, fk };
  } finally {
    await r.close();
  }
}

/** The sqlite3 handles Sequelize holds open: between transactions only its shared "default" one. */
const openHandles = () => Object.keys((db.sequelize.connectionManager as unknown as { connections: Record<string, unknown> }).connections);

const plain = async <T>(sql: string, transaction?: import("sequelize").Transaction) => (await db.sequelize.query(sql, { plain: true, transaction })) as T;

/** An edit of CARD, given a source and submitted for review; returns its id and version. */
async function editInReview(change: (c: import("../../app/domain/submissions").CardProposal) => void) {
  const { id } = await svc.startSubmission(contributor, { connector: CARD });
  const v = (await svc.viewSubmission(contributor, id))!;
  const content = structuredClone(v.content);
  change(content);
  await svc.updateSubmission(contributor, id, {
    version: v.version,
    content,
    sourceKind: "traced",
    sourceDetail: "Traced on a test loom.",
    summary: "Integrity test edit.",
    action: "submit",
  });
  const after = (await svc.viewSubmission(contributor, id))!;
  expect(after.state).toBe("in_review");
  return { id, version: after.version };
}

/** A bare submission row for the contention tests (they bump its version). */
async function counterRow(name: string) {
  const now = new Date();
  const s = await m.Submission.create({
    authorId: contributor.id,
    kind: "new",
    familyId: null,
    connectorId: null,
    baseRevision: null,
    content: { name, photos: [] },
    idempotencyKey: null,
    createdAt: now,
    updatedAt: now,
  });
  return s;
}

// ---------------------------------------------------------------------------------------------------------------------

describe("D1 connection pragmas (QUALITY D1)", () => {
  async function pragmas(transaction?: import("sequelize").Transaction) {
    return {
      journal: (await plain<{ journal_mode: string }>("PRAGMA journal_mode", transaction)).journal_mode,
      busy: (await plain<{ timeout: number }>("PRAGMA busy_timeout", transaction)).timeout,
      fk: (await plain<{ foreign_keys: number }>("PRAGMA foreign_keys", transaction)).foreign_keys,
      sync: (await plain<{ synchronous: number }>("PRAGMA synchronous", transaction)).synchronous,
    };
  }
  // sqlite.org/pragma.html#pragma_synchronous: 1 = NORMAL, 2 = FULL; the choice and its reason are in db/index.server.ts.
  const documented = () => ({ NORMAL: 1, FULL: 2 })[db.SYNCHRONOUS];

  it("the default handle: WAL, busy_timeout ≥ 5000 ms, foreign keys on, synchronous as documented", async () => {
    const p = await pragmas();
    expect(p.journal).toBe("wal");
    expect(p.busy).toBeGreaterThanOrEqual(5000); // QUALITY D1
    expect(p.fk).toBe(1);
    expect(p.sync).toBe(documented());
  });

  it("the same inside sequelize.transaction (Sequelize opens another handle for each transaction)", async () => {
    const inside = await db.sequelize.transaction(async (t) => pragmas(t));
    expect(inside).toEqual({ journal: "wal", busy: expect.any(Number), fk: 1, sync: documented() });
    expect(inside.busy).toBeGreaterThanOrEqual(5000); // QUALITY D1
    console.log(
      `D1: journal_mode=${inside.journal}, busy_timeout=${inside.busy} ms, foreign_keys=${inside.fk}, synchronous=${inside.sync} (${db.SYNCHRONOUS}) on both handles`,
    );
  });
});

describe("D8 transaction propagation (QUALITY D8)", () => {
  it("a pin created in a managed transaction that then throws is not there afterwards", async () => {
    const c = (await m.Connector.findOne({ where: { slug: CARD } }))!;
    const cavity = "D8-rollback";
    await expect(
      db.sequelize.transaction(async (transaction) => {
        await m.Pin.create(
          { familyId: c.familyId, connectorId: c.id, componentId: null, cavity, colourCode: "R", circuit: "", terminal: null, position: 99 },
          { transaction },
        );
        expect(await m.Pin.count({ where: { connectorId: c.id, cavity }, transaction })).toBe(1); // visible to its own transaction
        expect(await m.Pin.count({ where: { connectorId: c.id, cavity } })).toBe(0); // not to anyone else (WAL snapshot)
        throw new Error("rollback please");
      }),
    ).rejects.toThrow("rollback please");
    expect(await m.Pin.count({ where: { connectorId: c.id, cavity } })).toBe(0);
  });

  it("the test-only guard catches a query that forgets { transaction } (positive control)", async () => {
    const guard = db.enableTransactionGuard();
    try {
      await expect(
        db.sequelize.transaction(async (transaction) => {
          await m.Pin.count({ transaction }); // fine
          await m.Pin.count(); // forgotten
        }),
      ).rejects.toThrow(/Transaction guard: a query ran without \{ transaction \}/);
      expect(guard.violations).toHaveLength(1);
      expect(guard.violations[0]).toMatch(/integrity\.test\.ts:\d+/); // names the file:line that forgot it
      // Outside any open transaction a query needs none.
      await m.Pin.count();
      expect(guard.violations).toHaveLength(1);
    } finally {
      guard.disable();
    }
  });

  it("startSubmission, updateSubmission and decide (approve, return, decline) never forget { transaction }", async () => {
    const guard = db.enableTransactionGuard();
    let approveMs = 0;
    try {
      // Approve an edit with a corrected colour: the heaviest path (publish, recolour along the wire and across mates,
      // revisions for the cards that followed, loom check, audit, outbox, index job).
      const a = await editInReview((c) => {
        c.pins.find((p) => p.cavity === "1")!.code = "L/W";
      });
      const t0 = performance.now();
      expect((await svc.decide(moderator, a.id, { version: a.version, decision: "approve", message: "" })).state).toBe("published");
      approveMs = performance.now() - t0;
      // Return with a question, answer and resubmit, approve.
      const b = await editInReview((c) => {
        c.notes = "D8: returned once, then approved.";
      });
      await svc.decide(moderator, b.id, { version: b.version, decision: "return", message: "Which years?" });
      const bv = (await svc.viewSubmission(contributor, b.id))!;
      await svc.updateSubmission(contributor, b.id, { version: bv.version, action: "submit", answer: "All of them." });
      const bw = (await svc.viewSubmission(moderator, b.id))!;
      expect((await svc.decide(moderator, b.id, { version: bw.version, decision: "approve", message: "Thanks." })).state).toBe("published");
      // Decline; start-and-submit in one go; a new card in a family; an idempotent start.
      const d = await editInReview((c) => {
        c.location = "D8: under the seat";
      });
      await svc.decide(moderator, d.id, { version: d.version, decision: "decline", message: "Not so." });
      const family = (await m.Family.findOne())!;
      await svc.startSubmission(contributor, { family: family.slug, idempotencyKey: "d8-key" });
      await svc.startSubmission(contributor, { family: family.slug, idempotencyKey: "d8-key" });
      await svc.startSubmission(contributor, { connector: CARD, sourceKind: "traced", sourceDetail: "D8", submit: true });
      expect(guard.violations).toEqual([]);
      expect(guard.checked, "queries the guard saw inside transactions").toBeGreaterThan(100);
      console.log(
        `D8: the guard checked ${guard.checked} queries inside the app's transactions; none forgot { transaction } (approving the recolouring edit took ${ms(approveMs)})`,
      );
    } finally {
      guard.disable();
    }
  }, 60_000);
});

describe("D9 database full (QUALITY D9)", () => {
  it("an approval that needs a page the capped file does not have: SQLITE_FULL → 503, rolled back, digest unchanged; then it succeeds", async () => {
    const { id, version } = await editInReview((c) => {
      c.notes = `D9: ${"a longer note that needs room in a new revision. ".repeat(40)}`;
    });
    // Free pages would let the write fit without growing the file: start from none.
    if ((await plain<{ freelist_count: number }>("PRAGMA freelist_count")).freelist_count > 0) await db.sequelize.query("VACUUM");
    const pages = (await plain<{ page_count: number }>("PRAGMA page_count")).page_count;
    const before = await stateDigest(dbPath);
    const sql: string[] = [];
    const record = (_options: unknown, query: { sql?: string }) => {
      if (query?.sql) sql.push(query.sql);
    };
    db.sequelize.addHook("afterQuery", "d9-record", record as never);
    const { setFaults } = await import("../../app/infra/faults.server.ts");
    setFaults({ maxPageCount: pages }); // each transaction sets PRAGMA max_page_count on the write handle
    let error: unknown;
    try {
      await svc.decide(moderator, id, { version, decision: "approve", message: "" });
    } catch (e) {
      error = e;
    } finally {
      setFaults({});
      db.sequelize.removeHook("afterQuery", "d9-record");
    }
    expect(error, "the capped approval must fail").toBeDefined();
    expect((error as { parent?: { code?: string } }).parent?.code).toBe("SQLITE_FULL");
    expect(http.isBusyOrFull(error)).toBe(true);
    const res = http.submissionApiError(error);
    expect(res.status).toBe(503);
    expect(res.headers.get("Retry-After")).toBe("30");
    expect(((await res.json()) as { error: { code: string; message: string } }).error).toMatchObject({
      code: "unavailable",
      message: expect.stringMatching(/try again/),
    });
    // sqlite.org/lang_transaction.html: SQLITE_FULL may roll back on its own; the app still answers with ROLLBACK.
    expect(sql.some((s) => /^ROLLBACK/i.test(s.trim()))).toBe(true);
    // That ROLLBACK finds the transaction already gone and Sequelize "kills" the handle: it must really be closed.
    expect(openHandles()).toEqual(["default"]);
    expect(await stateDigest(dbPath)).toBe(before);
    expect((await checkFile(dbPath)).integrity).toEqual(["ok"]);
    // Reads keep working.
    expect((await lib.getConnectorCard(CARD))!.connector.slug).toBe(CARD);
    expect((await m.Submission.findByPk(id))!.state).toBe("in_review");
    // Cap lifted: the same approval goes through.
    const out = await svc.decide(moderator, id, { version, decision: "approve", message: "" });
    expect(out.state).toBe("published");
    const grown = (await plain<{ page_count: number }>("PRAGMA page_count")).page_count;
    console.log(`D9: capped at ${pages} pages → SQLITE_FULL, 503, digest unchanged; after lifting the cap the approval needed ${grown - pages} more page(s)`);
  });
});

describe("F9 database held by another process (QUALITY F9)", () => {
  it("reads continue while another process holds BEGIN IMMEDIATE; a decision waits about busy_timeout, answers 503, changes nothing, then succeeds", async () => {
    const { id, version } = await editInReview((c) => {
      c.notes = "F9: decided after the lock is released.";
    });
    const HOLD_MS = 10_000; // QUALITY F9: "holds BEGIN IMMEDIATE for 10 s"
    const holder = spawnChild({ mode: "hold", ms: HOLD_MS });
    try {
      await holder.waitFor(/^held$/);
      const heldAt = performance.now();
      // Page-style reads (WAL: a writer does not block readers).
      let t0 = performance.now();
      expect((await lib.getConnectorCard(CARD))!.connector.slug).toBe(CARD);
      const cardRead = performance.now() - t0;
      const before = await stateDigest(dbPath);
      // The decision, with a card read part-way through its wait.
      t0 = performance.now();
      let decidedAt = 0,
        readAt = 0;
      const [outcome, during] = await Promise.all([
        svc
          .decide(moderator, id, { version, decision: "approve", message: "" })
          .then(
            () => null,
            (e: unknown) => e,
          )
          .finally(() => {
            decidedAt = performance.now();
          }),
        (async () => {
          await sleep(1000);
          const s = performance.now();
          await lib.getConnectorCard(CARD);
          await m.Submission.count();
          readAt = performance.now();
          return readAt - s;
        })(),
      ]);
      const waited = performance.now() - t0;
      expect(readAt, "a page read returns while the decision is still waiting for the lock (WAL: readers are not blocked)").toBeLessThan(decidedAt);
      expect(performance.now() - heldAt, "the lock must still have been held when the decision gave up").toBeLessThan(HOLD_MS);
      expect(outcome, "the decision must fail while the lock is held").toBeTruthy();
      expect(http.isBusyOrFull(outcome)).toBe(true);
      expect((outcome as { parent?: { code?: string } }).parent?.code).toBe("SQLITE_BUSY");
      const res = http.submissionApiError(outcome);
      expect(res.status).toBe(503);
      expect(res.headers.get("Retry-After")).toBe("30");
      // sqlite.org/c3ref/busy_timeout.html: the handler sleeps until busy_timeout has accumulated, then SQLITE_BUSY. It must
      // not give up much sooner, nor hang on past it (1 s allowance for opening the handle and scheduling).
      expect(waited).toBeGreaterThanOrEqual(db.BUSY_TIMEOUT_MS * 0.9);
      expect(waited).toBeLessThanOrEqual(db.BUSY_TIMEOUT_MS + 1000);
      expect(await stateDigest(dbPath)).toBe(before);
      expect(openHandles(), "the refused transaction's handle is closed").toEqual(["default"]);
      console.log(
        `F9: card read while held ${ms(cardRead)}, read during the decision's wait ${ms(during)}; decision gave up after ${ms(waited)} (busy_timeout ${db.BUSY_TIMEOUT_MS} ms) → 503, digest unchanged`,
      );
      await holder.waitFor(/^released$/, HOLD_MS + 5000);
      expect((await svc.decide(moderator, id, { version, decision: "approve", message: "" })).state).toBe("published");
    } finally {
      await kill(holder);
    }
  }, 30_000);
});

describe("F9 database held by another process: background writes (QUALITY F9)", () => {
  it("a page read does not wait behind a background job's write that is waiting for the lock", async () => {
    const search = await import("../../app/services/search.server");
    // An approval leaves an index job; with no search service the drain fails and records the attempt on the job rows.
    const { id, version } = await editInReview((c) => {
      c.notes = "F9: leaves an index job.";
    });
    await svc.decide(moderator, id, { version, decision: "approve", message: "" });
    expect(await m.IndexJob.count({ where: { doneAt: null } })).toBeGreaterThan(0);
    const holder = spawnChild({ mode: "hold", ms: db.BUSY_TIMEOUT_MS + 3000 });
    try {
      await holder.waitFor(/^held$/);
      const t0 = performance.now();
      let drainAt = 0;
      const drain = search
        .drainIndexJobs()
        .then(
          () => null,
          (e: unknown) => e,
        )
        .finally(() => {
          drainAt = performance.now();
        });
      await sleep(500); // the drain's write (IndexJob.increment, no transaction) is now waiting for the lock
      const r0 = performance.now();
      await lib.getConnectorCard(CARD);
      const readAt = performance.now();
      const failure = await drain;
      console.log(
        `F9: with a background write waiting for the lock, a card read took ${ms(readAt - r0)}; the write gave up after ${ms(drainAt - t0)} (${http.isBusyOrFull(failure) ? "SQLITE_BUSY" : String(failure)})`,
      );
      expect(drainAt - t0, "the background write did wait for the lock (else this test proves nothing)").toBeGreaterThanOrEqual(db.BUSY_TIMEOUT_MS * 0.9);
      // Sequelize's sqlite dialect runs every query without a transaction on one shared handle: a write there that waits
      // for the lock holds that handle, and every read of the process queues behind it.
      expect(readAt, "the read must return while the background write is still waiting (page reads continue, QUALITY F9)").toBeLessThan(drainAt);
    } finally {
      await kill(holder);
    }
  }, 30_000);
});

// D2/D10 workers: the app's Sequelize instance in separate processes, each transaction read-then-write.
async function runWorkers(opts: { workers: number; count: number; submissionId: number; action: string; during?: () => Promise<void> }) {
  const kids = Array.from({ length: opts.workers }, (_, worker) =>
    spawnChild({ mode: "contend", submissionId: opts.submissionId, count: opts.count, worker, action: opts.action }),
  );
  try {
    await Promise.all(kids.map((k) => k.waitFor(/^ready$/)));
    const t0 = performance.now();
    for (const k of kids) k.send("go\n");
    const during = opts.during?.();
    const results = await Promise.all(
      kids.map(
        async (k) =>
          JSON.parse((await k.waitFor(/^result /, 120_000)).slice(7)) as {
            worker: number;
            waits: number[];
            durations: number[];
            busy: number;
            conflicts: number;
            errors: string[];
            elapsed: number;
          },
      ),
    );
    const elapsed = performance.now() - t0;
    await during;
    return { results, elapsed };
  } finally {
    await Promise.all(kids.map(kill));
  }
}

describe("D2 write contention (QUALITY D2)", () => {
  it("8 processes × 200 read-then-write IMMEDIATE transactions on one submission: no SQLITE_BUSY, exact totals, p99 wait ≤ busy_timeout/2", async () => {
    const WORKERS = 8,
      COUNT = 200; // QUALITY D2
    const row = await counterRow("D2 counter");
    const { results, elapsed } = await runWorkers({ workers: WORKERS, count: COUNT, submissionId: row.id, action: "d2.tx" });
    const waits = results.flatMap((r) => r.waits).sort((a, b) => a - b);
    const durations = results.flatMap((r) => r.durations).sort((a, b) => a - b);
    const busy = results.reduce((n, r) => n + r.busy, 0);
    const conflicts = results.reduce((n, r) => n + r.conflicts, 0);
    const errors = results.flatMap((r) => r.errors);
    console.log(
      `D2: ${WORKERS}×${COUNT} transactions in ${(elapsed / 1000).toFixed(1)} s (${((WORKERS * COUNT) / (elapsed / 1000)).toFixed(0)}/s); ` +
        `wait to begin p50 ${ms(quantile(waits, 0.5))}, p99 ${ms(quantile(waits, 0.99))}, max ${ms(waits.at(-1)!)}; ` +
        `whole transaction p99 ${ms(quantile(durations, 0.99))}; SQLITE_BUSY ${busy}, lost updates ${conflicts}, other errors ${errors.length}`,
    );
    expect(errors).toEqual([]);
    expect(busy).toBe(0); // QUALITY D2: 0 SQLITE_BUSY reach the caller
    expect(conflicts).toBe(0); // the conditional update always found the version it read
    expect(waits).toHaveLength(WORKERS * COUNT);
    expect((await m.Submission.findByPk(row.id))!.version).toBe(row.version + WORKERS * COUNT);
    expect(await m.AuditLog.count({ where: { action: "d2.tx", subjectId: String(row.id) } })).toBe(WORKERS * COUNT);
    expect(quantile(waits, 0.99)).toBeLessThanOrEqual(db.BUSY_TIMEOUT_MS / 2); // QUALITY D2: p99 wait ≤ busy_timeout/2
  }, 120_000);
});

describe("D10 hot backup (QUALITY D10)", () => {
  it("VACUUM INTO while writers run: every copy opens, passes integrity_check and holds a committed state", async () => {
    const WORKERS = 8,
      COUNT = 100;
    const row = await counterRow("D10 counter");
    const d2Before = await m.AuditLog.count({ where: { action: "d2.tx" } });
    const copies: { file: string; at: number }[] = [];
    const { elapsed } = await runWorkers({
      workers: WORKERS,
      count: COUNT,
      submissionId: row.id,
      action: "d10.tx",
      during: async () => {
        const src = await raw(dbPath, sqlite3.OPEN_READONLY);
        try {
          for (let i = 0; i < 4; i++) {
            await sleep(250 + i * 300);
            const file = path.join(dir, `backup-${i}.sqlite`);
            const t0 = performance.now();
            await src.all(`VACUUM INTO '${file.replaceAll("'", "''")}'`);
            copies.push({ file, at: performance.now() - t0 });
          }
        } finally {
          await src.close();
        }
      },
    });
    const total = WORKERS * COUNT;
    const seen: number[] = [];
    for (const c of copies) {
      expect((await checkFile(c.file)).integrity).toEqual(["ok"]);
      const r = await raw(c.file, sqlite3.OPEN_READONLY);
      try {
        const [{ version }] = await r.all<{ version: number }>("SELECT version FROM submissions WHERE id = ?", [row.id]);
        const [{ n }] = await r.all<{ n: number }>("SELECT count(*) AS n FROM audit_log WHERE action = 'd10.tx' AND subject_id = ?", [String(row.id)]);
        const [{ d2 }] = await r.all<{ d2: number }>("SELECT count(*) AS d2 FROM audit_log WHERE action = 'd2.tx'");
        // A committed state: each transaction bumped the version and wrote its audit row together.
        expect(version - row.version).toBe(n);
        expect(d2).toBe(d2Before); // rows committed before the backup began are all there
        seen.push(n);
      } finally {
        await r.close();
      }
    }
    console.log(
      `D10: ${copies.length} copies during ${(elapsed / 1000).toFixed(1)} s of writes held ${seen.join(", ")} of ${total} transactions; VACUUM INTO took ${copies.map((c) => ms(c.at)).join(", ")}`,
    );
    expect(copies).toHaveLength(4);
    expect(
      seen.some((n) => n > 0 && n < total),
      "at least one copy taken while the writers were mid-run",
    ).toBe(true);
  }, 120_000);
});

describe("D5 kill -9 mid-transaction (QUALITY D5)", () => {
  it("a writer SIGKILLed at random moments: integrity ok, foreign keys ok, every batch all or nothing, nothing committed lost; the card still reads", async () => {
    const BUDGET_MS = 40_000,
      MIN_ITERATIONS = 50,
      MAX_ITERATIONS = 200; // QUALITY D5 asks for 200 iterations
    const make = (await m.Make.findOne({ order: [["id", "ASC"]] }))!;
    const family = await m.Family.create({
      makeId: make.id,
      slug: "crash-rig",
      name: "Crash rig",
      modelRange: "Test rig",
      yearFrom: 2026,
      yearTo: 2026,
      engine: "—",
      displacementCc: 0,
      cylinders: 1,
      firingOrder: "—",
      crankDeg: null,
      ignition: "—",
      colourSystem: make.colourSystem,
      blurb: "",
    });
    const system = await m.System.create({ familyId: family.id, kind: "ignition", name: "Ignition" });
    const rig = await m.Connector.create({
      familyId: family.id,
      systemId: system.id,
      componentId: null,
      matesWithId: null,
      slug: "crash-rig-plug",
      name: "Crash rig plug",
      location: "Test bench",
      gender: "plug",
      housing: "—",
      rows: 4,
      cols: 5,
      cavities: RIG_CAVITIES.map((cavity, i) => ({ cavity, row: Math.floor(i / 5), col: i % 5 })),
      pin1: "1",
      latch: "top",
      notes: "",
      revision: 0,
      publishedAt: new Date(),
    });
    const rnd = mulberry32(SEED);
    const cfg = { mode: "batches", connectorId: rig.id, familyId: family.id };
    let iterations = 0,
      committedTotal = 0,
      inFlightCommitted = 0,
      emptyRuns = 0,
      openAtKill = 0;
    let rev = 0;
    const checkMs: number[] = [];
    const t0 = performance.now();
    // Two children warm up (imports) while one writes; a child opens the file only after its go.
    const warm = [spawnChild(cfg), spawnChild(cfg)];
    try {
      while (iterations < MAX_ITERATIONS && (iterations < MIN_ITERATIONS || performance.now() - t0 < BUDGET_MS)) {
        const cur = warm.shift()!;
        await cur.waitFor(/^ready$/);
        cur.send("go\n");
        warm.push(spawnChild(cfg));
        // From the first BEGIN on (a loaded machine may take a while to get there), so every kill lands in the writing.
        await cur.waitFor(/^begin /);
        await sleep(rnd() * 200);
        const { signal } = await kill(cur);
        if (cur.lines.at(-1)?.startsWith("begin ")) openAtKill++;
        expect(signal, `iteration ${iterations}: the writer must still be running when killed\n${cur.stderr().slice(-1500)}`).toBe("SIGKILL");
        const reported = cur.lines.filter((l) => l.startsWith("committed ")).map((l) => Number(l.slice(10)));
        const lastReported = reported.length ? reported.at(-1)! : rev;
        const c0 = performance.now();
        const { integrity, fk } = await checkFile(dbPath);
        expect(integrity, `iteration ${iterations}`).toEqual(["ok"]);
        expect(fk, `iteration ${iterations}`).toEqual([]);
        const r = await raw(dbPath);
        try {
          const [c] = await r.all<{ revision: number }>("SELECT revision FROM connectors WHERE id = ?", [rig.id]);
          const pins = await r.all<{ cavity: string; colourCode: string; circuit: string; position: number }>(
            "SELECT cavity, colour_code AS colourCode, circuit, position FROM pins WHERE connector_id = ? ORDER BY position",
            [rig.id],
          );
          const audits = (await r.all<{ detail: string }>("SELECT detail FROM audit_log WHERE action = 'crash.batch' ORDER BY id")).map(
            (a) => JSON.parse(a.detail) as { batch: number; checksum: string },
          );
          // Every batch either fully present or absent: batches 1..revision each have exactly one audit row with the
          // checksum of what that batch wrote, none after; the live pins are exactly the last batch's 20 rows.
          expect(
            audits.map((a) => a.batch),
            `iteration ${iterations}`,
          ).toEqual(Array.from({ length: c.revision }, (_, i) => i + 1));
          for (const a of audits) expect(a.checksum, `batch ${a.batch}`).toBe(batchChecksum(a.batch));
          if (c.revision === 0) expect(pins).toEqual([]);
          else {
            expect(pins, `iteration ${iterations}: pins of batch ${c.revision}`).toEqual(batchPins(c.revision));
            expect(batchChecksum(c.revision, pins)).toBe(audits.at(-1)!.checksum);
          }
          // pragma.html#pragma_synchronous: "durable across application crashes": nothing the child saw commit is gone.
          expect(c.revision, `iteration ${iterations}: last commit the child reported`).toBeGreaterThanOrEqual(lastReported);
          expect(c.revision).toBeLessThanOrEqual(lastReported + 1);
          if (c.revision === lastReported + 1) inFlightCommitted++;
          if (c.revision === rev) emptyRuns++;
          committedTotal += c.revision - rev;
          rev = c.revision;
        } finally {
          await r.close();
        }
        checkMs.push(performance.now() - c0);
        iterations++;
      }
    } finally {
      await Promise.all(warm.map(kill));
    }
    const elapsed = performance.now() - t0;
    // The app's own code on the same file, in this process and in a fresh one.
    const card = (await lib.getConnectorCard("crash-rig-plug"))!;
    expect(card.connector.revision.number).toBe(rev);
    expect(card.connector.pins.map((p) => p.colour.code)).toEqual(rev ? batchPins(rev).map((p) => p.colourCode) : []);
    expect((await lib.getConnectorCard(CARD))!.connector.slug).toBe(CARD);
    const fresh = spawnChild({ mode: "card", slug: "crash-rig-plug" });
    const read = JSON.parse((await fresh.waitFor(/^result /)).slice(7)) as { revision: number; pins: { code: string }[] };
    await fresh.exited;
    expect(read.revision).toBe(rev);
    expect(read.pins.map((p) => p.code)).toEqual(rev ? batchPins(rev).map((p) => p.colourCode) : []);
    console.log(
      `D5: ${iterations} SIGKILLs in ${(elapsed / 1000).toFixed(1)} s (seed ${SEED}; QUALITY asks 200${iterations < MAX_ITERATIONS ? `, ${iterations} fit the ${BUDGET_MS / 1000} s budget` : ""}); ` +
        `${committedTotal} batches committed (23 rows each), ${openAtKill} kills with a batch transaction open, ${emptyRuns} inside the child's first transaction, ` +
        `${inFlightCommitted} where the last commit landed but its report did not; ` +
        `check per kill p50 ${ms(
          quantile(
            checkMs.sort((a, b) => a - b),
            0.5,
          ),
        )}; integrity ok and every batch all-or-nothing after each`,
    );
    expect(iterations).toBeGreaterThanOrEqual(MIN_ITERATIONS);
  }, 180_000);
});

describe("F10 crash during start-up (QUALITY F10)", () => {
  /** The tables each migration creates, read from the migrations themselves with a recording stand-in QueryInterface. */
  async function migrationTables() {
    const { migrations } = await import("../../db/migrations/index.ts");
    const out: { name: string; tables: string[] }[] = [];
    // A table a later migration drops and creates again (search_fts, given prefix indexes) counts for the migration that
    // first created it: its presence says nothing about whether the later one ran.
    const earlier = new Set<string>();
    for (const mig of migrations) {
      const tables: string[] = [];
      const stub: object = new Proxy(
        {},
        {
          get: (_t, prop) =>
            prop === "sequelize"
              ? stub
              : (...args: unknown[]) => {
                  if (prop === "createTable") tables.push(String(args[0]));
                  const raw =
                    prop === "query" && typeof args[0] === "string"
                      ? /^\s*CREATE\s+(?:VIRTUAL\s+)?TABLE\s+(?:IF\s+NOT\s+EXISTS\s+)?[`"]?(\w+)/i.exec(args[0])
                      : null;
                  if (raw) tables.push(raw[1]);
                  return Promise.resolve([]);
                },
        },
      );
      await mig.up({ context: stub as never });
      out.push({ name: mig.name, tables: tables.filter((t) => !earlier.has(t)) });
      for (const t of tables) earlier.add(t);
    }
    return out;
  }

  /** integrity_check, and the recorded migrations agree with the schema: recorded ⇒ its tables exist, otherwise absent. */
  async function startupState(file: string) {
    const { integrity } = await checkFile(file);
    const r = await raw(file);
    try {
      const tables = new Set((await r.all<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table'")).map((t) => t.name));
      const meta = [...tables].find((t) => /^sequelize_?meta$/i.test(t));
      const recorded = meta ? (await r.all<{ name: string }>(`SELECT name FROM "${meta}" ORDER BY name`)).map((x) => x.name) : [];
      return { integrity, tables, recorded };
    } finally {
      await r.close();
    }
  }

  /**
   * Recorded migrations against the schema. "partial": a migration half made (some of its tables, or recorded with tables
   * missing): migrations are not atomic. "unrecorded": all of a migration's tables but no SequelizeMeta row: the crash hit
   * the window between its COMMIT and umzug's insert (the second test below makes that window on purpose).
   */
  function consistent(state: Awaited<ReturnType<typeof startupState>>, expected: { name: string; tables: string[] }[]) {
    const partial: string[] = [];
    const unrecorded: string[] = [];
    for (const mig of expected) {
      const present = mig.tables.filter((t) => state.tables.has(t));
      if (state.recorded.includes(mig.name) && present.length !== mig.tables.length)
        partial.push(`${mig.name} recorded but ${mig.tables.filter((t) => !state.tables.has(t)).join(", ")} missing`);
      else if (!state.recorded.includes(mig.name) && present.length === mig.tables.length && present.length) unrecorded.push(mig.name);
      else if (!state.recorded.includes(mig.name) && present.length) partial.push(`${mig.name} not recorded but ${present.join(", ")} exist`);
    }
    return { partial, unrecorded };
  }

  async function startCompletes(file: string) {
    const start = spawnChild({ mode: "migrate", setup: true }, file);
    const exit = await start.exited;
    return {
      ok: exit.code === 0 && start.lines.includes("done"),
      error:
        start
          .stderr()
          .split("\n")
          .find((l) => /^\w*Error\b/.test(l.trim()))
          ?.trim() ?? "",
    };
  }

  it("SIGKILL at random moments during migrations of a fresh file, and during WAL recovery after an earlier crash: the next start completes", async () => {
    const expected = await migrationTables();
    const rnd = mulberry32(SEED + 10);
    // How long the migrations take here, to spread the kills over them.
    const calib = spawnChild({ mode: "migrate" }, path.join(dir, "f10-calibrate.sqlite"));
    await calib.waitFor(/^start$/);
    const c0 = performance.now();
    await calib.waitFor(/^done$/);
    const span = performance.now() - c0;
    await calib.exited;
    const kills: string[] = [];
    const windowHits: string[] = [];
    let file = "";
    for (let i = 0; i < 8; i++) {
      file = path.join(dir, `f10-random-${i}.sqlite`);
      const child = spawnChild({ mode: "migrate" }, file);
      await child.waitFor(/^start$/);
      await sleep(rnd() * span);
      await kill(child);
      const state = await startupState(file);
      kills.push(`${state.recorded.length}/${expected.length}`);
      expect(state.integrity, `kill ${i}`).toEqual(["ok"]);
      const c = consistent(state, expected);
      expect(c.partial, `kill ${i}: migrations are transactional`).toEqual([]);
      if (c.unrecorded.length) {
        // The COMMIT → SequelizeMeta window (a known failure, asserted by the next test); this file cannot start again.
        windowHits.push(`kill ${i}: ${c.unrecorded.join(", ")}`);
        continue;
      }
      expect(await startCompletes(file), `the next start after kill ${i}`).toEqual({ ok: true, error: "" });
      const after = await startupState(file);
      expect(after.integrity).toEqual(["ok"]);
      expect(after.recorded).toEqual(expected.map((x) => x.name).sort());
      expect(consistent(after, expected)).toEqual({ partial: [], unrecorded: [] });
    }
    if (windowHits.length) console.log(`F10: random kills that landed between a migration's COMMIT and its SequelizeMeta row: ${windowHits.join("; ")}`);
    file = path.join(dir, "f10-recovery.sqlite");
    expect(await startCompletes(file), "a clean start for the recovery part").toEqual({ ok: true, error: "" });

    // WAL recovery: a process commits and dies with the WAL uncheckpointed; app starts are killed while they open it.
    const writer = spawnChild({ mode: "walwriter", rows: 200 }, file);
    await writer.waitFor(/^committed$/);
    await kill(writer);
    expect(statSync(`${file}-wal`).size, "a hot WAL left behind").toBeGreaterThan(0);
    for (let i = 0; i < 5; i++) {
      const child = spawnChild({ mode: "migrate" }, file);
      await child.waitFor(/^start$/);
      await sleep(rnd() * 20);
      await kill(child);
    }
    expect(await startCompletes(file)).toEqual({ ok: true, error: "" });
    expect((await checkFile(file)).integrity).toEqual(["ok"]);
    const r = await raw(file);
    try {
      const [{ n }] = await r.all<{ n: number }>("SELECT count(*) AS n FROM audit_log WHERE action = 'f10.probe'");
      expect(n, "the dead process's commit survived recovery").toBe(200);
    } finally {
      await r.close();
    }
    console.log(
      `F10: migrations take ${ms(span)}; 8 random kills (fresh file each) left ${kills.join(", ")} migrations recorded, none half made; ` +
        `${8 - windowHits.length} restarted cleanly; 5 kills during WAL recovery, then a clean start with the dead writer's commit intact`,
    );
  }, 120_000);

  it("SIGKILL between a migration's COMMIT and its SequelizeMeta row: the next start completes and the schema version is consistent", async () => {
    const expected = await migrationTables();
    const failures: string[] = [];
    for (const mig of expected) {
      const file = path.join(dir, `f10-window-${mig.name}.sqlite`);
      const child = spawnChild({ mode: "migrate", hangAtLog: mig.name }, file);
      await child.waitFor(new RegExp(`^logging ${mig.name}$`));
      await kill(child);
      expect(existsSync(file)).toBe(true);
      const done = await startCompletes(file);
      const state = await startupState(file);
      expect(state.integrity).toEqual(["ok"]);
      if (!done.ok) failures.push(`${mig.name}: ${done.error}`);
      else if (
        state.recorded.join() !==
        expected
          .map((x) => x.name)
          .sort()
          .join()
      )
        failures.push(`${mig.name}: recorded ${state.recorded.join(", ")}`);
    }
    expect(failures, "umzug records a migration after its transaction commits (db/migrate.ts): a crash in between must not stop every later start").toEqual([]);
  }, 60_000);
});
