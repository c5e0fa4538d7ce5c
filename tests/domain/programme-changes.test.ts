import { describe, expect, it } from "vitest";
import { summariseChanges, type MilestoneEvent } from "../../src/shared/domain/programme-changes.ts";

// Our own examples: events from an invented Aldermere Phase 2 history.
function ev(milestoneId: number, field: MilestoneEvent["field"], from: string | null, to: string | null, at: string, note: string | null = null): MilestoneEvent {
  return { milestoneId, field, from, to, at, note };
}

const HISTORY: MilestoneEvent[] = [
  ev(4, "forecast_finish", "2026-08-03", "2026-08-10", "2026-03-03T09:15:00Z", "Generator delivery slot moved"),
  ev(4, "forecast_finish", "2026-08-10", "2026-08-17", "2026-03-20T14:00:00Z", "Second slip: crane availability"),
  ev(2, "percent_complete", "40", "55", "2026-03-10T08:00:00Z"),
  ev(2, "percent_complete", "55", "60", "2026-03-24T08:00:00Z"),
  ev(1, "actual_finish", null, "2026-03-12", "2026-03-12T16:30:00Z", "Enabling works signed off"),
  ev(1, "percent_complete", "90", "100", "2026-03-12T16:30:00Z"),
  ev(5, "forecast_finish", "2026-09-04", "2026-08-28", "2026-03-15T10:00:00Z", "Chiller order brought forward"),
  ev(6, "baseline_finish", "2026-10-02", "2026-10-16", "2026-03-31T17:00:00Z", "Re-baseline v2: utility connection date"),
  ev(7, "audience", "internal", "investor", "2026-03-18T12:00:00Z"),
  ev(8, "forecast_finish", "2026-07-01", "2026-07-08", "2026-03-05T12:00:00Z"),
  ev(8, "forecast_finish", "2026-07-08", "2026-07-01", "2026-03-06T12:00:00Z"),
  ev(9, "weight", "2", "3", "2026-03-06T12:00:00Z"),
  ev(3, "forecast_finish", "2026-06-01", "2026-06-15", "2026-02-27T12:00:00Z"), // before the window
  ev(3, "forecast_finish", "2026-06-15", "2026-06-22", "2026-04-01T00:00:00Z"), // after the window
];

