import { describe, expect, it } from "vitest";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { addMonths } from "../../src/features/programme/dates.ts";
import { todayIn } from "../../src/lib/format.ts";
import { describePublicProgress, slipInWords } from "../../src/features/programme/words.ts";
import { describeDates } from "../../src/features/programme/public-routes.tsx";
import { makeMilestone } from "./milestone-fixture.ts";

// Our own examples: the plain words of the public pages.
describe("slipInWords", () => {
  it.each([
    [0, "on the planned date"],
    [1, "a day later than planned"],
    [3, "three days later than planned"],
    [-2, "two days earlier than planned"],
    [7, "a week later than planned"],
    [14, "two weeks later than planned"],
    [10, "about a week later than planned"],
    [18, "about three weeks later than planned"],
    [61, "about two months later than planned"],
    [-91, "about three months earlier than planned"],
  ])("%i days → %s", (days, words) => {
    expect(slipInWords(days)).toBe(words);
  });
});

const m = (over: Partial<Milestone> & Pick<Milestone, "id" | "name">): Milestone =>
  makeMilestone({ phase: "Ready for service", system: "commissioning", baselineFinish: "2027-03-12", ...over });

describe("describePublicProgress", () => {
  it("counts the complete ones and names the next ready-for-service date with its slip", () => {
    const list = [
      m({ id: 1, name: "Enabling works complete", baselineFinish: "2026-03-20", actualFinish: "2026-03-20", status: "complete" }),
      m({ id: 2, name: "Hall 2A ready for service", forecastFinish: "2027-03-26", slipDays: 14, status: "at_risk" }),
      m({ id: 3, name: "HD-1 ready for service", baselineFinish: "2027-05-28", forecastFinish: "2027-05-28" }),
    ];
    expect(describePublicProgress(list)).toBe("1 of 3 public milestones complete; Hall 2A ready for service is forecast for March 2027, two weeks later than planned.");
  });

  it("says so when nothing is published, and when everything is done", () => {
    expect(describePublicProgress([])).toBe("No public milestones have been published yet.");
    expect(describePublicProgress([m({ id: 1, name: "Hall 2A ready for service", actualFinish: "2027-03-12", status: "complete" })])).toBe(
      "1 of 1 public milestone complete: every published milestone is done.",
    );
  });

  it("uses no schedule-index jargon", () => {
    const text = describePublicProgress([m({ id: 2, name: "Hall 2A ready for service", forecastFinish: "2027-04-09", slipDays: 28, status: "behind" })]);
    expect(text).not.toMatch(/SPI|baseline|earned|index/i);
  });
});

describe("describeDates", () => {
  it("gives planned against expected in words", () => {
    expect(describeDates(m({ id: 2, name: "x", forecastFinish: "2027-03-26", slipDays: 14 }))).toBe("Planned for 12 March 2027; now expected 26 March 2027, two weeks later than planned.");
    expect(describeDates(m({ id: 2, name: "x", actualFinish: "2027-03-12" }))).toBe("Finished 12 March 2027, on the planned date.");
    expect(describeDates(m({ id: 2, name: "x", forecastFinish: "2027-03-12" }))).toBe("Expected 12 March 2027, as planned.");
  });
});

describe("dates", () => {
  it("a month before 31 March is the last day of February (2028 is a leap year)", () => {
    expect(addMonths("2027-03-31", -1)).toBe("2027-02-28");
    expect(addMonths("2028-03-31", -1)).toBe("2028-02-29");
    expect(addMonths("2027-01-15", -1)).toBe("2026-12-15");
  });

  it("today is the site's day, not the browser's: 23:30 UTC on 1 Dec is 2 Dec in Singapore", () => {
    const instant = new Date("2026-12-01T23:30:00Z");
    expect(todayIn("Europe/London", instant)).toBe("2026-12-01");
    expect(todayIn("Asia/Singapore", instant)).toBe("2026-12-02");
  });
});
