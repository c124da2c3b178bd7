import { describe, expect, it } from "vitest";
import { accountExistsMessage, escapeHtml, resetPasswordMessage, reviewOutcomeMessage, verifyEmailMessage, type MailContent } from "~/domain/mail-templates";

const link = "https://loomlore.example/verify?token=abc&x=1";
const hostile = `<script>alert("x")</script> & 'quotes'`;

/** The footer every message carries, in both bodies. */
function expectFooter(msg: MailContent, because: RegExp) {
  for (const body of [msg.text, msg.html]) {
    expect(body).toMatch(/You are getting this because .+ on Loomlore\. If it wasn(?:'|&#39;)t you, ignore it\./);
    expect(body).toMatch(because);
  }
}

/** Plain and HTML versions both carry the link; the HTML one escapes it (the & in the query). */
function expectLink(msg: MailContent, href = link) {
  expect(msg.text).toContain(href);
  expect(msg.html).toContain(`href="${escapeHtml(href)}"`);
  expect(msg.html).not.toContain(`href="${href}"`);
}

function expectWellFormed(msg: MailContent) {
  expect(msg.subject).not.toMatch(/[\r\n]/);
  expect(msg.subject.length).toBeGreaterThan(0);
  expect(msg.html.startsWith("<!doctype html>")).toBe(true);
  expect(msg.html).toContain('<html lang="en">');
  expect(msg.text.endsWith("\n")).toBe(true);
  expect(msg.text).not.toMatch(/<[a-z]/i); // the plain version is plain
}

describe("escapeHtml", () => {
  it("escapes the five characters that matter in text and attributes", () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
  });
});

describe("verifyEmailMessage", () => {
  it("greets by name, carries the link in both versions, explains why it came", () => {
    const msg = verifyEmailMessage({ displayName: "Ada", link });
    expectWellFormed(msg);
    expect(msg.subject).toBe("Confirm your e-mail address for Loomlore");
    expect(msg.text).toContain("Hello Ada,");
    expect(msg.html).toContain("Hello Ada,");
    expectLink(msg);
    expectFooter(msg, /someone joined with this address/);
  });

  it("escapes the display name in HTML and keeps it on one line", () => {
    const msg = verifyEmailMessage({ displayName: `${hostile}\r\nBcc: x@example.invalid`, link });
    expect(msg.html).not.toContain("<script>");
    expect(msg.html).toContain("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;quotes&#39;");
    expect(msg.text).toContain(`Hello ${hostile} Bcc: x@example.invalid,`);
  });
});

describe("resetPasswordMessage", () => {
  it("says someone asked for this address, and nothing about an account", () => {
    const msg = resetPasswordMessage({ link });
    expectWellFormed(msg);
    expect(msg.text).toContain("Someone asked to reset the password for this address on Loomlore.");
    expectLink(msg);
    expectFooter(msg, /someone asked for a password reset for this address/);
    for (const body of [msg.subject, msg.text, msg.html]) {
      expect(body).not.toMatch(/\baccount\b|registered|signed up|no user|not found|unknown/i);
      expect(body).not.toMatch(/Hello /); // no name: the same words whoever asked
    }
  });

  it("is the same message every time (only the link varies)", () => {
    const a = resetPasswordMessage({ link: "https://loomlore.example/reset?t=1" });
    const b = resetPasswordMessage({ link: "https://loomlore.example/reset?t=2" });
    expect(a.subject).toBe(b.subject);
    expect(a.text.replace("t=1", "t=2")).toBe(b.text);
  });
});

describe("accountExistsMessage", () => {
  it("tells the owner someone tried to join with their address and offers a reset", () => {
    const msg = accountExistsMessage({ link });
    expectWellFormed(msg);
    expect(msg.text).toMatch(/Someone tried to join Loomlore with this address/);
    expect(msg.text).toMatch(/nothing new was created/);
    expect(msg.text).toMatch(/sign in/i);
    expectLink(msg);
    expectFooter(msg, /someone tried to join with this address/);
  });
});

describe("reviewOutcomeMessage", () => {
  const base = { displayName: "Ada", cardName: "RX750 ignition unit plug", note: "Checked against the wiring sheet.", link };

  it.for([
    { outcome: "published", subject: "Your change to RX750 ignition unit plug is published", words: /published it/ },
    { outcome: "returned", subject: "Your change to RX750 ignition unit plug needs another look", words: /sent it back/ },
    { outcome: "declined", subject: "Your change to RX750 ignition unit plug was not accepted", words: /decided not to publish/ },
  ] as const)("$outcome: its own subject and wording, the note, the link and the footer", ({ outcome, subject, words }) => {
    const msg = reviewOutcomeMessage({ ...base, outcome });
    expectWellFormed(msg);
    expect(msg.subject).toBe(subject);
    expect(msg.text).toMatch(words);
    expect(msg.html).toMatch(words);
    expect(msg.text).toContain("The moderator's note:\nChecked against the wiring sheet.");
    expect(msg.html).toContain("The moderator&#39;s note:<br>Checked against the wiring sheet.");
    expectLink(msg);
    expectFooter(msg, /you sent a change to a card/);
  });

  it("escapes card name and note in HTML; the subject stays one line however the card is named", () => {
    const msg = reviewOutcomeMessage({ ...base, cardName: `Plug\r\nBcc: x@example.invalid ${hostile}`, note: `${hostile}\nsecond line`, outcome: "returned" });
    expect(msg.subject).not.toMatch(/[\r\n]/);
    expect(msg.subject).toContain("Plug Bcc: x@example.invalid");
    expect(msg.html).not.toContain("<script>");
    expect(msg.html).toContain("&lt;script&gt;");
    expect(msg.html).toContain("second line");
    expect(msg.text).toContain(`${hostile}\nsecond line`);
  });

  it("leaves the note out when there is none", () => {
    for (const note of [null, undefined, "", "   "]) {
      const msg = reviewOutcomeMessage({ ...base, note, outcome: "published" });
      expect(msg.text).not.toContain("note");
    }
  });

  it("shortens a very long card name in the subject", () => {
    const msg = reviewOutcomeMessage({ ...base, cardName: "x".repeat(500), outcome: "published" });
    expect(msg.subject.length).toBeLessThanOrEqual(160);
  });
});

describe("links", () => {
  it("must be absolute http(s) URLs", () => {
    for (const bad of ["javascript:alert(1)", "/verify?token=abc", "data:text/html,hi", "not a url"]) {
      expect(() => verifyEmailMessage({ displayName: "Ada", link: bad }), bad).toThrow(/mail link/);
      expect(() => resetPasswordMessage({ link: bad }), bad).toThrow(/mail link/);
    }
  });

  it("a quote in the link cannot break out of the attribute", () => {
    const msg = resetPasswordMessage({ link: 'https://loomlore.example/r?t="><script>' });
    expect(msg.html).not.toContain("<script>");
    expect(msg.html).not.toMatch(/href="[^"]*"></);
  });
});

// A delivered message keeps no live single-use link (OWASP ASVS 4.0.3 V2.5.x: reset tokens are secrets; a kept copy is
// as good as the token). Checked on the texts our own templates produce.
describe("redactTokens", () => {
  const link = "https://loomlore.example/reset?token=Q2x0d0VmTkF2bFpRZ2lHa0x3_-9";
  it("replaces the token in the text and the HTML of a real message, and nothing else", async () => {
    const { resetPasswordMessage, redactTokens, REDACTED } = await import("~/domain/mail-templates");
    const m = resetPasswordMessage({ link });
    expect(m.text).toContain("Q2x0d0VmTkF2bFpRZ2lHa0x3_-9");
    for (const part of [m.text, m.html]) {
      const r = redactTokens(part);
      expect(r).not.toContain("Q2x0d0VmTkF2bFpRZ2lHa0x3_-9");
      expect(r).toContain(`token=${REDACTED}`);
    }
    expect(redactTokens("see https://x.example/verify?a=1&amp;token=abc#top and /search?q=token")).toBe(
      `see https://x.example/verify?a=1&amp;token=${REDACTED}#top and /search?q=token`,
    );
    expect(redactTokens("no links here")).toBe("no links here");
  });
});
