import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { cleanup, fireEvent, render, screen, within } from "@testing-library/react";
import { afterEach, describe, expect, it } from "vitest";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import type { ProgrammeSettings } from "../../src/shared/domain/programme-health.ts";
import { HealthPreview } from "../../src/features/programme/components/health-preview.tsx";
import { MilestoneTable } from "../../src/features/programme/components/milestone-table.tsx";
import { PendingChanges } from "../../src/features/programme/components/pending-changes.tsx";
import { patchOf, previewDrafts, shiftDrafts } from "../../src/features/programme/preview.ts";
import { draftErrors, useDraftEditor } from "../../src/features/programme/use-draft-editor.ts";
import { makeMilestone } from "./milestone-fixture.ts";

afterEach(cleanup);

// Our own example, worked by hand. Status date Monday 4 Jan 2027; Saturdays and Sundays
// are not worked; on programme up to 5 working days of slip, behind beyond 15.
const settings: ProgrammeSettings = { toleranceWorkingDays: 5, behindWorkingDays: 15, calendar: { weekendDays: [6, 7], holidays: [] } };
const AT = "2027-01-04";

const milestone = (over: Partial<Milestone> & Pick<Milestone, "id" | "name">): Milestone =>
  makeMilestone({ phase: "Plant", area: "Plant yard", system: "power", baselineFinish: "2027-01-11", updatedAt: "2027-01-04T09:00:00Z", ...over });

// A: weight 1, done. B: weight 3, 50 % done, planned linearly 28 Dec → 11 Jan, so half planned on 4 Jan.
// PV = 1 + 3 × 0.5 = 2.5, EV = 1 + 3 × 0.5 = 2.5 → SPI 1.00, percent complete 2.5 / 4 = 62.5 %.
const A = milestone({ id: 1, name: "Generator set delivered", plannedStart: "2026-12-07", baselineFinish: "2026-12-18", actualFinish: "2026-12-18", percentComplete: 100, status: "complete" });
const B = milestone({ id: 2, name: "Generator commissioning L2", weight: 3, percentComplete: 50, plannedStart: "2026-12-28", baselineFinish: "2027-01-11", forecastFinish: "2027-01-11" });
const programme = [A, B];

describe("previewDrafts (the live preview's computation)", () => {
  it("with no change, before and after are the same figures", () => {
    const p = previewDrafts(programme, {}, settings, AT);
    expect(p.before.percentComplete).toBeCloseTo(62.5, 10);
    expect(p.before.spi).toBeCloseTo(1, 10);
    expect(p.after).toEqual(p.before);
    expect(p.statuses).toEqual([]);
  });

  it("moving B's forecast two weeks later and its progress to 25 % gives percent 43.75, SPI 0.70 and B at risk", () => {
    // After: EV = 1 + 3 × 0.25 = 1.75 → SPI 1.75 / 2.5 = 0.70, percent 1.75 / 4 = 43.75 %.
    // Slip 11 → 25 Jan is 14 calendar days, 10 working days: over the tolerance of 5, within 15 → at risk.
    const p = previewDrafts(programme, { 2: { forecastFinish: "2027-01-25", percentComplete: 25 } }, settings, AT);
    expect(p.after.percentComplete).toBeCloseTo(43.75, 10);
    expect(p.after.spi).toBeCloseTo(0.7, 10);
    expect(p.before.forecastCompletion).toBe("2027-01-11");
    expect(p.after.forecastCompletion).toBe("2027-01-25");
    expect(p.statuses).toEqual([{ id: 2, name: B.name, before: "on_programme", after: "at_risk", slipBefore: 0, slipAfter: 14 }]);
  });

  it("shifting by 16 working days puts B behind (beyond 15 working days)", () => {
    const drafts = shiftDrafts(programme, [1, 2], 16, settings);
    // A is complete: a shift leaves it alone. 11 Jan 2027 + 16 working days = 2 Feb 2027.
    expect(drafts).toEqual({ 2: { forecastFinish: "2027-02-02" } });
    expect(previewDrafts(programme, drafts, settings, AT).statuses[0]?.after).toBe("behind");
  });

  it("a PATCH carries only the fields that changed, with the version that was read", () => {
    expect(patchOf(B, { forecastFinish: "2027-01-25", percentComplete: 50 }, "  crane delayed ")).toEqual({ version: 1, forecastFinish: "2027-01-25", note: "crane delayed" });
  });

  it("refuses, before sending, what the server's schema would refuse", () => {
    expect(draftErrors(B, { percentComplete: 120 }, AT)).toEqual({ percentComplete: "must be between 0 and 100" });
    expect(draftErrors(B, { actualFinish: "2027-01-05" }, AT)).toEqual({ actualFinish: "must not be in the future" });
    expect(draftErrors(B, { actualFinish: "2027-01-04" }, AT)).toEqual({});
  });
});

