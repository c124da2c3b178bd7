/** Joining, signing in, verifying an address, resetting and changing a password. */
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { accountExistsMessage, resetPasswordMessage, verifyEmailMessage } from "~/domain/mail-templates";
import { passwordProblem } from "~/domain/passwords";
import { roleAfterVerification } from "~/domain/roles";
import { fieldErrors, formFields, joinForm, loginForm } from "~/validation/accounts";
import {
  audit,
  consumeToken,
  currentSession,
  dummyVerify,
  hashPassword,
  issueToken,
  revokeSessions,
  sequelize,
  startSession,
  tokenIsLive,
  User,
  verifyPassword,
  type SessionUser,
} from "./auth.server";
import { HashingBusy } from "~/infra/password-hash.server";
import { enqueueMail } from "./mail.server";
import { loginSucceeded, takeLoginAttempt, takeMailRequest, takeResetAttempt } from "./rate-limit.server";
import { appUrl as configuredAppUrl } from "~/env.server";

const VERIFY_TTL_MIN = 48 * 60;
const RESET_TTL_MIN = 30;

/** Where links in e-mails point: APP_URL, never the request's Host header (which a client can forge). */
export function appUrl(): string {
  return configuredAppUrl();
}

export class LoginError extends Error {}

/** The sign-in strategy: remix-auth's form strategy over our accounts. Unknown address and wrong password look alike. */
export const authenticator = new Authenticator<SessionUser>();
authenticator.use(
  new FormStrategy(async ({ form }) => {
    const parsed = loginForm.safeParse(formFields(form));
    if (!parsed.success) throw new LoginError("Enter your e-mail address and password.");
    const user = await User.findOne({ where: { email: parsed.data.email } });
    const ok = user ? await verifyPassword(parsed.data.password, user.passwordHash) : await dummyVerify(parsed.data.password);
    if (!user || !ok || user.disabledAt) throw new LoginError("That e-mail address and password don't match an account.");
    return { id: user.id, email: user.email, displayName: user.displayName, role: user.role, verified: !!user.emailVerifiedAt };
  }),
  "password",
);

export type FormResult = { ok: false; status: number; errors: Record<string, string>; values: Record<string, string>; retryAfterS?: number };

/** A hash or check refused at the queue's bound comes back as its HashingBusy (any other failure still throws). */
const orBusy = <T>(work: Promise<T>): Promise<T | HashingBusy> =>
  work.catch((e) => {
    if (e instanceof HashingBusy) return e;
    throw e;
  });
const busyMessage = (e: HashingBusy) => `Many people are signing in at this moment. Try again in ${e.retryAfterS} seconds.`;

/** The answer when password hashing is at its queue's bound (HashingBusy): a 429 to try again shortly, the form kept. */
function busy(e: HashingBusy, values: Record<string, string>): FormResult {
  return { ok: false, status: 429, values, retryAfterS: e.retryAfterS, errors: { form: busyMessage(e) } };
}

/** Sign in from the login form: limits first (before bcrypt), then the strategy, then a fresh session. */
export async function signIn(request: Request, ip: string): Promise<{ ok: true; setCookie: string; user: SessionUser } | FormResult> {
  const fields = formFields(await request.clone().formData());
  const values = { email: fields.email ?? "" };
  const limited = await takeLoginAttempt((fields.email ?? "").trim().toLowerCase(), ip);
  if (!limited.ok) {
    return {
      ok: false,
      status: 429,
      values,
      retryAfterS: limited.retryAfterS,
      errors: { form: `Too many attempts. Try again in ${Math.ceil(limited.retryAfterS / 60)} minute(s), or reset your password.` },
    };
  }
  try {
    const user = await authenticator.authenticate("password", request);
    await loginSucceeded((fields.email ?? "").trim().toLowerCase(), ip);
    // One queued transaction: written on the shared read handle, the session and its audit row each waited for the write
    // lock there, and every read of the process waited behind them.
    const setCookie = await sequelize.transaction(async (transaction) => {
      const cookie = await startSession(request, user.id, transaction);
      await audit(user.id, "session.start", "user", user.id, {}, transaction);
      return cookie;
    });
    return { ok: true, setCookie, user };
  } catch (e) {
    if (e instanceof LoginError) return { ok: false, status: 401, values, errors: { form: e.message } };
    if (e instanceof HashingBusy) return busy(e, values);
    throw e;
  }
}

