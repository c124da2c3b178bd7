/**
 * QUALITY.md F6 (oversized bodies) and F7 (slowloris and slow uploads) over real HTTP, against the production server
 * (app/serve.server.ts on build/). Bodies are written on raw TCP sockets so that they can lie about their length,
 * trickle, or keep coming after the answer; uploads go through a small counting TCP proxy that records how many bytes
 * the server accepted from the client ("count bytes accepted at a proxy in the test", F6). The server also logs one
 * `body cut off:` line per body it stopped reading, with the exact byte count, which the tests read as well.
 *
 * Small settings keep the run short: uploads must average 50 KB/s after 2.5 s, headers must be complete in 1.5 s.
 * The normal-client latency checks (F7 "p97.5 ≤ 2× baseline") print their figures; see withinTwiceBaseline.
 */
import { existsSync, readdirSync } from "node:fs";
import net from "node:net";
import path from "node:path";
import sharp from "sharp";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../support/server";
import { COOKIE, DEMO, req, signIn } from "../support/http";

const KiB = 1024;
const MiB = 1024 * KiB;
/** QUALITY "Open choices": 15 MB per photo, 12 per request (photos.server.ts PHOTO_LIMITS, MAX_BODY_BYTES = 12 × 15 MiB + 64 KiB). */
const PHOTO_MAX = 15 * MiB;
const MAX_BODY_BYTES = 12 * PHOTO_MAX + 64 * KiB;
/** QUALITY F6: "the server stops reading within limit + 1 MB". */
const SLACK = 1 * MiB;
/** serve.server.ts: bodies of every other route are capped at 64 KiB, like every JSON body (http.server.ts readJson). */
const FORM_MAX = 64 * KiB;
/** Test settings (defaults 10 s / 10 KB/s / 20 s, QUALITY F7). */
const GRACE_MS = 2_500;
const MIN_BPS = 50 * KiB;
const HEADERS_TIMEOUT_MS = 1_500;
/**
 * Client send rates: UPLINK (a fast home or office uplink) wherever the server answers early. While the server
 * prepares its answer it reads nothing, and a sender keeps filling the kernel's socket buffers on the way (up to 2 MB
 * here at 40 MB/s), which the proxy counts as accepted although the server never reads them: they are dropped with
 * the connection. So the proxy's count is an upper bound; the server's own count (its log line) is asserted as well.
 * FAST for the lying Content-Length, which Node's parser rejects without any answer from the app.
 */
const FAST = 40 * MiB;
const UPLINK = 10 * MiB;
/** serve.server.ts checks timeouts every headersTimeout / 4 (at least 250 ms). */
const CHECK_MS = Math.max(250, HEADERS_TIMEOUT_MS / 4);

let srv: TestServer;
let session: string;
let appPort: number;
let uploadsDir: string;
let jpegSmall: Buffer;

// ---- a counting TCP proxy ---------------------------------------------------------------------------------------

interface Conn {
  id: number;
  up: number;
  down: number;
  opened: number;
  closed?: number;
}
const conns: Conn[] = [];
let proxy: net.Server;
let proxyPort: number;

function startProxy(): Promise<void> {
  proxy = net.createServer((client) => {
    const c: Conn = { id: conns.length, up: 0, down: 0, opened: performance.now() };
    conns.push(c);
    const upstream = net.connect(appPort, "127.0.0.1");
    // client → server, counted as the upstream socket accepts it; paused while the server does not read.
    client.on("data", (d) => {
      c.up += d.length;
      if (!upstream.write(d)) {
        client.pause();
        upstream.once("drain", () => client.resume());
      }
    });
    upstream.on("data", (d) => {
      c.down += d.length;
      client.write(d);
    });
    client.on("end", () => upstream.end());
    upstream.on("end", () => client.end());
    const close = () => {
      c.closed ??= performance.now();
      client.destroy();
      upstream.destroy();
    };
    client.on("error", close);
    upstream.on("error", close);
    client.on("close", close);
    upstream.on("close", close);
  });
  return new Promise((resolve) =>
    proxy.listen(0, "127.0.0.1", () => {
      proxyPort = (proxy.address() as net.AddressInfo).port;
      resolve();
    }),
  );
}

