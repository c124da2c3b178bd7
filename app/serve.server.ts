// The production server: React Router's request handler on Express, with the few things the stock
// `react-router-serve` cannot be told: our error shape for undecodable URLs, explicit timeouts, and what to do with a
// request body nobody is going to read to the end (QUALITY.md F6 and F7).
import { env } from "./env.server.ts"; // first: the settings are checked before anything else loads (a bad one stops the start)
import { randomBytes } from "node:crypto";
import http from "node:http";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import { BASE_CSP, newNonce } from "./services/csp.server.ts";
import { watchBody } from "./server/body-watch.server.ts";

// tsx turns source maps on for stack traces; Sequelize captures a stack for every query (to attach to a failure), and
// with maps on each capture looks every frame up: ≈ 2 ms of a 21 ms card request under load (CPU profile, 2 cores).
// The build we serve has no maps anyway, so a production stack points at build/server/index.js either way;
// NODE_OPTIONS=--enable-source-maps keeps them.
// (NODE_OPTIONS is Node's own variable, not a Loomlore setting.)
if (env.NODE_ENV === "production" && !process.execArgv.includes("--enable-source-maps") && !/--enable-source-maps/.test(process.env.NODE_OPTIONS ?? "")) {
  process.setSourceMapsEnabled(false);
}
const root = path.resolve(import.meta.dirname, "..");
const build = await import(pathToFileURL(path.join(root, "build/server/index.js")).href);

const app = express();
app.disable("x-powered-by");
// Behind a proxy, TRUST_PROXY (e.g. "loopback" or a hop count) lets req.ip be the client's address, not the proxy's.
if (env.TRUST_PROXY) app.set("trust proxy", /^\d+$/.test(env.TRUST_PROXY) ? Number(env.TRUST_PROXY) : env.TRUST_PROXY);
app.use(compression());
// Headers every response carries (ASVS V14.4): no MIME sniffing, no framing by other sites, no referrer leaks. Set when
// the response's head is written, and only where the route set none of its own (React Router's adapter appends a
// route's headers, which would otherwise give "nosniff, nosniff" or two competing policies).
const SECURITY_HEADERS: Record<string, string> = {
  "X-Content-Type-Options": "nosniff",
  "X-Frame-Options": "DENY",
  "Referrer-Policy": "strict-origin-when-cross-origin",
  // HTML documents get the stricter policy with a script nonce from app/entry.server.tsx
  "Content-Security-Policy": BASE_CSP,
};
// Over HTTPS (directly, or X-Forwarded-Proto from a trusted proxy) browsers are told to stay on HTTPS (ASVS V14.4.5,
// RFC 6797): a year, this host only.
const HSTS = "max-age=31536000";
app.use((req, res, next) => {
  const writeHead = res.writeHead;
  res.writeHead = function (this: typeof res, ...args: Parameters<typeof res.writeHead>) {
    for (const [k, v] of Object.entries(SECURITY_HEADERS)) if (!this.hasHeader(k)) this.setHeader(k, v);
    if (req.secure && !this.hasHeader("Strict-Transport-Security")) this.setHeader("Strict-Transport-Security", HSTS);
    return writeHead.apply(this, args);
  } as typeof res.writeHead;
  next();
});
app.use(watchBody);

// The methods the app answers. The Fetch API refuses to build a Request for TRACE, TRACK and CONNECT (a TypeError
// that became a 500); they, and any method not listed, get 405 with the Allow header (RFC 9110 §15.5.6).
const METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"];
app.use((req, res, next) => {
  if (METHODS.includes(req.method)) return next();
  const error = { code: "method_not_allowed", message: `${req.method} is not a method this site answers.` };
  res.status(405).set("Allow", METHODS.join(", "));
  if (req.path.startsWith("/api/")) res.json({ error });
  else res.type("text/plain").send(error.message);
});

