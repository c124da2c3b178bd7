import { Op, type Transaction } from "sequelize";
import { isSpecMaterial, specKindOf } from "../app/domain/specs.ts";
import { Component, Connector, Photo, Pin, SpecValue, System, Wire } from "./models/index.ts";

/**
 * The editable content of a connector card as one JSON value: what a revision keeps and what a submission starts from
 * and changes (app/domain/submissions.ts CardProposal, plus the slug).
 */
export async function connectorSnapshot(connectorId: number, transaction?: Transaction) {
  const c = await Connector.findByPk(connectorId, { transaction, rejectOnEmpty: true });
  const [mate, system, pins, specs, photos] = await Promise.all([
    c.matesWithId ? Connector.findByPk(c.matesWithId, { transaction }) : null,
    System.findByPk(c.systemId, { transaction, rejectOnEmpty: true }),
    Pin.findAll({ where: { connectorId }, order: [["position", "ASC"]], transaction }),
    SpecValue.findAll({ where: { connectorId }, order: [["id", "ASC"]], transaction }),
    Photo.findAll({ where: { connectorId, removedAt: null }, order: [["position", "ASC"]], transaction }),
  ]);
  const goesTo = c.componentId ? new Map<number, { connector: string; cavity: string }>() : await wireEnds(pins, transaction);
  return {
    slug: c.slug,
    name: c.name,
    location: c.location,
    gender: c.gender as "plug" | "socket",
    housing: c.housing,
    system: system.kind,
    matesWith: mate?.slug ?? null,
    layout: { rows: c.rows, cols: c.cols, cavities: c.cavities, pin1: c.pin1, latch: c.latch },
    pins: pins.map((p) => ({ cavity: p.cavity, code: p.colourCode, circuit: p.circuit, terminal: p.terminal, goesTo: goesTo.get(p.id) ?? null })),
    // max null is "no upper limit"; conditions, kind and material make the value measurable and say if it is corrected.
    specs: specs.map((s) => ({
      name: s.name,
      min: s.min,
      max: s.max,
      unit: s.unit,
      between: [s.betweenA, s.betweenB] as [string, string],
      atC: s.atC,
      source: s.source,
      conditions: s.conditions ?? "",
      kind: specKindOf(s.kind),
      material: isSpecMaterial(s.material) ? s.material : null,
    })),
    notes: c.notes,
    photos: photos.map((p) => ({ id: p.id, caption: p.caption, credit: p.credit })),
  };
}
export type ConnectorSnapshot = Awaited<ReturnType<typeof connectorSnapshot>>;

/** For loom-side pins: the connector cavity at the wire's other end, looking through one splice. */
export async function wireEnds(pins: Pin[], transaction?: Transaction): Promise<Map<number, { connector: string; cavity: string }>> {
  const out = new Map<number, { connector: string; cavity: string }>();
  if (pins.length === 0) return out;
  const ids = pins.map((p) => p.id);
  const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: ids }, { toPinId: ids }] }, order: [["id", "ASC"]], transaction });
  const far = await Pin.findAll({ where: { id: wires.map((w) => (ids.includes(w.fromPinId) ? w.toPinId : w.fromPinId)) }, transaction });
  const spliceComponents = await Component.findAll({
    where: { id: far.map((p) => p.componentId).filter((x): x is number => !!x), kind: "splice" },
    transaction,
  });
  const spliceIds = new Set(far.filter((p) => spliceComponents.some((c) => c.id === p.componentId)).map((p) => p.id));
  const beyondWires = spliceIds.size
    ? await Wire.findAll({ where: { [Op.or]: [{ fromPinId: [...spliceIds] }, { toPinId: [...spliceIds] }] }, order: [["id", "ASC"]], transaction })
    : [];
  const beyond = await Pin.findAll({ where: { id: beyondWires.flatMap((w) => [w.fromPinId, w.toPinId]) }, transaction });
  const allPins = new Map([...far, ...beyond].map((p) => [p.id, p]));
  const connectors = new Map(
    (await Connector.findAll({ where: { id: [...allPins.values()].map((p) => p.connectorId).filter((x): x is number => !!x) }, transaction })).map((c) => [
      c.id,
      c,
    ]),
  );
  const at = (p: Pin | undefined) =>
    p?.connectorId && connectors.has(p.connectorId) ? { connector: connectors.get(p.connectorId)!.slug, cavity: p.cavity } : null;
  for (const p of pins) {
    for (const w of wires.filter((x) => x.fromPinId === p.id || x.toPinId === p.id)) {
      const otherId = w.fromPinId === p.id ? w.toPinId : w.fromPinId;
      let end = at(allPins.get(otherId));
      if (!end && spliceIds.has(otherId)) {
        const next = beyondWires.find((x) => (x.fromPinId === otherId || x.toPinId === otherId) && x.fromPinId !== p.id && x.toPinId !== p.id);
        if (next) end = at(allPins.get(next.fromPinId === otherId ? next.toPinId : next.fromPinId));
      }
      if (end) {
        out.set(p.id, end);
        break;
      }
    }
  }
  return out;
}
