// `npm start`: everything a newcomer needs on a fresh clone. Builds the app if there is no build, migrates the
// database and seeds the demo library into an empty one, starts the local mail stand-in (mail/server.ts) unless mail
// goes to a real relay and the local search stand-in (search/server.ts) unless SEARCH_URL names another service, then
// serves on PORT (default 3000). The app fills the search index from the library by itself.
import "./env.server.ts"; // first: a bad setting stops `npm start` before it builds or migrates
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";
import { env } from "./env.server.ts";

const root = path.resolve(import.meta.dirname, "..");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);
// The children get this process's environment (their settings are checked again where they are read).
const childEnv = { ...process.env, PORT: String(env.PORT), NODE_ENV: env.NODE_ENV };

function step(label: string, cmd: string, args: string[]) {
  console.log(`[loomlore] ${label}`);
  const r = spawnSync(cmd, args, { cwd: root, env: childEnv, stdio: "inherit" });
  if (r.status !== 0) {
    console.error(`[loomlore] ${label} failed (exit ${r.status ?? r.signal}).`);
    process.exit(r.status ?? 1);
  }
}

if (!existsSync(path.join(root, "build/server/index.js")) || env.REBUILD) {
  step("building the app (first start only; REBUILD=1 forces it)", bin("react-router"), ["build"]);
}
step("migrating the database and seeding the demo library if it is empty", bin("tsx"), ["app/cli.server.ts", "setup"]);

/**
 * The port a local stand-in should listen on, or null when the service is elsewhere: the URL unset (the app's default
 * points at the stand-in's default port) or a plain URL of the stand-in's protocol on loopback. A bad URL is reported
 * by the app itself (without echoing it: it may hold a password).
 */
function localPort(raw: string | undefined, protocol: string, defaultPort: number, protocolPort: number): number | null {
  if (!raw) return defaultPort;
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    return null;
  }
  const local = ["127.0.0.1", "localhost", "[::1]"].includes(url.hostname.toLowerCase());
  return local && url.protocol === protocol ? Number(url.port || protocolPort) : null;
}
/** The mail stand-in runs when mail would go to this machine (SMTP_URL unset or smtp:// on loopback); MAIL_STANDIN=off skips it. */
const standInPort = () => (env.MAIL_STANDIN === "off" ? null : localPort(env.SMTP_URL, "smtp:", 2525, 25));
/** The search stand-in runs when SEARCH_URL is unset or http:// on loopback; SEARCH_STANDIN=off skips it. */
const searchStandInPort = () => (env.SEARCH_STANDIN === "off" ? null : localPort(env.SEARCH_URL, "http:", 7700, 80));

let stopping = false;
let searchStandIn: ChildProcess | null = null;
let mailStandIn: ChildProcess | null = null;
let server: ChildProcess | null = null;

async function startMailStandIn(smtpPort: number): Promise<void> {
  const httpPort = String(env.MAIL_HTTP_PORT);
  console.log(`[loomlore] starting the mail stand-in (SMTP port ${smtpPort}; received mail at http://127.0.0.1:${httpPort}/messages)`);
  const child = spawn(process.execPath, ["--import", "tsx", "mail/server.ts"], {
    cwd: root,
    env: { ...childEnv, MAIL_SMTP_PORT: String(smtpPort), MAIL_HTTP_PORT: httpPort },
    stdio: "inherit",
  });
  mailStandIn = child;
  child.on("exit", (code, signal) => {
    if (!stopping)
      console.error(`[loomlore] the mail stand-in stopped (${code ?? signal}); mail stays queued until an SMTP server answers on port ${smtpPort}.`);
  });
  // Start the app once the stand-in answers (or after 10 s: the outbox keeps mail until it does).
  const deadline = Date.now() + 10_000;
  while (child.exitCode === null && Date.now() < deadline) {
    try {
      if ((await fetch(`http://127.0.0.1:${httpPort}/health`)).ok) break;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function startSearchStandIn(port: number): Promise<void> {
  console.log(`[loomlore] starting the search stand-in on http://127.0.0.1:${port} (index kept in search/data)`);
  const child = spawn(process.execPath, ["--import", "tsx", "search/server.ts"], {
    cwd: root,
    env: { ...childEnv, SEARCH_PORT: String(port) },
    stdio: "inherit",
  });
  searchStandIn = child;
  child.on("exit", (code, signal) => {
    if (!stopping) console.error(`[loomlore] the search stand-in stopped (${code ?? signal}); search answers from the database until it is back.`);
  });
  const deadline = Date.now() + 10_000;
  while (child.exitCode === null && Date.now() < deadline) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}/health`)).ok) break;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function stopChild(child: ChildProcess | null) {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((r) => child.once("exit", r));
  child.kill("SIGTERM");
  await Promise.race([exited, new Promise((r) => setTimeout(r, 3_000))]);
}

async function stopStandIns() {
  stopping = true;
  await Promise.all([stopChild(mailStandIn), stopChild(searchStandIn)]);
}

for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    if (server)
      server.kill(sig); // its exit stops the stand-in and this process
    else stopStandIns().then(() => process.exit(0));
  });
}

const mailPort = standInPort();
if (mailPort !== null) await startMailStandIn(mailPort);
const searchPort = searchStandInPort();
if (searchPort !== null) await startSearchStandIn(searchPort);

server = spawn(process.execPath, ["--import", "tsx", "app/serve.server.ts"], { cwd: root, env: childEnv, stdio: "inherit" });
server.on("exit", async (code, signal) => {
  await stopStandIns();
  process.exit(code ?? (signal ? 0 : 1));
});
