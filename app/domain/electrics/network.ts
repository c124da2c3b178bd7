// The loom as a network: its elements with their electrical models, the bike's states, and the battery's window in each.

import type { GraphEdge, SwitchState } from "../loom-graph";

export type EngineState = "stopped" | "cranking" | "running";
export const ENGINE_STATES: readonly EngineState[] = ["stopped", "cranking", "running"];
export type PointsState = "closed" | "open";

/** The electrical model of one component link; omitted fields take the kind's defaults. */
export interface LinkParams {
  /** Lamp rating in W at the family's system voltage (a lamp is a resistor of V²/P). */
  watts?: number;
  /** Resistance of a winding or resistive load, Ω (otherwise the card's spec between the link's cavities). */
  ohms?: number;
  /** Current drawn at the system voltage, A (electronic units, motors, horns): a resistor of V/I. */
  amps?: number;
  /** Draws only while a button is held (horn, starter relay coil, starter motor): never counted as continuous. */
  momentary?: boolean;
  /** Fraction of the time a switching element conducts (the points' or a unit's dwell, a flasher's on-time). */
  duty?: number;
  /** What the element does in the engine's states (see `behaviour`). */
  role?: "ignition-output" | "charging-output" | "stator" | "exciter" | "field-drive" | "charge-lamp-driver" | "flasher";
  /** An ignition unit's output with the engine stopped: "off" (switched off at rest) or "on" (holds the coil on). */
  atRest?: "off" | "on";
  /** Charging output at rpm, A: what the charging output delivers and each stator lead carries (AC). */
  outputA?: number;
  /** A switch contact's rating, A. */
  contactA?: number;
}

/** One element of the network: a graph edge with its electrical model. */
export interface Element extends GraphEdge {
  params?: LinkParams | null;
  /** Resistance in Ω: a wire's conductor (from its size and length), or a load's from its card spec. */
  ohms?: number | null;
  /** A fuse's rating, A. */
  ratingA?: number | null;
}

/** A family's loom as a network. */
export interface Network {
  elements: readonly Element[];
  systemV: 6 | 12;
  earth: "negative" | "positive";
  /** Battery posts (node ids). */
  plus: string;
  minus: string;
  /** The family's regulated-voltage spec (at the battery, charging at rpm), if the card gives one. */
  regulated?: { min: number; max: number } | null;
}

/** The state the bike is in: switch positions with the engine's state and the points (see loom-graph SWITCH_POSITIONS). */
export type OperatingState = SwitchState;

/** Node ids of the live and the earth post. */
export function posts(net: Network): { live: string; earth: string } {
  return net.earth === "positive" ? { live: net.minus, earth: net.plus } : { live: net.plus, earth: net.minus };
}

export interface BatteryWindow {
  /** Taken for the expected readings. */
  nominal: number;
  min: number;
  max: number;
  /** In words, with sources. */
  basis: string;
}

/**
 * What a healthy battery reads at its posts in each engine state, scaled by the number of cells (6 V: 3, 12 V: 6):
 * resting 12.6 V fully charged, 12.2 V half charged (REFERENCE-FACTS §5, published); while cranking at least 9.6 V
 * (common practice); charging at rpm 13.5–14.5 V (common practice) or the family's regulated-voltage spec.
 */
export function batteryWindow(systemV: 6 | 12, engine: EngineState, regulated?: { min: number; max: number } | null): BatteryWindow {
  const k = systemV / 12;
  const v = (x: number) => Math.round(x * k * 100) / 100;
  if (engine === "running") {
    if (regulated) {
      return {
        nominal: (regulated.min + regulated.max) / 2,
        min: regulated.min,
        max: regulated.max,
        basis: `charging at rpm: the family's regulated-voltage spec, ${regulated.min}–${regulated.max} V at the battery`,
      };
    }
    return {
      nominal: v(14),
      min: v(13.5),
      max: v(14.5),
      basis: `charging at rpm: ${v(13.5)}–${v(14.5)} V at the battery (common practice for lead-acid, ${k === 1 ? "12" : "6"} V)`,
    };
  }
  if (engine === "cranking") {
    return {
      nominal: v(10.5),
      min: v(9.6),
      max: v(12.7),
      basis: `cranking: at least ${v(9.6)} V at the battery with a healthy battery and starter (common practice)`,
    };
  }
  return {
    nominal: v(12.6),
    min: v(12.2),
    max: v(13.2),
    basis: `engine stopped: ${v(12.6)} V fully charged, ${v(12.2)} V half charged (resting voltage of a flooded lead-acid battery); below that, charge it before testing`,
  };
}
