import path from "node:path";
import { mkdirSync } from "node:fs";
import { AsyncLocalStorage } from "node:async_hooks";
import { Sequelize, Transaction } from "sequelize";
import { env } from "../app/env.server.ts";
import { faults } from "../app/infra/faults.server.ts";

/** Where the SQLite file lives: DB_PATH, else db/data/loomlore.sqlite (":memory:" for throwaway use). */
export function databasePath(): string {
  return env.DB_PATH;
}

// QUALITY D1/D2: busy_timeout ≥ 5000 ms (sqlite.org/c3ref/busy_timeout.html: sleep until that much has accumulated, then
// SQLITE_BUSY). DB_BUSY_TIMEOUT_MS overrides it for a test that wants to see the timeout sooner.
export const BUSY_TIMEOUT_MS = env.DB_BUSY_TIMEOUT_MS;

/**
 * PRAGMA synchronous (QUALITY D1 "the documented choice"): FULL. sqlite.org/pragma.html#pragma_synchronous: with
 * journal_mode=WAL, NORMAL is "safe from corruption" and "transactions are durable across application crashes
 * regardless of the synchronous setting", but sqlite.org/wal.html: at NORMAL the WAL is not synced per commit, so the last
 * commits "might rollback following a power failure or hard reset". That would lose an approved decision whose mail is
 * already queued. FULL syncs the WAL on every commit; measured on this 2-core machine (ext4 on a virtual disk, raw
 * sqlite3, WAL, 300 transactions of 30 inserts): NORMAL p50 0.07 ms / p99 1.0 ms, FULL p50 0.3–0.4 ms / p99 1.9–3.6 ms
 * per commit; under the D2 contention test (8 processes × 200 read-then-write transactions, the worst case we have)
 * FULL ran 209–223 transactions/s against NORMAL's 247–259, p99 wait to begin 532–731 ms against 435–536 ms. Decisions
 * are a moderator's clicks, each taking far longer than a commit, so durability costs nothing anyone notices: FULL.
 */
export const SYNCHRONOUS = "FULL" as const;

function run(conn: { run: (sql: string, cb: (err: Error | null) => void) => void }, sql: string) {
  return new Promise<void>((resolve, reject) => conn.run(sql, (err) => (err ? reject(err) : resolve())));
}

