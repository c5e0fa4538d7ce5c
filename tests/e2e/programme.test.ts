import AxeBuilder from "@axe-core/playwright";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { addDays, daysBetween } from "../../src/shared/domain/calendar.ts";
import { formatLongDate } from "../../src/shared/domain/locale-dates.ts";
import { signedDays, slipInWords } from "../../src/features/programme/words.ts";
import { formatDate } from "../../src/lib/format.ts";
import { formatTypedDate } from "../../src/shared/domain/locale-dates.ts";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import path from "node:path";
import { ARTIFACTS, launchBrowser, screenshot, signInAs as signInThroughForm, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
// How far the lead moves the forecast: three weeks, so the slip is plain to see.
const MOVE_DAYS = 21;

let t: TestApp;
let target: Milestone;
let newForecast: string;

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  // A public, open milestone of the demo programme, found as the lead sees it (no fixed ids).
  const lead = await signIn(t, DEMO.lead);
  const res = await lead.agent.get(`/api/projects/${SLUG}/milestones`).expect(200);
  const open = (res.body as Milestone[]).filter((m) => m.audience === "public" && m.actualFinish === null);
  const found = open.find((m) => /ready for service/i.test(m.name)) ?? open[0];
  if (!found) throw new Error("the demo programme has no open public milestone");
  target = found;
  newForecast = addDays(target.forecastFinish ?? target.baselineFinish, MOVE_DAYS);
});
afterAll(async () => {
  await t?.close();
});

const signInAs = (page: Page, email: string, landing: RegExp) => signInThroughForm(page, t.baseUrl, email, landing);

/** The whole page through the shared helper, and the chart alone beside it, to read its detail. */
async function chartShots(page: Page, testId: string, name: string) {
  // No tooltip under a resting pointer: the pictures stay the same from run to run.
  await page.mouse.move(0, 0);
  await screenshot(page, name);
  await page.getByTestId(testId).screenshot({ path: path.join(ARTIFACTS, `${name}-detail.png`) });
}

/** Rule ids of the axe-core violations on the page as it stands (WCAG checks: labels, contrast, roles). */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).analyze();
  return result.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

async function noSidewaysScroll(page: Page): Promise<number> {
  return page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
}

