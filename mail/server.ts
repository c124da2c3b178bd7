/**
 * The local stand-in for the hosted mail relay: an SMTP server on 127.0.0.1 that keeps what it receives, and a loopback
 * JSON list of those messages for tests and for reading mail while developing. `npm start` runs it beside the app
 * (app/start.server.ts); tests start it in-process with startMailStandIn({ smtpPort: 0, httpPort: 0, dataDir }).
 *
 *   SMTP  127.0.0.1:MAIL_SMTP_PORT (2525)  no auth needed, no STARTTLS, 10 MB size limit
 *   HTTP  127.0.0.1:MAIL_HTTP_PORT (8025)
 *     GET    /messages[?to=addr]  newest first: [{ id, messageId, from, to, subject, text, html, receivedAt }]
 *     GET    /messages/:id        one message, 404 if unknown
 *     DELETE /messages            forget every message (and the duplicate count)
 *     GET    /health              { status, mode, smtpListening, messages, duplicates }
 *     POST   /fault {"mode": …}   none | temporary (451) | permanent (550) | drop (take the message, then cut the
 *                                  connection before the reply) | slow-greeting (greet after 10 s) | refuse (stop listening)
 *
 * Messages are deduplicated by Message-ID (a resend after a lost reply is counted in `duplicates`, not stored twice) and
 * persisted to <dataDir>/messages.json (temp file + rename) before the SMTP reply, so restarting the stand-in loses nothing.
 * Run it alone with `node --import tsx mail/server.ts`.
 */
import { randomUUID } from "node:crypto";
import { mkdirSync, readFileSync, renameSync } from "node:fs";
import { rename, unlink, writeFile } from "node:fs/promises";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo, Server as NetServer } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { simpleParser } from "mailparser";
import { SMTPServer, type SMTPServerSession } from "smtp-server";
import { SMTPConnection } from "smtp-server/lib/smtp-connection.js";

const HOST = "127.0.0.1";
const SIZE_LIMIT = 10 * 1024 * 1024;
const SLOW_GREETING_MS = 10_000;
/** Oldest messages are forgotten beyond this many (the stand-in is for reading recent mail, not an archive). */
const MAX_MESSAGES = 5_000;
const MODES = ["none", "temporary", "permanent", "drop", "slow-greeting", "refuse"] as const;
export type FaultMode = (typeof MODES)[number];

export interface StoredMessage {
  id: string;
  messageId: string | null;
  from: string;
  /** The envelope recipients (who the relay was asked to deliver to), comma-separated. */
  to: string;
  subject: string;
  text: string;
  /** "" when the message had no HTML part. */
  html: string;
  receivedAt: string;
}

export interface MailStandInOptions {
  /** 0 picks a free port. Default MAIL_SMTP_PORT or 2525. */
  smtpPort?: number;
  /** 0 picks a free port. Default MAIL_HTTP_PORT or 8025. */
  httpPort?: number;
  /** Where messages.json lives. Default MAIL_DATA_DIR or mail/data next to this file. */
  dataDir?: string;
}

export interface MailStandIn {
  smtpPort: number;
  httpPort: number;
  close: () => Promise<void>;
}

// smtp-server waits 100 ms before every greeting to catch clients that talk too early (an anti-spam heuristic). Our only
// client is our own app on loopback, and that pause would dominate the outbox fault tests (hundreds of connections), so
// the stand-in's servers greet at once. Scoped to servers created here; any other SMTPServer keeps the library default.
const greetAtOnce = new WeakSet<SMTPServer>();
const libraryInit = SMTPConnection.prototype.init;
SMTPConnection.prototype.init = function (this: SMTPConnection) {
  if (!greetAtOnce.has(this._server) || typeof this._setListeners !== "function") return libraryInit.call(this);
  this._setListeners(() => this.connectionReady());
};

function smtpError(code: number, message: string): Error {
  return Object.assign(new Error(message), { responseCode: code });
}

function envPort(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`${name} must be a port number, got ${JSON.stringify(raw)}`);
  return n;
}

/** The message list: in memory, written through to messages.json with group commits (one write covers every waiting message). */
class Store {
  messages: StoredMessage[] = []; // oldest first
  duplicates = 0;
  private ids = new Set<string>();
  private file: string;
  private writing: Promise<void> = Promise.resolve();
  private next: Promise<void> | null = null;

