// The request-body watcher of the production server (app/serve.server.ts runs it before every route): caps, early
// answers, lingering after them, and the minimum upload rate (QUALITY.md F6 and F7). Plain TypeScript, run by tsx.
import type { Socket } from "node:net";
import type { NextFunction, Request as ExpressRequest, Response as ExpressResponse } from "express";
import { env } from "../env.server.ts";
import { EDITOR_FORM_MAX_BYTES } from "../services/http.server.ts";

const KiB = 1024;
const MiB = 1024 * KiB;

// ---- request bodies ---------------------------------------------------------------------------------------------
//
// Node keeps a connection alive after a response even when the request's body was never read to the end: it either
// drains the rest of the body (req._dump(), for a body nobody touched) or leaves the client blocked mid-upload until
// keepAliveTimeout. And when a reader cancels the body (the photo parser at its size limit), IncomingMessage.destroy
// destroys the socket at once, so the client never sees the 413 it was about to get. QUALITY.md F6 asks that "the
// server stops reading within limit + 1 MB", with the 413 delivered. So, for every request with a body:
// - an answer sent before the body is complete carries `Connection: close`;
// - a reader giving up on the body does not destroy the socket: reading just stops until the answer is out;
// - after the answer, the connection lingers (reads and discards) for at most LINGER_BYTES / LINGER_MS, so that a
//   client still sending reads the answer instead of a reset, and is then closed (gracefully if the body completed).
// Uploads must also keep a minimum rate (F7), and other bodies have a size cap of their own (F6 "1 MB body to login").

/** Upload bodies: the average rate must reach UPLOAD_MIN_BPS once UPLOAD_GRACE_MS have passed (QUALITY F7 "e.g. 10 KB/s after 10 s"). */
const UPLOAD_GRACE_MS = env.UPLOAD_GRACE_MS;
const UPLOAD_MIN_BPS = env.UPLOAD_MIN_BPS;
const RATE_CHECK_MS = Math.min(1_000, UPLOAD_GRACE_MS);
/**
 * Bodies of everything but the two upload routes: the 64 KiB every JSON body may have (http.server.ts readJson),
 * counted here while streaming so a chunked body is capped too; the submission editor's form (up to 200 pin rows,
 * 20 000 characters of notes, a pasted table) gets 1 MiB. QUALITY F6: "1 MB body to login/search … 413".
 */
const FORM_MAX_BYTES = env.FORM_MAX_BYTES;
/** After an early answer: read and discard at most this much, for at most this long, then close (well inside F6's "limit + 1 MB"). */
const LINGER_BYTES = 256 * KiB;
const LINGER_MS = 1_000;

const UPLOAD_PAGE = /^\/submissions\/[^/]+$/i;
const MULTIPART = /^multipart\/form-data\b/i;

interface BodyWatch {
  req: ExpressRequest;
  res: ExpressResponse;
  socket: Socket;
  /** The photo routes (rate rule here, their own size limits in photos.server.ts), or a size cap for everything else. */
  upload: boolean;
  max: number;
  start: number;
  /** Body bytes the HTTP parser has handed to the request so far. */
  bytes: number;
  declared: number | null;
  /** An answer went out before the body was complete: the connection closes after it. */
  armed: boolean;
  lingering: boolean;
  closing: boolean;
  logged: boolean;
  reason: string;
  rateTimer: NodeJS.Timeout | null;
  lingerTimer: NodeJS.Timeout | null;
  /** IncomingMessage#destroy, before we wrapped it. */
  destroy: (error?: Error) => unknown;
}

function hasBody(req: ExpressRequest): boolean {
  if (req.headers["transfer-encoding"] !== undefined) return true;
  const length = req.headers["content-length"];
  return length !== undefined && length.trim() !== "0";
}

/** The route's path without a single-fetch `.data` suffix (a fetcher posts to /submissions/12.data). */
const routePath = (req: ExpressRequest) => req.path.replace(/\.data$/, "");

function isUpload(req: ExpressRequest): boolean {
  if (req.method !== "POST") return false;
  const p = routePath(req);
  return /^\/api\/v1\/photos$/i.test(p) || (UPLOAD_PAGE.test(p) && MULTIPART.test(req.headers["content-type"] ?? ""));
}

const isApi = (req: ExpressRequest) => /^\/api\//i.test(req.path);

