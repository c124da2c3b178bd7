/**
 * Accounts and sessions. Passwords: bcrypt (cost measured on this machine, see DEVELOPERS.md) over a SHA-256
 * pre-hash, so passwords longer than bcrypt's 72 bytes are neither truncated nor rejected. Sessions live on the
 * server: the cookie carries a random id whose hash is stored, so signing out, a password change or an admin's
 * revocation really ends a session.
 */
import { createHash, randomBytes } from "node:crypto";
import { hashPassword, verifyPassword } from "~/infra/password-hash.server";
import { Op, type Transaction } from "sequelize";
import { sequelize } from "~db/index.server.ts";
import { AuditLog, Session, Token, User } from "~db/models/index.ts";
import type { Role } from "~/domain/roles";
import { env } from "~/env.server";

export { BCRYPT_COST, hashPassword, verifyPassword } from "~/infra/password-hash.server";

const SESSION_DAYS = 30;
const TOUCH_EVERY_MS = 60_000;
/** A session not used for this long ends, whatever its absolute expiry (ASVS V3.3.2; the issue asked for ~14 days). */
const SESSION_IDLE_DAYS = 14;
const SESSION_IDLE_MS = SESSION_IDLE_DAYS * 86400_000;
const production = env.NODE_ENV === "production";
/** The session cookie: __Host- prefixed (Secure, Path=/, no Domain) in production (ASVS V3.4.4). */
export const SESSION_COOKIE = production ? "__Host-loomlore" : "loomlore_session";

const sha256 = (s: string) => createHash("sha256").update(s, "utf8").digest("hex");
const randomToken = () => randomBytes(32).toString("base64url");

let dummyHash: Promise<string> | null = null;
/** Spend the same time as a real check when there is no account, so timing does not tell (ASVS 5.0 V6.3.8). */
export async function dummyVerify(password: string): Promise<false> {
  // A refused first hash (HashingBusy) must not stay cached as a rejection: the next sign-in tries again.
  dummyHash ??= hashPassword("no account has this password").catch((e) => {
    dummyHash = null;
    throw e;
  });
  await verifyPassword(password, await dummyHash);
  return false;
}

export interface SessionUser {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  verified: boolean;
}
const toSessionUser = (u: User): SessionUser => ({ id: u.id, email: u.email, displayName: u.displayName, role: u.role, verified: !!u.emailVerifiedAt });

function cookieValue(request: Request): string | null {
  const header = request.headers.get("Cookie") ?? "";
  for (const part of header.split(";")) {
    const [k, ...v] = part.trim().split("=");
    if (k === SESSION_COOKIE) return v.join("=") || null;
  }
  return null;
}

/** The Set-Cookie header for a session token (or its removal with null). */
export function sessionCookie(token: string | null): string {
  const attrs = ["Path=/", "HttpOnly", "SameSite=Lax", ...(production ? ["Secure"] : [])];
  return token
    ? [`${SESSION_COOKIE}=${token}`, `Max-Age=${SESSION_DAYS * 86400}`, ...attrs].join("; ")
    : [`${SESSION_COOKIE}=`, "Max-Age=0", ...attrs].join("; ");
}

/** Start a new session for a user (a fresh id: ASVS V3.2.1); ends the session the request came with, if any. */
export async function startSession(request: Request, userId: number, transaction?: Transaction): Promise<string> {
  const old = cookieValue(request);
  if (old) await Session.destroy({ where: { tokenHash: sha256(old) }, transaction });
  const token = randomToken();
  const now = new Date();
  await Session.create(
    {
      tokenHash: sha256(token),
      userId,
      createdAt: now,
      lastSeenAt: now,
      expiresAt: new Date(now.getTime() + SESSION_DAYS * 86400_000),
      revokedAt: null,
      userAgent: (request.headers.get("User-Agent") ?? "").slice(0, 300),
    },
    { transaction },
  );
  return sessionCookie(token);
}

