import { describe, expect, it } from "vitest";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import { DEMO, newClient, signIn } from "../helpers/app.ts";
import { ARTIFACTS, screenshot, signInAs, watchErrors, useBrowserApp } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
/** The phone the issue measures with: 375 × 812. */
const PHONE = { width: 375, height: 812 };

const { app, browsers } = useBrowserApp();

/** "2027-04-16" → "16 Apr 2027", as the glance writes dates. */
function shortDate(day: string): string {
  const [y, m, d] = day.split("-").map(Number) as [number, number, number];
  return new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" }).format(new Date(Date.UTC(y, m - 1, d)));
}

async function facilityAs(email?: string): Promise<FacilityAnswer> {
  const client = email ? await signIn(app(), email) : await newClient(app());
  return (await client.agent.get(`/api/projects/${SLUG}/facility`).expect(200)).body as FacilityAnswer;
}

/** Each row must say what the API says: name, and the forecast and planned dates in words. */
function expectRowSays(text: string, b: FacilityAnswer["blocks"][number]): void {
  expect(text).toContain(b.name);
  if (b.readyForService) expect(text).toContain("Ready for service");
  else if (b.forecastReadyDate) expect(text).toContain(`Forecast ${shortDate(b.forecastReadyDate)}`);
  if (!b.readyForService && b.baselineReadyDate && b.slipWorkingDays) expect(text).toContain(`planned ${shortDate(b.baselineReadyDate)}`);
}

describe("readiness at a glance", () => {
  it("on the public project page at 375 px shows every public block's row above the fold, with the API's dates", async () => {
    const facility = await facilityAs();
    const blocks = facility.blocks.filter((b) => b.audience === "public");
    expect(blocks.map((b) => b.name)).toEqual(["Hall 2A", "HD-1", "Hall 2B"]);

    const page = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${app().baseUrl}/projects/${SLUG}`);
    const rows = page.getByTestId("readiness-row");
    await expect.poll(() => rows.count()).toBe(blocks.length);
    // What the phone shows before any scrolling, to look at beside the full page.
    await page.screenshot({ path: `${ARTIFACTS}/readiness-project-375-fold.png` });
    for (const [i, b] of blocks.entries()) {
      const row = rows.nth(i);
      expect(await row.getAttribute("data-block-id")).toBe(String(b.id));
      expectRowSays((await row.textContent()) ?? "", b);
      // Above the fold: the whole row is inside the first screen, before any scrolling.
      const box = (await row.boundingBox())!;
      expect(box.y + box.height).toBeLessThanOrEqual(PHONE.height);
    }
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await screenshot(page, "readiness-project-375");
    expect(errors).toEqual([]);
  });

  it("appears on the public timeline and the project page at 1280 px, and in the investor room with the investor's blocks", async () => {
    const publicBlocks = (await facilityAs()).blocks.filter((b) => b.audience === "public");
    const desk = await browsers.launch(1280);
    const page = await desk.context.newPage();
    const errors = watchErrors(page);
    for (const [path, shot] of [
      [`/projects/${SLUG}`, "readiness-project"],
      [`/projects/${SLUG}/timeline`, "readiness-timeline"],
    ] as const) {
      await page.goto(`${app().baseUrl}${path}`);
      const rows = page.getByTestId("readiness-row");
      await expect.poll(() => rows.count()).toBe(publicBlocks.length);
      for (const [i, b] of publicBlocks.entries()) expectRowSays((await rows.nth(i).textContent()) ?? "", b);
      await screenshot(page, shot);
    }
    const phone = await (await browsers.launch(PHONE.width, PHONE.height)).context.newPage();
    await phone.goto(`${app().baseUrl}/projects/${SLUG}/timeline`);
    await expect.poll(() => phone.getByTestId("readiness-row").count()).toBe(publicBlocks.length);
    await screenshot(phone, "readiness-timeline-375");
    expect(errors).toEqual([]);

    const investorBlocks = (await facilityAs(DEMO.investor)).blocks;
    for (const width of [1280, 375]) {
      const room = await (await browsers.launch(width, width === 375 ? PHONE.height : 900)).context.newPage();
      const roomErrors = watchErrors(room);
      await signInAs(room, app().baseUrl, DEMO.investor, /\/investors$/);
      await room.goto(`${app().baseUrl}/investors/projects/${SLUG}`);
      const rows = room.getByTestId("readiness-row");
      await expect.poll(() => rows.count()).toBe(investorBlocks.length);
      for (const [i, b] of investorBlocks.entries()) expectRowSays((await rows.nth(i).textContent()) ?? "", b);
      await screenshot(room, width === 375 ? "readiness-investor-375" : "readiness-investor");
      expect(roomErrors).toEqual([]);
    }
  });
});
