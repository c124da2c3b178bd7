/** Anti-automation limits, checked before any bcrypt work (QUALITY P7, S9). */
import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";

// ASVS 4.0.3 V2.2.1: no more than 100 failed attempts per hour on a single account.
const perAccount = new RateLimiterMemory({ keyPrefix: "login-account", points: 100, duration: 3600 });
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

/** One sign-in attempt for an account from an address: both limits must allow it. */
export async function takeLoginAttempt(email: string, address: string): Promise<Limited> {
  const a = await take(perAddress, address);
  if (!a.ok) return a;
  return take(perAccount, email);
}

/** A successful sign-in clears the account's count (the owner is not punished for earlier typos). */
export async function clearLoginAttempts(email: string) {
  await perAccount.delete(email);
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
