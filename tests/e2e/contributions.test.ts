// The contributor's and the moderator's journeys in Chromium against the production build with the mail stand-in:
// a contributor starts an edit, uploads two photos (the progress bar is watched), corrects a colour in the pin map and
// sends it for review; a moderator returns it with a question; the contributor answers and resubmits; the moderator
// approves; the card shows the new revision and both photos; the stand-in holds both outcome mails. Plus the plain
// (no-JavaScript) photo form.
// Screenshots: tests/e2e/artifacts/submission.png, review-item.png, published-card.png.
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { artifact, browserSuite, newContext, skipBrowser, waitForMail, watchErrors } from "./browser";

const CARD = "rx750-four-pickups-socket";
const CONTRIBUTOR = { email: "contributor@loomlore.invalid", password: "crimp-and-solder-7" };
const MODERATOR = { email: "moderator@loomlore.invalid", password: "review-queue-lamp" };

/** A photo-like JPEG (noise, so it does not compress to nothing): about 1–2 MB at this size. */
async function photo(seed: number): Promise<Buffer> {
  const w = 1800,
    h = 1200;
  const raw = Buffer.alloc(w * h * 3);
  let x = (seed * 2654435761) >>> 0;
  for (let i = 0; i < raw.length; i++) {
    x ^= x << 13;
    x ^= x >>> 17;
    x ^= x << 5;
    raw[i] = x & 0xff;
  }
  return sharp(raw, { raw: { width: w, height: h, channels: 3 } })
    .jpeg({ quality: 92 })
    .toBuffer();
}