// ---- raw HTTP over TCP ------------------------------------------------------------------------------------------

interface RawResult {
  status: number | null;
  head: string;
  body: string;
  /** ms from the first byte sent to the status line, and to the socket closing. */
  msToStatus: number | null;
  msToClose: number;
  /** Body bytes this client managed to write. */
  sent: number;
  error?: string;
  conn: Conn | undefined;
}

interface BodyPlan {
  /** Total body bytes to try to send (after the head). */
  size: number;
  /** Bytes per second; Infinity sends as fast as the socket takes them. */
  rate?: number;
  /** Leading body bytes (part headers …), sent first, counted in size. */
  prefix?: Buffer;
  /** Bytes sent as fast as possible before the rate applies (counted in size). */
  burst?: number;
  /** Filler byte. */
  fill?: number;
  /** Chunked transfer encoding instead of a Content-Length (the head must say so). */
  chunked?: boolean;
}

/** Send `head` and then a body per `plan` to `port`; resolves when the server closes (or `giveUpMs`). */
function raw(head: string, plan: BodyPlan, o: { port?: number; giveUpMs?: number } = {}): Promise<RawResult> {
  const port = o.port ?? proxyPort;
  const before = conns.length;
  return new Promise((resolve) => {
    const t0 = performance.now();
    const s = net.connect(port, "127.0.0.1");
    let response = Buffer.alloc(0);
    let msToStatus: number | null = null;
    let sent = 0;
    let error: string | undefined;
    let done = false;
    const rate = plan.rate ?? Infinity;
    const filler = Buffer.alloc(64 * KiB, plan.fill ?? 0x41);
    const prefix = plan.prefix ?? Buffer.alloc(0);
    let timer: NodeJS.Timeout | null = null;
    s.on("data", (d) => {
      response = Buffer.concat([response, d]);
      if (msToStatus === null && response.includes("\r\n")) msToStatus = performance.now() - t0;
    });
    s.on("error", (e) => (error = (e as NodeJS.ErrnoException).code ?? e.message));
    s.on("close", () => {
      done = true;
      if (timer) clearTimeout(timer);
      clearTimeout(giveUp);
      const text = response.toString("latin1");
      const m = /^HTTP\/1\.1 (\d{3})/.exec(text);
      const split = text.indexOf("\r\n\r\n");
      resolve({
        status: m ? Number(m[1]) : null,
        head: split >= 0 ? text.slice(0, split) : text,
        body: split >= 0 ? text.slice(split + 4) : "",
        msToStatus,
        msToClose: performance.now() - t0,
        sent,
        error,
        conn: port === proxyPort ? conns[before] : undefined,
      });
    });
    const giveUp = setTimeout(() => s.destroy(), o.giveUpMs ?? 15_000);
    const frame = (b: Buffer) => (plan.chunked ? Buffer.concat([Buffer.from(`${b.length.toString(16)}\r\n`), b, Buffer.from("\r\n")]) : b);
    const nextChunk = (max: number): Buffer => {
      const n = Math.min(max, plan.size - sent);
      const fromPrefix = prefix.subarray(Math.min(sent, prefix.length), Math.min(sent + n, prefix.length));
      const rest = n - fromPrefix.length;
      return Buffer.concat([fromPrefix, filler.subarray(0, rest)]);
    };
    s.write(head);
    // One burst per turn of the event loop (then a timer, or 'drain'), so this client reads while it sends.
    const pump = () => {
      timer = null;
      if (done || s.destroyed) return;
      const burst = plan.burst ?? 0;
      let budget = rate === Infinity ? Infinity : sent < burst ? burst - sent : Math.floor((rate * (performance.now() - t0)) / 1000) + burst - sent;
      while (budget > 0 && sent < plan.size) {
        const chunk = nextChunk(Math.min(budget, filler.length));
        sent += chunk.length;
        budget -= chunk.length;
        if (!s.write(frame(chunk))) return void s.once("drain", pump);
      }
      if (sent >= plan.size) {
        if (plan.chunked) s.write("0\r\n\r\n");
        return;
      }
      timer = setTimeout(pump, rate < 100 * KiB ? 100 : 5); // a trickle needs no 5 ms timer (it would cost the client CPU)
    };
    pump();
  });
}

