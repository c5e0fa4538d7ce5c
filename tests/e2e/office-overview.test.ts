import { describe, expect, it } from "vitest";
import { DEMO } from "../helpers/app.ts";
import { screenshot, signInAs, useBrowserApp, watchErrors } from "../helpers/browser.ts";

/** WCAG 2.2, 2.5.8 Target Size (Minimum): 24 × 24 CSS px. */
const TARGET = 24;

const { app, browsers } = useBrowserApp();

describe("the office overview opens with the work waiting", () => {
  for (const [width, height] of [
    [1280, 900],
    [375, 812],
  ] as const) {
    it(`at ${width} px: a lead's counts come first, each a link of at least 24 px to where the work is done`, async () => {
      const { context } = await browsers.launch(width, height);
      const page = await context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, app().baseUrl, DEMO.lead);
      const panel = page.locator("section", { has: page.getByRole("heading", { name: "Waiting for you" }) });
      const links = panel.getByRole("link");
      await links.first().waitFor();
      // First on the page: above the other panels.
      const [waitingTop, projectsTop] = await Promise.all([panel.boundingBox(), page.getByRole("heading", { name: "Builds in this site office" }).boundingBox()]);
      expect(waitingTop!.y).toBeLessThan(projectsTop!.y);
      expect(await links.count()).toBeGreaterThan(0);
      for (const link of await links.all()) {
        const box = (await link.boundingBox())!;
        expect(box.height, await link.innerText()).toBeGreaterThanOrEqual(TARGET);
        expect(box.width, await link.innerText()).toBeGreaterThanOrEqual(TARGET);
      }
      expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);
      expect(await page.getByText(/sink/i).count()).toBe(0);
      await screenshot(page, `office-overview-lead-${width}`);
      await panel.getByRole("link", { name: /photos? to clear/ }).click();
      await page.waitForURL(/\/office\/media\/review\?project=aldermere-phase-2$/);
      expect(errors).toEqual([]);
    });
  }

  it("marketing sees only the work marketing does", async () => {
    const { context } = await browsers.launch(375, 812);
    const page = await signInAs(await context.newPage(), app().baseUrl, DEMO.marketing);
    const panel = page.locator("section", { has: page.getByRole("heading", { name: "Waiting for you" }) });
    await panel.locator("ul, p").first().waitFor();
    await page.waitForFunction(() => !document.body.innerText.includes("Counting what is waiting"));
    const text = await panel.innerText();
    expect(text).not.toMatch(/to review|to clear|overdue|commissioning/);
    await screenshot(page, "office-overview-marketing-375");
  });
});
