import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Locator, Page } from "playwright-core";
import { DEMO, newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
/** The phone the issue measures with. */
const PHONE = { width: 375, height: 812 };
/** WCAG 2.2, 2.5.8 Target Size (Minimum): 24 × 24 CSS px. */
const TARGET = 24;
const LONG_ORGANISATION = "AldermereCampusNeighbourhoodLiaisonAssociationOfResidentsAndBusinesses";

let t: TestApp;
const browsers = browserPool();

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  // A subscriber and an enquiry of our own, so the subscribers, enquiries and outbox pages have rows
  // (each sends a message, which the outbox lists).
  const visitor = await newClient(t);
  await visitor.agent
    .post("/api/subscriptions")
    .set("X-CSRF-Token", visitor.csrf)
    // An organisation written as one long word: the kind of value that widens a column past its frame.
    .send({ email: "phone.reader@example.org", name: "Ada Fenwick", organisation: LONG_ORGANISATION, interest: "prospect", frequency: "weekly", projectSlug: SLUG })
    .expect((r) => expect(r.status).toBeLessThan(300));
  await visitor.agent
    .post(`/api/projects/${SLUG}/enquiries`)
    .set("X-CSRF-Token", visitor.csrf)
    .send({ kind: "general", name: "Tom Brindle", email: "tom.brindle@example.org", message: "When is Hall 2A ready for service?" })
    .expect((r) => expect(r.status).toBeLessThan(300));
});
afterAll(async () => {
  await browsers.closeAll();
  await t?.close();
});

const sidewaysScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

/** Every control a row offers: its buttons, boxes, menus and download links. */
const controlsOf = (row: Locator) => row.locator('button, input:not([type="hidden"]), select, [role="button"], a[download]');

/** The page, the person who works on it, how its rows are found, and the controls each row must offer. */
const PAGES: Array<{ name: string; path: string; as: string; rows: string; actions?: RegExp }> = [
  { name: "updates", path: "/office/updates", as: DEMO.lead, rows: '[data-testid="row-card"]' },
  { name: "media", path: "/office/media", as: DEMO.lead, rows: 'ul[aria-label="Photos"] > li', actions: /^Edit / },
  { name: "enquiries", path: "/office/enquiries", as: DEMO.lead, rows: '[data-testid="row-card"]', actions: /^Open the enquiry from / },
  { name: "subscribers", path: "/office/subscribers", as: DEMO.lead, rows: '[data-testid="row-card"]', actions: /^Erase / },
  { name: "outbox", path: "/office/outbox", as: DEMO.admin, rows: '[data-testid="row-card"]' },
  { name: "users", path: "/office/users", as: DEMO.admin, rows: '[data-testid="row-card"]' },
  { name: "audit", path: "/office/audit", as: DEMO.admin, rows: '[data-testid="row-card"]' },
  { name: "programme", path: "/office/programme", as: DEMO.lead, rows: '[data-testid="row-card"]' },
  { name: "facility", path: "/office/facility", as: DEMO.lead, rows: '[data-testid="row-card"]', actions: /^Edit / },
];

describe("the site office at 375 px", () => {
  for (const p of PAGES) {
    it(`${p.name}: rows are cards, nothing scrolls sideways, and every row's controls are at least 24 × 24 px`, async () => {
      const page = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, t.baseUrl, p.as);
      await page.goto(`${t.baseUrl}${p.path}`);
      const rows = page.locator(p.rows);
      await rows.first().waitFor();
      // The office's tables are drawn as row cards at this width: no table is left to clip.
      expect(await page.locator("main table").count()).toBe(0);
      expect(await sidewaysScroll(page)).toBeLessThanOrEqual(0);

      const count = await rows.count();
      expect(count).toBeGreaterThan(0);
      for (let i = 0; i < count; i += 1) {
        const row = rows.nth(i);
        if (p.actions) expect(await row.getByRole("button", { name: p.actions }).count(), `row ${i} of ${p.name} offers its action`).toBeGreaterThan(0);
        const controls = controlsOf(row);
        for (let j = 0; j < (await controls.count()); j += 1) {
          const control = controls.nth(j);
          const label = (await control.getAttribute("aria-label")) ?? (await control.textContent()) ?? "";
          expect(await control.isVisible(), `${p.name} row ${i}: ${label} visible`).toBe(true);
          const box = await control.boundingBox();
          expect(box, `${p.name} row ${i}: ${label} has a box`).not.toBeNull();
          expect(Math.round(box!.width), `${p.name} row ${i}: ${label} width`).toBeGreaterThanOrEqual(TARGET);
          expect(Math.round(box!.height), `${p.name} row ${i}: ${label} height`).toBeGreaterThanOrEqual(TARGET);
          // Reachable: inside the phone's width, not pushed off its right edge.
          expect(box!.x, `${p.name} row ${i}: ${label} from the left`).toBeGreaterThanOrEqual(0);
          expect(box!.x + box!.width, `${p.name} row ${i}: ${label} to the right`).toBeLessThanOrEqual(PHONE.width);
        }
      }
      await page.mouse.move(0, 0);
      await screenshot(page, `office-phone-${p.name}-375`);
      expect(errors).toEqual([]);
      await page.close();
    });
  }
});

describe("the subscribers table at 1280 px", () => {
  it("shows each row's Data and Erase buttons whole, inside the table's visible width", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.goto(`${t.baseUrl}/office/subscribers`);
    const table = page.getByRole("table", { name: "Subscribers" });
    await table.waitFor();
    const scroller = table.locator("xpath=..");
    // No column is clipped: the table fits its frame, which has nothing to scroll sideways.
    expect(await scroller.evaluate((e) => e.scrollWidth - e.clientWidth)).toBeLessThanOrEqual(0);
    const frame = (await scroller.boundingBox())!;
    const erase = table.getByRole("button", { name: /^Erase / });
    expect(await erase.count()).toBeGreaterThan(0);
    for (const control of [...(await erase.all()), ...(await table.getByRole("link", { name: /^Data of / }).all())]) {
      const box = (await control.boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(frame.x);
      expect(box.x + box.width).toBeLessThanOrEqual(frame.x + frame.width);
      expect(box.height).toBeGreaterThanOrEqual(TARGET);
    }
    expect(await sidewaysScroll(page)).toBeLessThanOrEqual(0);
    await screenshot(page, "office-phone-subscribers-1280");
    expect(errors).toEqual([]);
    await page.close();
  });
});
