/** Chromium for the browser suites: find it, launch it with the flags this machine needs, watch pages for errors. */
import { existsSync, mkdirSync } from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from "playwright-core";

export const chromiumPath = process.env.CHROMIUM_PATH || "/usr/bin/chromium";
export const haveChromium = existsSync(chromiumPath);
export const inCI = process.env.CI === "true";

/** Skip the suites only outside CI; in CI a missing browser is a failure (see requireChromium). */
export const skipBrowser = !haveChromium && !inCI;
if (skipBrowser) {
  console.warn(`Browser tests skipped: no Chromium at ${chromiumPath} (set CHROMIUM_PATH, or install Debian's chromium).`);
}

/** Call first in beforeAll: throws in CI when the browser is missing, so the suite fails instead of passing empty. */
export function requireChromium(): void {
  if (!haveChromium) throw new Error(`CI=true but no Chromium at ${chromiumPath} (set CHROMIUM_PATH or install chromium).`);
}

export const LAUNCH_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export async function launchBrowser(): Promise<Browser> {
  requireChromium();
  return chromium.launch({ executablePath: chromiumPath, headless: true, args: LAUNCH_ARGS });
}

/** One fresh context per test file; pass javaScriptEnabled:false for the no-JS journeys. */
export async function newContext(browser: Browser, baseURL: string, opts: BrowserContextOptions = {}): Promise<BrowserContext> {
  return browser.newContext({ baseURL, viewport: { width: 1280, height: 900 }, ...opts });
}

export const artifactsDir = path.resolve(import.meta.dirname, "artifacts");
export function artifact(name: string): string {
  mkdirSync(artifactsDir, { recursive: true });
  return path.join(artifactsDir, name);
}

/**
 * Collect console errors and uncaught page errors. Only a 404 for a favicon (or for a URL
 * the test expects to be 404, e.g. the not-found page itself) is let through.
 */
export function watchErrors(page: Page, opts: { allow404?: (url: string) => boolean } = {}): string[] {
  const errors: string[] = [];
  const allowed = (url: string) => /\/favicon\.(ico|svg)(\?|$)/.test(url) || (opts.allow404?.(url) ?? false);
  page.on("console", (msg) => {
    if (msg.type() !== "error") return;
    const url = msg.location().url ?? "";
    if (/status of 404/.test(msg.text()) && allowed(url)) return;
    errors.push(`console.error ${msg.text()}${url ? ` (${url})` : ""}`);
  });
  page.on("pageerror", (err) => errors.push(`pageerror ${err.message}`));
  return errors;
}

/**
 * Resolve once React has hydrated the document: the router exists, has finished its initial
 * load, and React has attached its props to a DOM node (done in the hydration commit).
 */
export async function waitForHydration(page: Page, selector = "main"): Promise<void> {
  await page.waitForFunction((sel) => {
    const w = window as unknown as { __reactRouterDataRouter?: { state: { initialized: boolean; navigation: { state: string } } } };
    const router = w.__reactRouterDataRouter;
    const el = document.querySelector(sel);
    return Boolean(router?.state.initialized && router.state.navigation.state === "idle" && el && Object.keys(el).some((k) => k.startsWith("__reactFiber$")));
  }, selector, { timeout: 10_000 });
}