/** The signed-in user and their session, or null (unknown, revoked, expired, or a disabled account). */
export async function currentSession(request: Request): Promise<{ user: SessionUser; sessionId: number } | null> {
  const token = cookieValue(request);
  if (!token || token.length > 100) return null;
  const session = await Session.findOne({ where: { tokenHash: sha256(token), revokedAt: null, expiresAt: { [Op.gt]: new Date() } } });
  if (!session) return null;
  // Idle timeout beside the absolute one (ASVS V3.3.2): a session unused for SESSION_IDLE_DAYS ends.
  if (Date.now() - session.lastSeenAt.getTime() > SESSION_IDLE_MS) return null;
  const user = await User.findByPk(session.userId);
  if (!user || user.disabledAt) return null;
  // Writes go through a transaction (its own handle), never the shared one that every read of the process queues on.
  if (Date.now() - session.lastSeenAt.getTime() > TOUCH_EVERY_MS)
    await sequelize.transaction((transaction) => session.update({ lastSeenAt: new Date() }, { transaction }));
  return { user: toSessionUser(user), sessionId: session.id };
}

/** End the request's session (sign out): the row goes, so a copied cookie is worthless (ASVS V3.3.1). */
export async function endSession(request: Request): Promise<string> {
  const token = cookieValue(request);
  if (token) await sequelize.transaction((transaction) => Session.destroy({ where: { tokenHash: sha256(token) }, transaction }));
  return sessionCookie(null);
}

/** End every session of a user, optionally but one (password change, reset, an admin's revocation). */
export async function revokeSessions(userId: number, exceptSessionId?: number, transaction?: Transaction) {
  const where = exceptSessionId ? { userId, id: { [Op.ne]: exceptSessionId } } : { userId };
  await Session.update({ revokedAt: new Date() }, { where: { ...where, revokedAt: null }, transaction });
}

/** Record who did what (never a password, token or session id). */
export async function audit(
  actorId: number | null,
  action: string,
  subjectType: string,
  subjectId: string | number | null,
  detail: Record<string, unknown> = {},
  transaction?: Transaction,
) {
  await AuditLog.create(
    { actorId, action, subjectType, subjectId: subjectId === null ? null : String(subjectId), detail: JSON.stringify(detail), at: new Date() },
    { transaction },
  );
}

/** Make a single-use token for an e-mail link; only its hash is stored. */
export async function issueToken(userId: number, kind: "verify" | "reset", ttlMinutes: number, transaction?: Transaction): Promise<string> {
  const token = randomToken();
  const now = new Date();
  // A newer link replaces older ones of the same kind.
  await Token.update({ usedAt: now }, { where: { userId, kind, usedAt: null }, transaction });
  await Token.create(
    { userId, kind, tokenHash: sha256(token), expiresAt: new Date(now.getTime() + ttlMinutes * 60_000), usedAt: null, createdAt: now },
    { transaction },
  );
  return token;
}

/** Use a token once: the user it belongs to, or null when unknown, used or expired. Marks it used atomically. */
/** The row of a single-use token that is still live (unused, unexpired), or null. */
async function liveToken(token: string, kind: "verify" | "reset", transaction?: Transaction) {
  if (!token || token.length > 200) return null;
  const row = await Token.findOne({ where: { tokenHash: sha256(token), kind }, transaction });
  return row && !row.usedAt && row.expiresAt >= new Date() ? row : null;
}

/** Whether a single-use token is live, without using it: a read on the shared handle, no lock, no bcrypt. */
export async function tokenIsLive(token: string, kind: "verify" | "reset"): Promise<boolean> {
  return (await liveToken(token, kind)) !== null;
}

export async function consumeToken(token: string, kind: "verify" | "reset", transaction: Transaction): Promise<User | null> {
  const row = await liveToken(token, kind, transaction);
  if (!row) return null;
  // Check-and-act in one statement, so two clicks of the same link cannot both succeed (ASVS 5.0 V15.4.2).
  const [n] = await Token.update({ usedAt: new Date() }, { where: { id: row.id, usedAt: null }, transaction });
  if (n !== 1) return null;
  return User.findByPk(row.userId, { transaction });
}

export { sequelize, User };
