// Account journeys in a real browser against the production build with the mail stand-in: join → confirm the address
// from the mailed link → sign in → save a card → see it in the garage → sign out; and a failed join form that keeps
// what was typed, with the error beside the password (hydrated and without JavaScript).
// Screenshots: tests/e2e/artifacts/join.png (the failed form), garage.png (the garage with the saved card).
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserSuite, artifact, skipBrowser, waitForHydration, waitForMail } from "./browser";

const CARD = "/connectors/rx750-four-ignition-unit-plug";
const CARD_NAME = "Ignition unit, loom plug";

describe.skipIf(skipBrowser)("account journeys in Chromium", () => {
  const suite = browserSuite({ mail: true });
  const { open, gotoHydrated } = suite;

  it("join → confirm from the mail → sign in → the header shows the name → save a card → the garage lists it → sign out", async () => {
    const who = { displayName: "Journey Rider", email: "journey-rider@loomlore.invalid", password: "carburettor-float-height" };
    const page = await open();

    await gotoHydrated(page, "/join");
    await page.getByLabel("Your name (shown with your contributions)").fill(who.displayName);
    await page.getByLabel("E-mail address").fill(who.email);
    await page.getByLabel("Password").fill(who.password);
    await page.getByRole("button", { name: "Join" }).click();
    await page.locator("h1", { hasText: "Check your inbox" }).waitFor();
    expect(await page.locator("main strong").innerText()).toBe(who.email);

    // The mail's link points at APP_URL (http://localhost:<port> here); open the same path on the server under test.
    const mail = await waitForMail(suite.server.mailHttp!, who.email, /Confirm your e-mail address/);
    const link = /https?:\/\/\S+\/verify\?token=[A-Za-z0-9_-]+/.exec(mail.text);
    expect(link, mail.text).not.toBeNull();
    const url = new URL(link![0]);
    await gotoHydrated(page, url.pathname + url.search);
    expect(await page.locator("h1").innerText()).toBe("Confirm your address");
    await page.getByRole("button", { name: "Confirm my address" }).click();
    await page.locator("h1", { hasText: "Address confirmed" }).waitFor();

    await page.getByRole("link", { name: "Sign in", exact: true }).last().click();
    await page.waitForURL(/\/login\?notice=verified$/);
    await page.locator("[role=status]", { hasText: "Your address is confirmed" }).waitFor();
    await page.getByLabel("E-mail address").fill(who.email);
    await page.getByLabel("Password").fill(who.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/garage$/);
    await expect(page.getByTestId("signed-in-as").innerText()).resolves.toBe(who.displayName);
    const cookies = await suite.context.cookies();
    const session = cookies.find((c) => c.name === "__Host-loomlore");
    expect(session, "the session cookie reached the browser").toBeDefined();
    expect(session).toMatchObject({ httpOnly: true, secure: true, sameSite: "Lax", path: "/" });
    expect(await page.evaluate(() => document.cookie), "HttpOnly: not readable from scripts").not.toContain("loomlore");
    const me = await page.request.get("/api/v1/me");
    expect(await me.json()).toMatchObject({ user: { displayName: who.displayName, role: "contributor" } });

    await gotoHydrated(page, CARD);
    await page.getByRole("button", { name: "Save to my garage" }).click();
    await page.locator("[role=status]", { hasText: "Saved to your garage." }).waitFor();
    await page.getByText("★ In your garage").waitFor();

    await page.locator("header").getByRole("link", { name: "Garage", exact: true }).click();
    await page.waitForURL(/\/garage$/);
    await page.locator("h1", { hasText: `${who.displayName}'s garage` }).waitFor();
    const saved = page.locator("section[aria-labelledby=cards] li a[href^='/connectors/']");
    expect(await saved.count()).toBe(1);
    expect(await saved.first().innerText()).toBe(CARD_NAME);
    expect(await saved.first().getAttribute("href")).toBe(CARD);
    await page.screenshot({ path: artifact("garage.png"), fullPage: true });

    await page.locator("header").getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/login\?notice=signed-out$/);
    await waitForHydration(page);
    await page.locator("[role=status]", { hasText: "You are signed out." }).waitFor();
    expect(await page.locator("header").getByRole("link", { name: "Sign in" }).count()).toBe(1);
    expect(await page.getByTestId("signed-in-as").count()).toBe(0);
    expect(
      (await suite.context.cookies()).find((c) => c.name === "__Host-loomlore"),
      "the cookie is gone",
    ).toBeUndefined();
    expect((await page.request.get("/api/v1/me")).status()).toBe(401);
    const garage = await page.goto("/garage");
    expect(new URL(page.url()).pathname, `after sign-out /garage answers ${garage?.status()}`).toBe("/login");
  });

  async function failedJoin(page: Page) {
    const typed = { displayName: "Short Password", email: "short-password@loomlore.invalid" };
    await page.getByLabel("Your name (shown with your contributions)").fill(typed.displayName);
    await page.getByLabel("E-mail address").fill(typed.email);
    await page.getByLabel("Password").fill("abcdefghijk"); // 11 characters
    await page.getByRole("button", { name: "Join" }).click();
    const error = page.locator("#password-error");
    await error.waitFor();
    expect(await error.innerText()).toMatch(/Use at least 12 characters/);
    // Beside the password field: in the same field wrapper, right under the input, and announced by it.
    const password = page.locator("input[name=password]");
    await expect(password.getAttribute("aria-invalid")).resolves.toBe("true");
    await expect(password.getAttribute("aria-describedby")).resolves.toContain("password-error");
    const [inputBox, errorBox] = [await password.boundingBox(), await error.boundingBox()];
    expect(errorBox!.y).toBeGreaterThan(inputBox!.y);
    expect(errorBox!.y - (inputBox!.y + inputBox!.height)).toBeLessThan(80);
    expect(Math.abs(errorBox!.x - inputBox!.x)).toBeLessThan(4);
    await expect(page.locator("input[name=email]").inputValue()).resolves.toBe(typed.email);
    await expect(page.locator("input[name=displayName]").inputValue()).resolves.toBe(typed.displayName);
    expect(await page.locator("#email-error, #displayName-error").count()).toBe(0);
    expect(await page.locator("h1").innerText()).toBe("Join Loomlore");
  }

  it("a failed join keeps e-mail and name and shows the error beside the password (hydrated)", async () => {
    const page = await open(suite.context, { allow400: (u) => /\/join/.test(u) });
    await gotoHydrated(page, "/join");
    await failedJoin(page);
    await page.screenshot({ path: artifact("join.png"), fullPage: true });
  });

  it("a failed join keeps e-mail and name and shows the error beside the password (no JavaScript: the server re-renders it)", async () => {
    const page = await open(await suite.noJsContext(), { allow400: (u) => /\/join/.test(u) });
    const res = await page.goto("/join");
    expect(res?.status()).toBe(200);
    await failedJoin(page);
    // The password is never sent back in the page.
    expect(await page.content()).not.toContain("abcdefghijk");
  });
});