/**
 * One line per cut-off body, when its connection closes: method, path (never the query, which may hold a token),
 * status, body bytes read, who closed (often the client, once it has the answer).
 */
function logCutOff(w: BodyWatch, closedBy: "server" | "client") {
  if (w.logged) return;
  w.logged = true;
  const ms = Math.round(performance.now() - w.start);
  console.log(
    `[loomlore] body cut off: ${w.req.method} ${w.req.path} status=${w.res.statusCode} read=${w.bytes} ` +
      `declared=${w.declared ?? "chunked"} reason=${w.reason} closed-by=${closedBy} ms=${ms}`,
  );
}

/**
 * Close for good. With the body complete, gracefully: our FIN after the answer, and the client (which has all it
 * sent read) closes its side. Otherwise at once, the request destroyed too, so a reader still waiting on the body
 * sees it aborted.
 */
function closeNow(w: BodyWatch, error?: Error) {
  if (w.closing) return;
  w.closing = true;
  if (w.rateTimer) clearTimeout(w.rateTimer);
  if (w.lingerTimer) clearTimeout(w.lingerTimer);
  logCutOff(w, "server");
  if (w.req.complete) {
    w.socket.end();
    setTimeout(() => w.socket.destroy(), LINGER_MS).unref();
  } else if (!w.req.destroyed) w.destroy.call(w.req, error);
  else w.socket.destroy();
}

/**
 * After the answer, read (and discard) a little more before closing, without a FIN yet: a client still sending then
 * gets to read the answer (a client that meets our FIN or a reset mid-body often never does), and most stop
 * sending and close once they have it. A body that completes within the budget closes gracefully.
 */
function linger(w: BodyWatch) {
  const { req } = w;
  w.lingering = true;
  req.removeAllListeners("data"); // whoever read the body has given up on it by now
  let extra = 0;
  const done = () => closeNow(w);
  req.on("data", (chunk: Buffer) => {
    extra += chunk.length;
    if (extra > LINGER_BYTES) done();
  });
  req.once("end", done);
  w.lingerTimer = setTimeout(done, LINGER_MS);
  req.resume();
}

/** Make the body's reader (the action) fail now, without destroying the socket the answer goes out on. */
function abortReader(w: BodyWatch, error: Error) {
  if (w.req.listenerCount("error") > 0) w.req.emit("error", error);
}

/** Answer (unless something was sent already) in our error shape for /api/, a plain page otherwise; the connection closes after it. */
function answer(w: BodyWatch, status: number, code: string, message: string, title: string) {
  const { req, res } = w;
  if (res.headersSent) return false;
  res.status(status).set({ Connection: "close", "Cache-Control": "no-store" });
  if (isApi(req)) res.json({ error: { code, message } });
  else res.type("html").send(`<!doctype html><title>${title} · Loomlore</title><p>${message} <a href="/">Back to the library</a></p>`);
  return true;
}

const bodyError = (code: string, message: string) => Object.assign(new Error(message), { code });

function tooLarge(w: BodyWatch) {
  w.reason = "too-large";
  const limit = w.max >= MiB ? `${w.max / MiB} MiB` : `${Math.round(w.max / KiB)} KiB`;
  return answer(w, 413, "too_large", `The request body may be at most ${limit}.`, "Too large");
}

/** A non-upload body over its cap while streaming (chunked: there was no Content-Length to check up front). */
function overCap(w: BodyWatch) {
  if (w.closing || w.res.writableEnded) return;
  const error = bodyError("ERR_BODY_TOO_LARGE", "request body over its size limit");
  // An answer already on its way (the app's own limit, e.g. readJson's) stands; it closes the connection if the body
  // is incomplete. Only stop the reader from buffering more.
  if (w.res.headersSent) {
    if (!w.req.complete) abortReader(w, error);
    return;
  }
  tooLarge(w);
  abortReader(w, error);
}

