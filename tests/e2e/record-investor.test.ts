import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { User } from "../../src/shared/schemas/auth.ts";
import type { BudgetPosition } from "../../src/shared/schemas/budget.ts";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { DocumentAnswer, ViewLogRow } from "../../src/shared/schemas/documents.ts";
import type { RiskSummary } from "../../src/shared/schemas/risks.ts";
import { DEMO, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";
const ROOM = `/investors/projects/${SLUG}`;

let t: TestApp;
let investor: Agent;
const browsers = browserPool();
beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  investor = (await signIn(t, DEMO.investor)).agent;
});
afterAll(async () => {
  await browsers.closeAll();
  await t?.close();
});

/** What the demo investor is told by the API: the page must say the same. */
async function read<T>(path: string): Promise<T> {
  return (await investor.get(path).expect(200)).body as T;
}

async function investorPage(width = 1280): Promise<{ page: Page; errors: string[] }> {
  const page = await (await browsers.launch(width)).context.newPage();
  const errors = watchErrors(page);
  await signInAs(page, t.baseUrl, DEMO.investor, /\/investors$/);
  return { page, errors };
}

async function noSidewaysScroll(page: Page): Promise<void> {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow).toBeLessThanOrEqual(0);
}

describe("the investor's day in the investor room", () => {
  it("opens Risks and sees where the open risks sit, each cell counting what the API counts, and the top risks with owner and trend", async () => {
    const summary = await read<RiskSummary>(`/api/projects/${SLUG}/risks/summary`);
    expect(summary.openRisks).toBeGreaterThan(0);
    const { page, errors } = await investorPage();
    // From the room's home, the project's record is one link away.
    await page.getByRole("link", { name: "Risks" }).first().click();
    await page.waitForURL(new RegExp(`${ROOM}/risks$`));
    const cells = page.getByTestId("risk-cell");
    await expect.poll(() => cells.count()).toBe(summary.scale.likelihoodLevels * summary.scale.impactLevels);
    for (const c of summary.grid) {
      const cell = page.locator(`[data-testid="risk-cell"][data-likelihood="${c.likelihood}"][data-impact="${c.impact}"]`);
      expect(await cell.getAttribute("data-count")).toBe(String(c.count));
      expect(await cell.getAttribute("data-band")).toBe(c.band);
      // The count is printed in the square where there is one.
      expect(((await cell.textContent()) ?? "").trim()).toBe(c.count > 0 ? String(c.count) : "");
    }
    expect(summary.grid.reduce((n, c) => n + c.count, 0)).toBe(summary.openRisks);
    expect(await page.getByTestId("risk-grid-sentence").textContent()).toContain(`${summary.openRisks} open risk`);
    const top = page.getByTestId("top-risk");
    expect(await top.count()).toBeGreaterThan(0);
    const first = (await top.first().textContent()) ?? "";
    expect(first).toMatch(/owner/);
    expect(first).toMatch(/Rising|Falling|Steady|New/);
    expect(await page.locator("[data-trend='rising']").count()).toBeGreaterThan(0);
    await page.getByTestId("exposure-caution").waitFor();
    await page.getByTestId("risk-grid").scrollIntoViewIfNeeded();
    await screenshot(page, "record-investor-risks");
    expect(errors).toEqual([]);
  });

  it("opens Decisions and sees the overdue one first, in words, and one with its days left", async () => {
    const decisions = await read<DecisionAnswer[]>(`/api/projects/${SLUG}/decisions`);
    const open = decisions.filter((d) => d.status === "open");
    const overdue = open.filter((d) => d.overdue);
    expect(overdue.length).toBeGreaterThan(0);
    const waiting = open.find((d) => !d.overdue && (d.daysLeft ?? 0) > 0);
    expect(waiting).toBeDefined();
    const { page, errors } = await investorPage();
    await page.goto(`${t.baseUrl}${ROOM}/decisions`);
    const cards = page.getByTestId("open-decision");
    await cards.first().waitFor();
    expect(await cards.count()).toBe(open.length);
    expect(await cards.first().getAttribute("data-urgency")).toBe("overdue");
    const late = -(overdue[0]!.daysLeft ?? 0);
    expect(await cards.first().getByTestId("days-left").textContent()).toBe(`${late} day${late === 1 ? "" : "s"} overdue`);
    const card = page.locator(`[data-testid="open-decision"][data-decision-id="${waiting!.id}"]`);
    expect(await card.getByTestId("days-left").textContent()).toBe(`${waiting!.daysLeft} day${waiting!.daysLeft === 1 ? "" : "s"} left`);
    expect(await card.textContent()).toContain(waiting!.decider);
    expect(await card.getByTestId("decision-option").count()).toBe(waiting!.options.length);
    const decided = decisions.filter((d) => d.status === "decided");
    expect(await page.getByTestId("decided-decision").count()).toBe(decided.length);
    await screenshot(page, "record-investor-decisions");
    expect(errors).toEqual([]);
  });

  it("opens Cost and sees the budget walk drawn from the original budget to the projected final cost, and the three estimates", async () => {
    const position = await read<BudgetPosition>(`/api/projects/${SLUG}/budget`);
    const { page, errors } = await investorPage();
    await page.goto(`${t.baseUrl}${ROOM}/cost`);
    const walk = page.getByTestId("budget-walk");
    await walk.locator("svg.recharts-surface").waitFor();
    const steps = walk.getByTestId("walk-step");
    await expect.poll(() => steps.count()).toBe(position.walk.length);
    expect(await steps.first().getAttribute("data-kind")).toBe("start");
    expect(await steps.first().getAttribute("data-to")).toBe(String(position.originalBudget));
    const subtotal = walk.locator("[data-testid='walk-step'][data-kind='subtotal']");
    expect(await subtotal.getAttribute("data-to")).toBe(String(position.currentBudget));
    if (position.projectedFinalCost !== null) expect(await walk.locator("[data-testid='walk-step'][data-kind='projection']").getAttribute("data-to")).toBe(String(position.projectedFinalCost));
    expect(await page.getByTestId("eac-variant").count()).toBe(3);
    expect(await page.getByTestId("eac-variants").textContent()).toContain("EAC = AC + (BAC − EV) / (CPI × SPI)");
    expect(await page.getByTestId("cost-caution").textContent()).toBe(position.caution);
    await walk.scrollIntoViewIfNeeded();
    await screenshot(page, "record-investor-cost-walk");
    expect(errors).toEqual([]);
  });

  it("opens a document in the reader: the page drawn is their own copy, with their name in the stamp, logged once as a view", async () => {
    const me = (await read<{ user: User }>("/api/auth/me")).user;
    const documents = await read<DocumentAnswer[]>(`/api/projects/${SLUG}/documents`);
    const doc = documents.find((d) => d.latestVersion.fileType === "pdf");
    expect(doc).toBeDefined();
    const before = (await read<ViewLogRow[]>(`/api/projects/${SLUG}/my-document-views`)).filter((r) => r.documentId === doc!.id && r.kind === "view").length;
    const { page, errors } = await investorPage();
    await page.goto(`${t.baseUrl}${ROOM}/documents`);
    await page.getByTestId("document").first().waitFor();
    expect(await page.getByTestId("document").count()).toBe(documents.length);
    await screenshot(page, "record-investor-documents");
    await page.locator(`[data-testid="document"][data-document-id="${doc!.id}"]`).getByRole("link", { name: "Read here" }).click();
    await page.waitForURL(new RegExp(`${ROOM}/documents/${doc!.id}$`));
    const firstPage = page.locator("[data-testid='pdf-page'][data-page='1']");
    await page.locator("[data-testid='pdf-page'][data-page='1'][data-drawn='true']").waitFor({ timeout: 20_000 });
    expect(await page.getByTestId("pdf-page").count()).toBe(doc!.latestVersion.pages ?? (await page.getByTestId("pdf-page").count()));
    // The text pdf.js read from the copy the page was served: the reader's own name is on it.
    const words = (await firstPage.locator(".pdf-text-layer").textContent()) ?? "";
    expect(words).toContain(me.name);
    expect(words).toContain(me.email);
    // The canvas was drawn: it holds ink, not just white paper.
    const inked = await firstPage.locator("canvas").evaluate((c: HTMLCanvasElement) => {
      const data = c.getContext("2d")!.getImageData(0, 0, c.width, c.height).data;
      let dark = 0;
      for (let i = 0; i < data.length; i += 4) if (data[i]! < 128 && data[i + 3]! > 0) dark++;
      return dark;
    });
    expect(inked).toBeGreaterThan(100);
    await screenshot(page, "record-investor-document-viewer");
    const after = (await read<ViewLogRow[]>(`/api/projects/${SLUG}/my-document-views`)).filter((r) => r.documentId === doc!.id && r.kind === "view").length;
    expect(after).toBe(before + 1);
    // The download is a link to the same stamped copy.
    expect(await page.getByRole("link", { name: "Download your copy" }).getAttribute("href")).toBe(`/api/documents/${doc!.id}/file?as=download&version=${doc!.latestVersion.number}`);
    expect(errors).toEqual([]);
  });

  it("at phone width reads Risks and Decisions without sideways scrolling", async () => {
    const { page, errors } = await investorPage(375);
    await page.goto(`${t.baseUrl}${ROOM}/risks`);
    await page.getByTestId("risk-grid").locator("svg.recharts-surface").waitFor();
    expect(await page.getByTestId("risk-cell").count()).toBeGreaterThan(0);
    await noSidewaysScroll(page);
    await screenshot(page, "record-investor-risks-375");
    await page.goto(`${t.baseUrl}${ROOM}/decisions`);
    await page.getByTestId("open-decision").first().waitFor();
    await noSidewaysScroll(page);
    await screenshot(page, "record-investor-decisions-375");
    expect(errors).toEqual([]);
  });

  it("sees the outcome the lead records on an open decision: who decided, when and what", async () => {
    const open = (await read<DecisionAnswer[]>(`/api/projects/${SLUG}/decisions`)).find((d) => d.status === "open" && !d.overdue)!;
    const lead = await signIn(t, DEMO.lead);
    await lead.agent
      .post(`/api/decisions/${open.id}/outcome`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ chosenOption: 0, outcome: "Agreed at the committee's December meeting.", decidedBy: "Investors' committee", decidedOn: "2026-12-04", version: open.version })
      .expect(200);
    const { page, errors } = await investorPage();
    await page.goto(`${t.baseUrl}${ROOM}/decisions`);
    const record = page.locator(`[data-testid="decided-decision"][data-decision-id="${open.id}"]`);
    await record.waitFor();
    expect(await record.getByTestId("decision-outcome").textContent()).toBe(
      `● Decided on 4 Dec 2026 by Investors' committee — option A, ${open.options[0]!.label}: Agreed at the committee's December meeting.`,
    );
    expect(await page.locator(`[data-testid="open-decision"][data-decision-id="${open.id}"]`).count()).toBe(0);
    expect(errors).toEqual([]);
  });
});
