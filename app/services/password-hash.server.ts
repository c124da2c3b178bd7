/** Password hashing on its own (no database imports), shared by the auth service and the demo seeder. */
import { createHash } from "node:crypto";
import bcrypt from "bcryptjs";

/** bcrypt work factor: OWASP ASVS V2.4.4 floor 10; 12 measured at ≈ 245 ms here (QUALITY P7: highest with p50 ≤ 250 ms). */
export const BCRYPT_COST = Math.max(10, Number(process.env.BCRYPT_COST ?? 12));

// SHA-256 first, so passwords past bcrypt's 72-byte limit are neither truncated nor rejected (ASVS V2.4.4);
// base64 keeps NUL bytes out of bcrypt's input.
const prehash = (password: string) => createHash("sha256").update(password.normalize("NFC"), "utf8").digest("base64");

/** Hash a password for storage. */
export function hashPassword(password: string, cost = BCRYPT_COST): Promise<string> {
  return bcrypt.hash(prehash(password), cost);
}

/** Check a password against a stored hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(prehash(password), hash);
}
