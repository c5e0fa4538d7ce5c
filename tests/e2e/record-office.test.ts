import AxeBuilder from "@axe-core/playwright";
import { PDFDocument, StandardFonts } from "pdf-lib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { DocumentAnswer } from "../../src/shared/schemas/documents.ts";
import type { RiskAnswer } from "../../src/shared/schemas/risks.ts";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { browserPool, screenshot, signInAs, watchErrors } from "../helpers/browser.ts";

const SLUG = "aldermere-phase-2";

let t: TestApp;
const browsers = browserPool();
let lead: Awaited<ReturnType<typeof signIn>>;
let investor: Awaited<ReturnType<typeof signIn>>;

async function read<T>(path: string, as = lead): Promise<T> {
  return (await as.agent.get(path).expect(200)).body as T;
}

/** A date `days` from today as `YYYY-MM-DD` (UTC is close enough for a date weeks away). */
const inDays = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);

/** A small PDF of our own, one page of invented text. */
async function samplePdf(title: string): Promise<Buffer> {
  const pdf = await PDFDocument.create();
  const font = await pdf.embedFont(StandardFonts.Helvetica);
  pdf.addPage([595, 842]).drawText(title, { x: 60, y: 760, size: 18, font });
  return Buffer.from(await pdf.save());
}

beforeAll(async () => {
  t = await startTestApp({}, { listen: true });
  lead = await signIn(t, DEMO.lead);
  investor = await signIn(t, DEMO.investor);
});
afterAll(async () => {
  await browsers.closeAll();
  await t?.close();
});

const axeViolations = async (page: Page) => (await new AxeBuilder({ page }).analyze()).violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
const sidewaysScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