function head(method: string, target: string, headers: Record<string, string | number>, port = proxyPort): string {
  const lines = [
    `${method} ${target} HTTP/1.1`,
    `Host: 127.0.0.1:${port}`,
    `Origin: http://127.0.0.1:${port}`,
    ...Object.entries(headers).map(([k, v]) => `${k}: ${v}`),
  ];
  return `${lines.join("\r\n")}\r\n\r\n`;
}

const BOUNDARY = "----loomloreSlowClientBoundary9x";
const partHead = (name: string, filename?: string) =>
  `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"${filename ? `; filename="${filename}"\r\nContent-Type: image/jpeg` : ""}\r\n\r\n`;
/** A complete multipart body: the given photos, consent, and the closing boundary. */
function multipart(photos: Buffer[]): Buffer {
  return Buffer.concat([
    ...photos.flatMap((p, i) => [Buffer.from(partHead("photo", `plug-${i}.jpg`)), p, Buffer.from("\r\n")]),
    Buffer.from(`${partHead("consent")}yes\r\n--${BOUNDARY}--\r\n`),
  ]);
}
const uploadHeaders = (length: number | "chunked") => ({
  Cookie: `${COOKIE}=${session}`,
  "Content-Type": `multipart/form-data; boundary=${BOUNDARY}`,
  ...(length === "chunked" ? { "Transfer-Encoding": "chunked" } : { "Content-Length": length }),
});

