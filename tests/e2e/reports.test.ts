import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { User } from "../../src/shared/schemas/auth.ts";
import type { ReportDetail, ReportListItem } from "../../src/shared/schemas/reports.ts";
import { DEMO, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const ROOM = `/investors/projects/${SLUG}`;
const COMMENTARY = "Chiller 5 arrived on the last day of the month; the L4 cooling tests start on time.";

let t: TestApp;
let investor: Agent;
let lead: Agent;
const browsers = browserPool();
beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  investor = (await signIn(t, DEMO.investor)).agent;
  lead = (await signIn(t, DEMO.lead)).agent;
});
afterAll(async () => {
  await browsers.closeAll();
  await t?.close();
});

const sidewaysScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

/** The report the lead drafts and issues in the first test; the investor reads it in the next. */
let reportId = 0;

describe("the monthly report, from the lead's draft to the investor's copy", () => {
  it("the lead drafts last month's report, writes the summary's commentary, previews the PDF and issues it; the investor never sees the draft", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Reports", exact: true }).click();
    await page.waitForURL(/\/office\/reports$/);
    await page.getByRole("button", { name: "New draft" }).click();
    const dialog = page.getByRole("dialog", { name: "New draft report" });
    // The first month offered is the last one that has ended.
    const month = await dialog.getByLabel("Month").inputValue();
    const [y, m] = month.split("-").map(Number) as [number, number];
    const now = new Date();
    const londonMonth = new Intl.DateTimeFormat("en-CA", { timeZone: "Europe/London", year: "numeric", month: "2-digit" }).format(now).slice(0, 7);
    expect(month < londonMonth).toBe(true);
    expect(new Date(Date.UTC(y, m, 1)).toISOString().slice(0, 7)).toBe(londonMonth);
    await dialog.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/office\/reports\/\d+/);
    reportId = Number(/\/office\/reports\/(\d+)/.exec(page.url())![1]);
    await page.getByTestId("report-view").waitFor();
    expect(await page.getByTestId("report-actions").getByTestId("report-state").textContent()).toBe("Draft");

    // A draft is the office's: the investor's list does not carry it, and asking for it directly finds nothing.
    const listed = (await investor.get(`/api/projects/${SLUG}/reports`).expect(200)).body as ReportListItem[];
    expect(listed.map((r) => r.id)).not.toContain(reportId);
    expect(listed.every((r) => r.state !== "draft")).toBe(true);
    await investor.get(`/api/reports/${reportId}`).expect(404);

    // The summary's commentary, in the updates' editor.
    const editor = page.getByRole("textbox", { name: "Commentary on summary" });
    await editor.click();
    await page.keyboard.type(COMMENTARY);
    await page.getByRole("button", { name: "Save commentary" }).click();
    await page.getByRole("button", { name: "Commentary saved" }).waitFor();
    const saved = (await lead.get(`/api/reports/${reportId}`).expect(200)).body as ReportDetail;
    expect(saved.commentaryHtml.summary).toContain(COMMENTARY);
    await page.mouse.move(0, 0);
    await screenshot(page, "reports-office-draft");

    // Preview: the link opens the draft's PDF, which the lead may read.
    const preview = page.getByRole("link", { name: "Preview PDF" });
    expect(await preview.getAttribute("href")).toBe(`/api/reports/${reportId}/pdf?as=view`);
    const pdf = await page.request.get(`${t.baseUrl}/api/reports/${reportId}/pdf?as=view`);
    expect(pdf.status()).toBe(200);
    expect(pdf.headers()["content-type"]).toContain("application/pdf");
    expect((await pdf.body()).subarray(0, 5).toString("latin1")).toBe("%PDF-");

    // Issue: the confirmation says who is told and that it cannot be undone.
    await page.getByRole("button", { name: "Issue", exact: true }).click();
    const confirm = page.getByRole("dialog", { name: /^Issue the report for / });
    const words = (await confirm.textContent()) ?? "";
    expect(words).toContain("once each");
    expect(words).toContain("It cannot be undone.");
    await confirm.getByRole("button", { name: "Issue and notify" }).click();
    await page.locator("[data-testid='report-actions'] [data-testid='report-state'][data-state='issued']").waitFor({ timeout: 30_000 });
    expect(await page.getByRole("textbox", { name: "Commentary on summary" }).count()).toBe(0);
    expect(await page.getByTestId("report-commentary").first().textContent()).toContain(COMMENTARY);
    const issued = (await investor.get(`/api/projects/${SLUG}/reports`).expect(200)).body as ReportListItem[];
    expect(issued.find((r) => r.id === reportId)?.state).toBe("issued");
    expect(errors).toEqual([]);
    await page.close();
  });

  it("the investor opens it in the investor room: the web page carries the commentary, and the PDF is their own stamped copy", async () => {
    expect(reportId).toBeGreaterThan(0);
    const me = ((await investor.get("/api/auth/me").expect(200)).body as { user: User }).user;
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.investor, /\/investors$/);
    await page.goto(`${t.baseUrl}${ROOM}`);
    await page.getByRole("navigation", { name: "Project sections" }).getByRole("link", { name: "Reports" }).click();
    await page.waitForURL(new RegExp(`${ROOM}/reports$`));
    const items = page.getByTestId("investor-report");
    await items.first().waitFor();
    const listed = (await investor.get(`/api/projects/${SLUG}/reports`).expect(200)).body as ReportListItem[];
    expect(await items.count()).toBe(listed.length);
    const mine = page.locator(`[data-testid="investor-report"][data-report-id="${reportId}"]`);
    await mine.getByRole("heading").getByRole("link").click();
    await page.waitForURL(new RegExp(`${ROOM}/reports/${reportId}$`));
    await page.getByTestId("report-view").waitFor();
    expect(await page.getByTestId("report-section-summary").getByTestId("report-commentary").textContent()).toContain(COMMENTARY);
    // The summary's figures are the API's.
    const detail = (await investor.get(`/api/reports/${reportId}`).expect(200)).body as ReportDetail;
    const summary = detail.figures.summary as { percentComplete: number; spi: number | null };
    expect(await page.getByTestId("summary-percent").textContent()).toBe(`${summary.percentComplete.toFixed(1)}%`);
    expect(await page.getByTestId("summary-spi").textContent()).toBe(summary.spi === null ? "—" : summary.spi.toFixed(2));
    await page.getByTestId("report-section-budget").locator("svg.recharts-surface").first().waitFor();
    await screenshot(page, "reports-investor-web");

    await page.getByRole("navigation", { name: "Read the report as" }).getByRole("link", { name: "PDF" }).click();
    const firstPage = page.locator("[data-testid='pdf-page'][data-page='1']");
    await page.locator("[data-testid='pdf-page'][data-page='1'][data-drawn='true']").waitFor({ timeout: 30_000 });
    // The text pdf.js read from the copy the page was served: the reader's own name is on it.
    const text = (await firstPage.locator(".pdf-text-layer").textContent()) ?? "";
    expect(text).toContain(me.name);
    await screenshot(page, "reports-investor-pdf");
    expect(errors).toEqual([]);
    await page.close();
  });

  it("at phone width the investor reads the report without sideways scrolling", async () => {
    const page = await (await browsers.launch(375, 800)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.investor, /\/investors$/);
    await page.goto(`${t.baseUrl}${ROOM}/reports/${reportId}`);
    await page.getByTestId("report-view").waitFor();
    await page.getByTestId("report-section-budget").locator("svg.recharts-surface").first().waitFor();
    expect(await sidewaysScroll(page)).toBeLessThanOrEqual(0);
    await screenshot(page, "reports-investor-web-375");
    expect(errors).toEqual([]);
    await page.close();
  });
});