describe("HealthPreview", () => {
  it("shows each figure before → after", () => {
    const p = previewDrafts(programme, { 2: { forecastFinish: "2027-01-25", percentComplete: 25 } }, settings, AT);
    render(<HealthPreview preview={p} />);
    expect(screen.getByTestId("preview-percent-complete").textContent).toBe("Percent complete62.5%→becomes43.8%");
    expect(screen.getByTestId("preview-spi").textContent).toBe("SPI1.00→becomes0.70");
    expect(screen.getByTestId("preview-forecast-completion").textContent).toBe("Forecast completion11 Jan 2027→becomes25 Jan 2027(+14 d)");
    const status = screen.getByTestId("preview-status");
    expect(status.textContent).toContain("On programme");
    expect(status.textContent).toContain("At risk");
    expect(status.textContent).toContain("slip 0 d → +14 d");
  });
});

function Editor({ milestones }: { milestones: Milestone[] }) {
  const editor = useDraftEditor({ slug: "example", milestones, settings, at: AT });
  return (
    <>
      <MilestoneTable milestones={milestones} caption="Example" editable drafts={editor.drafts} onDraft={editor.setDraft} errors={editor.errors} previewed={editor.previewed} />
      <PendingChanges editor={editor} milestones={milestones} />
    </>
  );
}

describe("editing the programme table", () => {
  const renderEditor = () =>
    render(
      <QueryClientProvider client={new QueryClient()}>
        <Editor milestones={programme} />
      </QueryClientProvider>,
    );

  it("shows the effect of a typed forecast before anything is saved", () => {
    renderEditor();
    expect(screen.queryByTestId("health-preview")).toBeNull();
    fireEvent.change(screen.getByLabelText("Forecast finish of Generator commissioning L2"), { target: { value: "2027-01-25" } });
    const preview = screen.getByTestId("health-preview");
    expect(within(preview).getByTestId("preview-forecast-completion").textContent).toContain("11 Jan 2027→becomes25 Jan 2027");
    expect(within(preview).getByTestId("preview-status").textContent).toContain("At risk");
    // The row itself says what the status would become.
    const row = document.querySelector('[data-milestone-id="2"]') as HTMLElement;
    expect(row.textContent).toContain("would become");
    expect(within(preview).getByRole("button", { name: "Save change" })).toBeTruthy();
  });

  it("drops the change when the value is put back, and blocks saving a percent over 100", () => {
    renderEditor();
    const input = screen.getByLabelText("Forecast finish of Generator commissioning L2");
    fireEvent.change(input, { target: { value: "2027-01-25" } });
    fireEvent.change(input, { target: { value: "2027-01-11" } });
    expect(screen.queryByTestId("health-preview")).toBeNull();
    fireEvent.change(screen.getByLabelText("Percent complete of Generator commissioning L2"), { target: { value: "120" } });
    expect(screen.getByRole("button", { name: "Save change" }).hasAttribute("disabled")).toBe(true);
    expect(screen.getAllByText(/must be between 0 and 100/).length).toBeGreaterThan(0);
  });

  it("marks nothing editable for a reader", () => {
    render(<MilestoneTable milestones={programme} caption="Example" />);
    expect(screen.queryByLabelText("Forecast finish of Generator commissioning L2")).toBeNull();
    // Baseline and forecast of B are printed, not offered for editing.
    expect(screen.getAllByText("11 Jan 2027", { selector: "td *" })).toHaveLength(2);
    expect(document.querySelectorAll("input")).toHaveLength(0);
  });
});
