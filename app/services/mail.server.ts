/**
 * Outgoing mail through an outbox (table mail_outbox). A message is written in the same transaction as the action that
 * causes it (enqueueMail) and delivered later by the worker (deliverDueMail, looped by startMailWorker):
 *
 *   queued ──claim (lease 60 s)──▶ sending ──250──▶ sent
 *     ▲                              │ 4xx, no answer, connection lost: attempts+1, back off 1 m, 5 m, 30 m, 2 h, 6 h, then 12 h
 *     └──────────────────────────────┤ (after 4 days: failed, flagged in audit_log)
 *                                    └─ 5xx on the envelope or the message: failed at once, flagged, never retried
 *
 * A sender that dies mid-send leaves its rows in `sending`; once the lease has expired they are claimed again, so nothing
 * is lost. Every try of a row carries the row's stored Message-ID, so a resend after a lost reply (the relay took the
 * message but we never heard 250) is recognisable downstream as the same message.
 *
 * Config: SMTP_URL (default smtp://127.0.0.1:2525, the stand-in from mail/server.ts; smtps:// and user:pass@ work as
 * nodemailer reads them), MAIL_FROM (default "Loomlore <no-reply@loomlore.invalid>"), MAIL_TIMEOUT_MS (connection,
 * greeting and socket timeouts, default 5000), MAIL_POLL_MS (worker interval, default 2000).
 */
import { randomUUID } from "node:crypto";
import nodemailer, { type Transporter } from "nodemailer";
import type SMTPTransport from "nodemailer/lib/smtp-transport";
import { Op, Transaction, type InferAttributes } from "sequelize";
import { sequelize } from "~db/index.server.ts";
import { AuditLog, MailOutbox } from "~db/models/index.ts";
import { redactTokens } from "~/domain/mail-templates";
import { env } from "~/env.server";

export interface OutgoingMail {
  kind: string;
  /** One bare address (no display name, no list). */
  to: string;
  subject: string;
  text: string;
  html: string;
}

export interface DeliveryCounts {
  sent: number;
  retried: number;
  failed: number;
}

const LEASE_MS = 60_000;
const BATCH = 10;
const GIVE_UP_AFTER_MS = 4 * 24 * 3600_000;
const MINUTE = 60_000;
/** Wait before try n+1 after n failed tries; the last entry repeats. */
export const RETRY_DELAYS_MS = [1 * MINUTE, 5 * MINUTE, 30 * MINUTE, 120 * MINUTE, 360 * MINUTE, 720 * MINUTE] as const;
const HEALTH_TIMEOUT_MS = 1_500;

// Read at each use (not copied at load), so a test may change a setting between cases.
const smtpUrl = () => env.SMTP_URL;
const mailFrom = () => env.MAIL_FROM;
const timeoutMs = () => env.MAIL_TIMEOUT_MS;

function isLoopback(hostname: string): boolean {
  return ["127.0.0.1", "localhost", "::1", "[::1]"].includes(hostname.toLowerCase());
}

function transportOptions(url: string, timeout: number): SMTPTransport.Options {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new Error("SMTP_URL is not a URL"); // never echo it: it may hold a password
  }
  return {
    url,
    connectionTimeout: timeout,
    greetingTimeout: timeout,
    socketTimeout: timeout,
    dnsTimeout: timeout,
    // The local stand-in has no TLS: do not try STARTTLS on loopback. A real relay keeps nodemailer's defaults
    // (STARTTLS when offered, smtps:// for implicit TLS; add ?requireTLS=true to the URL to insist).
    ...(parsed.protocol === "smtp:" && isLoopback(parsed.hostname) ? { secure: false, ignoreTLS: true } : {}),
  };
}

let cached: { key: string; transport: Transporter<SMTPTransport.SentMessageInfo> } | null = null;

/** One transport per configuration (tests may point SMTP_URL elsewhere between runs). */
function transport() {
  const key = `${smtpUrl()}\n${timeoutMs()}`;
  if (cached?.key !== key) {
    cached?.transport.close();
    cached = { key, transport: nodemailer.createTransport(transportOptions(smtpUrl(), timeoutMs())) };
  }
  return cached.transport;
}

/** The domain of MAIL_FROM's address, for Message-IDs. */
function fromDomain(): string {
  const m = /@([A-Za-z0-9.-]+)\s*>?\s*$/.exec(mailFrom());
  return m ? m[1].toLowerCase() : "loomlore.invalid";
}

