/** Publishing an approved submission onto the live card, inside the decision's transaction. */
import { Op, type Transaction } from "sequelize";
import { checkLibrary } from "~db/check.ts";
import {
  Circuit, ComponentLink, Connector, Family, IndexJob, Make, Photo, Pin, Revision, SpecValue, System, Wire, type Submission,
} from "~db/models/index.ts";
import { libraryDocs, writeFallbackDocs } from "~db/search-index.ts";
import { connectorSnapshot, type ConnectorSnapshot } from "~db/snapshot.ts";
import { proposalProblems } from "~/domain/submissions";
import { familyRequestSchema, proposalSchema } from "~/validation/submissions";
import { audit } from "../auth.server";
import { familyContext } from "./context.server";
import { checkPhotos } from "./draft-photos.server";
import { SubmissionError } from "./errors.server";
import { wrote } from "./faults.server";

const slugify = (s: string) => s.toLowerCase().normalize("NFKD").replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "card";

async function uniqueSlug(model: typeof Connector | typeof Family, base: string, transaction: Transaction) {
  for (let n = 1; ; n++) {
    const slug = n === 1 ? base : `${base}-${n}`;
    if (!(await (model as typeof Connector).findOne({ where: { slug }, transaction }))) return slug;
  }
}

/** Write the proposal to the live tables and keep the revision; refuse if the loom would no longer hold together. */
export async function publish(s: Submission, transaction: Transaction): Promise<{ connector: Connector; revision: number; familySlug: string }> {
  const parsed = proposalSchema.safeParse(s.content);
  if (!parsed.success) throw new SubmissionError(409, "conflict", "The proposal is not complete; return it to the contributor.");
  const p = parsed.data;
  const now = new Date();

  // The family: the one chosen, or the requested one created now.
  let family: Family;
  let newFamily = false;
  if (s.familyId) family = await Family.findByPk(s.familyId, { transaction, rejectOnEmpty: true });
  else {
    const req = familyRequestSchema.parse(s.familyRequest);
    const make = await Make.findOne({ where: { slug: req.make }, transaction });
    if (!make) throw new SubmissionError(409, "conflict", "The requested family's make is no longer in the library.");
    family = await Family.create({
      makeId: make.id, slug: await uniqueSlug(Family, slugify(req.name), transaction), name: req.name, modelRange: req.modelRange || req.name,
      yearFrom: req.yearFrom, yearTo: req.yearTo, engine: req.engine || "—", displacementCc: req.displacementCc, cylinders: req.cylinders,
      firingOrder: req.firingOrder || "—", crankDeg: null, ignition: req.ignition || "—", colourSystem: make.colourSystem, blurb: "",
    }, { transaction });
    await audit(s.decidedBy ?? null, "family.create", "family", family.id, { slug: family.slug, fromSubmission: s.id }, transaction);
    await IndexJob.create({ kind: "family", subjectId: family.id, op: "upsert", createdAt: now }, { transaction });
    newFamily = true;
  }
  const ctx = await familyContext(family.id, null, transaction);
  const problems = proposalProblems(p, ctx.colourSystem, new Map(ctx.cards.map((c) => [c.slug, c.cavities])), { houseStyle: ctx.houseStyle });
  if (problems.length) throw new SubmissionError(409, "conflict", `The proposal no longer fits the library: ${problems[0].message}`, problems[0].field, problems);
  const before = new Set(await checkLibrary({ familyId: family.id, transaction }));

  const [system] = await System.findOrCreate({ where: { familyId: family.id, kind: p.system }, defaults: { familyId: family.id, kind: p.system, name: p.system[0].toUpperCase() + p.system.slice(1) }, transaction });
  let connector: Connector;
  let oldSnapshot: ConnectorSnapshot | null = null;
  const fields = {
    name: p.name, location: p.location, housing: p.housing || "—", gender: p.gender, systemId: system.id,
    rows: p.layout.rows, cols: p.layout.cols, cavities: p.layout.cavities, pin1: p.layout.pin1, latch: p.layout.latch, notes: p.notes,
  };
  if (s.kind === "edit") {
    connector = await Connector.findByPk(s.connectorId!, { transaction, rejectOnEmpty: true });
    if (connector.revision !== s.baseRevision) {
      throw new SubmissionError(409, "conflict", `The card was published again (revision ${connector.revision}) after this edit began from revision ${s.baseRevision}; return it so the contributor can start from the current card.`);
    }
    oldSnapshot = await connectorSnapshot(connector.id, transaction);
    await connector.update({ ...fields, revision: connector.revision + 1, publishedAt: now }, { transaction });
  } else {
    connector = await Connector.create({
      ...fields, familyId: family.id, componentId: null, matesWithId: null, slug: await uniqueSlug(Connector, `${family.slug}-${slugify(p.name)}`, transaction),
      revision: 1, publishedAt: now,
    }, { transaction });
  }

  // Mating partner.
  const mate = p.matesWith ? await Connector.findOne({ where: { slug: p.matesWith, familyId: family.id }, transaction }) : null;
  if (p.matesWith && !mate) throw new SubmissionError(409, "conflict", `“${p.matesWith}” is not a card of this family.`, "matesWith");
  if (mate && mate.id === connector.id) throw new SubmissionError(409, "conflict", "A connector cannot mate with itself.", "matesWith");
  if (mate && mate.matesWithId && mate.matesWithId !== connector.id) throw new SubmissionError(409, "conflict", `${mate.name} already mates with another connector.`, "matesWith");
  if (connector.matesWithId && connector.matesWithId !== mate?.id) {
    await Connector.update({ matesWithId: null }, { where: { id: connector.matesWithId, matesWithId: connector.id }, transaction });
  }
  await connector.update({ matesWithId: mate?.id ?? null }, { transaction });
  if (mate) await mate.update({ matesWithId: connector.id }, { transaction });

  // Pins, matched by cavity so wires and circuits keep their ends.
  const existing = await Pin.findAll({ where: { connectorId: connector.id }, transaction });
  const byCavity = new Map(existing.map((x) => [x.cavity, x]));
  const keep = new Set(p.pins.map((x) => x.cavity));
  for (const gone of existing.filter((x) => !keep.has(x.cavity))) {
    const circuit = await Circuit.findOne({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction });
    if (circuit) throw new SubmissionError(409, "conflict", `Cavity ${gone.cavity} starts or ends the circuit “${circuit.name}”, so its row cannot be taken out.`);
    if (await ComponentLink.findOne({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction })) {
      throw new SubmissionError(409, "conflict", `Cavity ${gone.cavity} leads into its component, so its row cannot be taken out.`);
    }
    await Wire.destroy({ where: { [Op.or]: [{ fromPinId: gone.id }, { toPinId: gone.id }] }, transaction });
    await gone.destroy({ transaction });
  }
  const touched = new Set<number>();
  const oldGoesTo = new Map((oldSnapshot?.pins ?? []).map((x) => [x.cavity, x.goesTo]));
  for (const [position, row] of p.pins.entries()) {
    let pin = byCavity.get(row.cavity);
    const oldCode = pin?.colourCode ?? null;
    if (pin) await pin.update({ colourCode: row.code, circuit: row.circuit, terminal: row.terminal, position }, { transaction });
    else pin = await Pin.create({ familyId: family.id, connectorId: connector.id, componentId: connector.componentId, cavity: row.cavity, colourCode: row.code, circuit: row.circuit, terminal: row.terminal, position }, { transaction });
    // One physical wire carries one colour: a corrected code follows the wire to its other end and across the mate.
    if (oldCode && row.code && oldCode !== row.code) for (const id of await recolour(pin, oldCode, row.code, transaction)) touched.add(id);
    const was = oldGoesTo.get(row.cavity) ?? null;
    const same = (was?.connector ?? null) === (row.goesTo?.connector ?? null) && (was?.cavity ?? null) === (row.goesTo?.cavity ?? null);
    if (!connector.componentId && !same) await rewire(pin, row.goesTo, family.id, transaction);
  }
  touched.delete(connector.id);

  await SpecValue.destroy({ where: { connectorId: connector.id }, transaction });
  for (const sp of p.specs) {
    await SpecValue.create({
      connectorId: connector.id, name: sp.name, min: sp.min, max: sp.max, unit: sp.unit, betweenA: sp.between[0], betweenB: sp.between[1], atC: sp.atC, source: sp.source,
      conditions: sp.conditions, kind: sp.kind, material: sp.material,
    }, { transaction });
  }

  // Photos: the proposal's list, in its order, becomes the card's; photos it drops leave the card (files stay for history).
  // Checked again here: a photo may have been published elsewhere since the proposal was last saved.
  await checkPhotos({ id: s.id, authorId: s.authorId, connectorId: connector.id }, p, transaction, 409);
  await Photo.update({ connectorId: null }, { where: { connectorId: connector.id, id: { [Op.notIn]: p.photos.map((x) => x.id) } }, transaction });
  for (const [position, ph] of p.photos.entries()) {
    const [n] = await Photo.update({ connectorId: connector.id, position, caption: ph.caption, credit: ph.credit }, { where: { id: ph.id, removedAt: null }, transaction });
    if (n !== 1) throw new SubmissionError(409, "conflict", `Photo ${position + 1} is no longer available.`, `photos.${position}`);
  }
  wrote("card");

  const after = await checkLibrary({ familyId: family.id, transaction });
  const fresh = after.filter((x) => !before.has(x));
  if (fresh.length) {
    throw new SubmissionError(409, "conflict", `Publishing would leave the loom inconsistent: ${fresh[0].replace(/^[^:]+: /, "")}`, undefined, fresh.map((m) => ({ field: "loom", message: m })));
  }

  const revision = connector.revision;
  await Revision.create({ connectorId: connector.id, number: revision, snapshot: await connectorSnapshot(connector.id, transaction), summary: s.summary.trim().slice(0, 250) || (s.kind === "new" ? "First published card." : "Edited card."), publishedAt: now }, { transaction });
  // Cards whose wire colours followed this one get a revision too, so their history explains the change.
  for (const otherId of touched) {
    const other = await Connector.findByPk(otherId, { transaction, rejectOnEmpty: true });
    await other.update({ revision: other.revision + 1, publishedAt: now }, { transaction });
    await Revision.create({ connectorId: other.id, number: other.revision, snapshot: await connectorSnapshot(other.id, transaction), summary: `Wire colours follow ${connector.name}, revision ${revision}.`, publishedAt: now }, { transaction });
    await IndexJob.create({ kind: "connector", subjectId: other.id, op: "upsert", createdAt: now }, { transaction });
  }
  wrote("revision");
  // The database's own search copy changes with the card, in this transaction (the service follows via index_jobs).
  await writeFallbackDocs(await libraryDocs({ connectorIds: [connector.id, ...touched], familyIds: newFamily ? [family.id] : [] }, transaction), transaction);
  return { connector, revision, familySlug: family.slug };
}

