// Journey 1 of PRODUCT.md in a real browser against the production build: find the family,
// open the card, read it from either side, follow a wire, print it; plus the 404 page.
import { writeFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserSuite, artifact, skipBrowser, waitForHydration } from "./browser";

const CARD = "/connectors/rx750-four-ignition-unit-plug";

describe.skipIf(skipBrowser)("library journeys in Chromium", () => {
  const suite = browserSuite();
  const { open, gotoHydrated } = suite;

  /** Cavity centres as drawn: each cavity group's translate(x y) in the card's face view. */
  async function cavityPositions(page: Page): Promise<Record<string, { x: number; y: number }>> {
    const groups = page.locator("main svg[role=img] g[data-cavity]");
    const out: Record<string, { x: number; y: number }> = {};
    for (const g of await groups.all()) {
      const cavity = (await g.getAttribute("data-cavity"))!;
      const m = /translate\(\s*(-?[\d.]+)[ ,]+(-?[\d.]+)\s*\)/.exec((await g.getAttribute("transform")) ?? "");
      expect(m, `transform of cavity ${cavity}`).not.toBeNull();
      out[cavity] = { x: Number(m![1]), y: Number(m![2]) };
    }
    return out;
  }

  /** Where each cavity is on screen, relative to the drawing's horizontal centre (px). */
  async function screenOffsets(page: Page): Promise<Record<string, number>> {
    return page.evaluate(() => {
      const svg = document.querySelector("main svg[role=img]")!;
      const box = svg.getBoundingClientRect();
      const mid = box.left + box.width / 2;
      const out: Record<string, number> = {};
      for (const g of svg.querySelectorAll("g[data-cavity]")) {
        // The cavity's own square, not the whole group: the pin-1 marker sits off one corner.
        const r = g.querySelector(":scope > rect:not([data-highlight])")!.getBoundingClientRect();
        out[g.getAttribute("data-cavity")!] = r.left + r.width / 2 - mid;
      }
      return out;
    });
  }

  it("home → family → card: makes, systems with thumbnails, pin map and face view", async () => {
    const page = await open();
    await gotoHydrated(page, "/");
    await expect(page.title()).resolves.toMatch(/Loomlore/);
    const makes = page.locator("section[aria-labelledby=makes-heading] article");
    expect(await makes.count()).toBe(4);
    for (const m of await makes.all()) {
      expect((await m.locator("h3").innerText()).trim()).not.toBe("");
      expect(await m.locator("a[href^='/families/']").count()).toBeGreaterThan(0);
    }
    await page.screenshot({ path: artifact("home.png"), fullPage: true });

    await page.getByRole("link", { name: "RX750 Four", exact: true }).click();
    await page.waitForURL("**/families/rx750-four");
    await page.locator("h1", { hasText: "RX750 Four" }).waitFor();
    const systems = await page.locator("main section h2").allInnerTexts();
    expect(systems).toContain("Ignition");
    expect(systems.length).toBeGreaterThanOrEqual(3);
    const cards = page.locator("main section li a[href^='/connectors/']");
    const n = await cards.count();
    expect(n).toBeGreaterThan(4);
    // Every card in the list carries a face thumbnail with at least one cavity drawn.
    expect(await page.locator("main section li a[href^='/connectors/'] svg[role=img]").count()).toBe(n);
    expect(await cards.first().locator("svg g[data-cavity]").count()).toBeGreaterThan(0);
    await page.screenshot({ path: artifact("family.png"), fullPage: true });

    await cards.filter({ has: page.getByText("Ignition unit, loom plug", { exact: true }) }).click();
    await page.waitForURL(`**${CARD}`);
    await page.locator("h1", { hasText: "Ignition unit, loom plug" }).waitFor();
    await expect(page.locator("h1").innerText()).resolves.toBe("Ignition unit, loom plug");

    const rows = page.locator("section[aria-labelledby=pins-heading] tbody tr");
    expect(await rows.count()).toBe(8);
    const codes: Record<string, string> = {};
    for (const r of await rows.all()) codes[(await r.getAttribute("data-cavity"))!] = (await r.locator("td").first().innerText()).trim();
    expect(Object.keys(codes).sort()).toEqual(["1", "2", "3", "4", "5", "6", "7", "8"]);
    expect(codes["5"]).toBe("Sb");

    const face = page.locator("main svg[role=img]");
    expect(await face.count()).toBe(1);
    await expect(face.getAttribute("data-view")).resolves.toBe("mating");
    const cavities = face.locator("g[data-cavity]");
    expect(await cavities.count()).toBe(8);
    for (const g of await cavities.all()) {
      const cavity = (await g.getAttribute("data-cavity"))!;
      const texts = (await g.locator("text").allTextContents()).map((t) => t.trim());
      expect(texts, `texts drawn in cavity ${cavity}`).toContain(cavity);
      await expect(g.locator("text[data-code]").textContent()).resolves.toBe(codes[cavity]);
    }
    expect(await face.isVisible()).toBe(true);
    const box = (await face.boundingBox())!;
    expect(box.width).toBeGreaterThan(250);
    await expect(page.getByTestId("view-caption").innerText()).resolves.toMatch(/mating face/i);
    await page.screenshot({ path: artifact("card-mating.png"), fullPage: true });
  });

  it("quick jump: typing a family name and submitting opens it", async () => {
    const page = await open();
    await gotoHydrated(page, "/");
    const box = page.getByRole("combobox", { name: "Jump to a family" });
    await box.fill("RX400");
    await box.press("Enter");
    await page.waitForURL("**/families/rx400-four");
    await page.locator("h1", { hasText: "RX400 Four" }).waitFor();
  });

  it("without JavaScript: the jump form and the card's Wire side link still work", async () => {
    const page = await open(await suite.noJsContext());
    await page.goto("/");
    await page.getByRole("combobox", { name: "Jump to a family" }).fill("RX400");
    await page.getByRole("button", { name: "Open" }).click();
    await page.waitForURL("**/families/rx400-four");
    await expect(page.locator("h1").innerText()).resolves.toContain("RX400 Four");

    await page.goto(CARD);
    await page.getByRole("link", { name: "Wire side" }).click();
    await page.waitForURL(`**${CARD}?view=wire`);
    await expect(page.getByTestId("view-caption").innerText()).resolves.toMatch(/wire side/i);
    await expect(page.locator("main svg[role=img]").getAttribute("data-view")).resolves.toBe("wire");
  });

  it("switching to the wire side mirrors the face view left to right", async () => {
    const page = await open();
    await gotoHydrated(page, CARD);
    const mating = await cavityPositions(page);
    const matingScreen = await screenOffsets(page);
    expect(Object.keys(mating)).toHaveLength(8);
    expect(new Set(Object.values(mating).map((p) => p.x)).size).toBeGreaterThan(1);

    await page.getByRole("link", { name: "Wire side" }).click();
    await page.waitForURL(`**${CARD}?view=wire`);
    await page.locator("main svg[role=img][data-view=wire]").waitFor();
    await expect(page.getByRole("link", { name: "Wire side" }).getAttribute("aria-current")).resolves.toBe("true");
    await expect(page.getByTestId("view-caption").innerText()).resolves.toMatch(/wire side/i);
    const face = page.locator("main svg[role=img]");
    await expect(face.getAttribute("data-view")).resolves.toBe("wire");
    await expect(face.getAttribute("aria-label")).resolves.toMatch(/^Wire side/);

    const wire = await cavityPositions(page);
    const wireScreen = await screenOffsets(page);
    expect(Object.keys(wire).sort()).toEqual(Object.keys(mating).sort());
    for (const [cavity, p] of Object.entries(mating)) {
      expect(wire[cavity].x, `x of cavity ${cavity}`).toBeCloseTo(-p.x, 3);
      expect(wire[cavity].y, `y of cavity ${cavity}`).toBeCloseTo(p.y, 3);
      // and on screen, not only in the attribute
      expect(Math.abs(wireScreen[cavity] + matingScreen[cavity]), `screen x of cavity ${cavity}`).toBeLessThan(2);
    }

    // The drawing agrees with the JSON face route the API documents.
    const api = await page.request.get(`/api/v1/connectors/rx750-four-ignition-unit-plug/face?view=wire`);
    expect(api.status()).toBe(200);
    const geo = (await api.json()) as { cavities: { cavity: string; x: number; y: number }[] };
    const scale = (wire["1"].x - wire["4"].x) / (geo.cavities.find((c) => c.cavity === "1")!.x - geo.cavities.find((c) => c.cavity === "4")!.x);
    expect(scale).toBeGreaterThan(0);
    for (const c of geo.cavities) expect(wire[c.cavity].x, `API x of cavity ${c.cavity}`).toBeCloseTo(c.x * scale, 3);

    await page.screenshot({ path: artifact("card-wire.png"), fullPage: true });
  });

  it("following a wire lands on the other card with that cavity highlighted in the same colour", async () => {
    const page = await open();
    await gotoHydrated(page, CARD);
    const from = page.locator("section[aria-labelledby=pins-heading] tbody tr[data-cavity='5']");
    const code = (await from.locator("td").first().innerText()).trim();
    expect(code).not.toBe("");
    await from.getByRole("link", { name: "Pickup coils, loom socket, cavity 1" }).click();
    await page.waitForURL((u) => u.pathname === "/connectors/rx750-four-pickups-socket" && u.searchParams.get("cavity") === "1");
    await page.locator("h1", { hasText: "Pickup coils, loom socket" }).waitFor();
    await expect(page.locator("h1").innerText()).resolves.toBe("Pickup coils, loom socket");

    const current = page.locator("section[aria-labelledby=pins-heading] tbody tr[aria-current='true']");
    expect(await current.count()).toBe(1);
    await expect(current.getAttribute("data-cavity")).resolves.toBe("1");
    await expect(
      current
        .locator("td")
        .first()
        .innerText()
        .then((t) => t.trim()),
    ).resolves.toBe(code);
    expect(await current.isVisible()).toBe(true);
    // The face view marks the same cavity.
    expect(await page.locator("main svg[role=img] g[data-cavity='1'] [data-highlight]").count()).toBe(1);
    expect(await page.locator("main svg[role=img] [data-highlight]").count()).toBe(1);
  });

  // A4 at 96 px/in is 794 px wide; less the app's 12 mm @page margins leaves about 703 px of line.
  const A4_CONTENT = { width: 703, height: 1032 };
  let printedPages: number | undefined;

  it("print media hides the page chrome and keeps the card; the PDF is well formed", async () => {
    const page = await open();
    await page.setViewportSize(A4_CONTENT);
    await gotoHydrated(page, CARD);
    // Each of these exists (so "not visible" is not vacuous) and is hidden on paper.
    const chrome = {
      "site header": page.locator("body > header"),
      breadcrumb: page.locator("nav[aria-label=Breadcrumb]"),
      "view switch": page.locator('[role=group][aria-label="Which side you are looking at"]'),
      "site footer": page.locator("body > footer"),
      "print button": page.locator("main button", { hasText: "Print this card" }),
    };
    for (const [name, loc] of Object.entries(chrome)) {
      expect(await loc.count(), name).toBe(1);
      expect(await loc.isVisible(), `${name} on screen`).toBe(true);
    }
    await expect(chrome["view switch"].getAttribute("class")).resolves.toMatch(/\bno-print\b/);
    await page.emulateMedia({ media: "print" });
    for (const [name, loc] of Object.entries(chrome)) expect(await loc.isVisible(), `${name} in print`).toBe(false);
    // What matters on paper is still there.
    expect(await page.locator("h1").isVisible()).toBe(true);
    expect(await page.locator("main svg[role=img]").isVisible()).toBe(true);
    expect(await page.locator("section[aria-labelledby=pins-heading] tbody tr").count()).toBe(8);
    await page.screenshot({ path: artifact("card-print.png"), fullPage: true });

    const pdf = (await page.pdf({ format: "A4" })).toString("latin1");
    writeFileSync(artifact("card-print.pdf"), pdf, "latin1");
    expect(pdf.startsWith("%PDF-")).toBe(true);
    const pageObjects = (pdf.match(/\/Type\s*\/Page(?![a-zA-Z])/g) ?? []).length;
    const counts = [...pdf.matchAll(/\/Type\s*\/Pages\b[^>]*?\/Count\s+(\d+)|\/Count\s+(\d+)[^>]*?\/Type\s*\/Pages\b/g)].map((m) => Number(m[1] ?? m[2]));
    expect(pageObjects, "PDF page objects").toBeGreaterThan(0);
    if (counts.length > 0) expect(Math.max(...counts), "/Count of the page tree").toBe(pageObjects);
    printedPages = pageObjects;
    console.info(`printed card: ${pageObjects} A4 page(s)`);
  });

  // The print stylesheet fits a card on one A4 page (issue: "a print stylesheet that fits the card on one page").
  it("the printed card fits on one A4 page", () => {
    expect(printedPages, "page count from the print test").toBeTypeOf("number");
    expect(printedPages, "the printed card should fit on one A4 page").toBe(1);
  });

  it("a phone-sized screen shows the card without horizontal page scroll", async () => {
    const page = await open();
    await page.setViewportSize({ width: 390, height: 844 });
    await gotoHydrated(page, CARD);
    await page.screenshot({ path: artifact("card-mobile.png"), fullPage: true });
    const face = (await page.locator("main svg[role=img]").boundingBox())!;
    expect(face.width).toBeGreaterThan(250);
    expect(face.x + face.width).toBeLessThanOrEqual(390);
    const scrollWidth = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(scrollWidth, "page wider than the phone").toBeLessThanOrEqual(390);
  });

  it("an unknown family is a real 404 with the Nothing here page", async () => {
    const page = await open(suite.context, { allow404: (u) => u.endsWith("/families/no-such-family") });
    const res = await page.goto("/families/no-such-family");
    expect(res?.status()).toBe(404);
    await expect(page.locator("h1").innerText()).resolves.toBe("Nothing here");
    await expect(page.locator("main").innerText()).resolves.toContain("no-such-family");
    await waitForHydration(page);
  });
});