  constructor(dir: string) {
    mkdirSync(dir, { recursive: true });
    this.file = path.join(dir, "messages.json");
    let raw: string | null = null;
    try {
      raw = readFileSync(this.file, "utf8");
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "ENOENT") throw e;
    }
    if (raw !== null) {
      try {
        const data = JSON.parse(raw) as { messages?: StoredMessage[]; duplicates?: number };
        this.messages = Array.isArray(data.messages) ? data.messages : [];
        this.duplicates = Number(data.duplicates) || 0;
      } catch {
        const aside = `${this.file}.unreadable-${Date.now()}`;
        renameSync(this.file, aside);
        console.error(`[mail] ${this.file} could not be read; kept it as ${aside} and started empty`);
      }
    }
    for (const m of this.messages) if (m.messageId) this.ids.add(m.messageId);
  }

  /** Store a message unless its Message-ID was seen before (then count a duplicate). Resolves once it is on disk. */
  add(m: StoredMessage): Promise<void> {
    if (m.messageId && this.ids.has(m.messageId)) this.duplicates += 1;
    else {
      this.messages.push(m);
      if (m.messageId) this.ids.add(m.messageId);
      if (this.messages.length > MAX_MESSAGES) {
        for (const old of this.messages.splice(0, this.messages.length - MAX_MESSAGES)) if (old.messageId) this.ids.delete(old.messageId);
      }
    }
    return this.persist();
  }

  clear(): Promise<void> {
    this.messages = [];
    this.ids.clear();
    this.duplicates = 0;
    return this.persist();
  }

  /** Resolves when a write that started after this call has finished: the state at call time is on disk. */
  persist(): Promise<void> {
    this.next ??= this.writing
      .catch(() => {})
      .then(() => {
        this.next = null;
        this.writing = this.write();
        return this.writing;
      });
    return this.next;
  }

  private async write(): Promise<void> {
    const tmp = `${this.file}.${process.pid}.${randomUUID()}.tmp`;
    try {
      await writeFile(tmp, JSON.stringify({ duplicates: this.duplicates, messages: this.messages }), { flush: true });
      await rename(tmp, this.file);
    } catch (e) {
      await unlink(tmp).catch(() => {});
      throw e;
    }
  }

  /** Wait for any write in flight (on close). */
  async flush(): Promise<void> {
    await (this.next ?? this.writing).catch(() => {});
  }
}

function sendJson(res: ServerResponse, status: number, body: unknown) {
  const text = JSON.stringify(body);
  res.writeHead(status, { "Content-Type": "application/json; charset=utf-8", "Cache-Control": "no-store", "Content-Length": Buffer.byteLength(text) });
  res.end(text);
}

async function readBody(req: IncomingMessage, limit: number): Promise<string> {
  let size = 0;
  const chunks: Buffer[] = [];
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > limit) throw Object.assign(new Error("body too large"), { status: 413 });
    chunks.push(chunk);
  }
  return Buffer.concat(chunks).toString("utf8");
}

function listen(server: NetServer, port: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const onError = (e: Error) => reject(e);
    server.once("error", onError);
    server.once("listening", () => {
      server.off("error", onError);
      resolve();
    });
    server.listen(port, HOST);
  });
}

