/** Anti-automation limits, checked before any bcrypt work (QUALITY P7, S9). */
import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";

// ASVS 4.0.3 V2.2.1: no more than 100 failed attempts per hour on a single account, and soft lock-outs that an attacker
// cannot turn against the owner (OWASP Authentication Cheat Sheet, "account lockout"). So: a tight limit per account
// and address (an attacker's own address is stopped after 40 tries), and the account-wide 100 per hour only for
// addresses the account has not signed in from: the owner on their usual address still gets in.
const perAccountAddress = new RateLimiterMemory({ keyPrefix: "login-account-address", points: 40, duration: 3600 });
const perAccount = new RateLimiterMemory({ keyPrefix: "login-account", points: 100, duration: 3600 });
/** Addresses each account has signed in from lately (in memory, as the limiters are; bounded). */
const knownAddresses = new Map<string, Map<string, number>>();
const KNOWN_FOR_MS = 30 * 86400_000;
const KNOWN_MAX_ACCOUNTS = 50_000;
const KNOWN_MAX_PER_ACCOUNT = 20;
const isKnown = (email: string, address: string) => (knownAddresses.get(email)?.get(address) ?? 0) > Date.now() - KNOWN_FOR_MS;
// Per address: generous enough that one busy workshop behind one address is not locked out.
const perAddress = new RateLimiterMemory({ keyPrefix: "login-address", points: 600, duration: 3600 });
// Join and reset requests send mail: keep them from being used to flood inboxes.
const mailPerAddress = new RateLimiterMemory({ keyPrefix: "mail-address", points: 30, duration: 3600 });
const mailPerRecipient = new RateLimiterMemory({ keyPrefix: "mail-recipient", points: 5, duration: 3600 });

export type Limited = { ok: true } | { ok: false; retryAfterS: number };

async function take(limiter: RateLimiterMemory, key: string): Promise<Limited> {
  try {
    await limiter.consume(key);
    return { ok: true };
  } catch (e) {
    if (e instanceof RateLimiterRes) return { ok: false, retryAfterS: Math.max(1, Math.ceil(e.msBeforeNext / 1000)) };
    throw e;
  }
}

/** One sign-in attempt for an account from an address: the address's, the pair's and (from a new address) the account's limits. */
export async function takeLoginAttempt(email: string, address: string): Promise<Limited> {
  const a = await take(perAddress, address);
  if (!a.ok) return a;
  const pair = await take(perAccountAddress, `${email}|${address}`);
  if (!pair.ok) return pair;
  if (isKnown(email, address)) return { ok: true };
  return take(perAccount, email);
}

/** A successful sign-in: the pair's count is cleared and the address is remembered for the account. */
export async function loginSucceeded(email: string, address: string) {
  await perAccountAddress.delete(`${email}|${address}`);
  let mine = knownAddresses.get(email);
  if (!mine) {
    if (knownAddresses.size >= KNOWN_MAX_ACCOUNTS) knownAddresses.delete(knownAddresses.keys().next().value!);
    knownAddresses.set(email, (mine = new Map()));
  }
  mine.delete(address);
  mine.set(address, Date.now());
  if (mine.size > KNOWN_MAX_PER_ACCOUNT) mine.delete(mine.keys().next().value!);
}

// Password resets: per address (made-up tokens in bulk) and per token (one link tried over and over).
const resetPerAddress = new RateLimiterMemory({ keyPrefix: "reset-address", points: 30, duration: 3600 });
const resetPerToken = new RateLimiterMemory({ keyPrefix: "reset-token", points: 10, duration: 3600 });

/** One reset attempt: both limits must allow it (checked before the token is looked up, and long before any bcrypt). */
export async function takeResetAttempt(token: string, address: string): Promise<Limited> {
  const a = await take(resetPerAddress, address);
  if (!a.ok) return a;
  return take(resetPerToken, token.slice(0, 200));
}

// Other actions a signed-in user can repeat (ASVS V11.1.4 anti-automation): each gets its own hourly budget per user.
const ACTION_LIMITS = {
  "password-check": 10, // the current-password check on /account: a guessing oracle otherwise
  report: 20, // mistake reports on a card
  "bike-check": 60,
  "garage-add": 60,
} as const;
export type LimitedAction = keyof typeof ACTION_LIMITS;
const actionLimiters = new Map<LimitedAction, RateLimiterMemory>();

/** One use of a limited action by a user; a refusal carries Retry-After seconds. */
export async function takeAction(action: LimitedAction, userId: number): Promise<Limited> {
  let l = actionLimiters.get(action);
  if (!l) actionLimiters.set(action, (l = new RateLimiterMemory({ keyPrefix: `action-${action}`, points: ACTION_LIMITS[action], duration: 3600 })));
  return take(l, String(userId));
}

/** One mail-sending request (join, forgot, resend) from an address to a recipient. */
export async function takeMailRequest(address: string, recipient: string): Promise<Limited> {
  const a = await take(mailPerAddress, address);
  if (!a.ok) return a;
  return take(mailPerRecipient, recipient);
}

// Photo uploads per user per minute (ASVS 4.0.3 V11.1.4, anti-automation on uploads); the count comes from PHOTO_LIMITS.
let uploadsPerUser: RateLimiterMemory | null = null;

/** One photo upload request by a user; `perMinute` is fixed by the first call (photos.server.ts passes its limit). */
export async function takeUpload(userId: number, perMinute: number): Promise<Limited> {
  uploadsPerUser ??= new RateLimiterMemory({ keyPrefix: "photo-upload", points: perMinute, duration: 60 });
  return take(uploadsPerUser, String(userId));
}
