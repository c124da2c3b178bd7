// The colour-code translator in a real browser: once hydrated it decodes as the rider types,
// through a fetcher on the JSON route, without the form being submitted.
import { describe, expect, it } from "vitest";
import { browserSuite, artifact, skipBrowser, waitForHydration } from "./browser";

describe.skipIf(skipBrowser)("colour codes page in Chromium", () => {
  const suite = browserSuite();
  const { open } = suite;

  it("decodes ws/rt live as it is typed (no submit) and shows white with red", async () => {
    const page = await open();
    const res = await page.goto("/colours");
    expect(res?.status()).toBe(200);
    await waitForHydration(page, "input[name=code]");
    const result = page.getByTestId("decode-result");
    await expect(result.innerText().then((t) => t.trim())).resolves.toBe("");

    const decodeCall = page.waitForResponse(
      (r) => {
        const u = new URL(r.url());
        return u.pathname.startsWith("/api/v1/colours/decode") && u.searchParams.get("code") === "ws/rt";
      },
      { timeout: 3_000 },
    );
    await page.getByRole("textbox", { name: "Code" }).pressSequentially("ws/rt", { delay: 20 });
    const typedAt = Date.now();
    // Within 2 s of the last key the panel names both colours.
    await page.waitForFunction(
      () => {
        const t = document.querySelector("[data-testid=decode-result]")?.textContent ?? "";
        return /\bwhite\b/i.test(t) && /\bred\b/i.test(t);
      },
      null,
      { timeout: 2_000 },
    );
    expect(Date.now() - typedAt).toBeLessThan(2_000);
    const call = await decodeCall;
    expect(call.status()).toBe(200);
    expect(new URL(call.url()).searchParams.get("code")).toBe("ws/rt");
    const text = await result.innerText();
    expect(text).toMatch(/\bwhite\b/i);
    expect(text).toMatch(/\bred\b/i);
    expect(text).toMatch(/IEC 60757:\s*\S+/);
    // Nothing was submitted: still the bare page address, no full navigation.
    expect(new URL(page.url()).search).toBe("");
    await page.screenshot({ path: artifact("colours.png"), fullPage: true });
  });
  it("decodes live in the chosen make's house and shows the green-and-yellow caution", async () => {
    const page = await open();
    await page.goto("/colours");
    await waitForHydration(page, "input[name=code]");
    // db/seeders/demo/makes.ts: brennwald writes DIN, where bl is blue (REFERENCE-FACTS 1.2, DIN 47002 [published]).
    await page.getByRole("combobox", { name: "Make" }).selectOption("brennwald");
    const call = page.waitForResponse(
      (r) => {
        const u = new URL(r.url());
        return u.pathname.startsWith("/api/v1/colours/decode") && u.searchParams.get("make") === "brennwald" && u.searchParams.get("code") === "Bl";
      },
      { timeout: 3_000 },
    );
    await page.getByRole("textbox", { name: "Code" }).pressSequentially("Bl", { delay: 20 });
    expect((await call).status()).toBe(200);
    await page.waitForFunction(() => /house style din/.test(document.querySelector("[data-testid=decode-result]")?.textContent ?? ""), null, {
      timeout: 2_000,
    });
    expect(await page.getByTestId("decode-result").innerText()).toMatch(/\bblue\b/);
    // IEC 60445 (REFERENCE-FACTS 5 [published]): green with yellow is kept for the protective conductor.
    await page.getByRole("combobox", { name: "Make" }).selectOption("asagiri");
    await page.getByRole("textbox", { name: "Code" }).fill("G/Y");
    await page.waitForSelector("[data-testid=decode-result] [data-warning=green_yellow_reserved]", { timeout: 2_000 });
    expect(await page.locator("[data-warning=green_yellow_reserved]").innerText()).toMatch(/IEC 60445/);
    expect(new URL(page.url()).search).toBe("");
  });
});
