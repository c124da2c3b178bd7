// The loom planner's fuses: each rated for what the kept circuits draw behind it, and the wires it protects sized to it.

import type { Element } from "../electrics";
import { FITTING_SOURCE, parseFitting } from "../terminals";
import { FUSE_MARGIN, FUSE_RATINGS_A, SHORT_TERM_A_PER_MM2, awgAreaMm2 } from "../wire-size";
import type { Currents } from "./currents";
import { EPS, FUSE_MOMENTARY_FACTOR, fmt, smallestAwg, smallestMetric } from "./rules";
import type { Topology } from "./topology";
import type { CutRow, FuseRow, PlannerCircuit, PlannerInput } from "./types";

export function planFuses(
  input: PlannerInput,
  kept: PlannerCircuit[],
  topo: Topology,
  rows: CutRow[],
  rowById: Map<string, CutRow>,
  cur: Map<string, Currents>,
  warnings: string[],
): FuseRow[] {
  const byId = new Map<string, Element>(input.network.elements.map((e) => [e.id, e]));
  // A wire is protected by the nearest fuse before it on the supply path of every kept circuit that uses it.
  const protector = new Map<string, string | null>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    let last: string | null = null;
    for (const id of t.supplyOrder) {
      if (t.fuses.includes(id)) last = id;
      if (rowById.has(id)) {
        const had = protector.get(id);
        protector.set(id, had === undefined ? last : had === last ? last : null);
      }
    }
  }
  const out: FuseRow[] = [];
  for (const id of new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.fuses))) {
    const el = byId.get(id)!;
    const name = input.names[id] ?? "fuse";
    const factoryA = el.ratingA ?? 0;
    const c = cur.get(id)!;
    const circuits = kept.filter((k) => topo.circuits.get(k.slug)!.fuses.includes(id)).map((k) => k.slug);
    const protects = rows.filter((r) => protector.get(r.wire) === id && r.role === "power").map((r) => r.wire);
    const contacts = [
      ...new Set(
        kept
          .filter((k) => circuits.includes(k.slug))
          .flatMap((k) => {
            const t = topo.circuits.get(k.slug)!;
            return t.contacts.filter((x) => t.supplyOrder.indexOf(x) > t.supplyOrder.indexOf(id));
          }),
      ),
    ];
    const need = FUSE_MARGIN * c.continuous;
    const momentaryNeed = Math.max(c.momentary, c.peak) / FUSE_MOMENTARY_FACTOR;
    const candidate = FUSE_RATINGS_A.find((r) => r >= Math.max(need, momentaryNeed) * (1 - EPS)) ?? FUSE_RATINGS_A.at(-1)!;
    const parts: string[] = [`Continuous ${fmt(c.continuous)} A behind it; ${FUSE_MARGIN} × that is ${fmt(need)} A.`];
    if (c.momentary > c.continuous)
      parts.push(`Momentary ${fmt(c.momentary)} A (a button held): within ${FUSE_MOMENTARY_FACTOR} × the rating for the seconds it lasts.`);
    const fuseWarnings: string[] = [];
    // What stands behind the fuse: the terminals of the wires it protects and the switch contacts on its path, each with
    // the current it carries itself. The trunk (what carries most of the fuse's current) sees whatever the fuse lets through.
    const behind: { what: string; ratingA: number; amps: number }[] = [];
    const seen = new Set<string>();
    for (const wid of protects) {
      const w = input.wires.find((x) => x.id === wid)!;
      const r = rowById.get(wid)!;
      for (const f of [w.fromFitting, w.toFitting]) {
        const fit = parseFitting(f);
        const what = `the ${fit.words} terminal${w.from.includes(":") ? ` at ${f === w.fromFitting ? w.from : w.to}` : ""}`;
        if (fit.ratingA !== null && !seen.has(what)) {
          seen.add(what);
          behind.push({ what, ratingA: fit.ratingA, amps: r.continuousA });
        }
      }
    }
    for (const x of contacts) {
      const p = byId.get(x)?.params as { contactA?: number } | null | undefined;
      if (p?.contactA) behind.push({ what: input.names[x] ?? "a switch contact", ratingA: p.contactA, amps: cur.get(x)?.continuous ?? 0 });
    }
    const trunk = behind.filter((b) => b.amps >= 0.8 * c.continuous);
    let ratingA: number;
    let raised = false;
    if (candidate <= factoryA || factoryA === 0) {
      ratingA = candidate;
      parts.push(
        factoryA === 0
          ? `${ratingA} A suits the kept circuits.`
          : ratingA < factoryA
            ? `${ratingA} A is enough for the kept circuits: smaller than the factory's ${factoryA} A (which also fed circuits now dropped), so it protects them better.`
            : `The factory's ${factoryA} A suits the kept circuits.`,
      );
    } else {
      const weak = trunk.filter((b) => b.ratingA < candidate);
      if (weak.length === 0) {
        ratingA = candidate;
        raised = true;
        parts.push(
          `Raised above the factory's ${factoryA} A because the kept circuits draw ${fmt(c.continuous)} A continuous; what carries its whole current is rated for ${candidate} A or more (${trunk.map((b) => `${b.what} ≈ ${b.ratingA} A`).join("; ") || "no terminal or contact recorded"}).`,
        );
      } else {
        ratingA = factoryA;
        const w = `"${name}": the kept circuits draw ${fmt(c.continuous)} A continuous, more than its factory ${factoryA} A suits (${FUSE_MARGIN} × ${fmt(c.continuous)} = ${fmt(need)} A). Not raised: ${weak.map((b) => `${b.what} (≈ ${b.ratingA} A)`).join(", ")} carries all of it and would then be the weakest part. Split the feed across a second fuse, or switch the heavy load through a relay.`;
        fuseWarnings.push(w);
        warnings.push(w);
      }
    }
    for (const b of behind) {
      if (b.amps > b.ratingA)
        fuseWarnings.push(
          `${b.what} carries ${fmt(b.amps)} A, more than the ≈ ${b.ratingA} A it is rated for (${FITTING_SOURCE}): fit a larger part or a relay.`,
        );
    }
    // The fuse protects the wire: no wire behind it may be thinner than the fuse stands short-term; grow it if so.
    for (const wid of protects) {
      const r = rowById.get(wid)!;
      if (SHORT_TERM_A_PER_MM2 * r.sizeMm2 >= ratingA * (1 - EPS)) continue;
      const size = smallestMetric(ratingA / SHORT_TERM_A_PER_MM2)!;
      r.notes.push(
        `Upsized from ${r.sizeMm2} to ${size} mm² so the ${ratingA} A fuse "${name}" protects it (${SHORT_TERM_A_PER_MM2} A/mm² short-term, rule of thumb).`,
      );
      r.sizeMm2 = size;
      const g = smallestAwg(size);
      if (g !== null && (r.awg === null || awgAreaMm2(g) > awgAreaMm2(r.awg))) r.awg = g;
      r.decidedBy = "fuse";
    }
    for (const wid of protects) rowById.get(wid)!.notes.push(`Protected by fuse "${name}" (${ratingA} A).`);
    out.push({
      id,
      name,
      circuits,
      factoryA,
      ratingA,
      continuousA: c.continuous,
      peakA: Math.max(c.peak, c.momentary),
      raised,
      protects,
      basis: parts.join(" "),
      warnings: fuseWarnings,
    });
  }
  return out;
}