/**
 * Join: the same answer whether or not the address already has an account (the existing owner is told by mail),
 * so the form cannot be used to find out who has one.
 */
export async function join(request: Request, ip: string): Promise<{ ok: true; email: string } | FormResult> {
  const fields = formFields(await request.formData());
  const values = { email: fields.email ?? "", displayName: fields.displayName ?? "" };
  const parsed = joinForm.safeParse(fields);
  if (!parsed.success) return { ok: false, status: 400, values, errors: fieldErrors(parsed.error.issues) };
  const { email, password, displayName } = parsed.data;
  const problem = passwordProblem(password, { email, displayName });
  if (problem) return { ok: false, status: 400, values, errors: { password: problem } };
  const limited = await takeMailRequest(ip, email);
  if (!limited.ok)
    return { ok: false, status: 429, values, retryAfterS: limited.retryAfterS, errors: { form: "Too many requests from here. Try again later." } };
  const hash = await orBusy(hashPassword(password));
  if (hash instanceof HashingBusy) return busy(hash, values);
  await sequelize.transaction(async (transaction) => {
    const existing = await User.findOne({ where: { email }, transaction });
    if (existing) {
      await enqueueMail({ kind: "account-exists", to: email, ...accountExistsMessage({ link: `${appUrl()}/login` }) }, transaction);
      return;
    }
    const now = new Date();
    const user = await User.create(
      { email, displayName, passwordHash: hash, role: "rider", emailVerifiedAt: null, passwordChangedAt: now, createdAt: now, disabledAt: null },
      { transaction },
    );
    const token = await issueToken(user.id, "verify", VERIFY_TTL_MIN, transaction);
    await enqueueMail({ kind: "verify", to: email, ...verifyEmailMessage({ displayName, link: `${appUrl()}/verify?token=${token}` }) }, transaction);
    await audit(user.id, "user.join", "user", user.id, {}, transaction);
  });
  return { ok: true, email };
}

/** Confirm an address from its link: single use; a verified rider becomes a contributor. */
export async function verifyAddress(token: string): Promise<{ ok: boolean }> {
  return sequelize.transaction(async (transaction) => {
    const user = await consumeToken(token, "verify", transaction);
    if (!user) return { ok: false };
    await user.update({ emailVerifiedAt: user.emailVerifiedAt ?? new Date(), role: roleAfterVerification(user.role) }, { transaction });
    await audit(user.id, "user.verify", "user", user.id, {}, transaction);
    return { ok: true };
  });
}

/** Send a fresh verification link to the signed-in user. */
export async function resendVerification(user: SessionUser, ip: string): Promise<{ ok: boolean; retryAfterS?: number }> {
  if (user.verified) return { ok: true };
  const limited = await takeMailRequest(ip, user.email);
  if (!limited.ok) return { ok: false, retryAfterS: limited.retryAfterS };
  await sequelize.transaction(async (transaction) => {
    const token = await issueToken(user.id, "verify", VERIFY_TTL_MIN, transaction);
    await enqueueMail(
      { kind: "verify", to: user.email, ...verifyEmailMessage({ displayName: user.displayName, link: `${appUrl()}/verify?token=${token}` }) },
      transaction,
    );
  });
  return { ok: true };
}

