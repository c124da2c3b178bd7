// Write latency under contention (issue "Hold under attack and contention"): npm run bench:writes
// Boots the production server (tests/support/server.ts, its own SQLite file) and runs 50 parallel writers of mixed
// kinds for a fixed number of rounds each: made-up password resets, card saves to a garage, bike adds, draft saves of a
// submission, mistake reports, sign-ins. Prints write p50/p99 per kind and overall, and the count of each status, so a
// 500 or 503 shows up at once. Prints figures; asserts nothing (these machines are shared and noisy).
// Two runs, each on a fresh server (the per-rider limits start full): as the site's own pages send a write with
// JavaScript (React Router's `.data` request: the action alone; the page's data is re-read by a separate GET), and as a
// browser without JavaScript does (a document POST: the action and then the whole page rendered). A draft save is the
// PATCH alone (the editor already holds the version; the bench reads it first, untimed). Before the timed rounds each kind
// runs once, untimed (a server in service has compiled its code; BENCH_COLD=1 leaves that out); "by round" shows how
// the figures settle. BENCH_MODES=js (or nojs) runs one of the two.

import { loadavg, cpus } from "node:os";
import { performance } from "node:perf_hooks";
import { startServer } from "../support/server.ts";
import { DEMO, req, signIn } from "../support/http.ts";

const WRITERS = 50;
const ROUNDS = 6;

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] : NaN;
};

async function run(mode: "with JavaScript" | "without JavaScript") {
  const srv = await startServer();
  const page = (p: string) => (mode === "with JavaScript" ? `${p}.data` : p);
  try {
    const rider = await signIn(srv, DEMO.rider.email, DEMO.rider.password);
    const contributor = await signIn(srv, DEMO.contributor.email, DEMO.contributor.password);
    const started = await req(srv, "/api/v1/submissions", { json: { connector: "rx750-four-ignition-unit-plug" }, session: contributor });
    const sub = JSON.parse(started.body).submission as { id: number };
    const timed = async (f: () => Promise<{ status: number }>) => {
      const t = performance.now();
      const r = await f();
      return { status: r.status, ms: performance.now() - t };
    };
    const kinds: Record<string, (i: number) => Promise<{ status: number; ms: number }>> = {
      reset: (i) => timed(() => req(srv, page("/reset"), { form: { token: `made-up-${i}-${Math.random()}`, password: "a-long-enough-passphrase" } })),
      "garage save": () => timed(() => req(srv, page("/connectors/rx750-four-coil-1-plug"), { form: { intent: "save" }, session: rider })),
      "bike add": (i) =>
        timed(() =>
          req(srv, page("/garage"), { form: { intent: "bike", family: "rx750-four", year: String(1977 + (i % 6)), label: `Bench ${i}` }, session: rider }),
        ),
      "draft save": async (i) => {
        const cur = JSON.parse((await req(srv, `/api/v1/submissions/${sub.id}`, { session: contributor })).body).submission as { version: number };
        return timed(() =>
          req(srv, `/api/v1/submissions/${sub.id}`, { method: "PATCH", json: { version: cur.version, summary: `Round ${i}` }, session: contributor }),
        );
      },
      report: (i) =>
        timed(() =>
          req(srv, page("/connectors/rx750-four-coil-2-plug"), { form: { intent: "report", text: `Looks different on mine (${i}).` }, session: rider }),
        ),
      "sign-in": () => timed(() => req(srv, page("/login"), { form: { email: DEMO.moderator.email, password: DEMO.moderator.password } })),
    };
    // BENCH_KINDS="reset,report" runs only those kinds (to see one kind's cost without the others).
    const only = process.env.BENCH_KINDS?.split(",").map((k) => k.trim());
    const names = Object.keys(kinds).filter((k) => !only || only.includes(k));
    // A server in service has served each page before: one of each, untimed, so the figures are not the JIT's first
    // compile (BENCH_COLD=1 leaves this out; round 0 below shows the difference).
    if (!process.env.BENCH_COLD) for (const n of names) await kinds[n](-1);
    const times: Record<string, number[]> = Object.fromEntries(names.map((n) => [n, []]));
    const statuses: Record<string, number> = {};
    const byRound: number[][] = [];
    const t0 = performance.now();
    await Promise.all(
      Array.from({ length: WRITERS }, async (_, w) => {
        for (let r = 0; r < ROUNDS; r++) {
          const kind = names[(w + r) % names.length];
          const { status, ms } = await kinds[kind](w * ROUNDS + r);
          times[kind].push(ms);
          (byRound[r] ??= []).push(ms);
          statuses[status] = (statuses[status] ?? 0) + 1;
        }
      }),
    );
    const wall = performance.now() - t0;
    const all = Object.values(times).flat();
    console.log(
      `writes ${mode}: ${WRITERS} parallel writers × ${ROUNDS} rounds = ${all.length} requests in ${(wall / 1000).toFixed(1)} s (load ${loadavg()[0].toFixed(1)}, ${cpus().length} cores)`,
    );
    for (const n of names)
      console.log(
        `  ${n.padEnd(12)} n=${String(times[n].length).padStart(3)}  p50 ${pct(times[n], 50).toFixed(0).padStart(5)} ms  p99 ${pct(times[n], 99).toFixed(0).padStart(5)} ms`,
      );
    console.log(
      `  ${"all".padEnd(12)} n=${String(all.length).padStart(3)}  p50 ${pct(all, 50).toFixed(0).padStart(5)} ms  p99 ${pct(all, 99).toFixed(0).padStart(5)} ms`,
    );
    console.log(`  by round: ${byRound.map((xs, r) => `${r}: p50 ${pct(xs, 50).toFixed(0)} p99 ${pct(xs, 99).toFixed(0)}`).join("; ")}`);
    console.log(
      `  statuses: ${Object.entries(statuses)
        .map(([s, n]) => `${s}×${n}`)
        .join(", ")}; 5xx: ${Object.entries(statuses)
        .filter(([s]) => Number(s) >= 500)
        .reduce((a, [, n]) => a + n, 0)}`,
    );
  } finally {
    await srv.stop();
  }
}

// BENCH_MODES="js" or "nojs" runs one of the two.
const modes = (process.env.BENCH_MODES ?? "js,nojs").split(",");
if (modes.includes("js")) await run("with JavaScript");
if (modes.includes("nojs")) await run("without JavaScript");
