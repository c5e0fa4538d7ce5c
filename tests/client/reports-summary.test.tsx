import { screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { INDICATIVE_CAUTION } from "../../src/shared/domain/facility.ts";
import type { ReportFigures } from "../../src/shared/domain/report-figures.ts";
import { spiSentence, spiTSentence } from "../../src/shared/domain/report-figures.ts";
import { DEFAULT_RISK_SCALE } from "../../src/shared/schemas/risks.ts";
import type { ReportDetail, ReportListItem } from "../../src/shared/schemas/reports.ts";
import { reportKeys } from "../../src/features/reports/api.ts";
import { InvestorReport, InvestorReports } from "../../src/features/reports/components/investor-reports.tsx";
import { daysLeftWords, endedMonths, orderReports, slipWords } from "../../src/features/reports/words.ts";
import { renderWithApp } from "./render.tsx";

// Invented figures in the shape of the demo (Aldermere Campus Phase 2), as GET /api/reports/:id sends them.
const SLUG = "aldermere-phase-2";

const FIGURES: ReportFigures = {
  project: { slug: SLUG, name: "Aldermere Campus Phase 2", operatorName: "Kestrel Colocation", currency: "GBP", timeZone: "Europe/London" },
  month: "2026-11",
  monthEnd: "2026-11-30",
  asAt: "2026-11-30T23:59:59.999Z",
  state: "issued",
  computedAt: "2026-12-02T09:00:00.000Z",
  summary: {
    percentComplete: 47.25,
    plannedPercent: 52.5,
    spi: 0.9,
    spiT: 0.87,
    spiSentence: spiSentence(0.9),
    spiTSentence: spiTSentence(0.87),
    headline: ["The build is 47.3% complete against 52.5% planned.", "Data hall 1 is forecast 12 working days after its baseline."],
    blocks: [
      { name: "Data hall 1", baselineReadyDate: "2027-03-01", forecastReadyDate: "2027-03-17", slipWorkingDays: 12, readyForService: false },
      { name: "Data hall 2", baselineReadyDate: "2027-09-01", forecastReadyDate: "2027-09-01", slipWorkingDays: 0, readyForService: false },
    ],
    budget: { currentBudget: 18_450_000_000, projectedFinalCost: 19_020_000_000, contingencyRemaining: 640_000_000, sentence: "The projected final cost is £190.2m against a current budget of £184.5m." },
    topRisks: [
      { reference: "R-001", title: "Chiller delivery slips past the commissioning window", kind: "risk", band: "critical", score: 20, trend: "rising" },
      { reference: "R-004", title: "Grid connection energisation date", kind: "risk", band: "high", score: 12, trend: "steady" },
    ],
    openDecisions: [
      { reference: "D-002", title: "Approve the temporary chiller hire", neededBy: "2026-12-14", daysLeft: 14 },
      { reference: "D-003", title: "Release contingency for the fuel farm", neededBy: "2026-11-27", daysLeft: -3 },
    ],
  },
  schedule: {
    completedInMonth: [{ name: "Generator yard slab poured", actualFinish: "2026-11-12", baselineFinish: "2026-11-05" }],
    dueNextMonth: [],
    slips: [],
    drivers: [{ block: "Data hall 1", chain: ["Chiller 5 delivered", "L4 cooling tests", "Data hall 1 ready for service"] }],
    trend: [],
    ieacT: 118.4,
    ieacTCompletion: "2027-10-20",
    baselineCompletion: "2027-09-01",
    forecastCompletion: "2027-09-22",
  },
  budget: {
    currency: "GBP",
    originalBudget: 18_000_000_000,
    approvedChanges: 450_000_000,
    currentBudget: 18_450_000_000,
    projectedFinalCost: 19_020_000_000,
    walk: [],
    eac: [],
    projectedFinalCostMethod: "bac_over_cpi",
    contingency: { held: 900_000_000, drawn: 260_000_000, remaining: 640_000_000 },
    cpi: 0.97,
    spi: 0.9,
    caution: INDICATIVE_CAUTION,
  },
  facility: { ramp: [], blocks: [], systems: [], availableFromLevel: 4 },
  risks: { top: [], grid: [], scale: DEFAULT_RISK_SCALE, openRisks: 2, openIssues: 0 },
  decisions: [],
  photos: [],
  cautions: { indicative: INDICATIVE_CAUTION, site: "The site is a construction site: visits only by arrangement, with an induction." },
  milestones: [],
};

function item(over: Partial<ReportListItem> & Pick<ReportListItem, "id" | "month" | "state">): ReportListItem {
  return { issuedAt: over.state === "draft" ? null : "2026-12-02T09:00:00.000Z", audience: "investor", supersedes: null, supersededBy: null, correctionNote: null, version: 1, ...over };
}

const DETAIL: ReportDetail = {
  ...item({ id: 7, month: "2026-11", state: "issued" }),
  monthEnd: "2026-11-30",
  commentary: {},
  commentaryHtml: { summary: "<p>Chiller 5 is the month's story: the hire unit keeps the L4 tests on track.</p>" },
  figures: FIGURES as unknown as Record<string, unknown>,
  documentId: 31,
};

describe("the report as a web page", () => {
  it("opens on the summary: percent against plan, SPI and SPI(t) with their sentences, the blocks' dates, top risks, open decisions and the lead's commentary", () => {
    renderWithApp(<InvestorReport slug={SLUG} id={7} asPdf={false} />, { data: [[reportKeys.report(7), DETAIL]] });
    const sections = screen.getAllByRole("heading", { level: 2 }).map((h) => h.textContent);
    // The page's own title, then the sections in the PDF's order, summary first.
    expect(sections).toEqual(["Monthly report, November 2026", "Summary", "Schedule", "Budget", "Facility readiness", "Risks and issues", "Decisions needed", "Photographs of the month", "Indicative figures and site safety"]);
    const summary = within(screen.getByTestId("report-section-summary"));
    expect(summary.getByTestId("summary-percent").textContent).toBe("47.3%");
    expect(summary.getByTestId("summary-planned").textContent).toBe("52.5%");
    expect(summary.getByTestId("summary-spi").textContent).toBe("0.90");
    expect(summary.getByTestId("summary-spit").textContent).toBe("0.87");
    expect(summary.getByText(spiSentence(0.9))).toBeTruthy();
    expect(summary.getByText(spiTSentence(0.87))).toBeTruthy();
    expect(summary.getByTestId("summary-pfc").textContent).toBe("£190.2m");
    expect(summary.getByTestId("report-commentary").textContent).toContain("Chiller 5 is the month's story");
    const rows = within(summary.getByTestId("report-blocks")).getAllByRole("row").slice(1);
    expect(rows.map((r) => r.textContent)).toEqual(["Data hall 11 Mar 202717 Mar 202712 working days late", "Data hall 21 Sept 20271 Sept 2027on the baseline"]);
    expect(summary.getByTestId("summary-risks").textContent).toContain("R-001 Chiller delivery slips past the commissioning window — Critical (score 20), rising");
    expect(summary.getByTestId("summary-decisions").textContent).toContain("needed by 27 Nov 2026, 3 days overdue");
    expect(summary.getByTestId("summary-decisions").textContent).toContain("14 days left");
    // The cautions close the report, word for word.
    expect(screen.getByTestId("report-cautions").textContent).toContain(INDICATIVE_CAUTION);
  });

  it("lists only issued reports for the room, newest first, a superseded one marked and linked to its correction", () => {
    const list = [item({ id: 1, month: "2026-09", state: "superseded", supersededBy: { id: 3 } }), item({ id: 2, month: "2026-11", state: "draft" }), item({ id: 3, month: "2026-09", state: "issued", supersedes: { id: 1, month: "2026-09" }, correctionNote: "The October budget walk left out change C-014." }), item({ id: 4, month: "2026-10", state: "issued" })];
    renderWithApp(<InvestorReports slug={SLUG} timeZone="Europe/London" />, { data: [[reportKeys.list(SLUG), list]] });
    const items = screen.getAllByTestId("investor-report");
    expect(items.map((li) => li.getAttribute("data-report-id"))).toEqual(["4", "3", "1"]);
    const superseded = within(items[2]!);
    expect(superseded.getByTestId("report-state").textContent).toBe("Superseded");
    expect(superseded.getByRole("link", { name: "read the corrected report" }).getAttribute("href")).toBe(`/investors/projects/${SLUG}/reports/3`);
    expect(within(items[1]!).getByText("What changed: The October budget walk left out change C-014.")).toBeTruthy();
    expect(within(items[0]!).getByRole("link", { name: "Download your copy" }).getAttribute("href")).toBe("/api/reports/4/pdf?as=download");
  });
});

describe("the report's words", () => {
  it("offers only months that have ended, newest first, across a year's turn", () => {
    expect(endedMonths("2027-01-01", 3)).toEqual(["2026-12", "2026-11", "2026-10"]);
    expect(endedMonths("2026-12-31", 1)).toEqual(["2026-11"]);
  });

  it("says slips and days left in words", () => {
    expect([slipWords(1), slipWords(0), slipWords(-3), slipWords(null)]).toEqual(["1 working day late", "on the baseline", "3 working days early", "—"]);
    expect([daysLeftWords(1), daysLeftWords(0), daysLeftWords(-1)]).toEqual(["1 day left", "Due on the month end", "1 day overdue"]);
    expect(orderReports([{ id: 1, month: "2026-10" }, { id: 2, month: "2026-11" }, { id: 3, month: "2026-10" }]).map((r) => r.id)).toEqual([2, 3, 1]);
  });
});
