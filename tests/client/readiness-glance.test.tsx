import { render, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import { INDICATIVE_CAUTION } from "../../src/shared/domain/facility.ts";
import { ReadinessAtAGlance, ReadinessBars, missingInWords, readinessInWords } from "../../src/features/public-site/components/readiness-glance.tsx";
import { facilityReadKeys } from "../../src/features/public-site/facility-api.ts";
import { block } from "./facility-fixtures.ts";
import { renderWithApp } from "./render.tsx";

// Invented blocks in the shape of the demo (Aldermere Phase 2), seen on 1 March 2027.
const TODAY = "2027-03-01";

// Hall 2A here is forecast two weeks after its plan, with four things still to do.
const HALL_2A = block({
  forecastReadyDate: "2027-04-16",
  slipWorkingDays: 10,
  missing: ["Integrated systems test (forecast 14 Apr 2027)", "Cooling at N: 3 of 4 units carry load", "Standby power at N+1", "Hall lighting"],
});
const HD_1 = block({ ...HALL_2A, id: 2, name: "HD-1", baselineReadyDate: "2027-06-30", forecastReadyDate: "2027-06-30", slipWorkingDays: 0, missing: ["Liquid-cooling loop flushed"] });
const HALL_2B = block({ ...HALL_2A, id: 3, name: "Hall 2B", baselineReadyDate: "2026-12-01", forecastReadyDate: "2026-12-01", readyForService: true, slipWorkingDays: 0, missing: [] });

const rows = () => screen.getAllByTestId("readiness-row");
const widthOf = (row: HTMLElement, id: string) => parseFloat((within(row).getByTestId(id) as HTMLElement).style.width);

describe("readiness at a glance", () => {
  it("draws one row per block in the order given, each with its name, its standing in a word and a shape", () => {
    render(<ReadinessBars blocks={[HALL_2A, HD_1, HALL_2B]} today={TODAY} />);
    expect(rows().map((r) => within(r).getByRole("heading").textContent)).toEqual(["Hall 2A", "HD-1", "Hall 2B"]);
    const standing = rows().map((r) => within(r).getByTestId("readiness-standing"));
    expect(standing.map((s) => s.textContent)).toEqual(["After plan", "On plan", "Ready for service"]);
    expect(standing.map((s) => s.querySelector("svg")?.getAttribute("data-shape"))).toEqual(["triangle", "ring", "disc"]);
  });

  it("writes the forecast against the plan in words, in the en-GB day-month-year form", () => {
    render(<ReadinessBars blocks={[HALL_2A, HD_1, HALL_2B]} today={TODAY} />);
    expect(rows().map((r) => within(r).getByTestId("readiness-words").textContent)).toEqual([
      "Forecast 16 Apr 2027, 10 working days after plan (planned 2 Apr 2027)",
      "Forecast 30 Jun 2027, as planned",
      "Ready for service since 1 Dec 2026",
    ]);
    expect(readinessInWords(block({ ...HALL_2A, slipWorkingDays: -1, baselineReadyDate: "2027-04-19" }))).toBe("Forecast 16 Apr 2027, 1 working day ahead of plan (planned 19 Apr 2027)");
    expect(readinessInWords(block({ ...HALL_2A, forecastReadyDate: null, baselineReadyDate: null, slipWorkingDays: null }))).toBe("No ready-for-service date yet");
  });

  it("names the first missing thing and counts the rest; a ready block lists none", () => {
    render(<ReadinessBars blocks={[HALL_2A, HD_1, HALL_2B]} today={TODAY} />);
    const [a, hd, b] = rows() as [HTMLElement, HTMLElement, HTMLElement];
    expect(within(a).getByTestId("readiness-missing").textContent).toBe("Still to do: Integrated systems test (forecast 14 Apr 2027) and 3 more");
    expect(within(hd).getByTestId("readiness-missing").textContent).toBe("Still to do: Liquid-cooling loop flushed");
    expect(within(b).queryByTestId("readiness-missing")).toBeNull();
    expect(missingInWords(["A", "B", "C"])).toBe("Still to do: A and 2 more");
    expect(missingInWords(["A"])).toBe("Still to do: A");
    expect(missingInWords([])).toBeNull();
  });

  it("draws the plan as an outline and the forecast as a solid bar from today, in proportion; a ready block has no bars", () => {
    render(<ReadinessBars blocks={[HALL_2A, HD_1, HALL_2B]} today={TODAY} />);
    const [a, hd, b] = rows() as [HTMLElement, HTMLElement, HTMLElement];
    // The axis runs from today (1 Mar 2027) to 1 Jul 2027, the month after the latest date: 122 days.
    expect(widthOf(a, "bar-planned")).toBeCloseTo((32 / 122) * 100, 5);
    expect(widthOf(a, "bar-forecast")).toBeCloseTo((46 / 122) * 100, 5);
    expect(widthOf(hd, "bar-forecast")).toBeCloseTo(widthOf(hd, "bar-planned"), 5);
    expect(widthOf(a, "bar-forecast")).toBeLessThan(widthOf(hd, "bar-forecast"));
    expect(within(b).queryByTestId("bar-forecast")).toBeNull();
    expect(within(b).getByTestId("readiness-bars").querySelector("[data-shape='disc']")).not.toBeNull();
  });

  it("on a public page shows only the public blocks, whoever reads it, from the facility answer", () => {
    const answer: FacilityAnswer = {
      at: TODAY,
      availableFromLevel: 5,
      blocks: [HALL_2A, block({ ...HALL_2A, id: 9, name: "Suite X", audience: "investor" }), HD_1],
      systems: [],
      ramp: [],
      features: [],
      caution: INDICATIVE_CAUTION,
    };
    const slug = "aldermere-phase-2";
    const { unmount } = renderWithApp(<ReadinessAtAGlance slug={slug} publicOnly detailsHref={`/projects/${slug}/facility`} />, { data: [[facilityReadKeys.facility(slug), answer]] });
    expect(rows().map((r) => within(r).getByRole("heading").textContent)).toEqual(["Hall 2A", "HD-1"]);
    expect(screen.getByRole("link", { name: /Capacity, cooling and plant of each block/ }).getAttribute("href")).toBe(`/projects/${slug}/facility`);
    unmount();
    renderWithApp(<ReadinessAtAGlance slug={slug} />, { data: [[facilityReadKeys.facility(slug), answer]] });
    expect(rows().map((r) => within(r).getByRole("heading").textContent)).toEqual(["Hall 2A", "Suite X", "HD-1"]);
  });
});
