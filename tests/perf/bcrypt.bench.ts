// Prints bcrypt hash time per work factor on this machine (QUALITY P7: choose the highest cost with p50 ≤ 250 ms,
// never below 10 — OWASP ASVS V2.4.4). A benchmark prints figures; it asserts nothing.
import { performance } from "node:perf_hooks";
import { hashPassword, BCRYPT_COST } from "../../app/infra/password-hash.server.ts";

const runs = Number(process.env.RUNS ?? 7);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`bcryptjs on node ${process.version}, ${runs} hashes per cost; configured cost ${BCRYPT_COST}`);
let best = 10;
for (const cost of [10, 11, 12, 13]) {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    await hashPassword("correct horse battery staple", cost, { wait: true });
    times.push(performance.now() - t);
  }
  const p50 = median(times);
  if (p50 <= 250) best = cost;
  console.log(`bcrypt cost ${cost}: p50 ${p50.toFixed(0)} ms, max ${Math.max(...times).toFixed(0)} ms`);
}
console.log(`highest cost with p50 ≤ 250 ms here: ${best}`);