// A state-changing request that a browser marks as cross-site is refused even without an Origin header (React Router's
// check of page actions only compares an Origin that is present; API routes run assertSameOrigin). OWASP CSRF cheat
// sheet, Fetch Metadata: refuse Sec-Fetch-Site: cross-site on unsafe methods.
app.use((req, res, next) => {
  if (["GET", "HEAD", "OPTIONS"].includes(req.method) || req.get("Origin") || req.get("Sec-Fetch-Site") !== "cross-site") return next();
  // The API's error shape, as the resource routes' own origin check answers (assertSameOrigin).
  res.status(403).json({ error: { code: "forbidden", message: "Requests from other sites are not accepted." } });
});

// A malformed percent-encoding (%ff) would reach Express's param decoding and come back as its HTML page;
// answer it here, in the API's error shape for API addresses.
app.use((req, res, next) => {
  try {
    decodeURIComponent(req.path);
    next();
  } catch {
    const error = { code: "bad_request", message: "The address is not valid URL encoding." };
    if (req.path.startsWith("/api/")) res.status(400).json({ error });
    else res.status(400).type("html").send(`<!doctype html><title>Bad address · Loomlore</title><p>${error.message} <a href="/">Back to the library</a></p>`);
  }
});

// Behind a trusted proxy, React Router's Express adapter takes only the port from X-Forwarded-Host and keeps the
// Host header's port otherwise (https://public.example:3000), so request.url stops matching the browser's Origin and
// every post fails the CSRF check. Express's req.hostname already honours the forwarded host only for a trusted
// proxy: when it does, let the forwarded host stand in for Host.
app.use((req, _res, next) => {
  const forwarded = req.get("X-Forwarded-Host")?.split(",")[0]?.trim();
  if (forwarded && app.enabled("trust proxy") && req.hostname === forwarded.split(":")[0]) req.headers.host = forwarded;
  next();
});

// Fingerprinted assets never change; everything else in public/ may.
app.use("/assets", express.static(path.join(root, "build/client/assets"), { immutable: true, maxAge: "1y" }));
app.use(express.static(path.join(root, "build/client"), { maxAge: "1h" }));
// The client's address reaches loaders and actions through the load context (rate limits are per address), and so
// does a fresh Content-Security-Policy nonce for the document rendered (app/entry.server.tsx), and an id that the log
// line and the error page of an unexpected error share (ASVS V7.4.1).
app.all(
  "*",
  createRequestHandler({
    build,
    mode: env.NODE_ENV,
    getLoadContext: (req) => ({ ip: req.ip ?? req.socket.remoteAddress ?? "unknown", cspNonce: newNonce(), requestId: randomBytes(4).toString("hex") }),
  }),
);

// Slow clients must not hold sockets (QUALITY F7, the "Slow clients" anchor: CVE-2018-12122): headers within 20 s
// (HEADERS_TIMEOUT_MS, slowloris), a whole request within 2 minutes. Node checks both only every
// connectionsCheckingInterval (default 30 s, Node docs http.createServer), which would let a slow-header socket live
// up to 50 s: check every quarter of headersTimeout, between 250 ms and 2 s.
const headersTimeout = env.HEADERS_TIMEOUT_MS; // at most 20 s (the setting's own bound)
const requestTimeout = 120_000;
const server = http.createServer(
  {
    headersTimeout,
    requestTimeout,
    keepAliveTimeout: 5_000,
    connectionsCheckingInterval: Math.max(250, Math.min(2_000, Math.floor(headersTimeout / 4))),
  },
  app,
);

// The app starts (migrate, seed when asked, the workers: app/startup.server.ts) before the server listens, so no
// request waits on a migration; on SIGTERM the server stops taking requests, the workers finish their pass, then exit.
await build.entry.module.startApp();
const port = env.PORT;
const host = env.HOST;
if (host) server.listen(port, host);
else server.listen(port);
server.on("listening", () => console.log(`[loomlore] listening on http://${host ?? "localhost"}:${port}`));
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    server.close(() => void build.entry.module.stopApp().finally(() => process.exit(0))); // after requests in flight
    server.closeIdleConnections();
    setTimeout(() => process.exit(0), 5_000).unref();
  });
}
