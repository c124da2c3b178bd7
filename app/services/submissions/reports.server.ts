/** Mistake reports in the review queue: one for a moderator, and closing it. */
import { BikeCheck, Connector, Family, MistakeReport, User } from "~db/models/index.ts";
import { can } from "~/domain/roles";
import { audit, sequelize } from "../auth.server";
import { SubmissionError, type Actor } from "./errors.server";

/** One open or closed mistake report with its card, for a moderator. */
export async function viewReport(viewer: Actor | null, id: number) {
  if (!viewer || !can(viewer.role, "review.work") || !Number.isSafeInteger(id)) return null;
  const r = await MistakeReport.findByPk(id);
  if (!r) return null;
  const c = await Connector.findByPk(r.connectorId, { include: [{ model: Family, as: "family" }] });
  const reporter = await User.findByPk(r.userId);
  const checks = await BikeCheck.findAll({ where: { connectorId: r.connectorId } });
  return {
    id: r.id,
    text: r.text,
    revision: r.revision,
    status: r.status,
    resolution: r.resolution,
    createdAt: r.createdAt.toISOString(),
    connector: { slug: c!.slug, name: c!.name, revision: c!.revision },
    family: { slug: c!.family!.slug, name: c!.family!.name },
    reporter: reporter?.displayName ?? "—",
    bikeChecked: { count: checks.length, years: [...new Set(checks.map((x) => x.year).filter((y): y is number => y !== null))].sort() },
  };
}

/** Close a mistake report (fixed by an edit, or not a mistake), with a note; audited. A second moderator gets 409. */
export async function closeReport(actor: Actor, id: number, status: "resolved" | "dismissed", note: string) {
  if (!can(actor.role, "review.work")) throw new SubmissionError(403, "forbidden", "This needs the moderator role.");
  if (!note.trim()) throw new SubmissionError(400, "bad_request", "Say what was done about the report.", "message");
  await sequelize.transaction(async (transaction) => {
    const [n] = await MistakeReport.update(
      { status, resolution: note.trim(), resolvedBy: actor.id, resolvedAt: new Date() },
      { where: { id, status: "open" }, transaction },
    );
    if (n !== 1) {
      const r = await MistakeReport.findByPk(id, { transaction });
      if (!r) throw new SubmissionError(404, "not_found", "There is no such report.");
      throw new SubmissionError(409, "conflict", "Another moderator has already closed this report.", undefined, [], { state: r.status, version: 0 });
    }
    await audit(actor.id, `report.${status}`, "mistake_report", id, { note: note.trim() }, transaction);
  });
}
