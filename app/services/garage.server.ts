/** A rider's garage (saved cards and bikes), bike-checked confirmations and mistake reports; always scoped to the owner. */
import { BikeCheck, Connector, Family, GarageItem, Make, MistakeReport } from "~db/models/index.ts";
import { audit, sequelize } from "./auth.server";
import { isSlug } from "~/validation/library";

/** The garage of one user. */
export async function listGarage(userId: number) {
  const items = await GarageItem.findAll({ where: { userId }, order: [["createdAt", "DESC"]] });
  const connectors = await Connector.findAll({ where: { id: items.map((i) => i.connectorId).filter((x): x is number => !!x) } });
  const families = await Family.findAll({
    where: { id: [...items.map((i) => i.familyId), ...connectors.map((c) => c.familyId)].filter((x): x is number => !!x) },
    include: [{ model: Make, as: "make" }],
  });
  const fam = new Map(families.map((f) => [f.id, f]));
  return {
    cards: items
      .filter((i) => i.kind === "card")
      .map((i) => {
        const c = connectors.find((x) => x.id === i.connectorId)!;
        const f = fam.get(c.familyId)!;
        return { id: i.id, slug: c.slug, name: c.name, family: { slug: f.slug, name: `${f.make!.name} ${f.name}` } };
      }),
    bikes: items
      .filter((i) => i.kind === "bike")
      .map((i) => {
        const f = fam.get(i.familyId!)!;
        return { id: i.id, family: { slug: f.slug, name: `${f.make!.name} ${f.name}`, yearFrom: f.yearFrom, yearTo: f.yearTo }, year: i.year, label: i.label };
      }),
  };
}

async function connectorBySlug(slug: string) {
  return isSlug(slug) ? Connector.findOne({ where: { slug } }) : null;
}

/** Save a card to the garage (once). */
export async function saveCard(userId: number, slug: string): Promise<boolean> {
  const c = await connectorBySlug(slug);
  if (!c) return false;
  // Writes run in a transaction (a handle of their own): never on the shared handle every read of the process waits on.
  await sequelize.transaction(async (transaction) => {
    const exists = await GarageItem.findOne({ where: { userId, kind: "card", connectorId: c.id }, transaction });
    if (!exists)
      await GarageItem.create({ userId, kind: "card", connectorId: c.id, familyId: null, year: null, label: "", createdAt: new Date() }, { transaction });
  });
  return true;
}

/** Add a bike (family and year) to the garage. */
export async function addBike(
  userId: number,
  familySlug: string,
  year: number | null,
  label: string,
): Promise<{ ok: true } | { ok: false; field: string; error: string }> {
  const f = isSlug(familySlug) ? await Family.findOne({ where: { slug: familySlug } }) : null;
  if (!f) return { ok: false, field: "family", error: "Choose a family from the list." };
  if (year !== null && (year < f.yearFrom - 1 || year > f.yearTo + 1))
    return { ok: false, field: "year", error: `The ${f.name} was made ${f.yearFrom}–${f.yearTo}.` };
  await sequelize.transaction((transaction) =>
    GarageItem.create({ userId, kind: "bike", connectorId: null, familyId: f.id, year, label: label.slice(0, 80), createdAt: new Date() }, { transaction }),
  );
  return { ok: true };
}

/** Remove one of the user's own garage items; another user's id changes nothing (and says nothing). */
export async function removeItem(userId: number, itemId: number): Promise<boolean> {
  return (await sequelize.transaction((transaction) => GarageItem.destroy({ where: { id: itemId, userId }, transaction }))) === 1;
}

/** Mark a card bike-checked on the rider's own bike (one per rider and card; the year is updated). */
export async function checkCard(userId: number, slug: string, year: number | null): Promise<boolean> {
  const c = await connectorBySlug(slug);
  if (!c) return false;
  await sequelize.transaction(async (transaction) => {
    const existing = await BikeCheck.findOne({ where: { userId, connectorId: c.id }, transaction });
    if (existing) await existing.update({ year }, { transaction });
    else await BikeCheck.create({ userId, connectorId: c.id, year, createdAt: new Date() }, { transaction });
    await audit(userId, "card.bike-checked", "connector", c.slug, { year }, transaction);
  });
  return true;
}

/** Report a mistake on a card; it feeds the review queue. */
export async function reportMistake(userId: number, slug: string, text: string): Promise<boolean> {
  const c = await connectorBySlug(slug);
  if (!c) return false;
  await sequelize.transaction(async (transaction) => {
    await MistakeReport.create({ userId, connectorId: c.id, revision: c.revision, text, status: "open", createdAt: new Date() }, { transaction });
    await audit(userId, "card.report", "connector", c.slug, { revision: c.revision }, transaction);
  });
  return true;
}

/** How many riders confirmed a card, and on which years. */
export async function bikeChecks(connectorId: number) {
  const rows = await BikeCheck.findAll({ where: { connectorId } });
  return { count: rows.length, years: [...new Set(rows.map((r) => r.year).filter((y): y is number => y !== null))].sort() };
}

/** What the signed-in rider has done with a card already (for the card page's buttons). */
export async function riderCardState(userId: number, connectorId: number) {
  const [saved, check] = await Promise.all([
    GarageItem.findOne({ where: { userId, kind: "card", connectorId } }),
    BikeCheck.findOne({ where: { userId, connectorId } }),
  ]);
  return { saved: !!saved, checkedYear: check ? (check.year ?? 0) : null };
}