/** Forgot password: always the same answer; a link goes out only to an address with an account. */
export async function requestReset(email: string, ip: string): Promise<{ ok: boolean; retryAfterS?: number }> {
  const limited = await takeMailRequest(ip, email);
  if (!limited.ok) return { ok: false, retryAfterS: limited.retryAfterS };
  await sequelize.transaction(async (transaction) => {
    const user = await User.findOne({ where: { email }, transaction });
    if (!user || user.disabledAt) return;
    const token = await issueToken(user.id, "reset", RESET_TTL_MIN, transaction);
    await enqueueMail({ kind: "reset", to: email, ...resetPasswordMessage({ link: `${appUrl()}/reset?token=${token}` }) }, transaction);
  });
  return { ok: true };
}

/** Set a new password from a reset link: single use, short-lived; every session of the account ends. */
export async function resetPassword(
  token: string,
  password: string,
  ip = "unknown",
): Promise<{ ok: true } | { ok: false; error: string; field?: string; status?: number; retryAfterS?: number }> {
  // Limits and the token first: a made-up token costs a lookup, never a bcrypt hash or a write lock.
  const limited = await takeResetAttempt(token, ip);
  if (!limited.ok)
    return {
      ok: false,
      status: 429,
      retryAfterS: limited.retryAfterS,
      error: `Too many attempts. Try again in ${Math.ceil(limited.retryAfterS / 60)} minute(s).`,
    };
  const expired = { ok: false as const, error: "This link has expired or was already used. Ask for a new one." };
  if (!(await tokenIsLive(token, "reset"))) return expired;
  const problem = passwordProblem(password, {});
  if (problem) return { ok: false, error: problem, field: "password" };
  const hash = await orBusy(hashPassword(password));
  if (hash instanceof HashingBusy) return { ok: false, status: 429, retryAfterS: hash.retryAfterS, error: busyMessage(hash) };
  return sequelize
    .transaction(async (transaction) => {
      const user = await consumeToken(token, "reset", transaction);
      if (!user) return expired;
      const personal = passwordProblem(password, { email: user.email, displayName: user.displayName });
      if (personal) throw new PasswordRejected(personal);
      await user.update({ passwordHash: hash, passwordChangedAt: new Date() }, { transaction });
      await revokeSessions(user.id, undefined, transaction);
      await audit(user.id, "user.password-reset", "user", user.id, {}, transaction);
      return { ok: true as const };
    })
    .catch((e) => {
      // A rejected password rolls the token back too: the rider can try again with the same link.
      if (e instanceof PasswordRejected) return { ok: false as const, error: e.message, field: "password" };
      throw e;
    });
}
class PasswordRejected extends Error {}

/** Change the password of the signed-in user; optionally end their other sessions (ASVS V3.3.3). Rotates the current one. */
export async function changePassword(
  request: Request,
  current: string,
  next: string,
  signOutOthers: boolean,
): Promise<{ ok: true; setCookie: string } | { ok: false; errors: Record<string, string>; status?: number; retryAfterS?: number }> {
  const s = await currentSession(request);
  if (!s) return { ok: false, errors: { form: "Sign in first." } };
  const user = await User.findByPk(s.user.id, { rejectOnEmpty: true });
  const matches = await orBusy(verifyPassword(current, user.passwordHash));
  if (matches instanceof HashingBusy) return busy(matches, {});
  if (!matches) return { ok: false, errors: { current: "That is not your current password." } };
  const problem = passwordProblem(next, { email: user.email, displayName: user.displayName });
  if (problem) return { ok: false, errors: { password: problem } };
  const hash = await orBusy(hashPassword(next));
  if (hash instanceof HashingBusy) return busy(hash, {});
  const setCookie = await sequelize.transaction(async (transaction) => {
    await user.update({ passwordHash: hash, passwordChangedAt: new Date() }, { transaction });
    // Other devices stay signed in unless asked; this one always gets a fresh session id (startSession ends the old).
    if (signOutOthers) await revokeSessions(user.id, s.sessionId, transaction);
    await audit(user.id, "user.password-change", "user", user.id, { signOutOthers }, transaction);
    return startSession(request, user.id, transaction);
  });
  return { ok: true, setCookie };
}