describe("the investor record in the site office", () => {
  it("the lead reads the risks register as a table at 1280 px and as cards at 375 px", async () => {
    const risks = await read<RiskAnswer[]>(`/api/projects/${SLUG}/risks`);
    const open = risks.filter((r) => r.status === "open");
    expect(open.length).toBeGreaterThan(0);

    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Risks", exact: true }).click();
    await page.waitForURL(/\/office\/risks$/);
    const table = page.getByRole("table", { name: "Risks and issues" });
    await table.waitFor();
    expect(await table.locator("tbody tr[data-risk-id]").count()).toBe(open.length);
    // Highest score first, each band by word beside its gauge.
    const top = [...open].sort((a, b) => b.score - a.score)[0]!;
    const firstId = Number(await table.locator("tbody tr[data-risk-id]").first().getAttribute("data-risk-id"));
    expect(open.find((r) => r.id === firstId)?.score).toBe(top.score);
    expect(await table.locator(`tr[data-risk-id="${top.id}"] [data-band="${top.band}"]`).textContent()).toContain(String(top.score));
    await page.getByLabel("Kind").selectOption("issue");
    expect(await table.locator("tbody tr[data-risk-id]").count()).toBe(open.filter((r) => r.kind === "issue").length);
    await page.getByLabel("Kind").selectOption("");
    await page.mouse.move(0, 0);
    await screenshot(page, "record-office-risks");
    expect(await axeViolations(page)).toEqual([]);

    // Open one: its actions and its history.
    await table.locator(`tr[data-risk-id="${top.id}"]`).getByRole("button", { name: top.title }).click();
    const panel = page.getByRole("dialog", { name: `${top.reference} · ${top.title}` });
    await panel.getByRole("heading", { name: "Actions" }).waitFor();
    await panel.getByRole("button", { name: "Show the history" }).click();
    await panel.getByTestId("risk-history").waitFor();
    await panel.getByRole("button", { name: "Close" }).first().click();
    expect(errors).toEqual([]);
    await page.close();

    const phone = await (await browsers.launch(375, 800)).context.newPage();
    const phoneErrors = watchErrors(phone);
    await signInAs(phone, t.baseUrl, DEMO.lead, /\/office$/);
    await phone.goto(`${t.baseUrl}/office/risks`);
    await phone.getByRole("list", { name: "Risks and issues" }).waitFor();
    expect(await phone.getByTestId("risk-card").count()).toBe(open.length);
    expect(await phone.getByRole("table", { name: "Risks and issues" }).count()).toBe(0);
    expect(await sidewaysScroll(phone)).toBeLessThanOrEqual(0);
    await screenshot(phone, "record-office-risks-phone");
    expect(phoneErrors).toEqual([]);
    await phone.close();
  });

  it("the lead records a decision's outcome and the investor then sees it decided", async () => {
    const created = await lead.agent
      .post(`/api/projects/${SLUG}/decisions`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ title: "Browser test: approve temporary cooling for Hall 2A", question: "Hire temporary cooling while Chiller 3 is commissioned?", options: [{ label: "Hire it" }, { label: "Wait for Chiller 3" }], recommendedOption: 0, decider: "Investors' committee", neededBy: inDays(20), audience: "investor" })
      .expect(201);
    const asked = created.body as DecisionAnswer;

    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Decisions", exact: true }).click();
    const card = page.locator(`[data-testid="decision"][data-decision-id="${asked.id}"]`);
    await card.waitFor();
    expect(await card.getByTestId("days-left").textContent()).toMatch(/^(19|20|21) days left$/);
    await card.getByRole("button", { name: "Record the outcome" }).click();
    const form = page.getByRole("form", { name: `Record the outcome of ${asked.reference}` });
    await form.getByLabel("Option chosen").selectOption("0");
    await form.getByLabel("Outcome").fill("Approved: hire temporary cooling for eight weeks.");
    await page.getByRole("button", { name: "Record the outcome" }).last().click();
    await card.getByTestId("decision-outcome").waitFor();
    expect(await card.getByTestId("decision-outcome").textContent()).toContain("Approved: hire temporary cooling for eight weeks.");
    await page.mouse.move(0, 0);
    await screenshot(page, "record-office-decisions");
    expect(await axeViolations(page)).toEqual([]);
    expect(errors).toEqual([]);
    await page.close();

    // The investor's own answer: decided, with the outcome and who decided.
    const seen = (await read<DecisionAnswer[]>(`/api/projects/${SLUG}/decisions`, investor)).find((d) => d.id === asked.id);
    expect(seen?.status).toBe("decided");
    expect(seen?.outcome).toMatchObject({ chosenOption: 0, text: "Approved: hire temporary cooling for eight weeks.", decidedBy: "Investors' committee" });

    // And on the investor room's page, signed in in a browser of their own.
    const room = await (await browsers.launch(1280, 900)).context.newPage();
    const roomErrors = watchErrors(room);
    await signInAs(room, t.baseUrl, DEMO.investor, /\/investors$/);
    await room.goto(`${t.baseUrl}/investors/projects/${SLUG}/decisions`);
    const decided = room.locator(`[data-testid="decided-decision"][data-decision-id="${asked.id}"]`);
    await decided.waitFor();
    expect(await decided.textContent()).toContain("Approved: hire temporary cooling for eight weeks.");
    expect(roomErrors).toEqual([]);
    await room.close();
  });

  it("the lead sees the budget position, the changes and the three estimates to choose from; marketing has no budget", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Budget", exact: true }).click();
    await page.getByTestId("budget-position").waitFor();
    expect(await page.getByRole("table", { name: "Budget changes" }).locator("tbody tr[data-change-id]").count()).toBeGreaterThan(0);
    expect(await page.getByRole("form", { name: "Budget settings" }).locator("[data-method]").count()).toBe(3);
    await page.getByRole("button", { name: "Record a change" }).click();
    const form = page.getByRole("form", { name: "Record a budget change" });
    await form.getByLabel("Status").selectOption("approved");
    await form.getByTestId("approval-rule").waitFor();
    expect(await form.getByTestId("approval-rule").textContent()).toContain("An approved change needs who approved it and the date of approval.");
    await page.getByRole("button", { name: "Cancel" }).click();
    await page.mouse.move(0, 0);
    await screenshot(page, "record-office-budget");
    expect(await axeViolations(page)).toEqual([]);
    expect(errors).toEqual([]);
    await page.close();

    const marketing = await (await browsers.launch(1280, 900)).context.newPage();
    await signInAs(marketing, t.baseUrl, DEMO.marketing, /\/office$/);
    // The office navigation renders after the landing URL is reached: wait for it before counting links.
    await marketing.getByRole("link", { name: "Risks", exact: true }).waitFor();
    expect(await marketing.getByRole("link", { name: "Risks", exact: true }).count()).toBe(1);
    expect(await marketing.getByRole("link", { name: "Budget", exact: true }).count()).toBe(0);
    await marketing.goto(`${t.baseUrl}/office/budget`);
    await marketing.getByText("The budget is kept by project leads and administrators").waitFor();
    await marketing.close();
  });

  it("the lead uploads a PDF and sees it in the library; a file that only claims to be a PDF is refused with the server's reason", async () => {
    const page = await (await browsers.launch(1280, 900)).context.newPage();
    const errors = watchErrors(page);
    await signInAs(page, t.baseUrl, DEMO.lead, /\/office$/);
    await page.getByRole("link", { name: "Documents", exact: true }).click();
    const library = page.getByRole("table", { name: "Document library" });
    await library.waitFor();

    await page.getByRole("button", { name: "Upload a document" }).click();
    let dialog = page.getByRole("dialog", { name: "Upload a document" });
    await dialog.getByTestId("document-file-input").setInputFiles({ name: "not-really.pdf", mimeType: "application/pdf", buffer: Buffer.from("This is plain text, not a PDF.") });
    await dialog.getByLabel("Title").fill("Browser test: not a PDF");
    await dialog.getByRole("button", { name: "Upload" }).click();
    const refusal = dialog.locator("#upload-refusal");
    await refusal.waitFor();
    expect(await refusal.textContent()).toMatch(/^▲(Not a PDF or an image|Refused): /);
    await dialog.getByRole("button", { name: "Cancel" }).click();

    await page.getByRole("button", { name: "Upload a document" }).click();
    dialog = page.getByRole("dialog", { name: "Upload a document" });
    await dialog.getByTestId("document-file-input").setInputFiles({ name: "hall-2a-witness-test.pdf", mimeType: "application/pdf", buffer: await samplePdf("Hall 2A witness test note") });
    expect(await dialog.getByLabel("Title").inputValue()).toBe("hall 2a witness test");
    await dialog.getByLabel("Title").fill("Browser test: Hall 2A witness test note");
    await dialog.getByLabel("Category").selectOption("technical");
    await dialog.getByLabel("Period", { exact: true }).fill("December 2026");
    await dialog.getByRole("button", { name: "Upload" }).click();
    await dialog.waitFor({ state: "detached" });
    const row = library.locator("tbody tr", { hasText: "Browser test: Hall 2A witness test note" });
    await row.waitFor();
    expect(await row.textContent()).toContain("1 page");

    const docs = await read<DocumentAnswer[]>(`/api/projects/${SLUG}/documents`);
    expect(docs.filter((d) => d.title === "Browser test: not a PDF")).toEqual([]);
    const stored = docs.find((d) => d.title === "Browser test: Hall 2A witness test note");
    expect(stored).toMatchObject({ category: "technical", period: "December 2026", audience: "investor" });
    expect(stored?.latestVersion).toMatchObject({ number: 1, fileType: "pdf", pages: 1 });

    await page.mouse.move(0, 0);
    await screenshot(page, "record-office-documents");
    expect(await axeViolations(page)).toEqual([]);
    // The refused upload's answer is logged by Chromium as a failed load; that one is expected.
    expect(errors.filter((e) => !/status of 4(15|22)/.test(e))).toEqual([]);
    await page.close();
  });
});
