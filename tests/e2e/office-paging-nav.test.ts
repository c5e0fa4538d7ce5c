import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { readerRows } from "../helpers/subscriber-rows.ts";
import { DEMO, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

// Decision 056: on a phone the site office's navigation shows every section and marks the one you
// are in; the subscribers list comes 50 at a time, the page kept in the address.

const SLUG = "aldermere-phase-2";
const PHONE = { width: 375, height: 812 };
const MARK = "paging-e2e.example.org";

let t: TestApp;
const browsers = browserPool();

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  const project = await t.db("projects").where({ slug: SLUG }).first("id");
  // Newer than anything the demo seeded, so they head the list in a known order.
  const base = Date.now() + 3_600_000;
  // Sixty readers of our own, newest last, so the list runs past one page whatever the demo holds.
  await t.db("subscribers").insert(readerRows(project.id, 60, MARK, base));
});
afterAll(async () => {
  await t?.db("subscribers").where("email", "like", `%@${MARK}`).delete();
  await browsers.closeAll();
  await t?.close();
});

const sideways = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

describe("the site office's navigation at 375 px", () => {
  it("shows every section inside the screen and marks the current one by more than colour", async () => {
    const page = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.admin, /\/office$/);
    await page.goto(`${t.baseUrl}/office/subscribers`);
    const nav = page.getByRole("navigation", { name: "Sections" });
    await nav.getByRole("link", { name: "Subscribers" }).waitFor();
    expect(await sideways(page)).toBeLessThanOrEqual(0);
    expect(await nav.evaluate((e) => e.scrollWidth - e.clientWidth)).toBeLessThanOrEqual(0);

    const links = nav.getByRole("link");
    const names = await links.allTextContents();
    // An administrator's sections, each of them on screen (not scrolled away to the side).
    for (const section of ["Overview", "Programme", "Media", "Updates", "Subscribers", "Digests", "Outbox", "Users", "Audit log"]) expect(names).toContain(section);
    for (const link of await links.all()) {
      const box = (await link.boundingBox())!;
      const name = await link.textContent();
      expect(box.x, `${name} from the left`).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width, `${name} to the right`).toBeLessThanOrEqual(PHONE.width);
      expect(Math.round(box.height), `${name} height`).toBeGreaterThanOrEqual(24);
    }

    const current = nav.locator('[aria-current="page"]');
    expect(await current.count()).toBe(1);
    expect(await current.textContent()).toBe("Subscribers");
    const look = (el: Element) => ({ weight: Number(getComputedStyle(el).fontWeight), bar: parseFloat(getComputedStyle(el).borderBottomWidth) });
    const here = await current.evaluate(look);
    const other = await nav.getByRole("link", { name: "Media" }).evaluate(look);
    // Heavier type and a thick bar under it: the mark holds in greyscale.
    expect(here.weight).toBeGreaterThanOrEqual(600);
    expect(other.weight).toBeLessThan(600);
    expect(here.bar).toBeGreaterThanOrEqual(3);
    expect(await nav.evaluate((e) => getComputedStyle(e.querySelector('[aria-current="page"]')!).borderBottomColor)).not.toBe("rgba(0, 0, 0, 0)");
    await screenshot(page, "office-nav-375");

    await nav.getByRole("link", { name: "Audit log" }).click();
    await page.waitForURL(/\/office\/audit$/);
    // The route's data arrives after the address changes; the mark follows the page shown.
    await expect.poll(() => nav.locator('[aria-current="page"]').textContent()).toBe("Audit log");
    expect(errors).toEqual([]);
    await page.close();
  });
});

describe("the subscribers list pages at 375 px", () => {
  it("shows 50 at a time, says which, and ?page=2 holds the next ones through back and forward", async () => {
    const page = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.goto(`${t.baseUrl}/office/subscribers`);
    const pager = page.getByRole("navigation", { name: "Pages of subscribers" });
    await pager.waitFor();
    const total = Number((await page.locator("#subs-h").textContent())!.match(/^(\d+)/)![1]);
    expect(total).toBeGreaterThanOrEqual(60);
    expect(await pager.getByTestId("pager-range").textContent()).toContain(`1–50 of ${total}`);
    const cards = page.locator('[data-testid="row-card"]');
    expect(await cards.count()).toBe(50);
    // Newest first: our sixtieth reader heads the first page.
    expect(await cards.first().textContent()).toContain("Paging Reader 60");
    expect(await sideways(page)).toBeLessThanOrEqual(0);

    await pager.getByRole("link", { name: "Older →" }).click();
    await page.waitForURL(/\/office\/subscribers\?page=2$/);
    await expect.poll(() => pager.getByTestId("pager-range").textContent()).toContain(`51–${Math.min(100, total)} of ${total}`);
    expect(await cards.count()).toBe(Math.min(50, total - 50));
    expect(await cards.first().textContent()).toContain("Paging Reader 10");
    await screenshot(page, "office-subscribers-page-2-375");

    await page.goBack();
    await page.waitForURL(/\/office\/subscribers$/);
    await expect.poll(() => cards.first().textContent()).toContain("Paging Reader 60");
    await page.goForward();
    await page.waitForURL(/\?page=2$/);
    await expect.poll(() => cards.first().textContent()).toContain("Paging Reader 10");

    // Opened straight from the address.
    await page.goto(`${t.baseUrl}/office/subscribers?page=2`);
    await expect.poll(() => pager.getByTestId("pager-range").textContent()).toContain(`51–`);
    expect(errors).toEqual([]);
    await page.close();
  });
});
