// How each kind of element behaves in a state: a conductor, an open, a resistor, a source, or a switching element.

import type { EdgeKind } from "../loom-graph";
import { strandedOhmsPerM } from "../wire-size";
import type { Element, EngineState, Network, OperatingState } from "./network";

export type Behaviour =
  | { t: "open" }
  | { t: "conductor"; ohms: number }
  | { t: "switching"; ohms: number; duty: number }
  | { t: "resistor"; ohms: number }
  /**
   * Pushes current through the element from a to b (it leaves the element at b): `amps` short-circuit, with a shunt of
   * `ohms` inside, so the output delivers its rated current at the battery's voltage and rises to a finite voltage
   * (not infinity) when nothing takes it.
   */
  | { t: "current"; amps: number; ohms: number }
  /** Holds V(a) − V(b) = volts. */
  | { t: "voltage"; volts: number }
  /** An AC winding delivering `amps` (RMS) into the leads it is joined to. */
  | { t: "ac"; amps: number };

/** Nominal resistances of healthy conductors, Ω: enough to tell the current's share, far below any allowed drop. */
const CONDUCTOR_OHMS: Partial<Record<EdgeKind, number>> = { mate: 0.002, contact: 0.005, fuse: 0.005, breaker: 0.01, transistor: 0.1 };
/**
 * A closed contact's resistance. A heavy contact (a starter relay's, rated for its current) is built to lose about 0.1 V at
 * that current (common practice: a healthy closed contact drops ≤ 0.1–0.2 V under full load), so it is less than a
 * switch contact's 5 mΩ; a rating the data does not give leaves the 5 mΩ.
 */
export function contactOhms(ratedA: number | undefined): number {
  const base = CONDUCTOR_OHMS.contact!;
  return ratedA !== undefined && ratedA > 0 ? Math.min(base, 0.1 / ratedA) : base;
}
/** A wire whose size or length the library does not know: 1 m of 0.75 mm² class 5 cable. */
const DEFAULT_WIRE_OHMS = strandedOhmsPerM(0.75) * 1;
const DEFAULT_DUTY = { breaker: 0.6, "ignition-output": 0.5, flasher: 0.5, "field-drive": 0.6 } as const;

const loadOhms = (e: Element, systemV: number, fallback: number): number => {
  const p = e.params ?? {};
  if (p.ohms !== undefined && p.ohms > 0) return p.ohms;
  if (p.watts !== undefined && p.watts > 0) return (systemV * systemV) / p.watts;
  if (p.amps !== undefined && p.amps > 0) return systemV / p.amps;
  if (e.ohms !== undefined && e.ohms !== null && e.ohms > 0) return e.ohms;
  return fallback;
};

/** How one element behaves in a state (before any fault). */
export function behaviour(e: Element, state: OperatingState, net: Network, batteryV: number): Behaviour {
  const p = e.params ?? {};
  const engine = state.engine as EngineState;
  const turning = engine !== "stopped";
  const closedBySwitch = !e.switchId || !e.positions || e.positions.includes(state[e.switchId as keyof OperatingState]);
  switch (e.kind) {
    case "wire":
      return { t: "conductor", ohms: e.ohms && e.ohms > 0 ? e.ohms : DEFAULT_WIRE_OHMS };
    case "mate":
    case "fuse":
      return { t: "conductor", ohms: CONDUCTOR_OHMS[e.kind]! };
    case "contact":
      return closedBySwitch ? { t: "conductor", ohms: contactOhms(p.contactA) } : { t: "open" };
    case "breaker":
      if (!turning) return state.points === "open" ? { t: "open" } : { t: "conductor", ohms: CONDUCTOR_OHMS.breaker! };
      return { t: "switching", ohms: CONDUCTOR_OHMS.breaker!, duty: p.duty ?? DEFAULT_DUTY.breaker };
    case "transistor": {
      const ohms = CONDUCTOR_OHMS.transistor!;
      if (!closedBySwitch) return { t: "open" };
      switch (p.role) {
        case "ignition-output":
          if (!turning) return p.atRest === "on" ? { t: "conductor", ohms } : { t: "open" };
          return { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY["ignition-output"] };
        case "charge-lamp-driver":
          return engine === "running" ? { t: "open" } : { t: "conductor", ohms };
        case "field-drive":
          return engine === "running" ? { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY["field-drive"] } : { t: "conductor", ohms };
        case "flasher":
          return { t: "switching", ohms, duty: p.duty ?? DEFAULT_DUTY.flasher };
        default:
          return { t: "conductor", ohms };
      }
    }
    case "winding":
      if (p.role === "stator") return engine === "running" ? { t: "ac", amps: p.outputA ?? 0 } : { t: "resistor", ohms: loadOhms(e, net.systemV, 0.5) };
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, 3 * (net.systemV / 12) ** 2) } : { t: "open" };
    case "lamp":
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, (net.systemV * net.systemV) / 5) } : { t: "open" };
    case "load":
      if (p.role === "charging-output") {
        if (engine !== "running" || !p.outputA) return { t: "open" };
        // A current source with a parallel resistance: rated output at the battery's voltage, three times the system voltage with nothing connected.
        const vMax = 3 * net.systemV;
        const isc = (p.outputA * vMax) / Math.max(1, vMax - batteryV);
        return { t: "current", amps: isc, ohms: vMax / isc };
      }
      if (p.role === "exciter") return engine === "running" ? { t: "voltage", volts: batteryV } : { t: "open" };
      return closedBySwitch ? { t: "resistor", ohms: loadOhms(e, net.systemV, net.systemV / 1) } : { t: "open" };
    case "sense":
      return { t: "open" };
    case "source":
      return { t: "voltage", volts: batteryV };
  }
}