describe("summariseChanges", () => {
  const summary = summariseChanges(HISTORY, "2026-03-01", "2026-03-31");
  const movesOf = (id: number) => summary.find((s) => s.milestoneId === id)?.moves;

  it("nets two forecast slips into one move later by 14 calendar days, with both notes", () => {
    expect(movesOf(4)).toEqual([
      {
        kind: "later",
        days: 14,
        from: "2026-08-03",
        to: "2026-08-17",
        notes: ["Generator delivery slot moved", "Second slip: crane availability"],
      },
    ]);
  });

  it("reports a forecast pulled in as earlier, with negative days", () => {
    expect(movesOf(5)).toEqual([{ kind: "earlier", days: -7, from: "2026-09-04", to: "2026-08-28", notes: ["Chiller order brought forward"] }]);
  });

  it("reports completion first, then the progress that came with it", () => {
    expect(movesOf(1)?.map((mv) => mv.kind)).toEqual(["completed", "progress"]);
    expect(movesOf(1)?.[0]).toEqual({ kind: "completed", from: null, to: "2026-03-12", notes: ["Enabling works signed off"] });
  });

  it("nets progress over the window", () => {
    expect(movesOf(2)).toEqual([{ kind: "progress", from: "40", to: "60", notes: [] }]);
  });

  it("reports a re-baseline with its days and reason, and an audience change", () => {
    expect(movesOf(6)).toEqual([{ kind: "rebaselined", days: 14, from: "2026-10-02", to: "2026-10-16", notes: ["Re-baseline v2: utility connection date"] }]);
    expect(movesOf(7)).toEqual([{ kind: "audience_changed", from: "internal", to: "investor", notes: [] }]);
  });

  it("leaves out a forecast moved out and back, a weight change alone, and events outside the window", () => {
    expect(summary.map((s) => s.milestoneId)).toEqual([1, 2, 4, 5, 6, 7]);
  });

  it("includes both end dates of the window", () => {
    const edges = [ev(1, "forecast_finish", "2026-05-01", "2026-05-04", "2026-03-01T00:00:00Z"), ev(2, "forecast_finish", "2026-05-01", "2026-05-04", "2026-03-31T23:59:59Z")];
    expect(summariseChanges(edges, "2026-03-01", "2026-03-31").map((s) => s.milestoneId)).toEqual([1, 2]);
  });

  it("orders events by instant, not by their text, when offsets differ", () => {
    // 09:00+02:00 (07:00 UTC) comes before 08:00Z.
    const events = [
      ev(1, "forecast_finish", "2026-05-08", "2026-05-15", "2026-03-10T08:00:00Z"),
      ev(1, "forecast_finish", "2026-05-01", "2026-05-08", "2026-03-10T09:00:00+02:00"),
    ];
    expect(summariseChanges(events, "2026-03-01", "2026-03-31")[0]?.moves[0]).toMatchObject({ kind: "later", days: 14, from: "2026-05-01", to: "2026-05-15" });
  });

  it("cuts the window with the given dateOf (e.g. the project's time zone)", () => {
    // 23:30Z on 31 March is already 1 April in a zone at UTC+1.
    const events = [ev(1, "forecast_finish", "2026-05-01", "2026-05-04", "2026-03-31T23:30:00Z")];
    const plusOne = (at: string): string => new Date(Date.parse(at) + 3_600_000).toISOString().slice(0, 10);
    expect(summariseChanges(events, "2026-03-01", "2026-03-31")).toHaveLength(1);
    expect(summariseChanges(events, "2026-03-01", "2026-03-31", plusOne)).toEqual([]);
  });

  it("reports an actual finish cleared as reopened, and skips a forecast first set from nothing", () => {
    const events = [ev(1, "actual_finish", "2026-03-02", null, "2026-03-05T10:00:00Z"), ev(2, "forecast_finish", null, "2026-06-01", "2026-03-05T10:00:00Z")];
    expect(summariseChanges(events, "2026-03-01", "2026-03-31")).toEqual([{ milestoneId: 1, moves: [{ kind: "reopened", from: "2026-03-02", to: null, notes: [] }] }]);
  });

  it("is empty with no events", () => {
    expect(summariseChanges([], "2026-03-01", "2026-03-31")).toEqual([]);
  });
});

describe("summariseChanges: removal from the programme", () => {
  // Our own examples.
  it("reports a removal first, with its reason, before any other move of the window", () => {
    const summary = summariseChanges(
      [
        ev(12, "forecast_finish", "2027-02-01", "2027-02-15", "2026-03-02T09:00:00Z", "Supplier failed"),
        ev(12, "removed", "false", "true", "2026-03-09T09:00:00Z", "Scope moved to Hall 2B's contract"),
      ],
      "2026-03-01",
      "2026-03-31",
    );
    expect(summary).toEqual([
      {
        milestoneId: 12,
        moves: [
          { kind: "removed", from: "false", to: "true", notes: ["Scope moved to Hall 2B's contract"] },
          { kind: "later", days: 14, from: "2027-02-01", to: "2027-02-15", notes: ["Supplier failed"] },
        ],
      },
    ]);
  });

  it("reports a restoration, and nothing for a removal undone within the window", () => {
    const restored = summariseChanges([ev(3, "removed", "true", "false", "2026-03-10T09:00:00Z", "Back in scope")], "2026-03-01", "2026-03-31");
    expect(restored).toEqual([{ milestoneId: 3, moves: [{ kind: "restored", from: "true", to: "false", notes: ["Back in scope"] }] }]);
    const undone = summariseChanges(
      [ev(3, "removed", "false", "true", "2026-03-10T09:00:00Z", "Wrong milestone"), ev(3, "removed", "true", "false", "2026-03-10T09:05:00Z", "Removed by mistake")],
      "2026-03-01",
      "2026-03-31",
    );
    expect(undone).toEqual([]);
  });
});