function createSequelize(storage: string): Sequelize {
  if (storage !== ":memory:") mkdirSync(path.dirname(storage), { recursive: true });
  // IMMEDIATE: a transaction takes the write lock when it begins, waiting up to the busy timeout. A DEFERRED one that
  // reads, then writes, is refused at once with SQLITE_BUSY when another writer holds the lock (no timeout applies
  // to that upgrade), which turned a busy moment into a 500.
  // retry max 1: Sequelize retries "SQLITE_BUSY: database is locked" 5 times by default, on top of busy_timeout, so a
  // held lock made a decision wait 5 × busy_timeout before its 503 (QUALITY F9: wait up to busy_timeout, then 503).
  const s = new Sequelize({
    dialect: "sqlite",
    storage,
    logging: false,
    define: { underscored: true },
    transactionType: Transaction.TYPES.IMMEDIATE,
    retry: { max: 1 },
  });
  // Every handle (the shared read handle, the one write handle) needs the same pragmas.
  s.addHook("afterConnect", async (conn: any) => {
    conn.configure("busyTimeout", BUSY_TIMEOUT_MS);
    await run(conn, "PRAGMA foreign_keys = ON");
    if (storage !== ":memory:") await run(conn, "PRAGMA journal_mode = WAL");
    await run(conn, `PRAGMA synchronous = ${SYNCHRONOUS}`);
  });
  // Sequelize's sqlite connection manager replaces getConnection and never runs the afterConnect hook (the handles got
  // node-sqlite3's defaults: rollback journal, busy timeout 1000 ms, synchronous FULL). Run it once per new handle,
  // before the handle's first query.
  type Handle = { close: () => void; uuid?: string };
  const manager = s.connectionManager as unknown as {
    getConnection: (options?: { uuid?: string }) => Promise<Handle>;
    releaseConnection: (conn: Handle, force?: boolean) => void;
    destroyConnection: (conn: Handle) => Promise<void>;
    connections: Record<string, Handle | undefined>;
  };
  const open = manager.getConnection.bind(manager);
  const release = manager.releaseConnection.bind(manager);
  const configured = new WeakMap<object, Promise<void>>();
  // One write handle, kept open. Sequelize's sqlite dialect opens a new handle for every transaction and closes it at
  // the end: each write paid an open, four pragmas and a fresh schema parse (≈ 5.6 ms of a 1-insert transaction on this
  // machine) inside the one-writer queue, where every writer behind it waits for it. The queue (serialiseWrites) runs
  // transactions one at a time, so one handle serves them all; a handle in doubt (a failed COMMIT or ROLLBACK) is closed
  // and the next transaction opens a new one.
  const WRITER = "loomlore-writer";
  let cap = 0; // the write handle's page cap as set (test only, QUALITY D9)
  manager.getConnection = async (options?: { uuid?: string }) => {
    const writes = !!options?.uuid && options.uuid !== "default" && storage !== ":memory:";
    const conn = await open(writes ? { ...options, uuid: WRITER } : options);
    let ready = configured.get(conn);
    if (!ready) {
      ready = (s as unknown as { runHooks: (name: string, ...args: unknown[]) => Promise<void> }).runHooks("afterConnect", conn, options ?? {});
      configured.set(conn, ready);
      if (writes) cap = 0;
    }
    try {
      await ready;
      // Test only (QUALITY D9, database full): cap the file so a write fails with SQLITE_FULL. Read at each transaction,
      // so a test can set and lift it between transactions (app/infra/faults.server.ts); never set in a real run.
      const want = Math.max(0, Math.floor(faults().maxPageCount ?? 0));
      if (writes && want !== cap) {
        await run(conn as never, `PRAGMA max_page_count = ${want || 4294967294}`);
        cap = want;
      }
    } catch (e) {
      // Not configured (e.g. SQLITE_BUSY while another process recovers the WAL, wal.html): the next query tries again.
      configured.delete(conn);
      if (writes && manager.connections[WRITER] === conn) {
        delete manager.connections[WRITER];
        conn.close(); // the write handle: nobody else will close it
      }
      throw e;
    }
    return conn;
  };
  // A finished transaction leaves the write handle open for the next one.
  manager.releaseConnection = (conn: Handle, force?: boolean) => {
    if (conn === manager.connections[WRITER] && force !== true) return;
    release(conn, force);
  };
  // When a COMMIT or ROLLBACK fails (SQLite already rolled back after SQLITE_FULL, or BEGIN IMMEDIATE never got the
  // lock), Sequelize "kills" the transaction's handle through the pool, which the sqlite dialect does not use: close it,
  // so the next transaction starts on a clean handle (QUALITY D9/F9).
  manager.destroyConnection = async (conn: Handle) => {
    if (conn === manager.connections[WRITER]) {
      delete manager.connections[WRITER];
      configured.delete(conn);
      conn.close();
      return;
    }
    release(conn);
  };
  serialiseWrites(s);
  return s;
}

/**
 * SQLite has one writer. Every managed transaction is IMMEDIATE (takes the write lock at BEGIN), so two of this process
 * at once made the second wait on the busy timeout, polling, and under a burst of sixteen gave SQLITE_BUSY 500s and a
 * 25 s freeze. Instead the process queues its own transactions (FIFO, one at a time): contention waits for the one
 * before it, milliseconds, and the busy timeout is left for other processes. A transaction begun inside another's
 * callback (same async context) runs at once rather than queue behind itself. Keep the work inside short: no bcrypt,
 * sharp or mail sending in a transaction.
 */
function serialiseWrites(s: Sequelize) {
  const inside = new AsyncLocalStorage<true>();
  let tail: Promise<unknown> = Promise.resolve();
  const original = s.transaction.bind(s) as (options?: unknown, callback?: unknown) => Promise<unknown>;
  const queued = function (options?: unknown, callback?: unknown) {
    if (typeof options === "function") [callback, options] = [options, undefined];
    if (typeof callback !== "function" || inside.getStore()) return original(options, callback);
    const work = callback as (t: Transaction) => Promise<unknown>;
    const run = tail.then(() => inside.run(true, () => original(options, work)));
    tail = run.catch(() => {});
    return run;
  };
  s.transaction = queued as typeof s.transaction;
}

