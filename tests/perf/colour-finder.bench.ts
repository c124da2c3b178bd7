// Colour finder speed: npx tsx tests/perf/colour-finder.bench.ts
// Invented, seeded libraries of 10 000 and 100 000 connectors (the 100k library starts with the
// 10k one), one index each, and the same 200 fixed queries (2–6 wires, dropped, faded, tracers
// worn off, re-written in another notation) against both. Each library runs twice: connectors with no notation (every
// reading of a typed code for every connector), then with each family in a notation and house style, so that a
// connector reads the codes as its maker writes them (one cost table per house). Prints figures; asserts nothing.

import { loadavg } from "node:os";
import { mulberry32, pick } from "../fixtures/random.ts";
import { performance } from "node:perf_hooks";
import { encodeColour, type ColourName, type ColourSystemId, type HouseStyleId } from "../../app/domain/colours/index.ts";
import { FADING_PAIRS, buildFinderIndex, findConnectors, type FinderConnector, type FinderIndex } from "../../app/domain/colour-finder.ts";

const PALETTE: ColourName[] = [
  "black",
  "brown",
  "red",
  "orange",
  "yellow",
  "green",
  "blue",
  "violet",
  "grey",
  "white",
  "pink",
  "light green",
  "light blue",
  "sky blue",
  "dark green",
  "chocolate",
  "tan",
];
const SYSTEMS = ["ignition", "lighting", "charging", "signals", "starting", "instruments"];
const code = (c: ColourName[]) => encodeColour(c[0], c.slice(1), "jis") ?? encodeColour(c[0], c.slice(1), "en");

function colours(rnd: () => number): ColourName[] {
  const base = pick(rnd, PALETTE);
  if (rnd() < 0.45) return [base];
  let tracer = pick(rnd, PALETTE);
  while (tracer === base) tracer = pick(rnd, PALETTE);
  return [base, tracer];
}

/** `count` more invented connectors from the stream `rnd`, numbered from `from`. */
function library(count: number, rnd: () => number, from = 0): FinderConnector[] {
  const out: FinderConnector[] = [];
  for (let i = from; i < from + count; i++) {
    const cavities = 2 + Math.floor(rnd() * 11); // 2–12
    const pins = Array.from({ length: cavities }, (_, k) => {
      const c = k >= 2 && rnd() < 0.1 ? [] : colours(rnd);
      return { cavity: String(k + 1), code: c.length ? code(c) : null, colours: c };
    });
    out.push({
      slug: `bench-${i}`,
      name: `Bench connector ${i}`,
      family: `bench-family-${i % 400}`,
      system: SYSTEMS[i % SYSTEMS.length],
      gender: i % 2 ? "socket" : "plug",
      pins,
    });
  }
  return out;
}

const partners = new Map<ColourName, ColourName[]>();
for (const [a, b] of FADING_PAIRS) {
  partners.set(a, [...(partners.get(a) ?? []), b]);
  partners.set(b, [...(partners.get(b) ?? []), a]);
}
const NOTATIONS: ColourSystemId[] = ["jis", "din", "en", "bs", "iec"];

/** 200 fixed queries of 2–6 wires taken from connectors of the first 10 000, damaged. */
function queries(lib: FinderConnector[], count: number, seed: number): { wires: string[]; truth: string }[] {
  const rnd = mulberry32(seed);
  const out: { wires: string[]; truth: string }[] = [];
  while (out.length < count) {
    const con = pick(rnd, lib);
    const seen = con.pins.filter((p) => p.colours.length).map((p) => [...p.colours]);
    if (seen.length < 2) continue;
    const want = Math.min(seen.length, 2 + Math.floor(rnd() * 5)); // 2–6, fewer when the card has fewer
    while (seen.length > want) seen.splice(Math.floor(rnd() * seen.length), 1);
    for (const c of seen) {
      if (rnd() < 0.2) c[0] = pick(rnd, partners.get(c[0]) ?? [c[0]]);
      if (c.length > 1 && rnd() < 0.2) c.length = 1;
    }
    for (let i = seen.length - 1; i > 0; i--) {
      const j = Math.floor(rnd() * (i + 1));
      [seen[i], seen[j]] = [seen[j], seen[i]];
    }
    const system = pick(rnd, NOTATIONS);
    out.push({ truth: con.slug, wires: seen.map((c) => encodeColour(c[0], c.slice(1), system) ?? encodeColour(c[0], c.slice(1), "en")!) });
  }
  return out;
}

