import { fireEvent, screen, waitFor, within } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { RiskAnswer } from "../../src/shared/schemas/risks.ts";
import { approvalMissing, ChangeForm } from "../../src/features/budget/components/change-form.tsx";
import { DecisionForm } from "../../src/features/decisions/components/decision-form.tsx";
import { daysLeftWords, orderDecisions } from "../../src/features/decisions/words.ts";
import { RiskRegister } from "../../src/features/risks/components/risk-table.tsx";
import { parseMoney } from "../../src/components/ui/money-field.tsx";
import { renderWithApp } from "./render.tsx";

afterEach(() => vi.unstubAllGlobals());

/** Fails the test if the page sends anything: the client's own checks must stop these forms first. */
function forbidNetwork() {
  const fetch = vi.fn(() => Promise.reject(new Error("no request expected")));
  vi.stubGlobal("fetch", fetch);
  return fetch;
}

/** A window of the given width for `matchMedia` (jsdom has none). */
function stubWidth(px: number) {
  vi.stubGlobal("matchMedia", (query: string) => {
    const max = /max-width:\s*([\d.]+)px/.exec(query);
    return { matches: max ? px <= Number(max[1]) : false, media: query, addEventListener: () => undefined, removeEventListener: () => undefined };
  });
}

const owner = (id: number, name: string) => ({ id, name });

function risk(id: number, over: Partial<RiskAnswer>): RiskAnswer {
  return {
    id,
    kind: "risk",
    reference: `R-00${id}`,
    title: `Risk ${id}`,
    description: "",
    cause: "",
    effect: "",
    category: "programme",
    owner: owner(1, "Lead Person"),
    likelihood: 2,
    impact: 2,
    score: 4,
    band: "low",
    trend: "steady",
    scoreAtWindowStart: 4,
    costExposure: null,
    expectedCost: null,
    expectedCostPert: null,
    scheduleDays: null,
    linkedMilestones: [],
    linkedBlocks: [],
    linkedSystems: [],
    status: "open",
    audience: "investor",
    impactNow: "",
    action: "",
    dueDate: null,
    fromRisk: null,
    issue: null,
    mitigations: [],
    version: 1,
    updatedAt: "2026-12-01T10:00:00Z",
    ...over,
  };
}

// Our own examples: four items across owners, categories, bands and statuses.
const RISKS: RiskAnswer[] = [
  risk(1, { title: "Chiller delivery slips", category: "supply_chain", likelihood: 4, impact: 4, score: 16, band: "critical", trend: "rising" }),
  risk(2, { title: "Utility connection date", category: "regulatory", likelihood: 3, impact: 4, score: 12, band: "high", owner: owner(2, "Admin Person"), trend: "new", scoreAtWindowStart: null }),
  risk(3, { title: "Crane hire", category: "programme", status: "closed" }),
  risk(4, { kind: "issue", reference: "I-001", title: "Chiller 3 arrived late", category: "supply_chain", likelihood: 5, impact: 3, score: 15, band: "high", trend: "falling" }),
];

const shownTitles = () => [...document.querySelectorAll("[data-risk-id]")].map((el) => el.querySelector("button, h3")?.textContent);