const globalKey = Symbol.for("loomlore.sequelize");
type Holder = { [globalKey]?: Sequelize };

/** The one Sequelize instance of this process (kept on globalThis so dev reloads don't open a second handle). */
export const sequelize: Sequelize = ((globalThis as Holder)[globalKey] ??= createSequelize(databasePath()));

// ---------------------------------------------------------------------------------------------------------------------
// Test only (QUALITY D8): a guard that fails any query run without `{ transaction }` while a managed transaction is open
// in the same async context (without CLS such a query runs on another handle: it does not see the transaction's writes,
// and a write there waits for the transaction's own lock). Inert until enableTransactionGuard() is called.

export interface TransactionGuard {
  /** One line per offending query: its SQL and the app frames of the stack that ran it. */
  readonly violations: string[];
  /** How many queries ran while a managed transaction was open (so a test can tell the guard saw the work). */
  readonly checked: number;
  /** Restore sequelize.query and sequelize.transaction. */
  disable(): void;
}

let activeGuard: TransactionGuard | null = null;

/** Whether `t` is `open` or a savepoint inside it (findOrCreate opens one with `parent` set). */
function within(t: Transaction | null | undefined, open: Transaction): boolean {
  for (let x = t as (Transaction & { parent?: Transaction }) | null | undefined; x; x = x.parent) if (x === open) return true;
  return false;
}

/** Test only: start recording (and failing) queries that forget the open transaction. */
export function enableTransactionGuard(): TransactionGuard {
  if (activeGuard) return activeGuard;
  const openTransaction = new AsyncLocalStorage<Transaction>();
  const violations: string[] = [];
  let checked = 0;
  const original = sequelize.transaction;
  const wrapped = function (this: Sequelize, options?: unknown, callback?: unknown) {
    if (typeof options === "function") [callback, options] = [options, undefined];
    if (typeof callback !== "function") return (original as (o?: unknown) => Promise<Transaction>).call(this, options);
    const work = callback as (t: Transaction) => Promise<unknown>;
    return (original as (o: unknown, cb: (t: Transaction) => Promise<unknown>) => Promise<unknown>).call(this, options, (t) =>
      openTransaction.run(t, () => work(t)),
    );
  };
  sequelize.transaction = wrapped as typeof sequelize.transaction;
  // Wrap query, not a beforeQuery hook: at entry the stack still holds the awaiting app frames (the hook runs after
  // Sequelize's retry wrapper, where V8's async stack trace no longer reaches the caller).
  const query = sequelize.query;
  sequelize.query = function (this: Sequelize, sql: unknown, options?: { transaction?: Transaction | null }) {
    const open = openTransaction.getStore();
    if (open && !(open as unknown as { finished?: string }).finished) checked++;
    if (open && !(open as unknown as { finished?: string }).finished && !within(options?.transaction, open)) {
      const text = typeof sql === "string" ? sql : String((sql as { query?: string })?.query ?? sql);
      const limit = Error.stackTraceLimit;
      Error.stackTraceLimit = 60;
      const stack = new Error().stack ?? "";
      Error.stackTraceLimit = limit;
      // Our frames only (app/, db/, tests/): the file:line that forgot the transaction is among them.
      const frames = stack
        .split("\n")
        .slice(1)
        .filter((l) => !/node_modules|node:|db\/index\.server\.ts/.test(l))
        .map((l) => l.trim());
      const what = options?.transaction ? "ran in another transaction" : "ran without { transaction }";
      const line = `${what} while one is open: ${text.slice(0, 200)}\n    ${frames.join("\n    ")}`;
      violations.push(line);
      return Promise.reject(new Error(`Transaction guard: a query ${line}`));
    }
    return (query as (sql: unknown, options?: unknown) => Promise<unknown>).call(this, sql, options);
  } as typeof sequelize.query;
  activeGuard = {
    violations,
    get checked() {
      return checked;
    },
    disable() {
      sequelize.query = query;
      sequelize.transaction = original;
      activeGuard = null;
    },
  };
  return activeGuard;
}
