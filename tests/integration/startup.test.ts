// Start-up and shut-down (app/startup.server.ts, app/env.server.ts): a bad setting stops the server before it listens,
// naming the variable; a started server has migrated and seeded before its first answer; SIGTERM ends it cleanly.
// Sources: Node.js docs (process exit codes: 1 for an uncaught failure; 'exit' carries the code), POSIX SIGTERM.
import { spawn } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { startServer } from "../support/server";

const root = path.resolve(import.meta.dirname, "../..");

function run(env: Record<string, string>): Promise<{ code: number | null; out: string }> {
  const dir = mkdtempSync(path.join(tmpdir(), "loomlore-startup-"));
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "app/serve.server.ts")], {
      cwd: root,
      env: { ...process.env, NODE_ENV: "production", PORT: "0", DB_PATH: path.join(dir, "t.sqlite"), UPLOADS_DIR: path.join(dir, "up"), ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), 30_000);
    child.on("exit", (code) => {
      clearTimeout(timer);
      rmSync(dir, { recursive: true, force: true });
      resolve({ code, out });
    });
  });
}

describe("start-up", () => {
  it.each([
    ["PHOTO_MAX_BYTES", "15MB"],
    ["SEARCH_URL", "ftp://127.0.0.1:7700"],
    ["BCRYPT_COST", "4"],
  ])("%s=%s: the server does not start, and says which variable is wrong", async (variable, value) => {
    const r = await run({ [variable]: value });
    expect(r.code).toBe(1);
    expect(r.out).toContain(variable);
    expect(r.out.match(/: expected/g), "only the bad variable is named").toHaveLength(1);
    expect(r.out).not.toMatch(/listening on/);
    expect(r.out).not.toMatch(/\n\s+at /); // one clear line, not a stack trace
  });

  it("a started server answers its first request from a migrated, seeded database, and SIGTERM ends it within the 5 s cap", async () => {
    const srv = await startServer();
    try {
      const r = await fetch(`${srv.url}/api/v1/families`);
      expect(r.status).toBe(200);
      expect(((await r.json()) as { families: unknown[] }).families.length).toBeGreaterThan(0);
    } finally {
      const t0 = performance.now();
      await srv.stop();
      expect(performance.now() - t0).toBeLessThan(6_000); // the workers stop within the 5 s cap
    }
  });
});
