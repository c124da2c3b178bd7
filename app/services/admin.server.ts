/** Admin work: roles, revoking sessions, the audit log and the mail outbox. */
import { AuditLog, Connector, Family, IndexJob, MailOutbox, Make, User } from "~db/models/index.ts";
import { libraryDocs, writeFallbackDocs } from "~db/search-index.ts";
import { isRole, type Role } from "~/domain/roles";
import { audit, revokeSessions, sequelize } from "./auth.server";
import { forgetFamilyGraph } from "./circuits.server";
import { forgetFinderIndex } from "./finder.server";
import { redactTokens } from "~/domain/mail-templates";

/** Every account with its role, newest first. */
export async function listUsers() {
  const users = await User.findAll({ order: [["createdAt", "DESC"]], limit: 200 });
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    role: u.role,
    verified: !!u.emailVerifiedAt,
    createdAt: u.createdAt.toISOString(),
    disabled: !!u.disabledAt,
  }));
}

/** Change someone's role; an admin cannot remove the last admin. Audited. */
export async function setRole(actorId: number, userId: number, role: string): Promise<{ ok: true } | { ok: false; error: string }> {
  if (!isRole(role)) return { ok: false, error: "Choose rider, contributor, moderator or admin." };
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction });
    if (!user) return { ok: false as const, error: "There is no such account." };
    if (user.role === "admin" && role !== "admin" && (await User.count({ where: { role: "admin" }, transaction })) <= 1) {
      return { ok: false as const, error: "Loomlore needs at least one admin." };
    }
    const from = user.role;
    await user.update({ role: role as Role }, { transaction });
    await audit(actorId, "user.role", "user", userId, { from, to: role }, transaction);
    return { ok: true as const };
  });
}

/** Sign someone out everywhere. Audited. */
export async function revokeUser(actorId: number, userId: number) {
  await sequelize.transaction(async (transaction) => {
    await revokeSessions(userId, undefined, transaction);
    await audit(actorId, "user.sessions-revoked", "user", userId, {}, transaction);
  });
}

/** The latest audit entries with the actor's name. */
export async function listAudit(limit = 100) {
  const rows = await AuditLog.findAll({ order: [["id", "DESC"]], limit });
  const users = await User.findAll({ where: { id: rows.map((r) => r.actorId).filter((x): x is number => !!x) } });
  return rows.map((r) => ({
    id: r.id,
    at: r.at.toISOString(),
    actor: users.find((u) => u.id === r.actorId)?.displayName ?? "—",
    action: r.action,
    subject: `${r.subjectType} ${r.subjectId ?? ""}`.trim(),
    detail: r.detail,
  }));
}

/** The latest messages in the outbox, with their delivery state. */
/** The outbox for the admin page: a queued message's live token is redacted here too (the page never holds one). */
export async function listOutbox(limit = 100) {
  const rows = await MailOutbox.findAll({ order: [["id", "DESC"]], limit });
  return rows.map((m) => ({
    id: m.id,
    kind: m.kind,
    to: m.toAddr,
    subject: m.subject,
    status: m.status,
    attempts: m.attempts,
    createdAt: m.createdAt.toISOString(),
    sentAt: m.sentAt?.toISOString() ?? null,
    lastError: m.lastError,
    text: redactTokens(m.text),
  }));
}

/** Makes and families for the admin page. */
export async function listLibrary() {
  const [makes, families] = await Promise.all([Make.findAll({ order: [["name", "ASC"]] }), Family.findAll({ order: [["name", "ASC"]] })]);
  return {
    makes: makes.map((m) => ({ id: m.id, slug: m.slug, name: m.name, colourSystem: m.colourSystem })),
    families: families.map((f) => ({
      id: f.id,
      slug: f.slug,
      name: f.name,
      modelRange: f.modelRange,
      yearFrom: f.yearFrom,
      yearTo: f.yearTo,
      makeId: f.makeId,
    })),
  };
}

/** Add a make (its families come through contributions). Audited. */
export async function createMake(actorId: number, input: { slug: string; name: string; colourSystem: string; blurb: string }) {
  return sequelize.transaction(async (transaction) => {
    if (await Make.findOne({ where: { slug: input.slug }, transaction })) return { ok: false as const, field: "slug", error: "A make with that slug exists." };
    const make = await Make.create(input, { transaction });
    await audit(actorId, "make.create", "make", make.slug, { name: input.name }, transaction);
    return { ok: true as const };
  });
}

/** Correct a family's name, model range or years. Audited with the before and after. */
export async function updateFamily(actorId: number, slug: string, input: { name: string; modelRange: string; yearFrom: number; yearTo: number }) {
  return sequelize
    .transaction(async (transaction) => {
      const f = await Family.findOne({ where: { slug }, transaction });
      if (!f) return { ok: false as const, field: "slug", error: "There is no such family." };
      const before = { name: f.name, modelRange: f.modelRange, yearFrom: f.yearFrom, yearTo: f.yearTo };
      await f.update(input, { transaction });
      await audit(actorId, "family.update", "family", slug, { before, after: input }, transaction);
      // Search: the family's document and its cards' (they carry its name and years), here and in the service.
      const connectorIds = (await Connector.findAll({ where: { familyId: f.id }, attributes: ["id"], transaction })).map((c) => c.id);
      await writeFallbackDocs(await libraryDocs({ familyIds: [f.id], connectorIds }, transaction), transaction);
      const now = new Date();
      await IndexJob.bulkCreate(
        [{ kind: "family", subjectId: f.id, createdAt: now }, ...connectorIds.map((id) => ({ kind: "connector" as const, subjectId: id, createdAt: now }))],
        { transaction },
      );
      return { ok: true as const };
    })
    .then((r) => {
      // The walk and the finder keep the family in memory: let them read it again.
      if (r.ok) {
        forgetFamilyGraph(slug);
        forgetFinderIndex();
      }
      return r;
    });
}
