import { describe, expect, it } from "vitest";
import { useBrowserApp } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

const { app, browsers } = useBrowserApp();

/**
 * The footer starts below the fold on the first paint of every public page, so nothing that
 * fills in above it (the page's data, its photos) pushes it down in view: a shift the phone
 * benchmark counted at 0.12 before the main region kept a screen's height.
 */
describe("reserved space on the public pages", () => {
  for (const [width, height] of [
    [375, 812],
    [1280, 900],
  ] as const) {
    it(`the footer is below the fold when the page first paints at ${width} px, however short the page`, async () => {
      const b = await browsers.launch(width, height);
      for (const path of [`/projects/${SLUG}`, `/projects/${SLUG}/gallery`, "/sign-in", "/forgot-password"]) {
        const page = await b.context.newPage();
        // The first frame in which the footer exists: measured in the page, before anything else runs.
        await page.addInitScript(() => {
          const w = window as unknown as { __footerTop?: number };
          new MutationObserver((_, observer) => {
            const footer = document.querySelector("footer");
            if (footer && w.__footerTop === undefined) {
              w.__footerTop = footer.getBoundingClientRect().top;
              observer.disconnect();
            }
          }).observe(document, { childList: true, subtree: true });
        });
        await page.goto(`${app().baseUrl}${path}`);
        await page.locator("footer").waitFor();
        const first = await page.evaluate(() => (window as unknown as { __footerTop?: number }).__footerTop);
        expect(first, path).toBeGreaterThanOrEqual(height);
        // And still there once the page has settled.
        await page.waitForLoadState("networkidle");
        const settled = await page.locator("footer").evaluate((f) => f.getBoundingClientRect().top);
        expect(settled, path).toBeGreaterThanOrEqual(height);
        await page.close();
      }
    });
  }
});
