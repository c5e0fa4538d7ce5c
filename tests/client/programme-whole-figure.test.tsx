import { render, screen } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { HealthFigures } from "../../src/features/programme/components/health-figures.tsx";
import { computeProgrammeHealth, WHOLE_PROGRAMME_NOTE } from "../../src/shared/domain/programme-health.ts";
import type { ProgrammeHealthResponse } from "../../src/shared/schemas/programme.ts";
import { WholeProgrammeNote } from "../../src/features/programme/components/whole-programme-note.tsx";

const SETTINGS = { toleranceWorkingDays: 5, behindWorkingDays: 15, calendar: { weekendDays: [6, 7], holidays: [] } };

/** The figures of a two-milestone programme as a visitor gets them: the public one listed, the hidden one only counted and worded. */
function visitorHealth(): ProgrammeHealthResponse {
  const health = computeProgrammeHealth({
    milestones: [
      { id: 1, name: "Hall 2A ready for service", weight: 2, percentComplete: 15, plannedStart: "2026-10-05", baselineFinish: "2027-04-02", forecastFinish: "2027-04-16", actualFinish: null, dependsOn: [2] },
      { id: 2, name: "Secure zoning signed off", weight: 3, percentComplete: 45, plannedStart: "2026-09-07", baselineFinish: "2027-01-29", forecastFinish: "2027-06-30", actualFinish: null, dependsOn: [] },
    ],
    at: "2026-12-01",
    settings: SETTINGS,
  });
  return {
    ...health,
    money: null,
    milestones: health.milestones.filter((m) => m.id === 1),
    drivers: { milestoneId: null, finish: "2027-06-30", chain: [{ id: null, name: "A milestone not listed here", finish: null }] },
    timeZone: "Europe/London",
  };
}

describe("one figure for the build, on the page", () => {
  it("shows the whole programme's percent and a driver it may not name without a name or a date", () => {
    render(<HealthFigures health={visitorHealth()} />);
    // (2 × 15 + 3 × 45) / 5 = 33 %: the hidden milestone counts.
    expect(screen.getByTestId("figure-percent").textContent).toContain("33");
    const drivers = screen.getByTestId("drivers").textContent ?? "";
    expect(drivers).toContain("A milestone not listed here");
    expect(drivers).not.toContain("Secure zoning");
    expect(drivers).not.toContain("(");
  });

  it("says in one short line that the figures cover the whole programme", () => {
    render(<WholeProgrammeNote />);
    const note = screen.getByTestId("whole-programme-note");
    expect(note.textContent).toBe(WHOLE_PROGRAMME_NOTE);
    expect(note.textContent).toMatch(/whole programme/);
  });
});
