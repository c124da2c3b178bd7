/** Start the production build on a free loopback port with its own fresh database; for integration and browser tests. */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as { port: number };
      srv.close(() => resolve(port));
    });
  });
}

export interface TestServer { url: string; dbPath: string; stop: () => Promise<void>; output: () => string }

/** Boot our production server (app/serve.server.ts on build/) against a new SQLite file (migrated and seeded on first request). */
export async function startServer(env: Record<string, string> = {}): Promise<TestServer> {
  const entry = path.join(root, "build/server/index.js");
  if (!existsSync(entry)) throw new Error("No production build: run `npm run build` first (npm test does).");
  const dir = mkdtempSync(path.join(tmpdir(), "loomlore-test-"));
  const dbPath = path.join(dir, "test.sqlite");
  const port = await freePort();
  let log = "";
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", path.join(root, "app/serve.server.ts")], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1", DB_PATH: dbPath, ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => (log += d));
  child.stderr!.on("data", (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      const r = await fetch(`${url}/api/v1/health`);
      if (r.status === 200) break;
    } catch { /* not listening yet */ }
    if (Date.now() > deadline) throw new Error(`server did not become healthy in 30 s:\n${log}`);
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    url,
    dbPath,
    output: () => log,
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once("exit", r));
        child.kill("SIGTERM");
        await exited;
      }
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
