// The loom planner's plan: check the input, size every wire the kept circuits pass, then fuses, colours and parts.

import { COLOUR_SYSTEM_IDS } from "../colours";
import { FITTING_SOURCE, parseFitting } from "../terminals";
import {
  AMPACITY_A_PER_MM2,
  CLASS5_WORST_OHM_MM2_PER_KM,
  FUSE_MARGIN,
  SHORT_TERM_A_PER_MM2,
  WorkshopInputError,
  copperTempFactor,
  strandedResistance,
} from "../wire-size";
import { SIMPLE_SCHEME, colourRows } from "./colours";
import { fullLoomCurrents, statesOf, worstCurrents } from "./currents";
import { planFuses } from "./fuses";
import { partsList } from "./parts";
import {
  ASSUMED_RUN_M,
  EPS,
  FUSE_MOMENTARY_FACTOR,
  MAX_RUN_M,
  MIN_PRACTICAL_MM2,
  NO_CURRENT_A,
  circuitDropPct,
  fail,
  fmt,
  round3,
  smallestAwg,
  smallestMetric,
} from "./rules";
import { topology } from "./topology";
import type { CircuitDrop, CutRow, PlanResult, PlannerInput, WireRole } from "./types";

// ---------------------------------------------------------------------------------------------
// Validation

function checkInput(input: PlannerInput) {
  if (input === null || typeof input !== "object") throw fail("input", "must be an object");
  if (!Array.isArray(input.circuits)) throw fail("circuits", "must be a list of circuits");
  if (!Array.isArray(input.wires)) throw fail("wires", "must be a list of wires");
  if (!Array.isArray(input.keep) || input.keep.length === 0) throw fail("keep", "choose at least one circuit to keep");
  const slugs = new Set(input.circuits.map((c) => c.slug));
  for (const slug of input.keep) {
    if (typeof slug !== "string" || !slugs.has(slug))
      throw fail("keep", `"${String(slug)}" is not a circuit of this family; use one of ${[...slugs].join(", ")}`);
  }
  if (input.scheme !== "factory" && input.scheme !== "simple") throw fail("scheme", 'use "factory" or "simple"');
  if (!COLOUR_SYSTEM_IDS.includes(input.notation)) throw fail("notation", `use one of ${COLOUR_SYSTEM_IDS.join(", ")}`);
  const tempC = input.tempC ?? 20;
  try {
    copperTempFactor(tempC);
  } catch (e) {
    if (e instanceof WorkshopInputError) throw fail("tempC", e.message.replace(/^tempC: /, ""));
    throw e;
  }
  const wireIds = new Set(input.wires.map((w) => w.id));
  const lengths = input.lengthsM ?? {};
  if (lengths === null || typeof lengths !== "object" || Array.isArray(lengths)) throw fail("lengthsM", "must map wire ids to metres");
  for (const [id, v] of Object.entries(lengths)) {
    const field = `lengthsM.${id}`;
    if (!wireIds.has(id)) throw fail(field, `there is no wire "${id}" in this family`);
    if (typeof v !== "number" || !Number.isFinite(v)) throw fail(field, "must be a number of metres");
    if (v <= 0 || v > MAX_RUN_M) throw fail(field, `must be more than 0 and at most ${MAX_RUN_M} m, got ${v}`);
  }
  return { tempC, lengths };
}

/** Build the cut list. Returns {ok:false,error:{field,message}} for unknown circuits, empty keep, bad lengths. */
export function planLoom(input: PlannerInput): { ok: true; plan: PlanResult } | { ok: false; error: { field: string; message: string } } {
  try {
    return { ok: true, plan: buildPlan(input) };
  } catch (e) {
    if (e instanceof WorkshopInputError) {
      const prefix = `${e.field}: `;
      return { ok: false, error: { field: e.field, message: e.message.startsWith(prefix) ? e.message.slice(prefix.length) : e.message } };
    }
    throw e;
  }
}

// ---------------------------------------------------------------------------------------------
// Planning

