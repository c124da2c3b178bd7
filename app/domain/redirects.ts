/**
 * Where a `next` parameter may send a signed-in browser. Pure: the caller gives our own origin (APP_URL).
 *
 * ASVS V5.1.5 and the OWASP "Unvalidated Redirects and Forwards" cheat sheet: accept only local targets, judged the way the browser will
 * resolve them. A browser drops tabs and newlines from a URL (WHATWG URL: "remove all ASCII tab or newline"), so
 * `/\t/evil.example` becomes `//evil.example`, another origin; and a backslash counts as a slash. So a target is
 * resolved with the URL parser against our origin and must keep it, and any control or whitespace character refuses
 * the request outright (400): no legitimate link of ours carries one, and Node refuses to put them in a header.
 */
export type NextTarget = { ok: true; to: string } | { ok: false; reason: string };

export const DEFAULT_NEXT = "/garage";

// C0 controls, DEL, C1 controls, and every Unicode space (\s covers U+0009–U+000D, U+0020, U+00A0, U+1680,
// U+2000–U+200A, U+2028, U+2029, U+202F, U+205F, U+3000, U+FEFF).
// eslint-disable-next-line no-control-regex -- control characters are what this checks for
const CONTROL_OR_SPACE = /[\u0000-\u001f\u007f-\u009f\s]/u;

export function nextTarget(next: string | null | undefined, origin: string): NextTarget {
  if (next === null || next === undefined || next === "") return { ok: true, to: DEFAULT_NEXT };
  if (CONTROL_OR_SPACE.test(next)) return { ok: false, reason: "The address to go on to holds control or space characters." };
  // Only a path on this site: "/x", never "//host", "/\host" or a scheme.
  if (!next.startsWith("/") || next.startsWith("//") || next.startsWith("/\\")) return { ok: true, to: DEFAULT_NEXT };
  let base: URL;
  let u: URL;
  try {
    base = new URL(origin);
    u = new URL(next, base);
  } catch {
    return { ok: true, to: DEFAULT_NEXT };
  }
  if (u.origin !== base.origin) return { ok: true, to: DEFAULT_NEXT };
  // The parser's own serialisation: percent-encoded, so any non-ASCII character is safe in a Location header. Dot
  // segments can leave a path that begins "//" ("/..//evil.example"), which a browser reads as another host: the
  // target must resolve to our origin once more, as the browser will resolve it.
  const to = `${u.pathname}${u.search}${u.hash}`;
  if (to.startsWith("//") || new URL(to, base).origin !== base.origin) return { ok: true, to: DEFAULT_NEXT };
  return { ok: true, to };
}