const CRLF = /[\r\n]/;
const ADDRESS = /^[^\s@<>()[\]\\,;:"]+@[^\s@<>()[\]\\,;:"]+\.[^\s@<>()[\]\\,;:"]+$/;

/** Refuse what could smuggle headers or extra recipients into the message. */
function checkMail(mail: OutgoingMail) {
  if (CRLF.test(mail.to)) throw new Error("mail rejected: line break in the recipient (header injection)");
  if (CRLF.test(mail.subject)) throw new Error("mail rejected: line break in the subject (header injection)");
  if (!ADDRESS.test(mail.to.trim())) throw new Error("mail rejected: the recipient must be one plain e-mail address");
  if (!mail.kind || CRLF.test(mail.kind)) throw new Error("mail rejected: kind is required");
}

/** Queue a message in the same transaction as the action that causes it (never sends). */
export async function enqueueMail(mail: OutgoingMail, transaction?: Transaction): Promise<void> {
  checkMail(mail);
  const now = new Date();
  await MailOutbox.create(
    {
      messageId: `<${randomUUID()}@${fromDomain()}>`,
      kind: mail.kind,
      toAddr: mail.to.trim(),
      subject: mail.subject,
      text: mail.text,
      html: mail.html,
      status: "queued",
      attempts: 0,
      nextAttemptAt: now,
      leaseUntil: null,
      lastError: null,
      createdAt: now,
      sentAt: null,
    },
    { transaction },
  );
}

type Claimed = {
  id: number;
  messageId: string;
  kind: string;
  toAddr: string;
  subject: string;
  text: string;
  html: string;
  attempts: number;
  createdAt: Date;
  leaseUntil: Date;
};

/** Take up to BATCH due rows (queued and due, or sending with an expired lease) under a fresh lease, atomically. */
async function claim(now: Date): Promise<Claimed[]> {
  return sequelize.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
    const due = await MailOutbox.findAll({
      where: {
        [Op.or]: [
          { status: "queued", nextAttemptAt: { [Op.lte]: now } },
          { status: "sending", leaseUntil: { [Op.lt]: now } },
        ],
      },
      order: [
        ["nextAttemptAt", "ASC"],
        ["id", "ASC"],
      ],
      limit: BATCH,
      transaction,
    });
    if (due.length === 0) return [];
    const leaseUntil = new Date(now.getTime() + LEASE_MS);
    await MailOutbox.update({ status: "sending", leaseUntil }, { where: { id: due.map((r) => r.id) }, transaction });
    return due.map((r) => ({
      id: r.id,
      messageId: r.messageId,
      kind: r.kind,
      toAddr: r.toAddr,
      subject: r.subject,
      text: r.text,
      html: r.html,
      attempts: r.attempts,
      createdAt: r.createdAt,
      leaseUntil,
    }));
  });
}

type SmtpError = Error & { code?: string; responseCode?: number; command?: string };

/** 5xx to the envelope or the message is final; everything else (4xx, no answer, lost connection, TLS, login) may pass. */
function isPermanent(e: SmtpError): boolean {
  const onMessage = e.code === "EENVELOPE" || e.code === "EMESSAGE";
  if (!onMessage) return false; // a login or connection problem is ours or the relay's to fix, not the message's
  const code = Number(e.responseCode);
  return !code || (code >= 500 && code < 600); // no code: nodemailer itself refused the address or the size
}

/** One short line for last_error and the log (log lines also lose addresses): code, SMTP reply, never credentials. */
function describeError(e: SmtpError): string {
  const parts = [e.code, e.responseCode, e.message].filter((x) => x !== undefined && x !== "");
  return parts
    .join(" ")
    .replace(/\/\/[^/\s:@]*:[^/\s@]*@/g, "//***@")
    .replace(/\s+/g, " ")
    .slice(0, 300);
}

function retryDelay(attempts: number): number {
  return RETRY_DELAYS_MS[Math.min(attempts, RETRY_DELAYS_MS.length) - 1];
}

/** Update a row we hold; false if our lease was lost (another worker took it over after expiry). */
async function settle(row: Claimed, values: Partial<InferAttributes<MailOutbox>>, flag?: string, at?: Date): Promise<boolean> {
  const where = { id: row.id, status: "sending", leaseUntil: row.leaseUntil };
  // In a transaction even alone: a write on Sequelize's shared handle would hold up every read of the process while it
  // waits for the write lock (a transaction gets a handle of its own).
  if (!flag) return sequelize.transaction(async (transaction) => (await MailOutbox.update(values, { where, transaction }))[0] === 1);
  // A failure and its flag for the admin are written together.
  return sequelize.transaction(async (transaction) => {
    const [n] = await MailOutbox.update(values, { where, transaction });
    if (n === 1) {
      await AuditLog.create(
        {
          actorId: null,
          action: "mail.failed",
          subjectType: "mail_outbox",
          subjectId: String(row.id),
          detail: JSON.stringify({ kind: row.kind, attempts: values.attempts, reason: flag }),
          at: at ?? new Date(),
        },
        { transaction },
      );
    }
    return n === 1;
  });
}

/** A settled message keeps its text without live tokens: the outbox only needs one until the message is delivered. */
const disarmed = (row: Claimed) => ({ text: redactTokens(row.text), html: redactTokens(row.html) });

/** Put claimed rows we did not get to back in the queue, untouched. */
async function release(rows: Claimed[]) {
  await sequelize.transaction(async (transaction) => {
    for (const row of rows) {
      await MailOutbox.update({ status: "queued", leaseUntil: null }, { where: { id: row.id, status: "sending", leaseUntil: row.leaseUntil }, transaction });
    }
  });
}

/**
 * One pass of the worker: claim due rows under a lease, send each with its stored Message-ID, record the outcome.
 * `now` is the clock the pass starts from (tests move it forward); time spent sending is added to it.
 */