describe("the risks register", () => {
  it("starts with open items, highest score first, and filters by band, owner, kind and status", () => {
    renderWithApp(<RiskRegister risks={RISKS} currency="GBP" onOpen={() => undefined} />);
    expect(screen.getByRole("table", { name: "Risks and issues" })).toBeTruthy();
    expect(shownTitles()).toEqual(["Chiller delivery slips", "Chiller 3 arrived late", "Utility connection date"]);
    expect(screen.getByText("3 of 4 shown")).toBeTruthy();

    fireEvent.change(screen.getByLabelText("Band"), { target: { value: "high" } });
    expect(shownTitles()).toEqual(["Chiller 3 arrived late", "Utility connection date"]);
    fireEvent.change(screen.getByLabelText("Owner"), { target: { value: "2" } });
    expect(shownTitles()).toEqual(["Utility connection date"]);

    fireEvent.change(screen.getByLabelText("Band"), { target: { value: "" } });
    fireEvent.change(screen.getByLabelText("Owner"), { target: { value: "" } });
    fireEvent.change(screen.getByLabelText("Kind"), { target: { value: "issue" } });
    expect(shownTitles()).toEqual(["Chiller 3 arrived late"]);

    fireEvent.change(screen.getByLabelText("Kind"), { target: { value: "" } });
    fireEvent.change(screen.getByLabelText("Status"), { target: { value: "closed" } });
    expect(shownTitles()).toEqual(["Crane hire"]);
  });

  it("shows each band by word and a gauge shape, and each trend by word and arrow", () => {
    renderWithApp(<RiskRegister risks={RISKS} currency="GBP" onOpen={() => undefined} />);
    const row = document.querySelector('tr[data-risk-id="1"]') as HTMLElement;
    expect(within(row).getByText("Critical")).toBeTruthy();
    expect(row.querySelector('[data-band="critical"] svg')?.getAttribute("data-shape")).toBe("gauge-4");
    expect(row.querySelector('[data-trend="rising"]')?.textContent).toBe("Rising");
    expect(row.querySelector('svg[data-shape="trend-rising"]')).toBeTruthy();
    const high = document.querySelector('tr[data-risk-id="2"]') as HTMLElement;
    expect(high.querySelector('[data-band="high"] svg')?.getAttribute("data-shape")).toBe("gauge-3");
  });

  it("at phone width shows cards instead of the table, filtered the same way", () => {
    stubWidth(375);
    const onOpen = vi.fn();
    renderWithApp(<RiskRegister risks={RISKS} currency="GBP" onOpen={onOpen} />);
    expect(screen.queryByRole("table")).toBeNull();
    const cards = within(screen.getByRole("list", { name: "Risks and issues" })).getAllByTestId("risk-card");
    expect(cards.map((c) => c.querySelector("h3")?.textContent)).toEqual(["Chiller delivery slips", "Chiller 3 arrived late", "Utility connection date"]);
    fireEvent.change(screen.getByLabelText("Category"), { target: { value: "regulatory" } });
    expect(screen.getAllByTestId("risk-card")).toHaveLength(1);
    fireEvent.click(screen.getByRole("button", { name: "Open R-002 Utility connection date" }));
    expect(onOpen).toHaveBeenCalledWith(expect.objectContaining({ id: 2 }));
  });

  it("at desktop width keeps the table", () => {
    stubWidth(1280);
    renderWithApp(<RiskRegister risks={RISKS} currency="GBP" onOpen={() => undefined} />);
    expect(screen.getByRole("table", { name: "Risks and issues" })).toBeTruthy();
    expect(screen.queryAllByTestId("risk-card")).toHaveLength(0);
  });
});

describe("a budget change's approval", () => {
  it("says what an approved change lacks", () => {
    expect(approvalMissing({ status: "approved", approvedBy: null, approvedOn: null })).toBe("An approved change needs who approved it and the date of approval.");
    expect(approvalMissing({ status: "approved", approvedBy: "Investors' committee", approvedOn: null })).toBe("An approved change needs the date of approval.");
    expect(approvalMissing({ status: "approved", approvedBy: "Board", approvedOn: "2026-11-02" })).toBeNull();
    expect(approvalMissing({ status: "proposed", approvedBy: null, approvedOn: null })).toBeNull();
  });

  it("shows the rule as soon as the change is marked approved, and refuses to send it without approver and date", async () => {
    const fetch = forbidNetwork();
    renderWithApp(<ChangeForm slug="aldermere-phase-2" change={null} currency="GBP" milestones={[]} risks={[]} onClose={() => undefined} />);
    expect(screen.queryByTestId("approval-rule")).toBeNull();
    fireEvent.change(screen.getByLabelText("Description"), { target: { value: "Extra containment for HD-1" } });
    fireEvent.change(screen.getByLabelText("Amount (GBP)"), { target: { value: "12,500" } });
    fireEvent.change(screen.getByLabelText("Status"), { target: { value: "approved" } });
    expect(screen.getByTestId("approval-rule").textContent).toContain("An approved change needs who approved it and the date of approval.");
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await waitFor(() => expect(screen.getByLabelText("Approved by").getAttribute("aria-invalid")).toBe("true"));
    expect(screen.getByText("is required for an approved change", { selector: "#" + screen.getByLabelText("Approved by").id + "-error" })).toBeTruthy();
    expect(screen.getByLabelText("Approved on").getAttribute("aria-invalid")).toBe("true");
    fireEvent.change(screen.getByLabelText("Approved by"), { target: { value: "Investors' committee" } });
    expect(screen.getByTestId("approval-rule").textContent).toContain("needs the date of approval");
    expect(fetch).not.toHaveBeenCalled();
  });

  it("reads amounts typed in pounds as whole pence", () => {
    expect(parseMoney("12,500", "GBP")).toBe(1_250_000);
    expect(parseMoney("-3000.5", "GBP")).toBe(-300_050);
    expect(parseMoney("−40", "GBP")).toBe(-4_000);
    expect(parseMoney("", "GBP")).toBeNull();
    expect(parseMoney("twelve", "GBP")).toBeNull();
  });
});

