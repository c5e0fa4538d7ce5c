import { describe, expect, it } from "vitest";
import type { SitePlan } from "../../src/shared/schemas/site-plan.ts";
import { DEMO, newClient } from "../helpers/app.ts";
import { openAs, screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const PHONE = { width: 375, height: 812 };

const { app, browsers } = useBrowserApp();

describe("the site plan", () => {
  it("a lead draws an area by dragging on the grid at 375 px, names it, and a visitor sees it on the public facility page", async () => {
    const phone = await browsers.launch(PHONE.width, PHONE.height);
    const page = await openAs(phone.context, app().baseUrl, DEMO.lead);
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}/office/site-plan?project=${SLUG}`);
    const grid = page.getByTestId("site-plan-grid");
    await grid.waitFor();
    // The mouse works in the viewport: bring the whole plan into it first.
    await page.getByTestId("site-plan").evaluate((el) => el.scrollIntoView({ block: "center" }));
    const box = (await grid.boundingBox())!;
    const cell = { w: box.width / 24, h: box.height / 16 };
    const at = (x: number, y: number) => [box.x + (x + 0.5) * cell.w, box.y + (y + 0.5) * cell.h] as const;
    // The demo plan leaves columns 8–15 of rows 13 and 14 empty: drag from column 8, row 13 to column 12, row 14.
    await page.mouse.move(...at(8, 13));
    await page.mouse.down();
    await page.mouse.move(...at(10, 14), { steps: 4 });
    await page.mouse.move(...at(12, 14), { steps: 4 });
    await page.mouse.up();
    const dialog = page.getByRole("dialog", { name: "New area" });
    await dialog.waitFor();
    expect(await dialog.getByLabel("Column").inputValue()).toBe("8");
    expect(await dialog.getByLabel("Width in cells").inputValue()).toBe("5");
    expect(await dialog.getByLabel("Height in cells").inputValue()).toBe("2");
    await dialog.getByLabel("Name").fill("Loading bay");
    await dialog.getByLabel("Kind").selectOption("other");
    await screenshot(page, "site-plan-office-375-new-area");
    await dialog.getByRole("button", { name: "Save" }).click();
    await dialog.waitFor({ state: "hidden" });
    await expect.poll(() => page.locator('[data-area="Loading bay"]').count()).toBe(1);
    await screenshot(page, "site-plan-office-375");
    expect(errors).toEqual([]);

    const visitor = await (await browsers.launch(1280)).context.newPage();
    const visitorErrors = watchErrors(visitor);
    await visitor.goto(`${app().baseUrl}/projects/${SLUG}/facility`);
    const link = visitor.getByRole("link", { name: /^Loading bay: no programme work listed/ });
    await link.waitFor();
    expect(await link.getAttribute("href")).toBe(`/projects/${SLUG}/gallery?area=Loading%20bay`);
    // The staff-only compound of the demo plan is never drawn for a visitor.
    expect(await visitor.locator('[data-area="Contractors\' compound"]').count()).toBe(0);
    await screenshot(visitor, "site-plan-public-facility-1280");
    expect(visitorErrors).toEqual([]);
  });

  it("tapping an area on the gallery's plan filters the photographs to that area", async () => {
    const client = await newClient(app());
    const plan = (await client.agent.get(`/api/projects/${SLUG}/site-plan`).expect(200)).body as SitePlan;
    const yard = plan.areas.find((a) => a.name === "Plant yard")!;
    expect(yard.status).not.toBeNull();
    const all = (await client.agent.get(`/api/projects/${SLUG}/gallery`).expect(200)).body as { items: Array<{ areas: string[] }> };
    const inYard = all.items.filter((p) => p.areas.includes("Plant yard")).length;
    expect(inYard).toBeGreaterThan(0);
    expect(inYard).toBeLessThan(all.items.length);

    const page = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}/projects/${SLUG}/gallery`);
    await expect.poll(() => page.getByTestId("gallery-photo").count()).toBe(all.items.length);
    const area = page.getByRole("link", { name: /^Plant yard: / });
    expect(await area.getAttribute("aria-label")).toContain(yard.status === "complete" ? "complete" : "");
    await area.click();
    await page.waitForURL(/gallery\?area=Plant(%20|\+)yard$/);
    await expect.poll(() => page.getByTestId("gallery-photo").count()).toBe(inYard);
    expect(await page.getByLabel("Area", { exact: true }).inputValue()).toBe("Plant yard");
    expect(await page.getByRole("link", { name: /^Plant yard: / }).getAttribute("aria-current")).toBe("true");
    await screenshot(page, "site-plan-gallery-375-plant-yard");
    expect(errors).toEqual([]);
  });
});
