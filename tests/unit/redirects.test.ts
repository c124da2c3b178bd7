import { describe, expect, it } from "vitest";
import { DEFAULT_NEXT, nextTarget } from "~/domain/redirects";

// Source: OWASP Unvalidated Redirects and Forwards Cheat Sheet (allow local targets only); WHATWG URL Standard (a
// parser strips ASCII tab and newline and treats "\" as "/" in special schemes). Judged against Node's own WHATWG URL.
const ORIGIN = "https://loomlore.example";
const landsOn = (to: string) => new URL(to, ORIGIN);

describe("nextTarget: a next parameter never leaves our origin", () => {
  it("keeps a local path, query and fragment, and encodes what needs it", () => {
    expect(nextTarget("/account", ORIGIN)).toEqual({ ok: true, to: "/account" });
    expect(nextTarget("/search?q=W/R#pins", ORIGIN)).toEqual({ ok: true, to: "/search?q=W/R#pins" });
    expect(nextTarget("/search?q=ü", ORIGIN)).toEqual({ ok: true, to: "/search?q=%C3%BC" });
    // U+3002 (ideographic full stop) reads as "." in a host name, but here it stays inside our path.
    const r = nextTarget("/\u3002evil.example", ORIGIN);
    expect(r.ok && landsOn(r.to).origin).toBe(ORIGIN);
  });

  it("sends anything that is not a path on this site to the garage", () => {
    for (const bad of [
      "//evil.example",
      "/\\evil.example",
      "https://evil.example/",
      "evil.example",
      "javascript:alert(1)",
      "\u3002evil.example",
      "/..//evil.example",
    ]) {
      const r = nextTarget(bad, ORIGIN);
      expect(r.ok, bad).toBe(true);
      if (r.ok) expect(landsOn(r.to).origin, bad).toBe(ORIGIN);
    }
    expect(nextTarget("//evil.example", ORIGIN)).toEqual({ ok: true, to: DEFAULT_NEXT });
    expect(nextTarget(null, ORIGIN)).toEqual({ ok: true, to: DEFAULT_NEXT });
  });

  it("refuses control and space characters (a browser drops the tab in /\\t/evil.example and lands on //evil.example)", () => {
    // The browser's view: Node's WHATWG parser strips the tab, proving the attack is real.
    expect(new URL("/\t/evil.example", ORIGIN).origin).toBe("https://evil.example");
    for (const bad of [
      "/\t/evil.example",
      "/\n/evil.example",
      "/\r\n/x",
      "/\u000b/x",
      "/\u000c/x",
      "/\u0000",
      "/\u007f",
      "/\u0085",
      "/ x",
      "/\u00a0x",
      "/\u3000x",
      "/\u2028x",
      "/\ufeffx",
    ]) {
      expect(nextTarget(bad, ORIGIN).ok, JSON.stringify(bad)).toBe(false);
    }
  });
});
