import type { Transaction } from "sequelize";
import type { Element, Network } from "../app/domain/electrics.ts";
import { LoomGraph, type EdgeKind } from "../app/domain/loom-graph.ts";
import { strandedResistance } from "../app/domain/wire-size.ts";
import { Component, ComponentLink, Connector, Pin, Wire } from "./models/index.ts";

/** A wire whose size or length is not recorded: 0.75 mm², 1 m (only for the model's small drops). */
const DEFAULT_SIZE_MM2 = 0.75;
const DEFAULT_LENGTH_M = 1;

/** Load one family's loom graph from the database: wires, mated cavities and internal links as edges, with their electrical models. */
export async function loadFamilyGraph(familyId: number, transaction?: Transaction) {
  const [pins, wires, connectors, components] = await Promise.all([
    Pin.findAll({ where: { familyId }, transaction }),
    Wire.findAll({ where: { familyId }, transaction }),
    Connector.findAll({ where: { familyId }, transaction }),
    Component.findAll({ where: { familyId }, transaction }),
  ]);
  const links = await ComponentLink.findAll({ where: { componentId: components.map((c) => c.id) }, transaction });
  const byConnectorCavity = new Map(pins.filter((p) => p.connectorId).map((p) => [`${p.connectorId}:${p.cavity}`, p]));
  const edges: Element[] = [
    // Stranded cable (IEC 60228 class 5 maximum): the drops the walk expects along a wire.
    ...wires.map((w) => ({
      id: `w${w.id}`,
      a: String(w.fromPinId),
      b: String(w.toPinId),
      kind: "wire" as const,
      ohms: strandedResistance(w.sizeMm2 && w.sizeMm2 > 0 ? w.sizeMm2 : DEFAULT_SIZE_MM2, w.lengthMm && w.lengthMm > 0 ? w.lengthMm / 1000 : DEFAULT_LENGTH_M),
    })),
    ...links.map((l) => ({
      id: `l${l.id}`,
      a: String(l.fromPinId),
      b: String(l.toPinId),
      kind: l.kind as EdgeKind,
      label: l.label,
      switchId: l.switchId,
      positions: l.positions,
      params: l.params,
      ratingA: l.ratingA,
    })),
  ];
  for (const c of connectors) {
    // Each mated pair once: from the half with the smaller id.
    if (!c.matesWithId || c.matesWithId < c.id) continue;
    for (const p of pins.filter((x) => x.connectorId === c.id)) {
      const other = byConnectorCavity.get(`${c.matesWithId}:${p.cavity}`);
      if (other) edges.push({ id: `m${p.id}-${other.id}`, a: String(p.id), b: String(other.id), kind: "mate" });
    }
  }
  return { graph: new LoomGraph(edges), elements: edges, pins, wires, connectors, components, links };
}

/** The family's network for the electrics: its elements, voltage, polarity and battery posts (null without a battery). */
export function familyNetwork(
  loaded: Awaited<ReturnType<typeof loadFamilyGraph>>,
  family: { systemVoltage: number; earth: string },
  regulated: { min: number; max: number } | null,
): Network | null {
  const battery = loaded.components.find((c) => c.kind === "battery");
  const post = (label: string) => battery && loaded.pins.find((p) => p.componentId === battery.id && p.cavity === label);
  const plus = post("+"),
    minus = post("-");
  if (!plus || !minus) return null;
  return {
    elements: loaded.elements,
    systemV: family.systemVoltage === 6 ? 6 : 12,
    earth: family.earth === "positive" ? "positive" : "negative",
    plus: String(plus.id),
    minus: String(minus.id),
    regulated,
  };
}