describe("asking for a decision", () => {
  const renderForm = () => renderWithApp(<DecisionForm slug="aldermere-phase-2" decision={null} today="2026-12-05" currency="GBP" milestones={[]} risks={[]} documents={[]} onClose={() => undefined} />);

  it("adds and removes options, each with its consequence and cost, and offers them as the recommendation", () => {
    forbidNetwork();
    renderForm();
    expect(screen.getAllByTestId("decision-option")).toHaveLength(2);
    fireEvent.click(screen.getByRole("button", { name: "Add an option" }));
    expect(screen.getAllByTestId("decision-option")).toHaveLength(3);
    fireEvent.change(screen.getByLabelText("Option 3"), { target: { value: "Defer HD-1 liquid cooling" } });
    fireEvent.change(screen.getByLabelText("Consequence of option 3"), { target: { value: "HD-1 opens at 15 kW per rack" } });
    const recommended = screen.getByLabelText("Recommended option") as HTMLSelectElement;
    expect([...recommended.options].map((o) => o.textContent)).toEqual(["No recommendation", "Option 1", "Option 2", "Defer HD-1 liquid cooling"]);
    fireEvent.click(screen.getByRole("button", { name: "Remove option 1" }));
    expect(screen.getAllByTestId("decision-option")).toHaveLength(2);
    expect((screen.getByLabelText("Option 2") as HTMLInputElement).value).toBe("Defer HD-1 liquid cooling");
    fireEvent.click(screen.getByRole("button", { name: "Remove option 1" }));
    // The last option cannot be removed: a request needs at least one.
    expect((screen.getByRole("button", { name: "Remove option 1" }) as HTMLButtonElement).disabled).toBe(true);
  });

  it("refuses a needed-by date in the past before anything is sent, naming the field", async () => {
    const fetch = forbidNetwork();
    renderForm();
    fireEvent.change(screen.getByLabelText("Title"), { target: { value: "Approve liquid cooling for HD-1" } });
    fireEvent.change(screen.getByLabelText("Who decides"), { target: { value: "Investors' committee" } });
    fireEvent.change(screen.getByLabelText("The question"), { target: { value: "Fit HD-1 for liquid cooling now?" } });
    fireEvent.change(screen.getByLabelText("Option 1"), { target: { value: "Yes" } });
    fireEvent.change(screen.getByLabelText("Option 2"), { target: { value: "No" } });
    fireEvent.change(screen.getByLabelText("Needed by"), { target: { value: "2026-12-04" } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    await screen.findByText("must not be in the past (today is 5 Dec 2026)");
    expect(screen.getByLabelText("Needed by").getAttribute("aria-invalid")).toBe("true");
    expect(fetch).not.toHaveBeenCalled();
  });
});

describe("the order and wording of decisions", () => {
  const d = (id: number, status: DecisionAnswer["status"], neededBy: string, daysLeft: number | null) => ({ id, status, neededBy, daysLeft, overdue: status === "open" && (daysLeft ?? 0) < 0 });
  it("puts open ones first, overdue at the top, then by needed-by; closed ones after, latest first", () => {
    const ordered = orderDecisions([d(1, "decided", "2026-11-01", null), d(2, "open", "2027-01-15", 41), d(3, "open", "2026-11-30", -5), d(4, "withdrawn", "2026-12-20", null), d(5, "open", "2026-12-19", 14), d(6, "decided", "2026-11-20", null)]);
    expect(ordered.map((x) => x.id)).toEqual([3, 5, 2, 6, 1, 4]);
  });
  it("says days left, due today and days overdue in words", () => {
    expect(daysLeftWords({ status: "open", daysLeft: 12 })).toBe("12 days left");
    expect(daysLeftWords({ status: "open", daysLeft: 1 })).toBe("1 day left");
    expect(daysLeftWords({ status: "open", daysLeft: 0 })).toBe("Due today");
    expect(daysLeftWords({ status: "open", daysLeft: -3 })).toBe("3 days overdue");
    expect(daysLeftWords({ status: "decided", daysLeft: null })).toBe("");
  });
});
