// The production server: React Router's request handler on Express, with the few things the stock
// `react-router-serve` cannot be told: our error shape for undecodable URLs and explicit timeouts.
import path from "node:path";
import { pathToFileURL } from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";

const root = path.resolve(import.meta.dirname, "..");
const build = await import(pathToFileURL(path.join(root, "build/server/index.js")).href);

const app = express();
app.disable("x-powered-by");
// Behind a proxy, TRUST_PROXY (e.g. "loopback" or a hop count) lets req.ip be the client's address, not the proxy's.
if (process.env.TRUST_PROXY) app.set("trust proxy", /^\d+$/.test(process.env.TRUST_PROXY) ? Number(process.env.TRUST_PROXY) : process.env.TRUST_PROXY);
app.use(compression());
// Headers every response carries (ASVS V14.4): no MIME sniffing, no framing by other sites, no referrer leaks.
app.use((_req, res, next) => {
  res.set({
    "X-Content-Type-Options": "nosniff",
    "X-Frame-Options": "DENY",
    "Referrer-Policy": "strict-origin-when-cross-origin",
    "Content-Security-Policy": "frame-ancestors 'none'; base-uri 'self'; form-action 'self'; object-src 'none'",
  });
  next();
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
// The client's address reaches loaders and actions through the load context (rate limits are per address).
app.all("*", createRequestHandler({ build, mode: process.env.NODE_ENV, getLoadContext: (req) => ({ ip: req.ip ?? req.socket.remoteAddress ?? "unknown" }) }));

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST;
const server = host ? app.listen(port, host) : app.listen(port);
server.on("listening", () => console.log(`[loomlore] listening on http://${host ?? "localhost"}:${port}`));
// Slow clients must not hold sockets: headers within 20 s (slowloris), a whole request within 2 minutes.
server.headersTimeout = 20_000;
server.requestTimeout = 120_000;
server.keepAliveTimeout = 5_000;
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    server.close(() => process.exit(0));
    setTimeout(() => process.exit(0), 3_000).unref();
  });
}