/** Change a wire's colour code along the wire and across mated cavities (not through splices or components). */
async function recolour(start: Pin, from: string, to: string, transaction: Transaction): Promise<Set<number>> {
  const seen = new Set<number>([start.id]);
  const queue = [start];
  const connectors = new Set<number>();
  while (queue.length) {
    const pin = queue.shift()!;
    if (pin.connectorId) connectors.add(pin.connectorId);
    const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: pin.id }, { toPinId: pin.id }] }, transaction });
    for (const w of wires) {
      if (w.colourCode === from) await w.update({ colourCode: to }, { transaction });
      const other = await Pin.findByPk(w.fromPinId === pin.id ? w.toPinId : w.fromPinId, { transaction });
      if (other && !seen.has(other.id) && other.connectorId && other.colourCode === from) {
        seen.add(other.id);
        await other.update({ colourCode: to }, { transaction });
        queue.push(other);
      }
    }
    if (pin.connectorId) {
      const c = await Connector.findByPk(pin.connectorId, { transaction });
      const matePin = c?.matesWithId ? await Pin.findOne({ where: { connectorId: c.matesWithId, cavity: pin.cavity }, transaction }) : null;
      if (matePin && !seen.has(matePin.id) && matePin.colourCode === from) {
        seen.add(matePin.id);
        await matePin.update({ colourCode: to }, { transaction });
        queue.push(matePin);
      }
    }
  }
  return connectors;
}

/** Point a loom-side cavity's wire at a new far end (or none): its direct wires to connector cavities are replaced. */
async function rewire(pin: Pin, goesTo: { connector: string; cavity: string } | null, familyId: number, transaction: Transaction) {
  const wires = await Wire.findAll({ where: { [Op.or]: [{ fromPinId: pin.id }, { toPinId: pin.id }] }, transaction });
  for (const w of wires) {
    const other = await Pin.findByPk(w.fromPinId === pin.id ? w.toPinId : w.fromPinId, { transaction });
    if (other?.connectorId) await w.destroy({ transaction });
  }
  if (!goesTo) return;
  const target = await Connector.findOne({ where: { slug: goesTo.connector, familyId }, transaction });
  const end = target ? await Pin.findOne({ where: { connectorId: target.id, cavity: goesTo.cavity }, transaction }) : null;
  if (!end) throw new SubmissionError(409, "conflict", `${goesTo.connector} cavity ${goesTo.cavity} has no pin for the wire to end on.`);
  await Wire.create({ familyId, fromPinId: pin.id, toPinId: end.id, colourCode: pin.colourCode ?? end.colourCode ?? "", sizeMm2: null, lengthMm: null }, { transaction });
}
