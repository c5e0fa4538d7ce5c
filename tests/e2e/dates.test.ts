import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { formatLongDate } from "../../src/shared/domain/locale-dates.ts";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { launchBrowser, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
let t: TestApp;
let target: Milestone;

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  const lead = await signIn(t, DEMO.lead);
  const res = await lead.agent.get(`/api/projects/${SLUG}/milestones`).expect(200);
  const found = (res.body as Milestone[]).find((m) => m.audience === "public" && m.actualFinish === null);
  if (!found) throw new Error("the demo programme has no open public milestone");
  target = found;
});
afterAll(async () => {
  await t?.close();
});

describe("dates typed and shown in the project's locale (decision 057)", () => {
  it("a lead on a phone types 15/01/2027 as a forecast and the public timeline shows that day", async () => {
    const phone = await launchBrowser({ width: 375, height: 812 });
    try {
      const page = await phone.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
      await page.goto(`${t.baseUrl}/office/programme`);
      const input = page.getByLabel(`Forecast finish of ${target.name}`, { exact: true });
      expect(await input.getAttribute("type")).toBe("text");
      expect(await input.getAttribute("placeholder")).toBe("dd/mm/yyyy");
      await input.fill("15/01/2027");
      await input.press("Tab");
      await screenshot(page, "dates-office-phone-typed");
      await page.getByTestId("pending-changes").getByRole("button", { name: "Save change" }).click();
      await page.getByText("Change saved").waitFor();
      await expect.poll(() => input.inputValue()).toBe("15/01/2027");

      const visitor = await phone.context.browser()!.newContext({ viewport: { width: 375, height: 812 } });
      const pub = await visitor.newPage();
      await pub.goto(`${t.baseUrl}/projects/${SLUG}/timeline`);
      const item = pub.locator(`[data-testid="timeline-item"][data-milestone-id="${target.id}"]`);
      await item.waitFor();
      expect(await item.textContent()).toContain(formatLongDate("2027-01-15"));
      await screenshot(pub, "dates-public-timeline-phone");
      await visitor.close();
      expect(errors).toEqual([]);
    } finally {
      await phone.close();
    }
    const lead = await signIn(t, DEMO.lead);
    const events = await lead.agent.get(`/api/milestones/${target.id}/events`).expect(200);
    expect(events.body[0]).toMatchObject({ field: "forecast_finish", to: "2027-01-15" });
  });

  it("no office page offers a native date box or a month-first placeholder", async () => {
    const browser = await launchBrowser();
    try {
      const page = await browser.context.newPage();
      await signInAs(page, t.baseUrl, DEMO.admin, /\/office$/);
      const hrefs = await page.locator('a[href^="/office"]').evaluateAll((as) => [...new Set(as.map((a) => a.getAttribute("href")!))]);
      expect(hrefs.length).toBeGreaterThan(5);
      for (const href of hrefs) {
        await page.goto(`${t.baseUrl}${href}`);
        await page.locator("main").waitFor();
        const found = await page.evaluate(() => ({
          native: document.querySelectorAll('input[type="date"], input[type="datetime-local"]').length,
          placeholders: Array.from(document.querySelectorAll("input[placeholder]")).map((i) => i.getAttribute("placeholder")!).filter((p) => /mm\/dd|m\/d\/y/i.test(p)),
        }));
        expect({ href, ...found }).toEqual({ href, native: 0, placeholders: [] });
      }
    } finally {
      await browser.close();
    }
  });
});
