/** Shared helpers for the integration tests: the API's error shape, a small CSV reader, and the "state digest" of a database file. */
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import path from "node:path";
import { promisify } from "node:util";
import sqlite3 from "sqlite3";
import { expect } from "vitest";
import { z } from "zod";
import type { TestServer } from "../support/server";

// API.md, Conventions: {"error": {"code": "snake_case_code", "message": "A sentence a person can act on", "field": "name-if-any"}}
export const errorBody = z.strictObject({
  error: z.strictObject({
    code: z.string().regex(/^[a-z]+(?:_[a-z]+)*$/, "snake_case"),
    message: z.string().min(1),
    field: z.string().min(1).optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBody>;

/** Parse a strict schema and fail with zod's own explanation (path + message) instead of a bare "false". */
export function shape<T extends z.ZodType>(schema: T, value: unknown, what = "body"): z.infer<T> {
  const r = schema.safeParse(value);
  if (!r.success) throw new Error(`${what} does not match the API.md shape:\n${z.prettifyError(r.error)}\n${JSON.stringify(value).slice(0, 600)}`);
  return r.data;
}

/**
 * RFC 4180-style CSV reader: quoted fields, doubled quotes, CRLF or LF records.
 * Returns rows of cells; a trailing line break does not make an empty last row.
 */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cell += ch;
    } else if (ch === '"' && cell === "") quoted = true;
    else if (ch === ",") {
      row.push(cell);
      cell = "";
    } else if (ch === "\r" && text[i + 1] === "\n") {
      /* the \n ends the record */
    } else if (ch === "\n") {
      row.push(cell);
      rows.push(row);
      row = [];
      cell = "";
    } else cell += ch;
  }
  if (quoted) throw new Error("CSV ends inside a quoted field");
  if (cell !== "" || row.length) {
    row.push(cell);
    rows.push(row);
  }
  return rows;
}

/** Undo the spreadsheet-formula defusing (a leading ' before = + - @ tab CR, OWASP CSV injection advice) to compare a cell with the JSON value. */
export const undefuse = (cell: string) => (/^'[=+\-@\t\r]/.test(cell) ? cell.slice(1) : cell);

function all(db: sqlite3.Database, sql: string): Promise<Record<string, unknown>[]> {
  return new Promise((resolve, reject) => db.all(sql, (err, rows) => (err ? reject(err) : resolve(rows as Record<string, unknown>[]))));
}

/**
 * QUALITY.md, general rule: a denied or failed request must leave the database unchanged. The digest is a SHA-256 over every
 * row of every user table (ordered by rowid) plus the schema, read through a separate read-only handle.
 */
export async function stateDigest(dbPath: string): Promise<string> {
  const db = await new Promise<sqlite3.Database>((resolve, reject) => {
    const d = new sqlite3.Database(dbPath, sqlite3.OPEN_READONLY, (err) => (err ? reject(err) : resolve(d)));
  });
  try {
    const hash = createHash("sha256");
    const tables = await all(db, "SELECT name, sql FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
    for (const t of tables) {
      hash.update(`${t.name}\n${t.sql}\n`);
      // FTS5 keeps its index in shadow tables (some WITHOUT ROWID); the virtual table's own rows cover their content.
      if (/^search_fts_/.test(String(t.name))) continue;
      for (const row of await all(db, `SELECT * FROM "${String(t.name).replaceAll('"', '""')}" ORDER BY rowid`)) hash.update(JSON.stringify(row) + "\n");
    }
    return hash.digest("hex");
  } finally {
    await new Promise<void>((resolve) => db.close(() => resolve()));
  }
}

/** Run one statement on a database file (used to inject faults from outside the process under test). */
export async function execSql(dbPath: string, sql: string): Promise<void> {
  const db = await new Promise<sqlite3.Database>((resolve, reject) => {
    const d = new sqlite3.Database(dbPath, (err) => (err ? reject(err) : resolve(d)));
  });
  try {
    await new Promise<void>((resolve, reject) => db.exec(sql, (err) => (err ? reject(err) : resolve())));
  } finally {
    await new Promise<void>((resolve) => db.close(() => resolve()));
  }
}

/** HTTP helpers bound to a test server's base URL (read when called, so it can be set in beforeAll). */
export function client(base: () => string) {
  /** Any request, no redirects followed: status, content type and the body as text. */
  async function call(path: string, init?: RequestInit) {
    const res = await fetch(base() + path, { redirect: "manual", ...init });
    const body = await res.text();
    return { res, status: res.status, type: res.headers.get("content-type") ?? "", body };
  }
  /** GET → 200 JSON, parsed against a schema. */
  async function getJson<T extends z.ZodType>(path: string, schema: T): Promise<z.infer<T>> {
    const r = await call(path);
    expect(r.status, `GET ${path}: ${r.body.slice(0, 300)}`).toBe(200);
    expect(r.type, path).toMatch(/^application\/json\b/);
    return shape(schema, JSON.parse(r.body), path);
  }
  return { call, getJson };
}

/** `npm run search:reconcile` against a test server's database and search stand-in; returns its counts. */
export async function reconcileOnce(srv: TestServer): Promise<{ added: number; updated: number; removed: number }> {
  const { stdout } = await promisify(execFile)("npm", ["run", "--silent", "search:reconcile"], {
    cwd: path.resolve(import.meta.dirname, "../.."),
    env: { ...process.env, DB_PATH: srv.dbPath, SEARCH_URL: srv.searchUrl!, SEARCH_KEY: "" },
    timeout: 60_000,
  });
  const m = /search index reconciled: (\{.*\})/.exec(stdout);
  if (!m) throw new Error(`no counts in the reconcile output:\n${stdout}`);
  return JSON.parse(m[1]);
}