/** The server's `body cut off:` log lines after `from` (for a request that declared `declared`, if given), parsed. */
function cutOffs(from: number, declared?: number | "chunked") {
  return [
    ...srv
      .output()
      .slice(from)
      .matchAll(/body cut off: (\S+) (\S+) status=(\d+) read=(\d+) declared=(\S+) reason=(\S+) closed-by=(\S+) ms=(\d+)/g),
  ]
    .map((m) => ({ method: m[1], path: m[2], status: Number(m[3]), read: Number(m[4]), declared: m[5], reason: m[6], closedBy: m[7], ms: Number(m[8]) }))
    .filter((l) => declared === undefined || l.declared === String(declared));
}
async function waitFor<T>(what: string, get: () => T | undefined | null | false, ms = 5_000): Promise<T> {
  const until = performance.now() + ms;
  for (;;) {
    const v = get();
    if (v) return v;
    if (performance.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

const ls = (d: string) =>
  existsSync(d)
    ? readdirSync(d)
        .filter((f) => f !== ".gitkeep")
        .sort()
    : [];
const tmpFiles = () => ls(path.join(uploadsDir, "tmp"));
const photoFiles = () => ls(path.join(uploadsDir, "photos"));

async function healthy() {
  const r = await fetch(`${srv.url}/api/v1/health`);
  expect(r.status, "the server still answers").toBe(200);
  await r.arrayBuffer();
}

// ---- latency of normal clients ----------------------------------------------------------------------------------

/** p97.5 of `values` (nearest rank). */
function p975(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.ceil(0.975 * sorted.length) - 1)];
}

/** Two normal clients, one on GET / and one on GET /api/v1/health, each on its own keep-alive connection, until `stop`. */
async function normalClients(opts: { count?: number; until?: () => boolean }): Promise<{ page: number[]; health: number[] }> {
  const out = { page: [] as number[], health: [] as number[] };
  const loop = async (target: string, into: number[]) => {
    for (let i = 0; opts.count !== undefined ? i < opts.count : !opts.until!(); i++) {
      const t = performance.now();
      const r = await fetch(srv.url + target);
      await r.arrayBuffer();
      expect(r.status, `GET ${target}`).toBe(200);
      into.push(performance.now() - t);
    }
  };
  await Promise.all([loop("/", out.page), loop("/api/v1/health", out.health)]);
  return out;
}
const fmt = (ms: number) => `${ms.toFixed(1)} ms`;

// ---- set-up -----------------------------------------------------------------------------------------------------

beforeAll(async () => {
  srv = await startServer({
    env: {
      UPLOAD_GRACE_MS: String(GRACE_MS),
      UPLOAD_MIN_BPS: String(MIN_BPS),
      HEADERS_TIMEOUT_MS: String(HEADERS_TIMEOUT_MS),
      PHOTO_PER_MINUTE: "1000", // this file sends more than the 20 uploads a minute one contributor may make
      PHOTO_SWEEPER: "off", // only the upload itself may clean up after itself here
      MAIL_WORKER: "off",
    },
  });
  appPort = Number(new URL(srv.url).port);
  uploadsDir = path.join(path.dirname(srv.dbPath), "uploads");
  session = await signIn(srv, DEMO.contributor.email, DEMO.contributor.password);
  await startProxy();
  // Noise, so the JPEG has some size (about 20 KB): a realistic first part before a trickle.
  jpegSmall = await sharp({ create: { width: 160, height: 120, channels: 3, background: "#808080", noise: { type: "gaussian", mean: 128, sigma: 60 } } })
    .jpeg({ quality: 90 })
    .toBuffer();
  await healthy(); // warm: the first request migrates and seeds
}, 60_000);

let logFrom = 0;
beforeEach(() => {
  logFrom = srv.output().length;
});
// On a failure, what the server said meanwhile (its cut-off lines, any stack trace).
afterEach(({ task }) => {
  if (task.result?.state === "fail") console.log(`server output during "${task.name}":\n${srv.output().slice(logFrom).slice(-4000)}`);
});

afterAll(async () => {
  await new Promise((r) => proxy?.close(r));
  await srv?.stop();
});

// ---- F6 ---------------------------------------------------------------------------------------------------------

describe("F6 oversized bodies: answered, and the server stops reading within limit + 1 MB", () => {
  it("a normal upload still succeeds and keeps its connection (regression guard for the cut-off logic)", async () => {
    const body = multipart([jpegSmall]);
    const r = await raw(head("POST", "/api/v1/photos", { ...uploadHeaders(body.length), Connection: "close" }), { size: body.length, prefix: body });
    expect(r.status, r.head + r.body).toBe(201);
    const keepAlive = await fetch(`${srv.url}/api/v1/photos`, {
      method: "POST",
      headers: { Cookie: `${COOKIE}=${session}`, Origin: srv.url },
      body: (() => {
        const f = new FormData();
        f.append("photo", new Blob([new Uint8Array(jpegSmall)], { type: "image/jpeg" }), "plug.jpg");
        f.append("consent", "yes");
        return f;
      })(),
    });
    expect(keepAlive.status).toBe(201);
    expect(keepAlive.headers.get("connection"), "a complete body keeps the connection alive").not.toBe("close");
    await keepAlive.arrayBuffer();
  });

  it("(a) a 30 MB photo against the 15 MB limit: 413 delivered, ≤ limit + 1 MB accepted, temp files gone", async () => {
    const from = srv.output().length;
    const prefix = Buffer.from(partHead("photo", "big.jpg"));
    const size = prefix.length + 30 * MiB;
    const r = await raw(head("POST", "/api/v1/photos", uploadHeaders(size)), { size, prefix, rate: UPLINK });
    const log = await waitFor("the cut-off log line", () => cutOffs(from, size)[0]);
    console.log(
      `[F6a] status ${r.status} in ${fmt(r.msToStatus ?? NaN)}, closed after ${fmt(r.msToClose)}; proxy accepted ${r.conn!.up} B ` +
        `(${r.conn!.up - PHOTO_MAX} past the limit); server read ${log.read} B (${log.read - PHOTO_MAX} past); client wrote ${r.sent} of ${size}`,
    );
    expect(r.status, `${r.error ?? ""} ${r.head}`).toBe(413);
    expect(r.head).toMatch(/\r\nConnection: close/i);
    expect(JSON.parse(r.body.slice(r.body.indexOf("{"), r.body.lastIndexOf("}") + 1)).error.code).toBe("too_large");
    expect(r.conn!.up, "bytes the proxy got the server to accept").toBeLessThanOrEqual(PHOTO_MAX + prefix.length + SLACK);
    expect(log.read, "bytes the server read").toBeLessThanOrEqual(PHOTO_MAX + prefix.length + SLACK);
    expect(r.sent, "the client was stopped well before the end").toBeLessThan(size);
    expect(tmpFiles()).toEqual([]);
    await healthy();
  });

  it("21 files in one request (12 allowed): 413, connection closed", async () => {
    const body = multipart(Array.from({ length: 21 }, () => jpegSmall));
    const r = await raw(head("POST", "/api/v1/photos", uploadHeaders(body.length)), { size: body.length, prefix: body });
    expect(r.status, r.head).toBe(413);
    expect(r.msToClose).toBeLessThan(3_000);
    expect(tmpFiles()).toEqual([]);
  });

  it("(b) Content-Length over MAX_BODY_BYTES, body trickling: 413 before the body is read, connection closed", async () => {
    const from = srv.output().length;
    const size = MAX_BODY_BYTES + 10 * MiB;
    const r = await raw(head("POST", "/api/v1/photos", uploadHeaders(size)), { size, prefix: Buffer.from(partHead("photo", "huge.jpg")), rate: 20 * KiB });
    const log = await waitFor("the cut-off log line", () => cutOffs(from, size)[0]);
    console.log(
      `[F6b] status ${r.status} in ${fmt(r.msToStatus ?? NaN)}, closed after ${fmt(r.msToClose)}; proxy accepted ${r.conn!.up} B, server read ${log.read} B`,
    );
    expect(r.status, r.head).toBe(413);
    expect(r.msToStatus!, "answered before the body is read (it would take hours at this rate)").toBeLessThan(1_000);
    expect(r.msToClose, "closed after a short linger, not held open").toBeLessThan(3_000);
    expect(r.conn!.up).toBeLessThan(SLACK);
    await healthy();
  });

  it("(c) Content-Length: 1000 followed by 50 MB: no 5xx, at most ~1 MB past, the server stays healthy", async () => {
    const size = 50 * MiB;
    const r = await raw(head("POST", "/api/v1/photos", uploadHeaders(1000)), { size, prefix: Buffer.from(partHead("photo", "liar.jpg")), rate: FAST });
    console.log(
      `[F6c] status ${r.status ?? "none (connection closed)"}, closed after ${fmt(r.msToClose)}; proxy accepted ${r.conn!.up} B (${r.conn!.up - 1000} past the declared 1000); ${r.error ?? ""}`,
    );
    // Node's parser reads the 1000 bytes as the body and the rest as a next request, which is not HTTP: 400 and close.
    if (r.status !== null) expect([400, 413]).toContain(r.status);
    expect(r.conn!.up - 1000).toBeLessThanOrEqual(SLACK);
    expect(r.sent).toBeLessThan(size);
    await waitFor("tmp/ empty", () => tmpFiles().length === 0);
    await healthy();
  });

  for (const variant of ["Content-Length", "chunked"] as const) {
    it(`(d) a 1 MB form body to /login (${variant}): 413 quickly`, async () => {
      const from = srv.output().length;
      const size = 1_000_000;
      const prefix = Buffer.from(`email=${encodeURIComponent(DEMO.contributor.email)}&password=`);
      const r = await raw(
        head("POST", "/login", {
          "Content-Type": "application/x-www-form-urlencoded",
          ...(variant === "chunked" ? { "Transfer-Encoding": "chunked" } : { "Content-Length": size }),
        }),
        { size, prefix, chunked: variant === "chunked", rate: UPLINK },
      );
      const log = await waitFor("the cut-off log line", () => cutOffs(from, variant === "chunked" ? "chunked" : size)[0]);
      console.log(
        `[F6d] /login ${variant}: status ${r.status} in ${fmt(r.msToStatus ?? NaN)}; proxy accepted ${r.conn!.up} B, server read ${log.read} B (cap ${FORM_MAX} B)`,
      );
      expect(r.status, r.head).toBe(413);
      expect(r.msToStatus!).toBeLessThan(1_000);
      expect(r.head).toMatch(/content-type: text\/html/i);
      expect(r.conn!.up).toBeLessThanOrEqual(FORM_MAX + SLACK);
      expect(log.read).toBeLessThanOrEqual(FORM_MAX + SLACK);
    });

    it(`(d) a 1 MB JSON body to /api/v1/colour-finder (${variant}): 413 in the API's error shape`, async () => {
      const from = srv.output().length;
      const size = 1_000_000;
      const json = Buffer.from(JSON.stringify({ wires: Array.from({ length: 80_000 }, () => "Bk/Wh") }).slice(0, size - 2) + '"]');
      const r = await raw(
        head("POST", "/api/v1/colour-finder", {
          "Content-Type": "application/json",
          ...(variant === "chunked" ? { "Transfer-Encoding": "chunked" } : { "Content-Length": json.length }),
        }),
        { size: json.length, prefix: json, chunked: variant === "chunked", rate: UPLINK },
      );
      const log = await waitFor("the cut-off log line", () => cutOffs(from, variant === "chunked" ? "chunked" : json.length)[0]);
      console.log(
        `[F6d] colour-finder ${variant}: status ${r.status} in ${fmt(r.msToStatus ?? NaN)}; proxy accepted ${r.conn!.up} B, server read ${log.read} B (cap ${FORM_MAX} B)`,
      );
      expect(r.status, r.head).toBe(413);
      expect(r.msToStatus!).toBeLessThan(1_000);
      const bodyText = r.body.slice(r.body.indexOf("{"), r.body.lastIndexOf("}") + 1);
      expect(JSON.parse(bodyText).error.code).toBe("too_large");
      expect(r.conn!.up).toBeLessThanOrEqual(FORM_MAX + SLACK);
      expect(log.read).toBeLessThanOrEqual(FORM_MAX + SLACK);
    });
  }

  const early = [
    { what: "a 401 before the body is read (no session)", status: 401, headers: { Cookie: "" } },
    { what: "a 415 (not multipart) to the upload route", status: 415, headers: { "Content-Type": "application/octet-stream" } },
  ];
  for (const c of early) {
    it(`${c.what}: answered and closed, instead of leaving the uploader blocked until keepAliveTimeout`, async () => {
      const from = srv.output().length;
      const size = 20 * MiB;
      const r = await raw(head("POST", "/api/v1/photos", { ...uploadHeaders(size), ...c.headers }), {
        size,
        prefix: Buffer.from(partHead("photo", "early.jpg")),
        rate: UPLINK,
      });
      const log = await waitFor("the cut-off log line", () => cutOffs(from, size)[0]);
      console.log(`[F6] ${c.status} before reading: closed after ${fmt(r.msToClose)}; proxy accepted ${r.conn!.up} B, server read ${log.read} B`);
      expect(r.status, r.head).toBe(c.status);
      expect(r.head).toMatch(/\r\nConnection: close/i);
      // Before this change Node kept the connection for keepAliveTimeout (5 s) with the client stuck mid-body.
      expect(r.msToClose, "closed after at most the 1 s linger").toBeLessThan(2_000);
      expect(r.conn!.up).toBeLessThanOrEqual(SLACK);
      expect(log.read).toBeLessThanOrEqual(SLACK);
    });
  }
});

// ---- F7 ---------------------------------------------------------------------------------------------------------

describe("F7 slow uploads and slowloris", () => {
  interface Latency {
    page: number;
    health: number;
    n: number;
  }
  const summary = (l: { page: number[]; health: number[] }): Latency => ({ page: p975(l.page), health: p975(l.health), n: l.page.length + l.health.length });
  const show = (l: Latency) => `GET / ${fmt(l.page)}, GET /api/v1/health ${fmt(l.health)} (n=${l.n})`;

  /**
   * QUALITY F7: "normal clients' p97.5 ≤ 2× baseline". The baseline is measured for as long as the load lasts, right
   * before and right after it, and the larger of the two counts: this machine is shared (other test runs and
   * benchmarks come and go), and a disturbance that starts or ends during the measurement shows in one of them. Such
   * a triple is measured again, up to three times; a server that the load itself slows down fails every one.
   */
  async function withinTwiceBaseline<T>(label: string, baselineMs: number, load: () => Promise<T>): Promise<T> {
    const window = async () => {
      const t0 = performance.now();
      return summary(await normalClients({ until: () => performance.now() - t0 > baselineMs }));
    };
    let last: { baseline: Latency; under: Latency; result: T } | undefined;
    for (let trial = 1; trial <= 3; trial++) {
      const before = await window();
      let done = false;
      const running = load().finally(() => (done = true));
      const under = summary(await normalClients({ until: () => done }));
      const result = await running;
      const after = await window();
      const baseline = { page: Math.max(before.page, after.page), health: Math.max(before.health, after.health), n: before.n + after.n };
      last = { baseline, under, result };
      console.log(`[F7] ${label}, try ${trial}: p97.5 before ${show(before)}; under load ${show(under)}; after ${show(after)}`);
      if (under.page <= 2 * baseline.page && under.health <= 2 * baseline.health) break;
    }
    expect(last!.under.page, "GET / p97.5 ≤ 2× baseline").toBeLessThanOrEqual(2 * last!.baseline.page);
    expect(last!.under.health, "GET /api/v1/health p97.5 ≤ 2× baseline").toBeLessThanOrEqual(2 * last!.baseline.health);
    return last!.result;
  }

  it("warm-up of the normal clients", async () => {
    await normalClients({ count: 30 });
  });

  it("(a)+(b) 20 uploads trickling at 1 KB/s are aborted with 408 and leave no files; normal clients stay within 2× baseline", async () => {
    // First a complete photo part (written to tmp/ at once), then a second part that trickles: the abort must remove
    // the first photo's temp file.
    const prefix = Buffer.concat([Buffer.from(partHead("photo", "first.jpg")), jpegSmall, Buffer.from("\r\n"), Buffer.from(partHead("photo", "second.jpg"))]);
    const size = prefix.length + 5 * MiB;
    await withinTwiceBaseline("20 uploads trickling at 1 KB/s", GRACE_MS, async () => {
      const from = srv.output().length;
      const photosBefore = photoFiles();
      let maxTmp = 0;
      const watcher = setInterval(() => (maxTmp = Math.max(maxTmp, tmpFiles().length)), 50);
      const results = await Promise.all(
        Array.from({ length: 20 }, () =>
          raw(
            head("POST", "/api/v1/photos", { ...uploadHeaders(size), Accept: "application/json" }, appPort),
            { size, prefix, burst: prefix.length, rate: 1 * KiB },
            { port: appPort },
          ),
        ),
      );
      clearInterval(watcher);
      const answered = results.map((r) => r.msToStatus ?? NaN);
      const closed = results.map((r) => r.msToClose);
      console.log(
        `[F7] trickling uploads: statuses ${JSON.stringify(results.map((r) => r.status))}; answered after ${fmt(Math.min(...answered))}–${fmt(Math.max(...answered))}, ` +
          `closed after ${fmt(Math.min(...closed))}–${fmt(Math.max(...closed))} ` +
          `(grace ${GRACE_MS} ms); at most ${maxTmp} files in tmp/ meanwhile`,
      );
      for (const r of results) {
        expect(r.status, `${r.error ?? ""} ${r.head}`).toBe(408);
        expect(JSON.parse(r.body.slice(r.body.indexOf("{"), r.body.lastIndexOf("}") + 1)).error.code).toBe("request_timeout");
        expect(r.msToStatus!, "answered once the grace period is over").toBeGreaterThanOrEqual(GRACE_MS - 50);
        expect(r.msToStatus!, "and not much later (one rate check)").toBeLessThan(GRACE_MS + 1_000);
        expect(r.msToClose, "closed after at most the 1 s linger").toBeLessThan(GRACE_MS + 2_500);
      }
      expect(maxTmp, "the first photo of each upload did reach tmp/ (so the clean-up is real)").toBeGreaterThan(0);
      await waitFor("tmp/ empty after the aborts", () => tmpFiles().length === 0);
      expect(photoFiles(), "no photo was stored").toEqual(photosBefore);
      await waitFor("20 too-slow log lines", () => cutOffs(from).filter((l) => l.reason.startsWith("too-slow")).length === 20);
    });
    await healthy();
  });

  it("a plain multipart form to /submissions/:id trickling gets a plain 408 page", async () => {
    const started = await req(srv, "/api/v1/submissions", { json: { family: "rx750-four" }, session });
    expect(started.status, started.body).toBe(201);
    const id = (JSON.parse(started.body) as { submission: { id: number } }).submission.id;
    const size = 5 * MiB;
    const r = await raw(head("POST", `/submissions/${id}`, uploadHeaders(size)), { size, prefix: Buffer.from(partHead("photo", "slow.jpg")), rate: 1 * KiB });
    expect(r.status, r.head).toBe(408);
    expect(r.head).toMatch(/content-type: text\/html/i);
    expect(r.body).toMatch(/too slow/);
  });

  it("an upload above the minimum rate, lasting past the grace period, is stored", async () => {
    const big = await sharp({ create: { width: 700, height: 500, channels: 3, background: "#808080", noise: { type: "gaussian", mean: 128, sigma: 60 } } })
      .jpeg({ quality: 95 })
      .toBuffer();
    const body = multipart([big]);
    const rate = 2 * MIN_BPS;
    expect(body.length / rate, "the upload lasts longer than the grace period").toBeGreaterThan(GRACE_MS / 1000);
    const r = await raw(head("POST", "/api/v1/photos", { ...uploadHeaders(body.length), Connection: "close" }), { size: body.length, prefix: body, rate });
    console.log(`[F7] a ${body.length} B upload at ${rate} B/s: ${r.status} after ${fmt(r.msToClose)}`);
    expect(r.status, `${r.head}\n${r.body.slice(0, 300)}`).toBe(201);
  });

  it("(c) slowloris: 200 sockets sending header bytes slowly are closed by headersTimeout; normal clients stay within 2× baseline", async () => {
    const results = await withinTwiceBaseline("200 slow-header sockets", HEADERS_TIMEOUT_MS + CHECK_MS, async () => {
      const sockets = Array.from({ length: 200 }, () => {
        const t0 = performance.now();
        const s = net.connect(appPort, "127.0.0.1");
        let got = "";
        const text = "GET / HTTP/1.1\r\nHost: 127.0.0.1\r\nX-Slow: ";
        // QUALITY F7 drips 1 byte per 10 s against a 20 s headersTimeout; the same two bytes per socket here.
        let i = 0;
        s.on("data", (d) => (got += d.toString("latin1")));
        s.on("error", () => {});
        s.write(text.slice(0, 16)); // the request line, then a byte at a time
        i = 16;
        const drip = setInterval(
          () => {
            if (!s.destroyed) s.write(i < text.length ? text[i++] : "a");
          },
          Math.round(HEADERS_TIMEOUT_MS / 2.5),
        );
        return new Promise<{ ms: number; got: string }>((resolve) =>
          s.on("close", () => {
            clearInterval(drip);
            resolve({ ms: performance.now() - t0, got });
          }),
        );
      });
      return Promise.all(sockets);
    });
    const ms = results.map((r) => r.ms);
    console.log(
      `[F7] slowloris: 200 sockets closed after ${fmt(Math.min(...ms))}–${fmt(Math.max(...ms))} (headersTimeout ${HEADERS_TIMEOUT_MS} ms, ` +
        `checked every ${CHECK_MS} ms); ${results.filter((r) => r.got.startsWith("HTTP/1.1 408")).length} got a 408`,
    );
    for (const r of results) {
      expect(r.ms, "closed by headersTimeout, not earlier").toBeGreaterThanOrEqual(HEADERS_TIMEOUT_MS - 50);
      expect(r.ms, "closed within headersTimeout plus a check interval (and scheduling slack)").toBeLessThan(HEADERS_TIMEOUT_MS + 2 * CHECK_MS + 1_000);
      expect(r.got).toMatch(/^HTTP\/1\.1 408/);
    }
    await healthy();
  });
});