describe.skipIf(skipBrowser)("contributions and review in Chromium", () => {
  const suite = browserSuite({ mail: true, env: { MAIL_POLL_MS: "200" } });
  const { open, gotoHydrated } = suite;

  async function signIn(page: Page, who: { email: string; password: string }) {
    await gotoHydrated(page, "/login");
    await page.getByLabel("E-mail address").fill(who.email);
    await page.getByLabel("Password").fill(who.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => !u.pathname.startsWith("/login"));
  }

  it("upload two photos → fill the pin map → submit → returned with a question → answer → approved → the card shows it", async () => {
    const page = await open();
    await signIn(page, CONTRIBUTOR);
    await gotoHydrated(page, "/contribute");
    await page.locator("select[name=card]").selectOption(CARD);
    await page.getByRole("button", { name: "Start the edit" }).click();
    await page.waitForURL(/\/submissions\/\d+$/);
    const submissionUrl = new URL(page.url()).pathname;
    await gotoHydrated(page, submissionUrl);
    await expect(page.getByTestId("submission-state").innerText()).resolves.toBe("draft");

    // Photos: record every value the progress bar shows while the browser sends the body.
    await page.evaluate(() => {
      const w = window as unknown as { __progress: number[] };
      w.__progress = [];
      new MutationObserver(() => {
        const bar = document.querySelector("progress");
        if (bar) w.__progress.push(Number((bar as HTMLProgressElement).value));
      }).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ["value"] });
    });
    await page.locator("input[type=file][name=photo]").setInputFiles([
      { name: "wire-side.jpg", mimeType: "image/jpeg", buffer: await photo(1) },
      { name: "in-place.jpg", mimeType: "image/jpeg", buffer: await photo(2) },
    ]);
    await page.getByLabel("Caption (optional)").fill("Wire side, latch up");
    await page.getByRole("checkbox").check();
    await page.getByRole("button", { name: "Upload" }).click();
    await page.locator("main img[src$='.thumb.webp']").nth(1).waitFor({ timeout: 30_000 });
    const progress = await page.evaluate(() => (window as unknown as { __progress: number[] }).__progress);
    expect(progress.length, "the progress bar was shown").toBeGreaterThan(0);
    expect(Math.max(...progress)).toBe(100);
    expect(
      progress.every((v, i) => i === 0 || v >= progress[i - 1]),
      `progress only grows: ${progress.join(",")}`,
    ).toBe(true);
    expect(await page.locator("main img[src$='.thumb.webp']").count()).toBe(2);

    // The pin map: correct cavity 1's colour; the decoded colour shows as it is typed.
    const code = page.locator("input[name='pins.0.code']");
    await code.fill("L/W");
    await expect.poll(async () => page.locator("main").innerText()).toMatch(/blue/i);
    await page.getByLabel("Traced on the bike").check();
    await page.locator("textarea[name=sourceDetail]").fill("Traced on my 1979 bike, loom unwrapped.");
    await page.locator("input[name=summary]").fill("Cavity 1 is blue with a white tracer.");
    await page.screenshot({ path: artifact("submission.png"), fullPage: true });
    await page.getByRole("button", { name: "Send for review" }).click();
    await page.locator("[role=status]", { hasText: "Sent for review" }).waitFor();
    await expect.poll(() => page.getByTestId("submission-state").innerText()).toBe("in review");

    // The moderator, in a context of their own.
    const modContext: BrowserContext = await newContext(suite.browser, suite.server.url);
    const mod = await modContext.newPage();
    const modErrors = watchErrors(mod);
    try {
      await signIn(mod, MODERATOR);
      await gotoHydrated(mod, "/review");
      await mod.getByTestId("queue").getByRole("link", { name: "Pickup coils, loom socket" }).first().click();
      await mod.waitForURL(/\/review\/\d+$/);
      await mod.locator("main td", { hasText: "L/W" }).first().waitFor();
      await mod.screenshot({ path: artifact("review-item.png"), fullPage: true });
      await mod.getByLabel(/Question, reason or note/).fill("Which year was the bike you traced?");
      await mod.getByRole("button", { name: "Return with a question" }).click();
      await mod.waitForURL(/\/review\?done=return$/);

      // The contributor answers and resubmits.
      await gotoHydrated(page, submissionUrl);
      await expect.poll(() => page.getByTestId("submission-state").innerText()).toBe("returned");
      await page.getByText("Which year was the bike you traced?").first().waitFor();
      await page.getByLabel("Your answer").fill("A 1979 bike, UK model.");
      await page.getByRole("button", { name: "Send answer and resubmit" }).click();
      await page.locator("[role=status]", { hasText: "Sent for review" }).waitFor();

      // The moderator approves; the card shows the new revision and both photos.
      await gotoHydrated(mod, submissionUrl.replace("/submissions/", "/review/"));
      await mod.getByRole("button", { name: "Approve and publish" }).click();
      await mod.waitForURL(new RegExp(`/connectors/${CARD}\\?published=\\d+$`));
      const revision = Number(new URL(mod.url()).searchParams.get("published"));
      expect(revision).toBeGreaterThan(1);
      await expect(mod.getByTestId("revision").innerText()).resolves.toBe(`Revision ${revision}`);
      const imgs = mod.getByTestId("card-photos").locator("img");
      await expect(imgs.count()).resolves.toBe(2);
      for (let i = 0; i < 2; i++) {
        await expect.poll(() => imgs.nth(i).evaluate((el) => (el as HTMLImageElement).complete && (el as HTMLImageElement).naturalWidth)).toBeGreaterThan(0);
      }
      await mod.screenshot({ path: artifact("published-card.png"), fullPage: true });
      expect(modErrors).toEqual([]);
    } finally {
      await modContext.close();
    }

    // Both outcome mails are in the stand-in.
    await waitForMail(suite.server.mailHttp!, CONTRIBUTOR.email, /needs another look/);
    await waitForMail(suite.server.mailHttp!, CONTRIBUTOR.email, /is published/);
  });

  it("without JavaScript the plain photo form uploads and the page shows the photo", async () => {
    const ctx = await suite.noJsContext();
    const page = await open(ctx);
    await page.goto("/login");
    await page.getByLabel("E-mail address").fill(CONTRIBUTOR.email);
    await page.getByLabel("Password").fill(CONTRIBUTOR.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => !u.pathname.startsWith("/login"));
    await page.goto("/contribute");
    await page.locator("select[name=family]").selectOption("rx750-four");
    await page.getByRole("button", { name: "Start a new card" }).click();
    await page.waitForURL(/\/submissions\/\d+$/);
    await page.locator("input[type=file][name=photo]").setInputFiles([{ name: "plug.jpg", mimeType: "image/jpeg", buffer: await photo(3) }]);
    await page.getByRole("checkbox").check();
    await page.getByRole("button", { name: "Upload" }).click();
    await page.locator("[role=status]", { hasText: "One photo added" }).waitFor();
    await page.goto(new URL(page.url()).pathname);
    expect(await page.locator("main img[src$='.thumb.webp']").count()).toBe(1);
  });
});
