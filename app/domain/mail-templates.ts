/**
 * The e-mails Loomlore sends, as pure functions: each returns a subject, a plain-text body and the same message in HTML.
 * Every interpolated value is HTML-escaped; subjects are single lines (header injection is also refused by the outbox).
 * Links must be absolute http(s) URLs (mail is read outside the site). Each message ends with a footer saying why the
 * reader got it. Nothing here says whether an address has an account beyond the fact that a message arrived.
 */

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export type ReviewOutcome = "published" | "returned" | "declined";

const SITE = "Loomlore";

/** What stands in for a single-use token once its message is delivered, and on the admin page. */
export const REDACTED = "[redacted]";

/**
 * A message with its single-use links disarmed: the value of every `token` query parameter replaced. Kept outbox rows
 * and the admin page then hold no live reset or verify link (a backup or an admin session must not be enough to take
 * an account over). Handles the text and the HTML forms (`&amp;token=` included).
 */
export function redactTokens(message: string): string {
  return message.replace(/([?&](?:amp;)?token=)[^&\s"'<>#]+/gi, `$1${REDACTED}`);
}

/** Escape for HTML text and double-quoted attribute values. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/** One line, trimmed, control characters (CR/LF included) turned into spaces; cut to `max` characters. */
function oneLine(value: string, max = 120): string {
  const line = value
    // eslint-disable-next-line no-control-regex -- control characters are what this checks for
    .replace(/[\u0000-\u001f\u007f]+/g, " ")
    .replace(/\s+/g, " ")
    .trim();
  return line.length > max ? `${line.slice(0, max - 1).trimEnd()}…` : line;
}

function checkLink(link: string): string {
  let url: URL;
  try {
    url = new URL(link);
  } catch {
    throw new Error("mail link must be an absolute URL");
  }
  if (url.protocol !== "https:" && url.protocol !== "http:") throw new Error("mail link must be http(s)");
  return url.href;
}

interface Layout {
  subject: string;
  /** Paragraphs before the link (plain text; escaped for HTML). */
  intro: string[];
  link: string;
  linkLabel: string;
  /** Paragraphs after the link. */
  after: string[];
  /** Why the reader got this message; completes "You are getting this because …". */
  because: string;
}

function compose({ subject, intro, link, linkLabel, after, because }: Layout): MailContent {
  const href = checkLink(link);
  const footer = `You are getting this because ${because} on ${SITE}. If it wasn't you, ignore it.`;
  const text = `${[...intro, `${linkLabel}:\n${href}`, ...after].join("\n\n")}\n\n-- \n${footer}\n`;
  const p = (t: string) => `<p style="margin:0 0 16px">${escapeHtml(t).replace(/\n/g, "<br>")}</p>`;
  const html = `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;padding:24px;background:#f6f4ef;color:#222;font:16px/1.5 sans-serif">
<div style="max-width:560px;margin:0 auto;background:#fff;padding:24px;border-radius:6px">
${intro.map(p).join("\n")}
<p style="margin:0 0 16px"><a href="${escapeHtml(href)}" style="display:inline-block;padding:10px 16px;background:#1d4e89;color:#fff;text-decoration:none;border-radius:4px">${escapeHtml(linkLabel)}</a></p>
<p style="margin:0 0 16px;font-size:14px;color:#555">If the button does not work, paste this address into your browser:<br><a href="${escapeHtml(href)}" style="color:#1d4e89;word-break:break-all">${escapeHtml(href)}</a></p>
${after.map(p).join("\n")}
<hr style="border:0;border-top:1px solid #ddd;margin:24px 0 12px">
<p style="margin:0;font-size:13px;color:#666">${escapeHtml(footer)}</p>
</div>
</body>
</html>
`;
  return { subject: oneLine(subject, 160), text, html };
}

/** After joining: confirm that the address belongs to the person who joined. */
export function verifyEmailMessage({ displayName, link }: { displayName: string; link: string }): MailContent {
  return compose({
    subject: `Confirm your e-mail address for ${SITE}`,
    intro: [
      `Hello ${oneLine(displayName, 80)},`,
      `Thanks for joining ${SITE}. Please confirm that this address is yours, so we can send you review results and let you reset your password if you ever need to.`,
    ],
    link,
    linkLabel: "Confirm this address",
    after: ["The link works once. If it has run out, sign in and ask for a new one."],
    because: "someone joined with this address",
  });
}

/** A password reset was asked for this address. Worded the same whoever asked, and says nothing about any account. */
export function resetPasswordMessage({ link }: { link: string }): MailContent {
  return compose({
    subject: `Password reset requested on ${SITE}`,
    intro: [
      `Someone asked to reset the password for this address on ${SITE}.`,
      "To choose a new password, open the link below. It works once and only for a short while.",
    ],
    link,
    linkLabel: "Choose a new password",
    after: ["If you did not ask for this, you need not do anything: nothing changes unless the link is used."],
    because: "someone asked for a password reset for this address",
  });
}

/**
 * Sent instead of a confirmation when someone tries to join with an address that is already signed up, so the join form
 * answers the same whether or not the address is known; only the owner of the mailbox learns which it was.
 */
export function accountExistsMessage({ link }: { link: string }): MailContent {
  return compose({
    subject: `Joining ${SITE} with this address`,
    intro: [
      `Someone tried to join ${SITE} with this address, but it is already signed up, so nothing new was created.`,
      "If it was you, just sign in. If you have forgotten your password, the sign-in page lets you choose a new one.",
    ],
    link,
    linkLabel: `Sign in to ${SITE}`,
    after: ["If it was not you, you need not do anything: nothing has changed."],
    because: "someone tried to join with this address",
  });
}

const OUTCOMES: Record<ReviewOutcome, { subject: (card: string) => string; lead: (card: string) => string; label: string; next: string }> = {
  published: {
    subject: (card) => `Your change to ${card} is published`,
    lead: (card) =>
      `A moderator has reviewed your change to ${card} and published it. Everyone reading the card now sees it. Thank you for improving the library.`,
    label: "See the card",
    next: "",
  },
  returned: {
    subject: (card) => `Your change to ${card} needs another look`,
    lead: (card) => `A moderator has reviewed your change to ${card} and sent it back to you with a question or a request. Nothing is published yet.`,
    label: "Open your change",
    next: "Edit your change and send it again when it is ready.",
  },
  declined: {
    subject: (card) => `Your change to ${card} was not accepted`,
    lead: (card) => `A moderator has reviewed your change to ${card} and decided not to publish it. The card stays as it was.`,
    label: "See the decision",
    next: "If you have a source that settles the question, you are welcome to propose the change again with it.",
  },
};

/** A moderator decided on a contribution: published, returned for changes, or declined; with the moderator's note. */
export function reviewOutcomeMessage({
  displayName,
  cardName,
  outcome,
  note,
  link,
}: {
  displayName: string;
  cardName: string;
  outcome: ReviewOutcome;
  note?: string | null;
  link: string;
}): MailContent {
  const o = OUTCOMES[outcome];
  if (!o) throw new Error(`unknown review outcome ${JSON.stringify(outcome)}`);
  const card = oneLine(cardName, 80);
  const trimmedNote = (note ?? "").replace(/\r\n?/g, "\n").trim();
  return compose({
    subject: o.subject(card),
    intro: [`Hello ${oneLine(displayName, 80)},`, o.lead(card), ...(trimmedNote ? [`The moderator's note:\n${trimmedNote}`] : [])],
    link,
    linkLabel: o.label,
    after: o.next ? [o.next] : [],
    because: "you sent a change to a card",
  });
}