describe("the programme, from the site office to the investor room and the public timeline", () => {
  it("the lead moves a forecast in the site office, seeing its effect before saving", async () => {
    const browser = await launchBrowser();
    try {
      const page = await browser.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, DEMO.lead, /\/office$/);
      await page.getByRole("link", { name: "Programme", exact: true }).click();
      await page.waitForURL(/\/office\/programme$/);
      const input = page.getByLabel(`Forecast finish of ${target.name}`, { exact: true });
      await input.fill(newForecast);

      // The live preview: the milestone's slip grows by the move before anything is saved.
      const pending = page.getByTestId("pending-changes");
      const line = pending.getByTestId("preview-status").filter({ hasText: target.name });
      await line.waitFor();
      const slipAfter = daysBetween(target.baselineFinish, newForecast);
      expect(await line.textContent()).toContain(`slip ${signedDays(target.slipDays)} → ${signedDays(slipAfter)}`);
      expect(await pending.getByTestId("preview-percent-complete").textContent()).toMatch(/%→becomes.*%/);
      await screenshot(page, "programme-office-preview");

      expect(await axeViolations(page)).toEqual([]);
      await pending.getByRole("button", { name: "Save change" }).click();
      await page.getByText("Change saved").waitFor();
      await expect.poll(() => pending.count()).toBe(0);
      // The box shows the saved day in the project's format (decision 057).
      await expect.poll(() => input.inputValue()).toBe(formatTypedDate(newForecast));
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }

    // The server holds the new forecast, and its history records the move.
    const lead = await signIn(t, DEMO.lead);
    const events = await lead.agent.get(`/api/milestones/${target.id}/events`).expect(200);
    expect(events.body[0]).toMatchObject({ field: "forecast_finish", to: newForecast });
  });

  it("the investor sees the new forecast and the slip in the investor room, with the three charts", async () => {
    const browser = await launchBrowser();
    try {
      const page = await browser.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, DEMO.investor, /\/investors$/);
      // The list shows the project's health figures.
      await page.getByTestId(`health-${SLUG}`).waitFor();
      await page.getByRole("link", { name: "Programme health, charts and what moved" }).click();
      await page.waitForURL(new RegExp(`/investors/projects/${SLUG}$`));

      const row = page.locator(`tr[data-milestone-id="${target.id}"]`);
      await row.waitFor();
      const slip = daysBetween(target.baselineFinish, newForecast);
      expect(await row.textContent()).toContain(formatDate(newForecast));
      expect(await row.textContent()).toContain(signedDays(slip));

      // What moved since last month names the move, in days.
      const moves = page.getByTestId("moves");
      await moves.waitFor();
      expect(await moves.textContent()).toContain(target.name);
      expect(await moves.textContent()).toMatch(new RegExp(`Forecast \\d+ days later: [^→]+→ ${formatDate(newForecast)}`));

      // Every figure comes with its explanation, and the caution is there.
      expect(await page.getByTestId("figure-spi").textContent()).toMatch(/for every week of work planned to date, about \d\.\d\d weeks' worth is done|nothing was planned/i);
      await page.getByText("Indicative figures").waitFor();

      await page.getByTestId("chart-s-curve").locator("svg.recharts-surface").waitFor();
      await page.getByTestId("chart-s-curve").getByText("Today").first().waitFor();
      await chartShots(page, "chart-s-curve", "programme-chart-s-curve");

      await page.getByRole("tab", { name: "Baseline and forecast" }).click();
      await page.getByTestId("chart-timeline").locator("svg.recharts-surface").waitFor();
      await chartShots(page, "chart-timeline", "programme-chart-timeline");

      await page.getByRole("tab", { name: "Slip" }).click();
      const slipChart = page.getByTestId("chart-slip");
      await slipChart.locator("svg.recharts-surface").waitFor();
      // The moved milestone's slip is drawn, labelled with its days.
      expect(await slipChart.locator("svg").first().textContent()).toContain(signedDays(slip));
      await chartShots(page, "chart-slip", "programme-chart-slip");
      expect(await axeViolations(page)).toEqual([]);

      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it("a visitor's public timeline shows the public milestone moved, in plain words", async () => {
    const phone = await launchBrowser({ width: 360, height: 740 });
    try {
      // The project's home carries the plain-words line and the way to the timeline.
      const home = await phone.context.newPage();
      await home.goto(`${t.baseUrl}/projects/${SLUG}`);
      const line = home.getByTestId("public-progress");
      await line.waitFor();
      expect(await line.textContent()).toMatch(/^\d+ of \d+ public milestones complete; .+ is forecast for [A-Z][a-z]+ \d{4}, .+\.$/);
      expect(await home.getByRole("link", { name: /See the timeline/ }).getAttribute("href")).toBe(`/projects/${SLUG}/timeline`);
      await home.close();

      const page = await phone.context.newPage();
      const errors = watchErrors(page);
      await page.goto(`${t.baseUrl}/projects/${SLUG}/timeline`);
      const item = page.locator(`[data-testid="timeline-item"][data-milestone-id="${target.id}"]`);
      await item.waitFor();
      const slip = daysBetween(target.baselineFinish, newForecast);
      expect(await item.textContent()).toContain(`now expected ${formatLongDate(newForecast)}, ${slipInWords(slip)}`);
      // No money and no index jargon on the public page.
      const text = (await page.locator("main").textContent()) ?? "";
      expect(text).not.toMatch(/\bSPI\b|\bCPI\b|earned value|£|\bbudget\b/i);
      expect(await noSidewaysScroll(page)).toBeLessThanOrEqual(0);
      await screenshot(page, "programme-public-timeline-phone");
      expect(await axeViolations(page)).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await phone.close();
    }
  });

  it("the site walk works at phone width (360 px): one milestone at a time, large controls", async () => {
    const phone = await launchBrowser({ width: 360, height: 740 });
    try {
      const page = await phone.context.newPage();
      const errors = watchErrors(page);
      await signInAs(page, DEMO.lead, /\/office$/);
      await page.goto(`${t.baseUrl}/office/programme/walk`);
      const form = page.getByRole("form", { name: /^Update / });
      await form.waitFor();
      expect(await form.getByText(/^1 of \d+/).count()).toBe(1);
      // A tap on +10 changes the percent, and the preview shows its effect before saving.
      const before = await form.getByText(/^\d+%$/).first().textContent();
      await form.getByRole("button", { name: "Add 10 percent" }).click();
      const after = await form.getByText(/^\d+%$/).first().textContent();
      expect(Number(after?.replace("%", ""))).toBe(Math.min(100, Number(before?.replace("%", "")) + 10));
      await form.getByTestId("health-preview").waitFor();
      const submit = form.getByRole("button", { name: "Save and next" });
      const box = await submit.boundingBox();
      expect(box?.height ?? 0).toBeGreaterThanOrEqual(44);
      expect(await noSidewaysScroll(page)).toBeLessThanOrEqual(0);
      await screenshot(page, "programme-site-walk-phone");
      expect(await axeViolations(page)).toEqual([]);
      // Nothing is saved by leaving: the walk does not write until asked.
      await page.getByRole("button", { name: "Skip →" }).click();
      await expect.poll(() => page.getByText(/^2 of \d+/).count()).toBe(1);
      expect(errors).toEqual([]);
    } finally {
      await phone.close();
    }
  });
});
