/** Publishing an approved submission onto the live card, inside the decision's transaction. */
import { Op, type Transaction } from "sequelize";
import { checkLibrary } from "~db/check.ts";
import { Circuit, ComponentLink, Connector, Family, IndexJob, Make, Photo, Pin, Revision, SpecValue, System, Wire, type Submission } from "~db/models/index.ts";
import { libraryDocs, writeFallbackDocs } from "~db/search-index.ts";
import { connectorSnapshot, type ConnectorSnapshot } from "~db/snapshot.ts";
import { planPublish, PublishConflict, type PublishPlan } from "~/domain/publish-plan";
import { proposalProblems, type CardProposal } from "~/domain/submissions";
import { familyRequestSchema, proposalSchema } from "~/validation/submissions";
import { audit } from "../auth.server";
import { familyContext } from "./context.server";
import { checkPhotos } from "./draft-photos.server";
import { SubmissionError } from "./errors.server";
import { wrote } from "./faults.server";

const slugify = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 60) || "card";

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
    family = await Family.create(
      {
        makeId: make.id,
        slug: await uniqueSlug(Family, slugify(req.name), transaction),
        name: req.name,
        modelRange: req.modelRange || req.name,
        yearFrom: req.yearFrom,
        yearTo: req.yearTo,
        engine: req.engine || "—",
        displacementCc: req.displacementCc,
        cylinders: req.cylinders,
        firingOrder: req.firingOrder || "—",
        crankDeg: null,
        ignition: req.ignition || "—",
        colourSystem: make.colourSystem,
        blurb: "",
      },
      { transaction },
    );
    await audit(s.decidedBy ?? null, "family.create", "family", family.id, { slug: family.slug, fromSubmission: s.id }, transaction);
    await IndexJob.create({ kind: "family", subjectId: family.id, op: "upsert", createdAt: now }, { transaction });
    newFamily = true;
  }
  const ctx = await familyContext(family.id, null, transaction);
  const problems = proposalProblems(p, ctx.colourSystem, new Map(ctx.cards.map((c) => [c.slug, c.cavities])), { houseStyle: ctx.houseStyle });
  if (problems.length)
    throw new SubmissionError(409, "conflict", `The proposal no longer fits the library: ${problems[0].message}`, problems[0].field, problems);
  const before = new Set(await checkLibrary({ familyId: family.id, transaction }));

  const [system] = await System.findOrCreate({
    where: { familyId: family.id, kind: p.system },
    defaults: { familyId: family.id, kind: p.system, name: p.system[0].toUpperCase() + p.system.slice(1) },
    transaction,
  });
  let connector: Connector;
  let oldSnapshot: ConnectorSnapshot | null = null;
  const fields = {
    name: p.name,
    location: p.location,
    housing: p.housing || "—",
    gender: p.gender,
    systemId: system.id,
    rows: p.layout.rows,
    cols: p.layout.cols,
    cavities: p.layout.cavities,
    pin1: p.layout.pin1,
    latch: p.layout.latch,
    notes: p.notes,
  };
  if (s.kind === "edit") {
    connector = await Connector.findByPk(s.connectorId!, { transaction, rejectOnEmpty: true });
    if (connector.revision !== s.baseRevision) {
      throw new SubmissionError(
        409,
        "conflict",
        `The card was published again (revision ${connector.revision}) after this edit began from revision ${s.baseRevision}; return it so the contributor can start from the current card.`,
      );
    }
    oldSnapshot = await connectorSnapshot(connector.id, transaction);
    await connector.update({ ...fields, revision: connector.revision + 1, publishedAt: now }, { transaction });
  } else {
    connector = await Connector.create(
      {
        ...fields,
        familyId: family.id,
        componentId: null,
        matesWithId: null,
        slug: await uniqueSlug(Connector, `${family.slug}-${slugify(p.name)}`, transaction),
        revision: 1,
        publishedAt: now,
      },
      { transaction },
    );
  }

  // Mating partner.
  const mate = p.matesWith ? await Connector.findOne({ where: { slug: p.matesWith, familyId: family.id }, transaction }) : null;
  if (p.matesWith && !mate) throw new SubmissionError(409, "conflict", `“${p.matesWith}” is not a card of this family.`, "matesWith");
  if (mate && mate.id === connector.id) throw new SubmissionError(409, "conflict", "A connector cannot mate with itself.", "matesWith");
  if (mate && mate.matesWithId && mate.matesWithId !== connector.id)
    throw new SubmissionError(409, "conflict", `${mate.name} already mates with another connector.`, "matesWith");
  if (connector.matesWithId && connector.matesWithId !== mate?.id) {
    await Connector.update({ matesWithId: null }, { where: { id: connector.matesWithId, matesWithId: connector.id }, transaction });
  }
  await connector.update({ matesWithId: mate?.id ?? null }, { transaction });
  if (mate) await mate.update({ matesWithId: connector.id }, { transaction });

  // Pins, matched by cavity so wires and circuits keep their ends: the family's rows are read once, the rules in
  // app/domain/publish-plan.ts say what changes (kept, added, removed pins; colours that follow a wire; rewires), and the
  // changes are written here, in this transaction.
  const plan = await planPins(connector, family.id, p, oldSnapshot, transaction);
  await applyPlan(plan, connector, family.id, transaction);
  const touched = plan.touched;

  await SpecValue.destroy({ where: { connectorId: connector.id }, transaction });
  for (const sp of p.specs) {
    await SpecValue.create(
      {
        connectorId: connector.id,
        name: sp.name,
        min: sp.min,
        max: sp.max,
        unit: sp.unit,
        betweenA: sp.between[0],
        betweenB: sp.between[1],
        atC: sp.atC,
        source: sp.source,
        conditions: sp.conditions,
        kind: sp.kind,
        material: sp.material,
      },
      { transaction },
    );
  }

  // Photos: the proposal's list, in its order, becomes the card's; photos it drops leave the card (files stay for history).
  // Checked again here: a photo may have been published elsewhere since the proposal was last saved.
  await checkPhotos({ id: s.id, authorId: s.authorId, connectorId: connector.id }, p, transaction, 409);
  await Photo.update({ connectorId: null }, { where: { connectorId: connector.id, id: { [Op.notIn]: p.photos.map((x) => x.id) } }, transaction });
  for (const [position, ph] of p.photos.entries()) {
    const [n] = await Photo.update(
      { connectorId: connector.id, position, caption: ph.caption, credit: ph.credit },
      { where: { id: ph.id, removedAt: null }, transaction },
    );
    if (n !== 1) throw new SubmissionError(409, "conflict", `Photo ${position + 1} is no longer available.`, `photos.${position}`);
  }
  wrote("card");

  const after = await checkLibrary({ familyId: family.id, transaction });
  const fresh = after.filter((x) => !before.has(x));
  if (fresh.length) {
    throw new SubmissionError(
      409,
      "conflict",
      `Publishing would leave the loom inconsistent: ${fresh[0].replace(/^[^:]+: /, "")}`,
      undefined,
      fresh.map((m) => ({ field: "loom", message: m })),
    );
  }

  const revision = connector.revision;
  await Revision.create(
    {
      connectorId: connector.id,
      number: revision,
      snapshot: await connectorSnapshot(connector.id, transaction),
      summary: s.summary.trim().slice(0, 250) || (s.kind === "new" ? "First published card." : "Edited card."),
      publishedAt: now,
    },
    { transaction },
  );
  // Cards whose wire colours followed this one get a revision too, so their history explains the change.
  for (const otherId of touched) {
    const other = await Connector.findByPk(otherId, { transaction, rejectOnEmpty: true });
    await other.update({ revision: other.revision + 1, publishedAt: now }, { transaction });
    await Revision.create(
      {
        connectorId: other.id,
        number: other.revision,
        snapshot: await connectorSnapshot(other.id, transaction),
        summary: `Wire colours follow ${connector.name}, revision ${revision}.`,
        publishedAt: now,
      },
      { transaction },
    );
    await IndexJob.create({ kind: "connector", subjectId: other.id, op: "upsert", createdAt: now }, { transaction });
  }
  wrote("revision");
  // The database's own search copy changes with the card, in this transaction (the service follows via index_jobs).
  await writeFallbackDocs(await libraryDocs({ connectorIds: [connector.id, ...touched], familyIds: newFamily ? [family.id] : [] }, transaction), transaction);
  return { connector, revision, familySlug: family.slug };
}

