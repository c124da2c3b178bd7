import type { Transaction } from "sequelize";
import { LoomGraph, type EdgeKind, type GraphEdge } from "../app/domain/loom-graph.ts";
import { Component, ComponentLink, Connector, Pin, Wire } from "./models/index.ts";

/** Load one family's loom graph from the database: wires, mated cavities and internal links as edges. */
export async function loadFamilyGraph(familyId: number, transaction?: Transaction) {
  const [pins, wires, connectors, components] = await Promise.all([
    Pin.findAll({ where: { familyId }, transaction }),
    Wire.findAll({ where: { familyId }, transaction }),
    Connector.findAll({ where: { familyId }, transaction }),
    Component.findAll({ where: { familyId }, transaction }),
  ]);
  const links = await ComponentLink.findAll({ where: { componentId: components.map((c) => c.id) }, transaction });
  const byConnectorCavity = new Map(pins.filter((p) => p.connectorId).map((p) => [`${p.connectorId}:${p.cavity}`, p]));
  const edges: GraphEdge[] = [
    ...wires.map((w) => ({ id: `w${w.id}`, a: String(w.fromPinId), b: String(w.toPinId), kind: "wire" as const })),
    ...links.map((l) => ({ id: `l${l.id}`, a: String(l.fromPinId), b: String(l.toPinId), kind: l.kind as EdgeKind, label: l.label, switchId: l.switchId, positions: l.positions })),
  ];
  for (const c of connectors) {
    // Each mated pair once: from the half with the smaller id.
    if (!c.matesWithId || c.matesWithId < c.id) continue;
    for (const p of pins.filter((x) => x.connectorId === c.id)) {
      const other = byConnectorCavity.get(`${c.matesWithId}:${p.cavity}`);
      if (other) edges.push({ id: `m${p.id}-${other.id}`, a: String(p.id), b: String(other.id), kind: "mate" });
    }
  }
  return { graph: new LoomGraph(edges), pins, wires, connectors, components, links };
}

