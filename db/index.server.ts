import path from "node:path";
import { mkdirSync } from "node:fs";
import { Sequelize, Transaction } from "sequelize";

/** Where the SQLite file lives: DB_PATH, else db/data/loomlore.sqlite (":memory:" for throwaway use). */
export function databasePath(): string {
  return process.env.DB_PATH ?? path.resolve(process.cwd(), "db/data/loomlore.sqlite");
}

const BUSY_TIMEOUT_MS = Number(process.env.DB_BUSY_TIMEOUT_MS ?? 5000);

function run(conn: { run: (sql: string, cb: (err: Error | null) => void) => void }, sql: string) {
  return new Promise<void>((resolve, reject) => conn.run(sql, (err) => (err ? reject(err) : resolve())));
}

function createSequelize(storage: string): Sequelize {
  if (storage !== ":memory:") mkdirSync(path.dirname(storage), { recursive: true });
  // IMMEDIATE: a transaction takes the write lock when it begins, waiting up to the busy timeout. A DEFERRED one that
  // reads, then writes, is refused at once with SQLITE_BUSY when another writer holds the lock (no timeout applies
  // to that upgrade), which turned a busy moment into a 500.
  const s = new Sequelize({ dialect: "sqlite", storage, logging: false, define: { underscored: true }, transactionType: Transaction.TYPES.IMMEDIATE });
  // Sequelize opens a fresh sqlite3 handle per transaction: every handle needs the same pragmas.
  s.addHook("afterConnect", async (conn: any) => {
    conn.configure("busyTimeout", BUSY_TIMEOUT_MS);
    await run(conn, "PRAGMA foreign_keys = ON");
    if (storage !== ":memory:") await run(conn, "PRAGMA journal_mode = WAL");
    await run(conn, "PRAGMA synchronous = NORMAL");
  });
  return s;
}

const globalKey = Symbol.for("loomlore.sequelize");
type Holder = { [globalKey]?: Sequelize };

/** The one Sequelize instance of this process (kept on globalThis so dev reloads don't open a second handle). */
export const sequelize: Sequelize = ((globalThis as Holder)[globalKey] ??= createSequelize(databasePath()));
