/**
 * The password policy (OWASP ASVS 4.0.3 V2.1): at least 12 characters, at most 128, any printable Unicode;
 * not on a common-password list; not made of the account's own address or name. Lengths count code points,
 * so twelve emoji are twelve characters.
 */

export const MIN_PASSWORD_CHARS = 12; // ASVS V2.1.1
export const MAX_PASSWORD_CHARS = 128; // ASVS V2.1.2: ≥ 64 permitted, > 128 denied

// A small list of passwords that top every leaked-password ranking, with the usual 12-character padding
// (common practice: "123456789012", "password1234"). A production deployment would add a breached-password check.
const COMMON = [
  "123456789012",
  "1234567890123",
  "12345678901234",
  "123456123456",
  "111111111111",
  "000000000000",
  "123123123123",
  "password1234",
  "password12345",
  "password123!",
  "passwordpassword",
  "p@ssw0rd1234",
  "passw0rd1234",
  "password1!",
  "qwertyuiop12",
  "qwertyuiopas",
  "qwerty123456",
  "qwertyqwerty",
  "1q2w3e4r5t6y",
  "1qaz2wsx3edc",
  "asdfghjkl123",
  "zxcvbnm12345",
  "iloveyou1234",
  "iloveyouiloveyou",
  "letmein12345",
  "letmeinletmein",
  "welcome12345",
  "welcome123456",
  "changeme1234",
  "administrator",
  "admin1234567",
  "adminadmin12",
  "monkey123456",
  "dragon123456",
  "football1234",
  "baseball1234",
  "sunshine1234",
  "princess1234",
  "trustno11234",
  "superman1234",
  "starwars1234",
  "whatever1234",
  "abcdefghijkl",
  "abc123abc123",
  "aaaaaaaaaaaa",
  "motorcycle12",
  "motorbike123",
  "harley123456",
  "loomlore1234",
];
const COMMON_SET = new Set(COMMON);

/** Number of characters as a person counts them (code points, not UTF-16 units). */
export function passwordLength(password: string): number {
  return [...password].length;
}

/** Why a password is not acceptable, as a sentence for the form; null when it is fine. */
export function passwordProblem(password: string, who: { email?: string; displayName?: string } = {}): string | null {
  const n = passwordLength(password);
  if (n < MIN_PASSWORD_CHARS) return `Use at least ${MIN_PASSWORD_CHARS} characters (a few words you will remember work well).`;
  if (n > MAX_PASSWORD_CHARS) return `Use at most ${MAX_PASSWORD_CHARS} characters.`;
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(password)) return "Use printable characters only.";
  const folded = password.toLowerCase().normalize("NFKC");
  if (COMMON_SET.has(folded) || /^(.)\1+$/u.test(folded)) return "That password is one of the most common ones; choose something less guessable.";
  const local = who.email?.split("@")[0]?.toLowerCase();
  if (local && local.length >= 4 && folded.includes(local)) return "Don't build the password from your e-mail address.";
  const name = who.displayName?.toLowerCase().replace(/\s+/g, "");
  if (name && name.length >= 4 && folded.replace(/\s+/g, "").includes(name)) return "Don't build the password from your name.";
  return null;
}