/** Read the family's pins, wires and cards once (the mate already set) and plan the card's pins from the proposal. */
async function planPins(
  connector: Connector,
  familyId: number,
  p: CardProposal,
  oldSnapshot: ConnectorSnapshot | null,
  transaction: Transaction,
): Promise<PublishPlan> {
  const [pins, wires, connectors] = await Promise.all([
    Pin.findAll({
      where: { familyId },
      attributes: ["id", "connectorId", "cavity", "colourCode", "circuit", "terminal", "position"],
      order: [["id", "ASC"]],
      transaction,
    }),
    Wire.findAll({ where: { familyId }, attributes: ["id", "fromPinId", "toPinId", "colourCode"], order: [["id", "ASC"]], transaction }),
    Connector.findAll({ where: { familyId }, attributes: ["id", "slug", "matesWithId"], order: [["id", "ASC"]], transaction }),
  ]);
  // What ends on the card's own pins: a removed cavity may not take a circuit's end or a component's lead with it.
  const own = pins.filter((x) => x.connectorId === connector.id).map((x) => x.id);
  const ends = { [Op.or]: [{ fromPinId: own }, { toPinId: own }] };
  const [circuits, componentLinks] = own.length
    ? await Promise.all([
        Circuit.findAll({ where: ends, attributes: ["id", "name", "fromPinId", "toPinId"], order: [["id", "ASC"]], transaction }),
        ComponentLink.findAll({ where: ends, attributes: ["id", "fromPinId", "toPinId"], order: [["id", "ASC"]], transaction }),
      ])
    : [[], []];
  try {
    return planPublish({
      card: { id: connector.id, componentId: connector.componentId },
      pins: pins.map((x) => ({
        id: x.id,
        connectorId: x.connectorId,
        cavity: x.cavity,
        colourCode: x.colourCode,
        circuit: x.circuit,
        terminal: x.terminal,
        position: x.position,
      })),
      wires: wires.map((w) => ({ id: w.id, fromPinId: w.fromPinId, toPinId: w.toPinId, colourCode: w.colourCode })),
      connectors: connectors.map((c) => ({ id: c.id, slug: c.slug, matesWithId: c.matesWithId })),
      circuits: circuits.map((c) => ({ name: c.name, fromPinId: c.fromPinId, toPinId: c.toPinId })),
      componentLinks: componentLinks.map((l) => ({ fromPinId: l.fromPinId, toPinId: l.toPinId })),
      rows: p.pins,
      goesToBefore: new Map((oldSnapshot?.pins ?? []).map((x) => [x.cavity, x.goesTo])),
    });
  } catch (e) {
    if (e instanceof PublishConflict) throw new SubmissionError(409, "conflict", e.message);
    throw e;
  }
}

/** Write a pin plan: what goes first (a removed cavity's wires with it), then changed and new pins, then the wires. */
async function applyPlan(plan: PublishPlan, connector: Connector, familyId: number, transaction: Transaction) {
  if (plan.deleteWires.length) await Wire.destroy({ where: { id: plan.deleteWires }, transaction });
  if (plan.deletePins.length) await Pin.destroy({ where: { id: plan.deletePins }, transaction });
  for (const { id, changes } of plan.updatePins) await Pin.update(changes, { where: { id }, transaction });
  const created = new Map<number, number>();
  for (const { ref, ...row } of plan.createPins) {
    const pin = await Pin.create({ ...row, familyId, connectorId: connector.id, componentId: connector.componentId }, { transaction });
    created.set(ref, pin.id);
  }
  const idOf = (id: number) => (id < 0 ? created.get(id)! : id);
  for (const { id, colourCode } of plan.wireColours) await Wire.update({ colourCode }, { where: { id }, transaction });
  for (const w of plan.createWires) {
    await Wire.create(
      { familyId, fromPinId: idOf(w.fromPinId), toPinId: idOf(w.toPinId), colourCode: w.colourCode, sizeMm2: null, lengthMm: null },
      { transaction },
    );
  }
}