export async function deliverDueMail(now: Date = new Date()): Promise<DeliveryCounts> {
  const counts: DeliveryCounts = { sent: 0, retried: 0, failed: 0 };
  const started = Date.now();
  const clock = () => new Date(now.getTime() + (Date.now() - started));
  const t = transport(); // a bad SMTP_URL throws here, before any row is claimed
  const rows = await claim(now);
  if (rows.length === 0) return counts;
  for (const [i, row] of rows.entries()) {
    // Never send on a lease that may have run out: hand the rest back for the next pass.
    if (Date.now() - started > LEASE_MS / 2) {
      await release(rows.slice(i));
      break;
    }
    const attempts = row.attempts + 1;
    try {
      await t.sendMail({ from: mailFrom(), to: row.toAddr, subject: row.subject, text: row.text, html: row.html, messageId: row.messageId });
    } catch (err) {
      const e = err as SmtpError;
      const at = clock();
      const error = describeError(e);
      if (isPermanent(e)) {
        if (await settle(row, { status: "failed", attempts, leaseUntil: null, lastError: error, ...disarmed(row) }, "rejected", at)) counts.failed += 1;
        log("warn", `#${row.id} (${row.kind}) rejected by the relay, not retrying: ${error}`);
      } else if (at.getTime() - new Date(row.createdAt).getTime() >= GIVE_UP_AFTER_MS) {
        const lastError = `gave up after 4 days: ${error}`;
        if (await settle(row, { status: "failed", attempts, leaseUntil: null, lastError, ...disarmed(row) }, "gave-up", at)) counts.failed += 1;
        log("warn", `#${row.id} (${row.kind}) ${lastError}`);
      } else {
        const delay = retryDelay(attempts);
        const nextAttemptAt = new Date(at.getTime() + delay);
        if (await settle(row, { status: "queued", attempts, nextAttemptAt, leaseUntil: null, lastError: error })) counts.retried += 1;
        log("warn", `#${row.id} (${row.kind}) not delivered (try ${attempts}), next try in ${Math.round(delay / MINUTE)} min: ${error}`);
      }
      continue;
    }
    if (await settle(row, { status: "sent", attempts, sentAt: clock(), leaseUntil: null, lastError: null, ...disarmed(row) })) counts.sent += 1;
    else log("warn", `#${row.id} (${row.kind}) was sent after its lease had been taken over`);
  }
  return counts;
}

let lastLog = { line: "", at: 0 };
/** Log without repeating the same line more than once a minute (a failing pass would otherwise flood the log). */
function log(level: "warn" | "error", line: string) {
  const now = Date.now();
  if (line === lastLog.line && now - lastLog.at < MINUTE) return;
  lastLog = { line, at: now };
  // Relay replies can quote the recipient: keep addresses out of the log (last_error keeps them for the admin page).
  console[level](`[mail] ${line.replace(/[^\s<>()"',;:@]+@[^\s<>()"',;:]+/g, "<address>")}`);
}

type Worker = { timer: NodeJS.Timeout | null; running: Promise<void> | null; stopped: boolean };
const workerKey = Symbol.for("loomlore.mailWorker");
type Holder = { [workerKey]?: Worker };

/** Start the background loop (once per process; dev reloads reuse it). Never throws; errors are logged. */
export function startMailWorker(): void {
  const holder = globalThis as Holder;
  if (holder[workerKey]) return;
  const interval = env.MAIL_POLL_MS;
  const w: Worker = { timer: null, running: null, stopped: false };
  holder[workerKey] = w;
  const schedule = (ms: number) => {
    if (w.stopped) return;
    w.timer = setTimeout(tick, ms);
    w.timer.unref();
  };
  const tick = () => {
    w.timer = null;
    w.running = (async () => {
      let full = false;
      try {
        const c = await deliverDueMail();
        full = c.sent + c.retried + c.failed >= BATCH; // more may be waiting: go again at once
      } catch (e) {
        log("error", `delivery pass failed: ${describeError(e as SmtpError)}`);
      }
      w.running = null;
      schedule(full ? 0 : interval);
    })();
  };
  schedule(0);
}

/** Stop the loop and wait for a pass in progress to finish. */
export async function stopMailWorker(): Promise<void> {
  const holder = globalThis as Holder;
  const w = holder[workerKey];
  if (!w) return;
  delete holder[workerKey];
  w.stopped = true;
  if (w.timer) clearTimeout(w.timer);
  await w.running;
  cached?.transport.close();
  cached = null;
}

/** Whether the relay answers (EHLO and, if configured, login) within 1.5 s; for /api/v1/health. */
export async function mailHealthy(): Promise<boolean> {
  let t: Transporter | null = null;
  let timer: NodeJS.Timeout | undefined;
  try {
    t = nodemailer.createTransport(transportOptions(smtpUrl(), HEALTH_TIMEOUT_MS));
    const timeout = new Promise<false>((resolve) => {
      timer = setTimeout(() => resolve(false), HEALTH_TIMEOUT_MS);
    });
    return (await Promise.race([t.verify(), timeout])) === true;
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
    t?.close();
  }
}