function buildPlan(input: PlannerInput): PlanResult {
  const { tempC, lengths } = checkInput(input);
  const systemV = input.network.systemV;
  const keep = new Set(input.keep);
  const kept = input.circuits.filter((c) => keep.has(c.slug));
  const dropped = input.circuits.filter((c) => !keep.has(c.slug)).map(({ slug, name }) => ({ slug, name }));
  const keptLoads = new Set(kept.flatMap((c) => c.loads));
  const without = new Set(input.circuits.flatMap((c) => c.loads).filter((id) => !keptLoads.has(id)));
  const topo = topology(input);
  const warnings: string[] = [];

  // The wires the kept circuits pass, each with the circuits that use it.
  const rowCircuits = new Map<string, string[]>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    for (const id of [...t.supply, ...t.ret]) rowCircuits.set(id, [...(rowCircuits.get(id) ?? []), c.slug]);
  }
  const wires = input.wires.filter((w) => rowCircuits.has(w.id));
  const fuseIds = new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.fuses));
  const contactIds = new Set(kept.flatMap((c) => topo.circuits.get(c.slug)!.contacts));
  const cur = worstCurrents(input.network, [...wires.map((w) => w.id), ...fuseIds, ...contactIds], without);
  const full = fullLoomCurrents(
    input.network,
    input.wires.map((w) => w.id),
  );

  // Lengths and roles.
  let assumed = 0;
  const rows: CutRow[] = wires.map((w) => {
    const c = cur.get(w.id)!;
    const net = topo.netOf.get(w.id) ?? w.id;
    const currentA = Math.max(c.continuous, c.momentary);
    const earth = topo.earthNets.has(net);
    const role: WireRole = earth ? "earth" : currentA < NO_CURRENT_A && c.peak < NO_CURRENT_A && topo.senseNodes.has(net) ? "signal" : "power";
    let lengthM: number;
    let lengthSource: CutRow["lengthSource"];
    const notes: string[] = [];
    if (lengths[w.id] !== undefined) {
      lengthM = lengths[w.id]!;
      lengthSource = "builder";
    } else if (typeof w.defaultLengthM === "number" && Number.isFinite(w.defaultLengthM) && w.defaultLengthM > 0) {
      lengthM = w.defaultLengthM;
      lengthSource = "family default";
    } else {
      lengthM = ASSUMED_RUN_M;
      lengthSource = "assumed";
      assumed++;
      notes.push(`Length assumed ${ASSUMED_RUN_M} m: measure the run and enter it.`);
    }
    if (role === "power" && currentA < NO_CURRENT_A)
      notes.push("Carries no current in any state the planner checks: check what it feeds before you leave it out or cut it thin.");
    return {
      wire: w.id,
      from: w.from,
      to: w.to,
      net,
      colour: "",
      colours: [],
      lengthM,
      lengthSource,
      currentA,
      continuousA: c.continuous,
      peakA: Math.max(c.peak, currentA),
      momentary: c.continuous < NO_CURRENT_A && c.momentary >= NO_CURRENT_A,
      role,
      circuits: rowCircuits.get(w.id)!,
      sizeMm2: 0,
      awg: null,
      dropV: 0,
      dropPct: 0,
      decidedBy: "minimum",
      fittings: [parseFitting(w.fromFitting).words, parseFitting(w.toFitting).words],
      notes,
    };
  });
  const rowById = new Map(rows.map((r) => [r.wire, r]));
  const wireById = new Map(input.wires.map((w) => [w.id, w]));

  // Sizing. A circuit's drop budget is shared among its wires so that the copper is least: area ∝ √I (Lagrange), every
  // wire at least what its own share needs; rounding up to standard sizes only lowers the drops.
  const k = (CLASS5_WORST_OHM_MM2_PER_KM / 1000) * copperTempFactor(tempC); // Ω·mm²/m, class 5, at temperature
  const needDrop = new Map<string, number>();
  const budgets = new Map<string, { pct: number; basis: string }>();
  const circuitAmps = new Map<string, (id: string) => number>();
  for (const c of kept) {
    const t = topo.circuits.get(c.slug)!;
    // In the states this circuit works in: the starter's wires while cranking, the rest with everything continuous on.
    const states = statesOf(c);
    const amps = (id: string) => Math.max(...states.map((i) => cur.get(id)!.byState[i] ?? 0));
    const ws = [...t.supply, ...t.ret].map((id) => rowById.get(id)!).filter((r) => r.role !== "signal" && amps(r.wire) >= NO_CURRENT_A);
    const budget = circuitDropPct(c);
    budgets.set(c.slug, budget);
    circuitAmps.set(c.slug, amps);
    const B = (systemV * budget.pct) / 100;
    const S = ws.reduce((s, r) => s + r.lengthM * Math.sqrt(amps(r.wire)), 0);
    for (const r of ws) needDrop.set(r.wire, Math.max(needDrop.get(r.wire) ?? 0, (k * Math.sqrt(amps(r.wire)) * S) / B));
  }
  for (const r of rows) {
    if (r.role === "signal") {
      r.sizeMm2 = MIN_PRACTICAL_MM2;
      r.awg = smallestAwg(MIN_PRACTICAL_MM2);
      r.decidedBy = "minimum";
      r.notes.push(`Signal wire (no load current in any state): the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice).`);
      continue;
    }
    const drop = needDrop.get(r.wire) ?? 0;
    const amp = r.momentary ? r.currentA / SHORT_TERM_A_PER_MM2 : r.continuousA / AMPACITY_A_PER_MM2;
    const need = Math.max(drop, amp, MIN_PRACTICAL_MM2);
    const size = smallestMetric(need);
    if (size === undefined)
      throw fail("keep", `wire ${r.wire} (${r.from} → ${r.to}) needs ${fmt(need)} mm², more than the largest size offered: split the load or shorten the run`);
    r.sizeMm2 = size;
    r.awg = smallestAwg(need);
    r.decidedBy = need === MIN_PRACTICAL_MM2 && drop < MIN_PRACTICAL_MM2 && amp < MIN_PRACTICAL_MM2 ? "minimum" : amp >= drop ? "ampacity" : "voltage-drop";
    if (r.decidedBy === "ampacity")
      r.notes.push(
        r.momentary
          ? `Carries ${fmt(r.currentA)} A only while a button is held: sized by the short-term ${SHORT_TERM_A_PER_MM2} A/mm² rule of thumb.`
          : `Decided by the ampacity rule of thumb (${AMPACITY_A_PER_MM2} A/mm² continuous, German automotive practice), not a standard.`,
      );
    if (r.decidedBy === "minimum") r.notes.push(`Raised to the ${MIN_PRACTICAL_MM2} mm² minimum for mechanical strength (common practice).`);
    const w = wireById.get(r.wire)!;
    const fullA = full.get(r.wire)!;
    if (w.factorySizeMm2 !== null && w.factorySizeMm2 > r.sizeMm2 + EPS) {
      if (Math.max(fullA.continuous, fullA.momentary) <= r.currentA * 1.02) {
        // Dropping circuits took nothing off this wire: never cut it thinner than the factory did.
        r.sizeMm2 = w.factorySizeMm2;
        r.awg = smallestAwg(w.factorySizeMm2);
        r.decidedBy = "factory";
        r.notes.push(`Kept at the factory's ${w.factorySizeMm2} mm²: it carries as much as it did in the full loom.`);
      } else {
        r.notes.push(
          `Thinner than the factory's ${w.factorySizeMm2} mm²: with the dropped circuits gone it carries ${fmt(r.currentA)} A instead of ${fmt(Math.max(fullA.continuous, fullA.momentary))} A.`,
        );
      }
    }
    if (r.role === "power" && /stator|phase|alternator/i.test(`${r.from} ${r.to}`))
      r.notes.push(`Stator lead: carries the alternator's output (AC) at rpm, ${fmt(r.currentA)} A (common practice).`);
  }
  const setDrop = (r: CutRow) => {
    r.dropV = r.currentA > 0 ? r.currentA * strandedResistance(r.sizeMm2, r.lengthM, tempC) : 0;
    r.dropPct = (r.dropV / systemV) * 100;
  };

  // Fuses, after the sizes: a fuse must not exceed what the wires it protects stand short-term.
  const fuses = planFuses(input, kept, topo, rows, rowById, cur, warnings);
  rows.forEach(setDrop);

  // Each kept circuit's total drop against its target (what the budget promised).
  const circuitDrops: CircuitDrop[] = kept.map((c) => {
    const t = topo.circuits.get(c.slug)!;
    const amps = circuitAmps.get(c.slug)!;
    const dropV = [...t.supply, ...t.ret].reduce((s, id) => {
      const r = rowById.get(id);
      return s + (r ? amps(id) * strandedResistance(r.sizeMm2, r.lengthM, tempC) : 0);
    }, 0);
    const b = budgets.get(c.slug)!;
    return { circuit: c.slug, name: c.name, dropV: round3(dropV), budgetV: round3((systemV * b.pct) / 100), budgetPct: b.pct, basis: b.basis };
  });
  for (const d of circuitDrops) if (d.dropV > d.budgetV + 1e-6) warnings.push(`${d.name}: its wires drop ${d.dropV} V, over its ${d.budgetV} V target.`);

  // Unfused live wires: what protects them is the builder's routing.
  for (const r of rows) {
    if (r.role !== "power" || fuses.some((f) => f.protects.includes(r.wire))) continue;
    const supplySide = kept.some((c) => topo.circuits.get(c.slug)!.supply.includes(r.wire));
    if (supplySide) r.notes.push("Unfused: keep it short, sleeved and clear of sharp edges; fit the main fuse as close to the battery as you can.");
  }
  // Every wire's terminals against what it carries.
  for (const r of rows) {
    for (const [i, f] of [wireById.get(r.wire)!.fromFitting, wireById.get(r.wire)!.toFitting].entries()) {
      const fit = parseFitting(f);
      if (fit.ratingA !== null && r.continuousA > fit.ratingA)
        r.notes.push(
          `Its ${i === 0 ? "first" : "second"} end's ${fit.words} terminal is rated about ${fit.ratingA} A, less than the ${fmt(r.continuousA)} A it carries: use a larger terminal (${FITTING_SOURCE}).`,
        );
    }
  }

  const legend = colourRows(rows, topo, input, kept);
  const byGauge: Record<string, number> = {};
  for (const r of [...rows].sort((a, b) => a.sizeMm2 - b.sizeMm2)) byGauge[String(r.sizeMm2)] = round3((byGauge[String(r.sizeMm2)] ?? 0) + r.lengthM);
  const totals = { wires: rows.length, lengthM: round3(rows.reduce((s, r) => s + r.lengthM, 0)), byGauge };
  const parts = partsList(rows, fuses, input);
  const assumptions = [
    `System ${systemV} V, conductor temperature ${fmt(tempC)} °C${input.tempC === undefined ? " (the default; copper's resistance rises 0.393 %/°C, so choose a higher temperature for a hot run)" : ""}.`,
    "Currents from the loom's electrics in its worst real states: charging at rpm with the lights, brake and an indicator on; standing with the ignition on and the points closed; cranking; the horn pressed. Dropped circuits draw nothing.",
    "Conductors: stranded automotive cable, IEC 60228 class 5 maximum resistance (19.5 mΩ/m at 1 mm²), at the conductor temperature.",
    "Drop targets hold for each circuit as a whole, supply and return wires together: 3 % for ignition, charging and the headlamp, 5 % while cranking, 10 % for the rest.",
    `Ampacity: at most ${AMPACITY_A_PER_MM2} A/mm² continuous and ${SHORT_TERM_A_PER_MM2} A/mm² for the seconds a button is held (rules of thumb of German automotive practice, not a standard). No wire thinner than ${MIN_PRACTICAL_MM2} mm² (common practice).`,
    `Fuses: at least ${FUSE_MARGIN} × the continuous current behind them (common practice), a momentary load within ${FUSE_MOMENTARY_FACTOR} × the rating (from memory), never above what the thinnest wire behind them stands short-term, and never above the factory's rating unless every terminal and switch contact behind it is rated for more.`,
    `Terminals: ${FITTING_SOURCE}.`,
    ...(assumed > 0 ? [`${assumed} wire${assumed === 1 ? " has" : "s have"} no entered or family length: ${ASSUMED_RUN_M} m assumed.`] : []),
    input.scheme === "factory" ? "Colours: the factory's." : `Colours: Loomlore's simple scheme: ${SIMPLE_SCHEME.join("; ")}.`,
  ];
  const ignored = Object.keys(lengths).filter((id) => !rowCircuits.has(id));
  if (ignored.length > 0)
    assumptions.push(`Lengths entered for ${ignored.join(", ")} are unused: no kept circuit passes ${ignored.length === 1 ? "that wire" : "those wires"}.`);
  return { rows, fuses, circuitDrops, legend, parts, dropped, totals, assumptions, warnings };
}