/** An upload below the minimum average rate after the grace period (QUALITY F7): 408, the reader aborted, the connection closed. */
function checkRate(w: BodyWatch) {
  w.rateTimer = null;
  if (w.closing || w.req.complete || w.res.writableEnded || w.socket.destroyed) return;
  const rate = w.bytes / ((performance.now() - w.start) / 1000);
  // Data waiting in the request's own buffer means the server is the slow side (backpressure), not the client.
  if (rate >= UPLOAD_MIN_BPS || w.req.readableLength > 0) {
    w.rateTimer = setTimeout(checkRate, RATE_CHECK_MS, w);
    return;
  }
  w.reason = `too-slow(${Math.round(rate)}B/s)`;
  const error = bodyError("ERR_UPLOAD_TOO_SLOW", "upload below the minimum rate");
  const min = UPLOAD_MIN_BPS >= KiB ? `${Math.round(UPLOAD_MIN_BPS / KiB)} KB/s` : `${UPLOAD_MIN_BPS} bytes/s`;
  const message = `The upload was too slow (under ${min} after ${Math.round(UPLOAD_GRACE_MS / 100) / 10} s), so it was stopped and nothing was saved. Try again on a faster connection.`;
  if (!answer(w, 408, "request_timeout", message, "Upload too slow")) return closeNow(w, error);
  abortReader(w, error);
}

export function watchBody(req: ExpressRequest, res: ExpressResponse, next: NextFunction) {
  if (!hasBody(req) || req.complete) return next();
  const declaredHeader = req.headers["content-length"];
  const declared = declaredHeader !== undefined && /^\d+$/.test(declaredHeader.trim()) ? Number(declaredHeader) : null;
  const upload = isUpload(req);
  const socket = req.socket;
  const w: BodyWatch = {
    req,
    res,
    socket,
    upload,
    max: upload ? Infinity : UPLOAD_PAGE.test(routePath(req)) ? EDITOR_FORM_MAX_BYTES : FORM_MAX_BYTES,
    start: performance.now(),
    bytes: 0,
    declared,
    armed: false,
    lingering: false,
    closing: false,
    logged: false,
    reason: "answered-early",
    rateTimer: null,
    lingerTimer: null,
    destroy: req.destroy,
  };

  // Count the body as the HTTP parser hands it over (parserOnBody calls req.push): chunked bodies are counted too.
  const push = req.push;
  req.push = function (this: ExpressRequest, chunk: unknown, encoding?: BufferEncoding) {
    if (chunk) {
      w.bytes += (chunk as Buffer).length;
      if (w.bytes > w.max && w.reason !== "too-large") {
        w.reason = "too-large";
        setImmediate(overCap, w);
      }
    }
    return push.call(this, chunk, encoding);
  };
  // A reader cancelling the body (a size limit, a malformed form) lands here. Destroying the request would destroy the
  // socket under the answer that is about to be sent: stop reading instead; that answer carries Connection: close.
  // (IncomingMessage#destroy aborts the socket unless the body was both received and read to the end.)
  req.destroy = function (this: ExpressRequest, error?: Error) {
    if (w.closing || socket.destroyed || (req.complete && req.readableEnded)) return w.destroy.call(this, error) as ExpressRequest;
    if (!req.complete && !w.lingering) this.pause();
    return this;
  };
  req.on("error", () => {}); // the body's reader hears errors through its own listener; never an uncaught 'error'
  // Mark the body as being consumed, or after the answer Node would req._dump() it: read it all, discarded unseen.
  req.read(0);

  // Any answer that starts while the body is incomplete closes the connection once it is out: Node's server calls
  // socket.destroySoon() after a `Connection: close` response, and here that lingers briefly instead.
  const writeHead = res.writeHead as (...args: unknown[]) => ExpressResponse;
  res.writeHead = function (this: ExpressResponse, ...args: unknown[]) {
    if (!req.complete && !w.armed) {
      w.armed = true;
      this.setHeader("Connection", "close");
      socket.destroySoon = () => (req.complete || req.readableEnded ? closeNow(w) : linger(w));
    }
    return writeHead.apply(this, args);
  } as typeof res.writeHead;

  // After the answer Node no longer tracks the request: when the socket closes, end it, so a reader still waiting on
  // the body sees the abort.
  const onClose = () => {
    if (w.rateTimer) clearTimeout(w.rateTimer);
    if (w.lingerTimer) clearTimeout(w.lingerTimer);
    if (w.armed) logCutOff(w, "client");
    if (!req.destroyed) w.destroy.call(req);
  };
  socket.once("close", onClose);
  res.once("finish", () => {
    if (w.rateTimer) clearTimeout(w.rateTimer);
    w.rateTimer = null;
    if (!w.armed) socket.off("close", onClose); // a complete request on a connection that stays open
  });

  if (!upload && declared !== null && declared > w.max) return void tooLarge(w);
  if (upload) w.rateTimer = setTimeout(checkRate, UPLOAD_GRACE_MS, w);
  next();
}
