import { describe, expect, it } from "vitest";
import { renderNotes } from "~/services/markdown.server";

// Payloads from the OWASP XSS Filter Evasion Cheat Sheet (OWASP/CheatSheetSeries), hosts replaced with example.invalid.
const PAYLOADS = [
  `<SCRIPT SRC=https://example.invalid/xss.js></SCRIPT>`,
  `javascript:/*--></title></style></textarea></script></xmp><svg/onload='+/"\`/+/onmouseover=1/+/[*/[]/+alert(42);//'>`,
  `<a onmouseover="alert(document.cookie)">xxs link</a>`,
  `<IMG """><SCRIPT>alert("XSS")</SCRIPT>">`,
  `<IMG SRC=javascript:alert(String.fromCharCode(88,83,83))>`,
  `<IMG SRC=/ onerror="alert(String.fromCharCode(88,83,83))"></img>`,
  `<IMG SRC=&#106;&#97;&#118;&#97;&#115;&#99;&#114;&#105;&#112;&#116;&#58;&#97;&#108;&#101;&#114;&#116;&#40;&#39;&#88;&#83;&#83;&#39;&#41;>`,
  `<IMG SRC="jav&#x09;ascript:alert('XSS');">`,
  `<SCRIPT/XSS SRC="https://example.invalid/xss.js"></SCRIPT>`,
  `<<SCRIPT>alert("XSS");//\\<</SCRIPT>`,
  `<svg/onload=alert('XSS')>`,
  `<BODY ONLOAD=alert('XSS')>`,
  `<IFRAME SRC="javascript:alert('XSS');"></IFRAME>`,
  `<META HTTP-EQUIV="refresh" CONTENT="0;url=data:text/html base64,PHNjcmlwdD5hbGVydCgnWFNTJyk8L3NjcmlwdD4K">`,
  `<DIV STYLE="background-image: url(javascript:alert('XSS'))">`,
  `<IMG STYLE="xss:expr/*XSS*/ession(alert('XSS'))">`,
  `<BASE HREF="javascript:alert('XSS');//">`,
  `</TITLE><SCRIPT>alert("XSS");</SCRIPT>`,
  `[x](javascript:alert(1))`,
  `[x](data:text/html,<script>alert(1)</script>)`,
  `<form action="javascript:alert(1)"><button formaction="javascript:alert(1)">x</button></form>`,
];

describe("notes: marked then sanitize-html", () => {
  it.each(PAYLOADS)("leaves nothing executable in %s", (payload) => {
    const html = renderNotes(payload);
    expect(html).not.toMatch(/<\s*(script|iframe|frame|object|embed|base|meta|link|style|svg|form|button|img|body)\b/i);
    expect(html).not.toMatch(/\son[a-z]+\s*=/i);
    expect(html).not.toMatch(/(href|src|action|formaction)\s*=\s*"?\s*(javascript|vbscript|data):/i);
    expect(html).not.toMatch(/expression\(|url\(javascript/i);
  });

  it("keeps ordinary Markdown and marks links noopener", () => {
    const html = renderNotes("Check **cavity 3** first. See [the forum](https://example.invalid/t/1).");
    expect(html).toContain("<strong>cavity 3</strong>");
    expect(html).toContain('href="https://example.invalid/t/1"');
    expect(html).toContain('rel="noopener noreferrer nofollow"');
  });
});
