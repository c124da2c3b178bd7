import type { Transaction } from "sequelize";
import { Connector, Pin, SpecValue } from "./models/index.ts";

/** The editable content of a connector card as one JSON value: what a revision keeps and a submission changes. */
export async function connectorSnapshot(connectorId: number, transaction?: Transaction) {
  const c = await Connector.findByPk(connectorId, { transaction, rejectOnEmpty: true });
  const mate = c.matesWithId ? await Connector.findByPk(c.matesWithId, { transaction }) : null;
  const pins = await Pin.findAll({ where: { connectorId }, order: [["position", "ASC"]], transaction });
  const specs = await SpecValue.findAll({ where: { connectorId }, order: [["id", "ASC"]], transaction });
  return {
    slug: c.slug, name: c.name, location: c.location, gender: c.gender, housing: c.housing, matesWith: mate?.slug ?? null,
    layout: { rows: c.rows, cols: c.cols, cavities: c.cavities, pin1: c.pin1, latch: c.latch },
    pins: pins.map((p) => ({ cavity: p.cavity, code: p.colourCode, circuit: p.circuit, terminal: p.terminal })),
    specs: specs.map((s) => ({ name: s.name, min: s.min, max: s.max, unit: s.unit, between: [s.betweenA, s.betweenB], atC: s.atC, source: s.source })),
    notes: c.notes,
  };
}
