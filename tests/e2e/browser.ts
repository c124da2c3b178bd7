/** Chromium for the browser suites: find it, launch it with the flags this machine needs, watch pages for errors. */
import { existsSync, mkdirSync } from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, expect } from "vitest";
import { startServer, type TestServer } from "../support/server";

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

export interface WatchOptions {
  /** A URL the test expects to answer 404 (the not-found page itself). */
  allow404?: (url: string) => boolean;
  /** A URL the test makes answer 400 on purpose (a rejected form), whose "Failed to load resource" line is no page error. */
  allow400?: (url: string) => boolean;
}

/**
 * Collect console errors and uncaught page errors. Only a 404 for a favicon, and the 404s and 400s a test says it
 * expects, are let through.
 */
export function watchErrors(page: Page, opts: WatchOptions = {}): string[] {
  const errors: string[] = [];
  const allowed = (url: string) => /\/favicon\.(ico|svg)(\?|$)/.test(url) || (opts.allow404?.(url) ?? false);
  page.on("console", (msg) => {
    if (msg.type() !== "error") return;
    const url = msg.location().url ?? "";
    if (/status of 404/.test(msg.text()) && allowed(url)) return;
    if (/status of 400/.test(msg.text()) && opts.allow400?.(url)) return;
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
  await page.waitForFunction(
    (sel) => {
      const w = window as unknown as { __reactRouterDataRouter?: { state: { initialized: boolean; navigation: { state: string } } } };
      const router = w.__reactRouterDataRouter;
      const el = document.querySelector(sel);
      return Boolean(router?.state.initialized && router.state.navigation.state === "idle" && el && Object.keys(el).some((k) => k.startsWith("__reactFiber$")));
    },
    selector,
    { timeout: 10_000 },
  );
}

/**
 * One browser suite's plumbing, registered on the enclosing describe: a production server with a fresh database, a
 * browser, a default context (and a no-JavaScript one on demand), and pages whose console and page errors fail the test.
 */
export function browserSuite(serverOptions?: Parameters<typeof startServer>[0]) {
  let server: TestServer | undefined;
  let browser: Browser | undefined;
  let context: BrowserContext | undefined;
  let noJs: BrowserContext | undefined;
  let pages: { page: Page; errors: string[] }[] = [];

  beforeAll(async () => {
    requireChromium();
    server = await startServer(serverOptions);
    browser = await launchBrowser();
    context = await newContext(browser, server.url);
  });
  afterAll(async () => {
    await noJs?.close();
    await context?.close();
    await browser?.close();
    await server?.stop();
  });
  afterEach(async () => {
    const seen = pages;
    pages = [];
    for (const p of seen) await p.page.close();
    expect(seen.flatMap((p) => p.errors)).toEqual([]);
  });

  return {
    get server(): TestServer {
      return server!;
    },
    get browser(): Browser {
      return browser!;
    },
    get context(): BrowserContext {
      return context!;
    },
    /** A context with JavaScript off (made once), for the no-JavaScript paths. */
    async noJsContext(): Promise<BrowserContext> {
      noJs ??= await newContext(browser!, server!.url, { javaScriptEnabled: false });
      return noJs;
    },
    /** A page whose errors are checked after the test. */
    async open(ctx?: BrowserContext, opts: WatchOptions = {}): Promise<Page> {
      const page = await (ctx ?? context!).newPage();
      pages.push({ page, errors: watchErrors(page, opts) });
      return page;
    },
    /** Go to a URL, expect 200 and wait for hydration. */
    async gotoHydrated(page: Page, url: string): Promise<void> {
      const res = await page.goto(url);
      expect(res?.status(), `GET ${url}`).toBe(200);
      await waitForHydration(page);
    },
  };
}

export interface CapturedMail {
  to: string;
  subject: string;
  text: string;
}

/** The newest mail to an address whose subject matches, from the mail stand-in's JSON list (newest first). */
export async function waitForMail(mailHttp: string, to: string, subject: RegExp, timeoutMs = 20_000): Promise<CapturedMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const list = (await (await fetch(`${mailHttp}/messages?to=${encodeURIComponent(to)}`)).json()) as CapturedMail[];
    const m = list.find((x) => subject.test(x.subject));
    if (m) return m;
    if (Date.now() > deadline) throw new Error(`no mail "${subject}" to ${to}: ${list.map((x) => x.subject).join(" | ")}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}
