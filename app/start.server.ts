// `npm start`: everything a newcomer needs on a fresh clone. Builds the app if there is no build, migrates the
// database and seeds the demo library into an empty one, then serves on PORT (default 3000).
import { spawn, spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);
const env = { ...process.env, PORT: process.env.PORT ?? "3000", NODE_ENV: process.env.NODE_ENV ?? "production" };

function step(label: string, cmd: string, args: string[]) {
  console.log(`[loomlore] ${label}`);
  const r = spawnSync(cmd, args, { cwd: root, env, stdio: "inherit" });
  if (r.status !== 0) {
    console.error(`[loomlore] ${label} failed (exit ${r.status ?? r.signal}).`);
    process.exit(r.status ?? 1);
  }
}

if (!existsSync(path.join(root, "build/server/index.js")) || process.env.REBUILD === "1") {
  step("building the app (first start only; REBUILD=1 forces it)", bin("react-router"), ["build"]);
}
step("migrating the database and seeding the demo library if it is empty", bin("tsx"), ["db/cli.ts", "setup"]);

const server = spawn(process.execPath, ["--import", "tsx", "app/serve.server.ts"], { cwd: root, env, stdio: "inherit" });
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => server.kill(sig));
server.on("exit", (code, signal) => process.exit(code ?? (signal ? 0 : 1)));
