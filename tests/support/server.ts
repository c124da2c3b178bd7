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

export interface TestServer {
  url: string;
  dbPath: string;
  /** With `mail: true`: base URL of the mail stand-in's JSON list (GET `${mailHttp}/messages`, POST `${mailHttp}/fault`). */
  mailHttp?: string;
  /** With `search: true`: the search stand-in's URL (its `/_standin/fault` switches fault modes) and a way to stop/restart it. */
  searchUrl?: string;
  search?: { url: string; stop: () => Promise<void>; restart: () => Promise<void> };
  stop: () => Promise<void>;
  output: () => string;
}

export interface StartOptions {
  /** Start a mail stand-in (mail/server.ts) on free ports and point the app's SMTP_URL at it. Default false. */
  mail?: boolean;
  /** Start a search stand-in (search/server.ts) on a free port with its own data dir and point SEARCH_URL at it. Default false. */
  search?: boolean;
  /** Extra environment for the app. */
  env?: Record<string, string>;
}

/** `startServer({ mail, env })`, or the older `startServer(env)`. */
function options(arg: StartOptions | Record<string, string>): { mail: boolean; search: boolean; env: Record<string, string> } {
  const { mail, search, env, ...rest } = arg as StartOptions & Record<string, unknown>;
  const legacy = Object.fromEntries(Object.entries(rest).filter((e): e is [string, string] => typeof e[1] === "string"));
  return { mail: mail === true, search: search === true, env: { ...legacy, ...(env ?? {}) } };
}

/**
 * Boot our production server (app/serve.server.ts on build/) against a new SQLite file (migrated and seeded on first request).
 * Without `mail: true` the app's SMTP_URL points at a closed loopback port, so no test ever mails a stand-in that a
 * developer left running on 2525: mail stays queued and health reports mail down. Likewise without `search: true` SEARCH_URL
 * points at a closed port (search answers from the database).
 */
export async function startServer(arg: StartOptions | Record<string, string> = {}): Promise<TestServer> {
  const { mail, search, env } = options(arg);
  const entry = path.join(root, "build/server/index.js");
  if (!existsSync(entry)) throw new Error("No production build: run `npm run build` first (npm test does).");
  const dir = mkdtempSync(path.join(tmpdir(), "loomlore-test-"));
  const dbPath = path.join(dir, "test.sqlite");
  const port = await freePort();
  let standIn: { smtpPort: number; httpPort: number; close: () => Promise<void> } | null = null;
  if (mail) {
    const { startMailStandIn } = await import("../../mail/server.ts");
    standIn = await startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir: path.join(dir, "mail") });
  }
  let searchStandIn: { url: string; port: number; close: () => Promise<void> } | null = null;
  const searchDir = path.join(dir, "search");
  const { startSearchStandIn } = await import("../../search/server.ts");
  if (search) searchStandIn = await startSearchStandIn({ port: 0, dataDir: searchDir });
  const searchPort = searchStandIn?.port ?? 0;
  const searchUrl = searchStandIn?.url;
  const mailHttp = standIn ? `http://127.0.0.1:${standIn.httpPort}` : undefined;
  const mailEnv = standIn
    ? { SMTP_URL: `smtp://127.0.0.1:${standIn.smtpPort}`, MAIL_HTTP_URL: mailHttp! }
    : { SMTP_URL: "smtp://127.0.0.1:1", MAIL_HTTP_URL: "http://127.0.0.1:1" };
  let log = "";
  // SERVER_NODE_ARGS (e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof") passes flags to the server's node, for profiling a bench.
  const nodeArgs = (process.env.SERVER_NODE_ARGS ?? "").split(" ").filter(Boolean);
  const child: ChildProcess = spawn(process.execPath, [...nodeArgs, "--import", "tsx", path.join(root, "app/serve.server.ts")], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: "production",
      PORT: String(port),
      HOST: "127.0.0.1",
      DB_PATH: dbPath,
      UPLOADS_DIR: path.join(dir, "uploads"),
      SEARCH_URL: searchUrl ?? "http://127.0.0.1:1",
      ...mailEnv,
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => (log += d));
  child.stderr!.on("data", (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 30_000;
  try {
    for (;;) {
      if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
      try {
        const r = await fetch(`${url}/api/v1/health`);
        if (r.status === 200) break;
      } catch {
        /* not listening yet */
      }
      if (Date.now() > deadline) throw new Error(`server did not become healthy in 30 s:\n${log}`);
      await new Promise((r) => setTimeout(r, 150));
    }
  } catch (e) {
    if (child.exitCode === null) child.kill("SIGKILL");
    await standIn?.close();
    await searchStandIn?.close();
    throw e;
  }
  return {
    url,
    dbPath,
    mailHttp,
    searchUrl,
    search: searchStandIn
      ? {
          url: searchUrl!,
          stop: async () => {
            await searchStandIn?.close();
          },
          // Same port and data dir: a restarted service keeps what it had persisted.
          restart: async () => {
            searchStandIn = await startSearchStandIn({ port: searchPort, dataDir: searchDir });
          },
        }
      : undefined,
    output: () => log,
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once("exit", r));
        child.kill("SIGTERM");
        await exited;
      }
      await standIn?.close();
      await searchStandIn?.close().catch(() => {});
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
