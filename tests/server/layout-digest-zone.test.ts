import { describe, expect, it } from "vitest";
import { CATCH_UP_MS } from "../../server/digests/digests.schedule.ts";
import { sendTimes } from "../../server/digests/digests.windows.ts";
import { zoneWithoutWeeklyRunDue } from "../../scripts/layout/scenarios.ts";

// The kill test's digest scenario makes a project and asks for last week's run; the workers'
// scheduler must not make that run first (Monday 08:00 local to Tuesday 08:00, it catches up).
describe("the digest scenario's project zone", () => {
  const dueWithin = (at: Date, zone: string, ms: number) =>
    [0, ms].some((d) => {
      const t = new Date(at.getTime() + d);
      return t.getTime() - sendTimes("weekly", t, zone).due.getTime() <= CATCH_UP_MS;
    });

  it("on Monday at 09:00 in London is not London's, where the week's run is due", () => {
    const at = new Date("2026-11-30T09:00:00Z");
    expect(dueWithin(at, "Europe/London", 0)).toBe(true);
    const zone = zoneWithoutWeeklyRunDue(at);
    expect(zone).not.toBe("Europe/London");
    expect(dueWithin(at, zone, 10 * 60_000)).toBe(false);
  });

  it("at every half hour of a week, across a change of the clocks, has no weekly run due in the next ten minutes", () => {
    // 23 March 2026 to 3 April 2026 holds the end of British winter time (29 March).
    for (let t = Date.parse("2026-03-23T00:00:00Z"); t < Date.parse("2026-04-03T00:00:00Z"); t += 30 * 60_000) {
      const at = new Date(t);
      expect(dueWithin(at, zoneWithoutWeeklyRunDue(at), 10 * 60_000), at.toISOString()).toBe(false);
    }
  });
});
