/**
 * The Content-Security-Policy of our responses (ASVS V14.4.3; QUALITY S14).
 *
 * Every response: no framing by other sites, no <base> or form posts to other origins, no plugins. An HTML document
 * also limits scripts: files from our own origin, and inline scripts only with the nonce made for that response
 * (React Router's inline hydration and scroll scripts carry it: `<ServerRouter nonce>` and renderToPipeableStream's
 * `nonce`, app/entry.server.tsx). An injected `<script>` without the nonce does not run.
 */
import { randomBytes } from "node:crypto";

export const BASE_CSP = "frame-ancestors 'none'; base-uri 'self'; form-action 'self'; object-src 'none'";

/** A fresh nonce for one response: 128 random bits, base64 (CSP3 asks for at least 128 bits). */
export function newNonce(): string {
  return randomBytes(16).toString("base64");
}

/** The policy of an HTML document whose inline scripts carry `nonce`. */
export function documentCsp(nonce: string): string {
  return `${BASE_CSP}; script-src 'self' 'nonce-${nonce}'`;
}
