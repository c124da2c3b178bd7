// The diagnosis: from the readings a rider enters, where on the walk the fault lies and which point to measure next.

import type { BatteryWindow, Solution } from "../electrics";
import { CIRCUIT_DROP_V, CONTACT_DROP_V, OPEN_SHARE, round2 } from "./limits";
import type { Expect, ProbePoint, Walk } from "./types";

export interface Reading {
  step: number;
  value: number;
}
export type FaultKind = "open" | "high_resistance" | "short";
export interface Fault {
  between: [number, number];
  kind: FaultKind;
  likely: string[];
  reason: string;
}
export interface Diagnosis {
  fault: Fault | null;
  next: number | null;
  checked: { step: number; value: number; expect: Expect; ok: boolean | null }[];
  /** The battery's own reading against its window in this state (powered walks, when the live post was measured). */
  battery: { verdict: "ok" | "low" | "high"; reading: number; min: number; max: number; message: string } | null;
  notes: string[];
}

const inRange = (e: Expect, v: number) => (e.min === null || v >= e.min) && (e.max === null || v <= e.max);

/** Say between which two probe points the fault lies, what kind it is, and which point to measure next to halve the search. */
export function diagnose(walk: Walk, readings: Reading[]): Diagnosis {
  const pts = walk.probePoints;
  const byStep = new Map(pts.map((p) => [p.step, p]));
  const values = new Map(readings.map((r) => [r.step, r.value]));
  const notes: string[] = [];
  const checked = [...values]
    .sort(([a], [b]) => a - b)
    .map(([step, value]) => {
      const p = byStep.get(step)!;
      return { step, value, expect: p.expect, ok: p.expect.steady === false ? null : inRange(p.expect, value) };
    });
  const between = (a: number, b: number) => walk.segments.find((x) => x.from === a && x.to === b)?.elements ?? [];
  const fault = (a: number, b: number, kind: FaultKind, reason: string, extra: string[] = []): Fault => {
    const likely = between(a, b);
    return { between: [Math.min(a, b), Math.max(a, b)], kind, likely: [...new Set([...(likely.length ? likely : [byStep.get(b)!.label]), ...extra])], reason };
  };
  let found: Fault | null = null;
  let battery: Diagnosis["battery"] = null;

  if (walk.circuit.powered && walk.battery) {
    const positive = walk.reference?.earth === "positive";
    // On a positive-earth bike live points read negative; a rider who typed them without the sign (or swapped the leads) gets the same verdict.
    const typedPositive =
      positive && [...values.values()].filter((v) => Math.abs(v) > 1).every((v) => v > 0) && [...values.values()].some((v) => Math.abs(v) > 1);
    if (typedPositive)
      notes.push("Positive earth: the readings were typed without their minus sign (or with the leads swapped); they were read as magnitudes.");
    const mag = (v: number) => (positive && !typedPositive ? -v : v);
    const M = new Map([...values].map(([s, v]) => [s, mag(v)]));
    const nominalMag = (p: ProbePoint) => (positive ? -1 : 1) * (p.expect.nominal ?? 0);
    const live = pts[0]!; // a laid-out walk has at least one point, the first on the live side
    const w = walk.battery;
    const vNominal = w.nominal;
    const vb = M.get(live.step);
    if (vb !== undefined) {
      const verdict = vb < w.min - 0.05 ? "low" : vb > w.max + 0.05 ? "high" : "ok";
      battery = {
        verdict,
        reading: vb,
        min: w.min,
        max: w.max,
        message:
          verdict === "ok"
            ? `The battery reads ${vb} V: within ${w.min}–${w.max} V for this state.`
            : verdict === "low"
              ? lowBattery(w, vb)
              : `The battery reads ${vb} V, above ${w.max} V: ${w.basis.startsWith("charging") ? "the regulator is not holding the voltage down (overcharging boils a battery and blows bulbs)" : "a surface charge from recent charging; let it rest, or switch the headlamp on for a minute"}.`,
      };
    }
    const scale = (vb !== undefined && vb > 1 ? vb : vNominal) / vNominal;
    const vRef = vb !== undefined && vb > 1 ? vb : vNominal;
    const ex = (p: ProbePoint) => nominalMag(p) * scale;
    const steady = (p: ProbePoint) => p.expect.steady !== false;
    if (vb !== undefined && vb < 1) {
      found = {
        between: [live.step, live.step],
        kind: "open",
        likely: ["the battery, or the meter's leads: the battery post shows no voltage (check the leads, then the battery and its connections)"],
        reason: "The live post reads no voltage, so nothing on this circuit can.",
      };
    }
    // Walk each stretch in step order; the first that does not behave as the healthy loom would is the fault.
    for (const s of [...walk.segments].sort((x, y) => x.to - y.to || x.from - y.from)) {
      if (found) break;
      const a = byStep.get(s.from)!,
        b = byStep.get(s.to)!;
      const ma = M.get(a.step),
        mb = M.get(b.step);
      if (ma === undefined || mb === undefined || !steady(a) || !steady(b)) continue;
      const side = b.side === "supply" ? "supply" : a.side === "return" ? "return" : "across";
      // Past an element that is open in this state a return-side point has nothing to hold it to earth: what it reads is
      // decided further on. Only on the supply side does voltage past an open switch mean something feeds it.
      if (s.open && side !== "supply") continue;
      if (s.hasLoad) {
        // Across a load: its drop is expected. What is not: a pin fed only through the load pulled down to earth.
        if (ex(b) > 0.5 * vRef && b.via === "load" && mb < 0.1 * vRef && ma > 0.5 * vRef) {
          found = fault(
            b.step,
            b.before ?? b.step,
            "short",
            `Step ${b.step} should sit at battery voltage through the load (nothing switched to earth beyond it) but reads ${mb} V: something joins it to earth.`,
            ["a wire chafed through to the frame, a shorted condenser, or a switch stuck closed beyond this point"],
          );
        }
        continue;
      }
      const expDrop = ex(a) - ex(b);
      const dev = ma - mb - expDrop;
      if (side === "supply" && ex(b) < 0.1 * vRef && mb > 0.5 * vRef) {
        found = fault(
          a.step,
          b.step,
          "short",
          `Step ${b.step} should have no voltage in these positions (an open switch lies before it) but reads ${mb} V: it is being fed from somewhere.`,
          ["contacts welded or bridged in the switch, or this wire touching a live feed"],
        );
      } else if ((Math.abs(expDrop) < 0.05 ? Math.abs(dev) : Math.sign(expDrop) * dev) > s.allowedV + 1e-9) {
        // Only a loss beyond the healthy one is a fault here: less loss than expected means less current, i.e. a fault further on.
        // An open takes (nearly) the whole voltage across it, no current flowing to drop any elsewhere; a high resistance a part.
        if (Math.abs(ma - mb) > OPEN_SHARE * vRef) {
          const fuse = s.kinds.includes("fuse");
          const reason =
            side === "return"
              ? `Step ${a.step} floats up to ${ma} V while step ${b.step} is at ${mb} V: the return path is open between them, so no current flows.`
              : mb > ma
                ? `Step ${b.step} rises to ${mb} V while step ${a.step} reads ${ma} V: the current cannot get through between them (open), so the source's voltage climbs.`
                : `Voltage is present at step ${a.step} (${ma} V) but gone at step ${b.step} (${mb} V): the circuit is open between them.`;
          found = fault(
            a.step,
            b.step,
            "open",
            reason,
            fuse ? ["if the fuse has blown, something beyond it shorts to earth: find it before fitting a new fuse"] : [],
          );
        } else if (s.loaded) {
          found = fault(
            a.step,
            b.step,
            "high_resistance",
            `${round2(Math.abs(ma - mb))} V is lost between step ${a.step} and step ${b.step} where the healthy loom loses ${round2(Math.abs(expDrop))} V; up to ${round2(s.allowedV)} V is allowed there (≈ ${CONTACT_DROP_V} V per contact under load, common practice): a high resistance between them.`,
            [
              "a corroded, loose or burnt terminal, a dirty switch contact or a fuse holder that has lost its grip",
              ...(side === "return"
                ? ["or an open earth here, with the current finding its way back through another lamp's filament (other lamps glow faintly)"]
                : []),
            ],
          );
        }
      }
    }
    if (!found) {
      // Over the whole supply side, the drop to the load may not exceed the circuit's allowance even if no one stretch does.
      for (const [lin] of walk.loadSteps) {
        const p = byStep.get(lin)!;
        const mp = M.get(lin);
        if (mp === undefined || vb === undefined || !steady(p) || !walk.loaded) continue;
        const lost = vb - mp - (vNominal * scale - ex(p));
        if (lost > CIRCUIT_DROP_V) {
          const stretches = walk.segments.filter((s) => s.to <= lin && M.has(s.from) && M.has(s.to) && !s.hasLoad);
          const worst = stretches.reduce((m, s) => (M.get(s.from)! - M.get(s.to)! > M.get(m.from)! - M.get(m.to)! ? s : m), stretches[0]!);
          // stretches[0] is undefined only for no stretches, when the callback never runs: `if (worst)` catches it.
          if (worst)
            found = fault(
              worst.from,
              worst.to,
              "high_resistance",
              `The load's supply terminal (step ${lin}) is ${round2(lost)} V below where it should be: more than the ${CIRCUIT_DROP_V} V a whole supply side may lose. The biggest loss is between step ${worst.from} and step ${worst.to}.`,
            );
        }
      }
    }
    const measuredAll = pts.every((p) => !steady(p) || values.has(p.step));
    if (!found && measuredAll && checked.every((c) => c.ok !== false) && walk.loadSteps.length && walk.loaded) {
      // Every voltage right and every drop within limits: the loom delivers; what is left is the load and its own terminals.
      const [a, b] = walk.loadSteps[0]!; // loadSteps.length was checked above
      // What lies next to a point that cannot be read steadily (a flasher's output) is as unproven as the load.
      const unproven = walk.segments.filter((s) => [s.from, s.to].some((n) => !steady(byStep.get(n)!))).flatMap((s) => s.elements);
      const likely = [...new Set([...walk.loadSteps.flatMap(([x, y]) => between(x, y)), ...unproven])];
      found = {
        between: [a, b],
        kind: "open",
        likely,
        reason: `Every point reads as it should, so the loom delivers: if the load still does not work, it is the load itself or its terminals (steps ${walk.loadSteps.map(([x, y]) => `${x}–${y}`).join(", ")}). Check it on the bench.`,
      };
      notes.push("This verdict assumes the load does not work; if it does, there is no fault on this circuit.");
    }
  } else {
    const bad = pts.find((p) => values.has(p.step) && !inRange(p.expect, values.get(p.step)!));
    if (bad && bad.after !== null && (values.get(bad.after) === undefined || inRange(byStep.get(bad.after)!.expect, values.get(bad.after)!))) {
      const v = values.get(bad.step)!;
      const e = bad.expect;
      const kind: FaultKind = !Number.isFinite(v) || v > 1e6 ? "open" : e.min !== null && v < e.min ? "short" : "high_resistance";
      const words =
        kind === "open"
          ? "reads open"
          : kind === "short"
            ? `reads ${v} ${e.unit}, below ${e.min} ${e.unit}: turns or leads shorted together`
            : `reads ${v} ${e.unit}, above ${e.max} ${e.unit}: a high resistance`;
      found = fault(bad.after, bad.step, kind, `The reading is right up to step ${bad.after}; step ${bad.step} ${words}.`);
    }
  }

  // Halve the search: between the last good and the first bad measured point, or over what is left unmeasured.
  const measured = checked.map((c) => c.step);
  const probeable = pts.filter((p) => p.expect.steady !== false);
  const lo = found ? found.between[0] : Math.max(0, ...checked.filter((c) => c.ok === true).map((c) => c.step));
  const hi = found ? found.between[1] : Math.min(pts.length + 1, ...checked.filter((c) => c.ok === false).map((c) => c.step));
  const open = probeable.filter((p) => p.step > lo && p.step < hi && !measured.includes(p.step)).map((p) => p.step);
  const rest = probeable.filter((p) => !measured.includes(p.step)).map((p) => p.step);
  // The middle index of a list just checked to be non-empty.
  const next = open.length
    ? open[Math.floor((open.length - 1) / 2)]!
    : !found && rest.length && measured.length === 0
      ? rest[Math.floor((rest.length - 1) / 2)]!
      : null;
  return { fault: found, next, checked, battery, notes };
}

function lowBattery(w: BatteryWindow, vb: number): string {
  if (w.basis.startsWith("charging"))
    return `The battery reads ${vb} V at rpm, below ${w.min} V: the charging system is not keeping up. Walk the charging circuit and check the stator's output.`;
  if (w.basis.startsWith("cranking"))
    return `The battery falls to ${vb} V while cranking, below ${w.min} V: a weak or discharged battery, or a starter drawing too much. Charge the battery and test again.`;
  return `The battery reads ${vb} V, below ${w.min} V: it is less than half charged. Charge it before testing, as low readings everywhere would follow from it.`;
}

/** The readings a meter would show on this walk for a given solution (tests and "what should I see"): steady points only. */
export function readingsFrom(walk: Walk, sol: Solution): Reading[] {
  return walk.probePoints.filter((p) => p.expect.steady !== false).map((p) => ({ step: p.step, value: round2(sol.reading(p.node)) }));
}
