import { screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { BudgetChangeAnswer, BudgetPosition } from "../../src/shared/schemas/budget.ts";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { DocumentAnswer } from "../../src/shared/schemas/documents.ts";
import type { RiskAnswer, RiskSummary } from "../../src/shared/schemas/risks.ts";
import { DEFAULT_RISK_SCALE } from "../../src/shared/schemas/risks.ts";
import { budgetPosition } from "../../src/shared/domain/budget.ts";
import { riskGrid } from "../../src/shared/domain/risks.ts";
import { budgetKeys } from "../../src/features/budget/api.ts";
import { InvestorCost, walkSentence } from "../../src/features/budget/investor-cost.tsx";
import { walkBars, walkFloor } from "../../src/features/budget/investor-walk-steps.ts";
import { decisionKeys } from "../../src/features/decisions/api.ts";
import { InvestorDecisions } from "../../src/features/decisions/investor-decisions.tsx";
import { documentKeys } from "../../src/features/documents/api.ts";
import { byCategory, InvestorDocuments } from "../../src/features/documents/investor-documents.tsx";
import { riskKeys } from "../../src/features/risks/api.ts";
import { bandRange, gridRows, gridSentence } from "../../src/features/risks/investor-risk-marks.tsx";
import { InvestorRisks, topRisks } from "../../src/features/risks/investor-risks.tsx";
import { riskAnswer } from "./record-fixtures.ts";
import { renderWithApp } from "./render.tsx";

// Invented figures in the shape of the demo (Aldermere Campus Phase 2); the answers the routes send.
const SLUG = "aldermere-phase-2";

function risk(over: Partial<RiskAnswer> & Pick<RiskAnswer, "id" | "likelihood" | "impact">): RiskAnswer {
  const score = over.likelihood * over.impact;
  return riskAnswer({
    reference: `R-${String(over.id).padStart(3, "0")}`,
    category: "supply_chain",
    owner: { id: 2, name: "Imogen Thackeray" },
    score,
    band: score >= 16 ? "critical" : score >= 10 ? "high" : score >= 5 ? "medium" : "low",
    scoreAtWindowStart: score,
    ...over,
  });
}

const RISKS: RiskAnswer[] = [
  risk({
    id: 1,
    likelihood: 4,
    impact: 5,
    title: "Chiller 5 delivery slips past the HD-1 commissioning window",
    trend: "rising",
    scoreAtWindowStart: 12,
    linkedMilestones: [{ id: 21, name: "HD-1 ready for service" }],
    mitigations: [{ id: 9, description: "Hire a temporary 400 kW chiller for L4 tests", owner: { id: 3, name: "Ravi Okonjo" }, dueDate: "2027-01-15", status: "in_progress", overdue: false, version: 1 }],
  }),
  risk({ id: 2, likelihood: 2, impact: 3, category: "regulatory", trend: "new", scoreAtWindowStart: null }),
  risk({ id: 3, likelihood: 4, impact: 5, title: "Second risk at the same cell", trend: "falling", scoreAtWindowStart: 25 }),
  risk({ id: 4, likelihood: 3, impact: 3, status: "closed" }),
];

function summaryOf(risks: RiskAnswer[]): RiskSummary {
  const open = risks.filter((r) => r.kind === "risk" && r.status === "open");
  return {
    scale: DEFAULT_RISK_SCALE,
    grid: riskGrid(risks, DEFAULT_RISK_SCALE),
    openRisks: open.length,
    openIssues: 0,
    byBand: { low: 0, medium: 1, high: 0, critical: 2 },
    totalExpectedCost: 4_800_000,
    totalExpectedCostPert: 5_250_000,
    contingencyRemaining: 30_000_000,
    windowStart: "2026-11-01",
  };
}

describe("the investor room's Risks", () => {
  it("counts the open risks in each likelihood × impact cell, most likely row first, closed ones left out", () => {
    const rows = gridRows(summaryOf(RISKS));
    expect(rows.map((r) => r.likelihood)).toEqual([5, 4, 3, 2, 1]);
    const count = (l: number, i: number) => rows.find((r) => r.likelihood === l)!.cells.find((c) => c.impact === i)!.count;
    expect(count(4, 5)).toBe(2);
    expect(count(2, 3)).toBe(1);
    expect(count(3, 3)).toBe(0); // R-004 is closed
    expect(rows.flatMap((r) => r.cells).reduce((n, c) => n + c.count, 0)).toBe(3);
    expect(gridSentence(summaryOf(RISKS))).toBe("3 open risks: 2 critical, 0 high, 1 medium, 0 low.");
  });

  it("names each band's scores on the default 5 × 5 scale (medium from 5, high from 10, critical from 16)", () => {
    // Common practice (no published source): the default band edges of the product (decision 035).
    expect(["low", "medium", "high", "critical"].map((b) => bandRange(b as "low", DEFAULT_RISK_SCALE))).toEqual(["1–4", "5–9", "10–15", "16–25"]);
  });

  it("lists the top risks by score, rising before falling on a tie, with owner, mitigation, trend and what they affect", () => {
    expect(topRisks(RISKS).map((r) => r.reference)).toEqual(["R-001", "R-003", "R-002"]);
    renderWithApp(<InvestorRisks slug={SLUG} project={{ currency: "GBP" }} />, {
      data: [
        [riskKeys.list(SLUG), RISKS],
        [riskKeys.summary(SLUG), summaryOf(RISKS)],
      ],
    });
    const items = screen.getAllByTestId("top-risk");
    expect(items).toHaveLength(3);
    const first = within(items[0]!);
    expect(items[0]!.textContent).toContain("Chiller 5 delivery slips");
    expect(first.getByText("Imogen Thackeray")).toBeTruthy();
    expect(items[0]!.textContent).toContain("Hire a temporary 400 kW chiller for L4 tests");
    expect(items[0]!.textContent).toContain("HD-1 ready for service");
    expect(items[0]!.querySelector("[data-trend='rising']")?.textContent).toBe("Rising (was 12)");
    expect(items[0]!.querySelector("[data-trend='rising'] svg")?.getAttribute("data-shape")).toBe("rising");
    expect(items[0]!.querySelector("[data-band='critical']")?.textContent).toContain("Critical");
    // The table behind the chart says the same counts as the grid.
    const table = screen.getByTestId("risk-grid-table");
    expect(table.querySelector("td[data-likelihood='4'][data-impact='5']")?.textContent).toBe("2 (critical)");
    expect(table.querySelector("td[data-likelihood='3'][data-impact='3']")?.textContent).toBe("0 (medium)");
    expect(screen.getByTestId("risk-exposure").textContent).toContain("£48,000");
    expect(screen.getByTestId("exposure-caution").textContent).toMatch(/^Indicative/);
    expect(screen.getByTestId("risks-gone").textContent).toContain("R-004");
  });

  it("shows no money to a caller the summary gives none (marketing)", () => {
    renderWithApp(<InvestorRisks slug={SLUG} project={{ currency: "GBP" }} />, {
      data: [
        [riskKeys.list(SLUG), RISKS],
        [riskKeys.summary(SLUG), { ...summaryOf(RISKS), totalExpectedCost: null, totalExpectedCostPert: null, contingencyRemaining: null }],
      ],
    });
    expect(screen.queryByTestId("risk-exposure")).toBeNull();
    expect(screen.getAllByTestId("top-risk")).toHaveLength(3);
  });
});

function decision(over: Partial<DecisionAnswer> & Pick<DecisionAnswer, "id" | "neededBy">): DecisionAnswer {
  return {
    reference: `D-${String(over.id).padStart(3, "0")}`,
    title: `Decision ${over.id}`,
    question: "Which way?",
    background: "",
    options: [
      { label: "Hire a temporary chiller", consequence: "HD-1 keeps its ready date", cost: 18_500_000 },
      { label: "Wait for chiller 5", consequence: "HD-1 ready date moves about six weeks", cost: null },
    ],
    recommendedOption: 0,
    recommendation: "Hire: the rent is less than six weeks of lost revenue.",
    decider: "Investors' committee",
    daysLeft: null,
    overdue: false,
    status: "open",
    outcome: null,
    withdrawnReason: null,
    linkedMilestones: [],
    linkedRisks: [],
    documents: [],
    audience: "investor",
    version: 1,
    updatedAt: "2026-12-01T10:00:00.000Z",
    ...over,
  };
}

describe("the investor room's Decisions", () => {
  it("puts the overdue one first and says in words how late it is and how many days the others have", () => {
    const list = [
      decision({ id: 1, neededBy: "2027-01-15", daysLeft: 12 }),
      decision({ id: 2, neededBy: "2026-12-31", daysLeft: -3, overdue: true, title: "Approve the fuel polishing contract" }),
      decision({ id: 3, neededBy: "2027-02-01", daysLeft: 1 }),
      decision({ id: 4, neededBy: "2026-11-20", status: "decided", outcome: { chosenOption: 0, text: "Hire the temporary chiller.", decidedBy: "Investors' committee", decidedOn: "2026-11-18", recordedBy: "Project lead" } }),
    ];
    renderWithApp(<InvestorDecisions slug={SLUG} project={{ currency: "GBP" }} />, { data: [[decisionKeys.list(SLUG), list]] });
    const open = screen.getAllByTestId("open-decision");
    expect(open.map((d) => d.getAttribute("data-decision-id"))).toEqual(["2", "1", "3"]);
    expect(within(open[0]!).getByTestId("days-left").textContent).toBe("3 days overdue");
    expect(open[0]!.getAttribute("data-urgency")).toBe("overdue");
    expect(open[0]!.querySelector("[data-shape='overdue']")).not.toBeNull();
    expect(within(open[1]!).getByTestId("days-left").textContent).toBe("12 days left");
    expect(within(open[2]!).getByTestId("days-left").textContent).toBe("1 day left");
    expect(open[1]!.textContent).toContain("Investors' committee");
    expect(open[1]!.textContent).toContain("costs £185.0k");
    expect(open[1]!.textContent).toContain("★ Recommended");
    const decided = screen.getByTestId("decided-decision");
    expect(within(decided).getByTestId("decision-outcome").textContent).toBe("● Decided on 18 Nov 2026 by Investors' committee — option A, Hire a temporary chiller: Hire the temporary chiller.");
  });
});

describe("the investor room's Cost", () => {
  // Source: Schwalbe, Information Technology Project Management, ch. 7, exercise 1 (secondary):
  // PV 23,000 · EV 20,000 · AC 25,000 · BAC 120,000 → EAC = BAC / CPI = 150,000 (CHECKS.md).
  const position = budgetPosition({
    originalBudget: 110_000,
    changes: [
      { label: "C-001 Second fuel polishing skid", amount: 15_000, status: "approved", drawsOnContingency: false },
      { label: "C-002 Value-engineered cable trays", amount: -5_000, status: "approved", drawsOnContingency: false },
      { label: "C-003 Temporary chiller hire", amount: 4_000, status: "approved", drawsOnContingency: true },
      { label: "C-004 Proposed roof walkway", amount: 2_000, status: "proposed", drawsOnContingency: false },
    ],
    contingencyHeld: 10_000,
    plannedValue: 23_000,
    earnedValue: 20_000,
    actualCost: 25_000,
    method: "bac_over_cpi",
  });

  it("walks from the original budget through each approved change to the current budget and the projected final cost", () => {
    const bars = walkBars(position.walk);
    expect(bars.map((b) => [b.label, b.from, b.to, b.look])).toEqual([
      ["Original budget", 0, 110_000, "total"],
      ["C-001 Second fuel polishing skid", 110_000, 125_000, "rise"],
      ["C-002 Value-engineered cable trays", 125_000, 120_000, "saving"],
      ["Current approved budget", 0, 120_000, "total"],
      ["Projected final cost", 0, 150_000, "projection"],
    ]);
    // A saving floats from the lower level to the higher one.
    expect(bars[2]!.span).toEqual([120_000, 125_000]);
    expect(walkSentence({ ...position, originalBudget: 110_000, currency: "GBP" })).toBe("From £1,100 approved at the start to £1,200 now; projected to finish at £1,500.");
  });

  it("starts the walk's scale a round step below the lowest level when the changes are small beside the budget, else at zero", () => {
    // Levels 110,000 … 150,000: a spread of 40,000 in steps of 20,000 → the scale starts at 60,000.
    expect(walkFloor(walkBars(position.walk))).toBe(60_000);
    // A build of £5.1m with £0.4m of changes (minor units): the scale starts at £4.6m.
    const small = walkBars([
      { label: "Original budget", amount: 510_000_000, kind: "start" },
      { label: "C-001", amount: 12_600_000, kind: "change" },
      { label: "Current approved budget", amount: 522_600_000, kind: "subtotal" },
      { label: "Projected final cost", amount: 550_000_000, kind: "projection" },
    ]);
    expect(walkFloor(small)).toBe(460_000_000);
    // A walk that spreads over more than half its top starts at zero.
    expect(walkFloor(walkBars([{ label: "Original budget", amount: 100, kind: "start" }, { label: "Projected final cost", amount: 300, kind: "projection" }]))).toBe(0);
  });

  it("shows the three estimates side by side with their formulas, the chosen one marked, and the contingency", () => {
    const answer: BudgetPosition = {
      at: "2026-12-05",
      currency: "GBP",
      originalBudget: 110_000,
      ...position,
      plannedValue: 23_000,
      earnedValue: 20_000,
      actualCost: 25_000,
      projectedFinalCostMethod: "bac_over_cpi",
      riskExposure: { expected: 4_000, pert: 7_000 },
      caution: "Indicative figures.",
    };
    const changes: BudgetChangeAnswer[] = [];
    renderWithApp(<InvestorCost slug={SLUG} />, {
      data: [
        [budgetKeys.position(SLUG), answer],
        [budgetKeys.changes(SLUG), changes],
      ],
    });
    const variants = screen.getAllByTestId("eac-variant");
    expect(variants.map((v) => v.getAttribute("data-method"))).toEqual(["bac_over_cpi", "ac_plus_remaining", "ac_plus_remaining_over_cpi_spi"]);
    expect(variants[0]!.textContent).toContain("EAC = BAC / CPI");
    expect(variants[0]!.textContent).toContain("£1,500");
    expect(variants[0]!.textContent).toContain("The projected final cost the project lead uses");
    expect(variants[1]!.textContent).toContain("£1,250");
    expect(variants[1]!.textContent).not.toContain("The projected final cost the project lead uses");
    // 168,750 minor units: derived with CPI 0.8 and SPI 0.869565 (CHECKS.md).
    expect(variants[2]!.textContent).toContain("£1,688");
    const contingency = screen.getByTestId("contingency").textContent ?? "";
    expect(contingency).toContain("£100");
    expect(contingency).toContain("£40");
    expect(contingency).toContain("£60");
    expect(screen.getByTestId("cost-caution").textContent).toBe("Indicative figures.");
  });
});

describe("the investor room's Documents", () => {
  function doc(id: number, over: Partial<DocumentAnswer> = {}): DocumentAnswer {
    const version = { id: id * 10, number: 1, fileType: "pdf" as const, bytes: 2_400_000, pages: 18, originalName: "report.pdf", note: "", removed: [], uploadedBy: "Project lead", uploadedAt: "2026-11-28T09:00:00.000Z" };
    return { id, title: `Document ${id}`, category: "monitoring_report", period: "November 2026", periodEnd: "2026-11-30", audience: "investor", organisations: [], latestVersion: version, versions: [version], newSinceLastVisit: false, version: 1, updatedAt: "2026-11-28T09:00:00.000Z", ...over };
  }

  it("groups the library by category, marks what is new since the last visit by shape and word, and links each copy", () => {
    const docs = [doc(1, { newSinceLastVisit: true }), doc(2, { category: "certificate", title: "Energisation certificate" }), doc(3, { periodEnd: "2026-10-31", title: "October report" })];
    expect(byCategory(docs).map((g) => [g.category, g.documents.map((d) => d.id)])).toEqual([
      ["monitoring_report", [1, 3]],
      ["certificate", [2]],
    ]);
    renderWithApp(<InvestorDocuments slug={SLUG} project={{ timeZone: "Europe/London" }} />, { data: [[documentKeys.list(SLUG), docs]] });
    const items = screen.getAllByTestId("document");
    expect(items.map((i) => i.getAttribute("data-document-id"))).toEqual(["1", "3", "2"]);
    expect(within(items[0]!).getByTestId("new-mark").textContent).toBe("New since your last visit");
    expect(within(items[0]!).getByTestId("new-mark").querySelector("svg")).not.toBeNull();
    expect(within(items[1]!).queryByTestId("new-mark")).toBeNull();
    expect(items[0]!.textContent).toContain("PDF · 2.3 MB · 18 pages");
    expect(within(items[0]!).getByRole("link", { name: "Download" }).getAttribute("href")).toBe("/api/documents/1/file?as=download&version=1");
    expect(within(items[0]!).getByRole("link", { name: "Read here" }).getAttribute("href")).toBe(`/investors/projects/${SLUG}/documents/1`);
  });
});