/** Start the stand-in (SMTP + JSON list, both on 127.0.0.1). Port 0 picks a free one; the chosen ports are returned. */
export async function startMailStandIn(options: MailStandInOptions = {}): Promise<MailStandIn> {
  const here = path.dirname(fileURLToPath(import.meta.url));
  const store = new Store(options.dataDir ?? process.env.MAIL_DATA_DIR ?? path.join(here, "data"));
  let mode: FaultMode = "none";
  let smtpListening = false;
  let closed = false;
  const greetingTimers = new Map<string, NodeJS.Timeout>();

  // Worded like a real relay's replies, which quote the recipient.
  const refusal = (to = "recipient"): Error | null =>
    mode === "temporary"
      ? smtpError(451, `4.3.0 <${to}>: temporarily unable to accept mail, try again later`)
      : mode === "permanent"
        ? smtpError(550, `5.1.1 <${to}>: mailbox unavailable`)
        : null;

  const connectionOf = (session: SMTPServerSession) => [...smtp.connections].find((c) => c.id === session.id);

  const smtp: SMTPServer = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    disableReverseLookup: true,
    size: SIZE_LIMIT,
    banner: "Loomlore mail stand-in",
    logger: false,
    closeTimeout: 1_000,
    onConnect(session, callback) {
      if (mode !== "slow-greeting") return callback();
      greetingTimers.set(
        session.id,
        setTimeout(() => {
          greetingTimers.delete(session.id);
          callback();
        }, SLOW_GREETING_MS),
      );
    },
    onClose(session) {
      const t = greetingTimers.get(session.id);
      if (t) clearTimeout(t);
      greetingTimers.delete(session.id);
    },
    onRcptTo(address, _session, callback) {
      callback(refusal(address.address));
    },
    onData(stream, session, callback) {
      const refused = refusal(session.envelope.rcptTo.map((r) => r.address).join(", "));
      if (refused) {
        stream.on("end", () => callback(refused));
        stream.resume();
        return;
      }
      const dropping = mode === "drop";
      simpleParser(stream)
        .then(async (parsed) => {
          if (stream.sizeExceeded) return callback(smtpError(552, "5.3.4 Message too big"));
          await store.add({
            id: randomUUID(),
            messageId: parsed.messageId ?? null,
            from: parsed.from?.text ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ""),
            to: session.envelope.rcptTo.map((r) => r.address).join(", "),
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
            receivedAt: new Date().toISOString(),
          });
          // "drop": the message is taken, but the connection dies before the sender hears 250, so it will send again.
          const connection = dropping ? connectionOf(session) : undefined;
          if (connection) connection._socket.destroy();
          else callback();
        })
        .catch((e: Error) => callback(smtpError(451, `4.3.0 Could not store the message (${e.message})`)));
    },
  });
  greetAtOnce.add(smtp);
  smtp.on("error", (e) => {
    if (!closed) console.error(`[mail] SMTP: ${e.message}`);
  });

  await listen(smtp.server, options.smtpPort ?? envPort("MAIL_SMTP_PORT", 2525));
  smtpListening = true;
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const stopSmtpListening = () =>
    new Promise<void>((resolve) => {
      smtpListening = false;
      smtp.server.close(() => resolve());
      for (const c of smtp.connections) c._socket.destroy(); // a relay that went away takes its sessions with it
    });

  async function setMode(next: FaultMode) {
    if (next === "refuse" && smtpListening) await stopSmtpListening();
    if (next !== "refuse" && !smtpListening && !closed) {
      await listen(smtp.server, smtpPort);
      smtpListening = true;
    }
    mode = next;
  }

  async function handle(req: IncomingMessage, res: ServerResponse) {
    const url = new URL(req.url ?? "/", `http://${HOST}`);
    const method = req.method ?? "GET";
    const one = /^\/messages\/([^/]+)$/.exec(url.pathname);
    if (url.pathname === "/messages" && method === "GET") {
      const to = url.searchParams.get("to")?.trim().toLowerCase();
      const list = store.messages.slice().reverse();
      return sendJson(res, 200, to ? list.filter((m) => m.to.toLowerCase().split(/,\s*/).includes(to)) : list);
    }
    if (url.pathname === "/messages" && method === "DELETE") {
      await store.clear();
      return sendJson(res, 200, { deleted: true });
    }
    if (one && method === "GET") {
      const m = store.messages.find((x) => x.id === decodeURIComponent(one[1]));
      return m ? sendJson(res, 200, m) : sendJson(res, 404, { error: "no such message" });
    }
    if (url.pathname === "/health" && method === "GET") {
      return sendJson(res, 200, { status: "ok", mode, smtpListening, messages: store.messages.length, duplicates: store.duplicates });
    }
    if (url.pathname === "/fault" && method === "POST") {
      let next: unknown;
      try {
        next = (JSON.parse(await readBody(req, 1024)) as { mode?: unknown }).mode;
      } catch {
        return sendJson(res, 400, { error: 'expected JSON {"mode": …}' });
      }
      if (!MODES.includes(next as FaultMode)) return sendJson(res, 400, { error: `mode must be one of ${MODES.join(", ")}` });
      await setMode(next as FaultMode);
      return sendJson(res, 200, { mode });
    }
    if (["/messages", "/health", "/fault"].includes(url.pathname) || one) return sendJson(res, 405, { error: "method not allowed" });
    return sendJson(res, 404, { error: "not found" });
  }

  const http: Server = createServer((req, res) => {
    handle(req, res).catch((e: Error & { status?: number }) => {
      if (!res.headersSent) sendJson(res, e.status ?? 500, { error: e.message });
      else res.destroy();
    });
  });
  try {
    await listen(http, options.httpPort ?? envPort("MAIL_HTTP_PORT", 8025));
  } catch (e) {
    await stopSmtpListening();
    throw e;
  }
  const httpPort = (http.address() as AddressInfo).port;

  return {
    smtpPort,
    httpPort,
    close: async () => {
      if (closed) return;
      closed = true;
      for (const t of greetingTimers.values()) clearTimeout(t);
      greetingTimers.clear();
      await Promise.all([
        new Promise<void>((resolve) => {
          smtp.close(() => resolve());
          for (const c of smtp.connections) c._socket.destroy();
        }),
        new Promise<void>((resolve) => {
          http.close(() => resolve());
          http.closeAllConnections();
        }),
      ]);
      await store.flush();
    },
  };
}

// Run directly: `node --import tsx mail/server.ts` (what `npm start` does).
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  try {
    const s = await startMailStandIn();
    console.log(`[mail] stand-in relay: SMTP on ${HOST}:${s.smtpPort}, received mail at http://${HOST}:${s.httpPort}/messages`);
    for (const sig of ["SIGINT", "SIGTERM"] as const) {
      process.on(sig, () => {
        setTimeout(() => process.exit(0), 3_000).unref();
        s.close().then(() => process.exit(0));
      });
    }
  } catch (e) {
    console.error(`[mail] stand-in could not start: ${(e as Error).message}`);
    process.exit(1);
  }
}