// Invented families spread over the house styles Loomlore knows, and one jis family with no house.
const HOUSES: [ColourSystemId, HouseStyleId | null][] = [
  ["jis", "jis-letters"],
  ["jis", "jis-bl-black"],
  ["jis", "jis-bl-blue"],
  ["jis", "jis-caps"],
  ["din", "din"],
  ["bs", "bs"],
  ["en", "en"],
  ["jis", null],
];
/** The same connectors with each family (bench-family-<n>) in one notation and house. */
const housed = (lib: FinderConnector[]): FinderConnector[] =>
  lib.map((c) => {
    const [notation, houseStyle] = HOUSES[Number(c.family.slice("bench-family-".length)) % HOUSES.length];
    return { ...c, notation, houseStyle };
  });

const pct = (xs: number[], p: number) => xs[Math.min(xs.length - 1, Math.ceil((p / 100) * xs.length) - 1)];
const ms = (x: number) => `${x.toFixed(2)} ms`;

function run(label: string, lib: FinderConnector[], qs: { wires: string[]; truth: string }[]) {
  const t0 = performance.now();
  const index: FinderIndex = buildFinderIndex(lib);
  const buildMs = performance.now() - t0;
  for (const q of qs) findConnectors(index, { wires: q.wires }); // warm-up: one pass, as a running server would be
  const times: number[] = [];
  const cpu: number[] = [];
  let assigned = 0;
  let first = 0;
  for (const q of qs) {
    const c0 = process.cpuUsage();
    const s = performance.now();
    const r = findConnectors(index, { wires: q.wires });
    times.push(performance.now() - s);
    const c1 = process.cpuUsage(c0);
    cpu.push((c1.user + c1.system) / 1000);
    if (!r.ok) throw new Error(`${JSON.stringify(q.wires)}: ${r.error.message}`);
    assigned += r.stats.assigned;
    if (r.candidates[0]?.connector.slug === q.truth) first++;
  }
  times.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  const p95 = pct(times, 95);
  console.log(
    `colour-finder ${label}: p50 ${ms(pct(times, 50))} p95 ${ms(p95)} max ${ms(times[times.length - 1])}` +
      ` | cpu p50 ${ms(pct(cpu, 50))} p95 ${ms(pct(cpu, 95))} | build ${ms(buildMs)} | munkres on ${(assigned / qs.length).toFixed(1)} of ${lib.length} connectors per query` +
      ` | true card first in ${first}/${qs.length}`,
  );
  return p95;
}

// The 100k library is the 10k one continued from the same stream; it is made only after the 10k
// run, so that run's garbage collections do not walk a heap ten times its size.
const rnd = mulberry32(20261201);
const small = library(10_000, rnd);
const qs = queries(small, 200, 60757);
// p50/p95/max are wall-clock; on a shared box a load average above the core count inflates them,
// so the process CPU time per query is printed too.
console.log(`node ${process.version}, ${qs.length} queries of 2–6 wires, load average ${loadavg()[0].toFixed(1)}`);
const p95small = run("10k", small, qs);
const p95smallHoused = run("10k, house styles", housed(small), qs);
const big = small.concat(library(90_000, rnd, 10_000));
const p95big = run("100k", big, qs);
const p95bigHoused = run("100k, house styles", housed(big), qs);
console.log(`colour-finder 100k/10k p95 ratio: ${(p95big / p95small).toFixed(1)}; with house styles ${(p95bigHoused / p95smallHoused).toFixed(1)}`);
