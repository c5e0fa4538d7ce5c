import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import { newClient } from "../helpers/app.ts";
import { screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

// The public pages rendered on the server and taken over by the browser (decision 059).
const SLUG = "aldermere-phase-2";
const PROJECT = `/projects/${SLUG}`;
const PUBLIC_PAGES = ["/", PROJECT, `${PROJECT}/updates`, `${PROJECT}/updates/hd-1-containment-goes-up`, `${PROJECT}/gallery`, `${PROJECT}/stories/the-plant-yard-then-and-now`, `${PROJECT}/timeline`, `${PROJECT}/facility`, `${PROJECT}/search?q=chill`];

const { app, browsers } = useBrowserApp();

/** Whether React has taken over the page's root (hydrateRoot marks its container). */
const hydrated = (page: Page) => page.evaluate(() => Object.keys(document.getElementById("root") ?? {}).some((k) => k.startsWith("__reactContainer")));

describe("server-rendered public pages in the browser", () => {
  it("show the project page's headline figure and readiness rows with JavaScript turned off", async () => {
    const visitor = (await newClient(app())).agent;
    const health = (await visitor.get(`/api/projects/${SLUG}/health`).expect(200)).body as { percentComplete: number };
    const blocks = ((await visitor.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer).blocks.filter((b) => b.audience === "public");
    const page = await (await browsers.launch(375, 812)).context.newPage();
    await (await page.context().newCDPSession(page)).send("Emulation.setScriptExecutionDisabled", { value: true });
    await page.goto(`${app().baseUrl}${PROJECT}`);
    expect(await hydrated(page)).toBe(false);
    const main = (await page.locator("main").textContent()) ?? "";
    expect(main).toContain(`${Math.round(health.percentComplete)}%`);
    expect(main).toContain("of the work is complete");
    const rows = page.getByTestId("readiness-row");
    expect(await rows.count()).toBe(blocks.length);
    for (const [i, b] of blocks.entries()) expect(await rows.nth(i).textContent()).toContain(b.name);
    await screenshot(page, "server-rendered-project-no-js-375");
  });

  it("hydrate every public page without a console error, at 375 and at 1280 px", async () => {
    for (const width of [375, 1280]) {
      const page = await (await browsers.launch(width, 812)).context.newPage();
      const errors = watchErrors(page);
      for (const path of PUBLIC_PAGES) {
        const res = await page.goto(`${app().baseUrl}${path}`);
        // The HTML arrived with the page in it, and its data for the browser.
        expect(await res!.text(), path).toContain('id="plumbline-state"');
        await expect.poll(() => hydrated(page), { message: path }).toBe(true);
        await page.waitForLoadState("networkidle");
        expect(errors, `${path} at ${width} px`).toEqual([]);
      }
    }
  });

  it("navigates in the browser after hydration, without loading a new document", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}${PROJECT}`);
    await expect.poll(() => hydrated(page)).toBe(true);
    await page.waitForLoadState("networkidle");
    // A mark on the window: a full page load would wipe it, a client navigation keeps it.
    await page.evaluate(() => Object.assign(window, { keptAcrossNavigation: true }));
    await page.getByRole("navigation", { name: "This project" }).getByRole("link", { name: "Updates" }).click();
    await page.waitForURL(`**${PROJECT}/updates`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toContain("Updates");
    await page.getByRole("link", { name: "HD-1 containment goes up" }).first().click();
    await page.waitForURL(`**${PROJECT}/updates/hd-1-containment-goes-up`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("HD-1 containment goes up");
    expect(await page.evaluate(() => (window as unknown as { keptAcrossNavigation?: boolean }).keptAcrossNavigation)).toBe(true);
    expect(errors).toEqual([]);
  });
});
