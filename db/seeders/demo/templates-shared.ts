/** What the demo loom templates share: the codes and base types, the unplugged-unit condition, and two builders. */
import type { Part } from "./parts.ts";
import type { FamilySpec } from "./spec.ts";

export type Codes<K extends string> = Record<K, string>;
export type Base = Omit<FamilySpec, "systems" | "components" | "nets" | "pairs" | "circuits">;

export const UNPLUGGED_UNIT = "Ignition off (battery earth lead off for safety) and the ignition unit unplugged";

export function family(base: Base, systems: string[], part: Part): FamilySpec {
  return { ...base, systems, components: part.components, nets: part.nets, pairs: part.pairs, circuits: part.circuits };
}

export const CHARGE_LAMP_DRIVER = (from: string, to: string) =>
  ({ from, to, kind: "transistor" as const, label: "charge lamp driver", params: { role: "charge-lamp-driver" as const } });
