import AxeBuilder from "@axe-core/playwright";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO, startTestApp, type TestApp } from "../helpers/app.ts";
import { launchBrowser, screenshot, signInAs as signInThroughForm, watchErrors } from "../helpers/browser.ts";
import { makePatternedImage } from "../helpers/images.ts";

let t: TestApp;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  // The worker runs in the app, as under npm start: the page sees processing turn into ready.
  t = await startTestApp({}, { listen: true, mediaWorker: true });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await t?.close();
});

const stamp = Date.now().toString(36);
const NAMES = [`chiller-lift-${stamp}.jpg`, `pipe-run-${stamp}.jpg`, `plinths-${stamp}.jpg`];

const signInAs = (page: Page, email: string) => signInThroughForm(page, t.baseUrl, email, /\/office$/);

/** axe-core's WCAG checks (labels, contrast, roles) on the page as it stands. */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).analyze();
  return result.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

const mediaRow = (name: string) => t.db("media_items").where({ original_name: name }).first("id", "status", "sensitivity", "flagged_for_review", "alt_text", "focal_x", "focal_y");

describe("the media library in the browser", () => {
  it("marketing uploads three photos through the drop zone, sees each bar reach ready, tags them, and sets a focal point", async () => {
    const context = browser.context;
    const page = await context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, DEMO.marketing);
    await page.getByRole("link", { name: "Media" }).click();
    await page.waitForURL(/\/office\/media/);
    await page.getByRole("heading", { name: "Media library", level: 1 }).waitFor();

    const files = await Promise.all(
      NAMES.map(async (name, i) => ({ name, mimeType: "image/jpeg", buffer: await makePatternedImage({ width: 1400, height: 933, noise: 3, seed: 40 + i }) })),
    );
    // Record every state each upload row passes through, as the user would see it.
    await page.evaluate(() => {
      const seen: Record<string, string[]> = {};
      (window as unknown as { phases: typeof seen }).phases = seen;
      const note = (el: Element) => {
        const name = el.getAttribute("data-upload");
        const phase = el.getAttribute("data-phase");
        if (!name || !phase) return;
        const list = (seen[name] ??= []);
        if (list[list.length - 1] !== phase) list.push(phase);
      };
      new MutationObserver((records) => {
        for (const r of records) {
          if (r.type === "attributes" && r.target instanceof Element) note(r.target);
          r.addedNodes.forEach((n) => n instanceof Element && n.matches("[data-upload]") && note(n));
        }
      }).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ["data-phase"] });
    });
    await page.getByTestId("media-file-input").setInputFiles(files);
    for (const name of NAMES) {
      const row = page.locator(`[data-upload="${name}"]`);
      await row.getByRole("progressbar").waitFor();
      await expect.poll(() => row.getAttribute("data-phase"), { timeout: 30_000 }).toBe("ready");
      expect(await row.getByRole("progressbar").getAttribute("aria-valuenow")).toBe("100");
      expect(await row.getByTestId("upload-state").textContent()).toMatch(/Ready/);
    }
    const phases = await page.evaluate(() => (window as unknown as { phases: Record<string, string[]> }).phases);
    for (const name of NAMES) {
      // Each bar shows the upload, then the processing, then the photo ready.
      const seen = phases[name] ?? [];
      expect(seen).toContain("uploading");
      expect(seen).toContain("processing");
      expect(seen.indexOf("uploading")).toBeLessThan(seen.indexOf("processing"));
      expect(seen[seen.length - 1]).toBe("ready");
    }
    await screenshot(page, "media-uploads-ready");
    for (const name of NAMES) expect(await mediaRow(name)).toMatchObject({ status: "ready", sensitivity: "unreviewed" });

    // Select the three in the grid and tag them together.
    for (const name of NAMES) {
      const card = page.locator(`[data-media-name="${name}"]`);
      await card.waitFor();
      await card.getByLabel(`Select ${name}`).check();
    }
    const bar = page.getByRole("region", { name: "Tag the selected photos" });
    await expect.poll(() => bar.getByText("3 selected").isVisible()).toBe(true);
    await bar.getByLabel("Area to add").fill("Plant yard");
    await bar.getByLabel("System to add").selectOption("cooling");
    await bar.getByRole("button", { name: "Add tags" }).click();
    await page.getByText("Tagged 3 photos").waitFor();
    for (const name of NAMES) {
      const { id } = await mediaRow(name);
      const tags = await t.db("media_tags").where({ media_id: id }).orderBy(["kind", "value"]).select("kind", "value");
      expect(tags).toEqual([
        { kind: "area", value: "Plant yard" },
        { kind: "system", value: "cooling" },
      ]);
    }
    await screenshot(page, "media-tagged");

    // Edit one: alt text, the security tag, and a focal point clicked on the photo.
    await page.locator(`[data-media-name="${NAMES[0]}"]`).getByRole("button", { name: `Edit ${NAMES[0]}` }).click();
    const panel = page.getByRole("form", { name: `Edit ${NAMES[0]}` });
    await panel.waitFor();
    await panel.getByLabel("Alt text").fill("A chiller hanging from a crane above its concrete plinth");
    await panel.getByRole("checkbox", { name: "Security", exact: true }).check();
    const picker = panel.getByTestId("focal-picker");
    const box = (await picker.boundingBox())!;
    await picker.click({ position: { x: box.width * 0.25, y: box.height * 0.75 } });
    expect(await picker.getAttribute("aria-label")).toMatch(/25 % across, 75 % down/);
    await picker.press("ArrowRight");
    expect(await picker.getAttribute("aria-label")).toMatch(/27 % across, 75 % down/);
    await panel.getByRole("button", { name: "Save photo" }).click();
    await page.getByText("Photo saved").waitFor();
    await expect.poll(async () => (await mediaRow(NAMES[0]!)).flagged_for_review).toBe(1);
    const saved = await mediaRow(NAMES[0]!);
    expect(saved).toMatchObject({ alt_text: "A chiller hanging from a crane above its concrete plinth", sensitivity: "unreviewed" });
    expect(saved.focal_x).toBeCloseTo(0.27, 2);
    expect(saved.focal_y).toBeCloseTo(0.75, 2);
    await screenshot(page, "media-edit-focal-point");
    expect(await axeViolations(page)).toEqual([]);
    // Marketing sees no way to change sensitivity.
    expect(await panel.getByLabel("Sensitivity").count()).toBe(0);
    expect(errors).toEqual([]);
    await page.close();
  });

  it("a refused file shows the server's reason on its own row, and the good file beside it is kept", async () => {
    const page = await browser.context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/media`);
    await page.getByRole("heading", { name: "Media library", level: 1 }).waitFor();
    const good = `gate-${stamp}.jpg`;
    const bad = `site-notes-${stamp}.jpg`;
    await page.getByTestId("media-file-input").setInputFiles([
      { name: good, mimeType: "image/jpeg", buffer: await makePatternedImage({ width: 800, height: 533, noise: 2, seed: 77 }) },
      { name: bad, mimeType: "image/jpeg", buffer: Buffer.from("Week 14 site notes: generator 3 delivered.\n") },
    ]);
    const badRow = page.locator(`[data-upload="${bad}"]`);
    await expect.poll(() => badRow.getAttribute("data-phase"), { timeout: 20_000 }).toBe("refused");
    expect(await badRow.getByRole("alert").textContent()).toMatch(/plain text/);
    await expect.poll(() => page.locator(`[data-upload="${good}"]`).getAttribute("data-phase"), { timeout: 30_000 }).toBe("ready");
    expect(await page.locator(`[data-upload="${good}"]`).getByRole("alert").count()).toBe(0);
    expect(await mediaRow(bad)).toBeUndefined();
    await screenshot(page, "media-upload-refused-file");
    // The browser logs the refused request (415) as a failed load; nothing else may appear.
    expect(errors.filter((e) => !/status of 415/.test(e))).toEqual([]);
    await page.close();
  });

  it("a lead clears the three in the review queue, the security-flagged one shown first with its flag", async () => {
    const lead = await launchBrowser();
    try {
      const page = await lead.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, DEMO.lead);
      await page.goto(`${t.baseUrl}/office/media`);
      await page.getByRole("link", { name: "Review queue" }).click();
      await page.getByRole("heading", { name: "Photo review", level: 1 }).waitFor();
      const queue = page.getByRole("list", { name: "Photos waiting for review" });
      await queue.waitFor();
      const flagged = queue.locator(`[data-media-name="${NAMES[0]}"]`);
      await flagged.getByText("Security review").waitFor();
      // Security-flagged photos lead the queue.
      const order = await queue.locator("[data-media-name]").evaluateAll((els) => els.map((e) => e.getAttribute("data-media-name")));
      const flaggedNames = await queue.locator("[data-media-name]:has([data-flag='security'])").evaluateAll((els) => els.map((e) => e.getAttribute("data-media-name")));
      expect(order.slice(0, flaggedNames.length)).toEqual(flaggedNames);
      expect(flaggedNames).toContain(NAMES[0]);
      await screenshot(page, "media-review-queue");
      expect(await axeViolations(page)).toEqual([]);

      for (const name of NAMES) {
        await queue.getByRole("button", { name: `Clear ${name} for publishing` }).click();
        await page.getByText(`${name} is cleared for publishing`).waitFor();
        await queue.locator(`[data-media-name="${name}"]`).waitFor({ state: "detached" });
      }
      for (const name of NAMES) expect(await mediaRow(name)).toMatchObject({ sensitivity: "cleared", flagged_for_review: 0 });
      await screenshot(page, "media-review-cleared");
      expect(errors).toEqual([]);
    } finally {
      await lead.close();
    }
  });

  it("the library works at phone width (360 px) without sideways scrolling", async () => {
    const phone = await launchBrowser({ width: 360, height: 740 });
    try {
      const page = await phone.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, DEMO.marketing);
      await page.goto(`${t.baseUrl}/office/media`);
      await page.getByRole("heading", { name: "Media library", level: 1 }).waitFor();
      await page.locator("[data-media-name]").first().waitFor();
      // The placeholder colour shows under every card until its image has loaded.
      const background = await page.locator("[data-media-name] [data-loaded]").first().evaluate((el) => getComputedStyle(el).backgroundColor);
      expect(background).not.toBe("rgba(0, 0, 0, 0)");
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await screenshot(page, "media-library-phone");
      expect(await axeViolations(page)).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await phone.close();
    }
  });
});
