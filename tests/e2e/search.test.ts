import AxeBuilder from "@axe-core/playwright";
import { describe, expect, it } from "vitest";
import { screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const { app, browsers } = useBrowserApp();

describe("the public search page", () => {
  for (const width of [375, 1280]) {
    it(`at ${width} px: a visitor searches HD-1, sees the count, the groups and the marked code, and opens the block`, async () => {
      const page = await (await browsers.launch(width, 812)).context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${app().baseUrl}/projects/${SLUG}/search`);
      await page.getByLabel("Words or codes").fill("HD-1");
      await page.getByRole("button", { name: "Search" }).click();
      await page.waitForURL(/search\?q=HD-1/);
      const count = page.getByTestId("search-count");
      await count.waitFor();
      expect(await count.textContent()).toMatch(/^\d+ results for “HD-1”$/);
      expect(await page.getByRole("heading", { level: 2, name: /^Capacity blocks/ }).count()).toBe(1);
      expect(await page.locator("mark", { hasText: "HD-1" }).count()).toBeGreaterThan(0);
      expect(await page.title()).toMatch(/^“HD-1” · Search · /);
      // Nothing wider than the screen.
      expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);
      const axe = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"]).analyze();
      expect(axe.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`)).toEqual([]);
      await screenshot(page, `search-hd-1-${width}`);
      await page.getByTestId("search-group-block").getByRole("link", { name: "HD-1", exact: true }).click();
      await page.waitForURL(/\/facility#block-\d+$/);
      expect(errors).toEqual([]);
    });
  }
});
