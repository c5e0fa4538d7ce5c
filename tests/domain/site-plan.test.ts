import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { MilestoneStatus } from "../../src/shared/domain/programme-health.ts";
import { areaStatus, areasOverlap, cellsBetween, placementProblems, SITE_GRID } from "../../src/shared/domain/site-plan.ts";

describe("areaStatus: an area's status from its milestones' statuses", () => {
  // Common practice (no published source): a zone's progress reads as its least advanced piece
  // of work ("worst-of" roll-up), and is complete only when all of its work is.
  it.each<[string, MilestoneStatus[], MilestoneStatus | null]>([
    ["no milestone in the area", [], null],
    ["every milestone complete", ["complete", "complete"], "complete"],
    ["complete and on programme", ["complete", "on_programme"], "on_programme"],
    ["one at risk among finished work", ["complete", "complete", "at_risk"], "at_risk"],
    ["one behind beside one at risk", ["at_risk", "behind", "on_programme"], "behind"],
    ["a single milestone behind", ["behind"], "behind"],
  ])("%s → %s", (_what, statuses, expected) => {
    expect(areaStatus(statuses)).toBe(expected);
  });

  it("never reads better than its worst unfinished milestone, whatever the order", () => {
    const rank: Record<MilestoneStatus, number> = { complete: 0, on_programme: 1, at_risk: 2, behind: 3 };
    const status = fc.constantFrom<MilestoneStatus>("complete", "on_programme", "at_risk", "behind");
    fc.assert(
      fc.property(fc.array(status, { minLength: 1, maxLength: 12 }), (list) => {
        const worst = list.reduce((a, b) => (rank[b] > rank[a] ? b : a));
        expect(areaStatus(list)).toBe(worst);
        expect(areaStatus([...list].reverse())).toBe(worst);
      }),
    );
  });
});

describe("placementProblems: an area inside the grid and on no other", () => {
  const hall = { name: "Hall 2A", x: 2, y: 2, w: 8, h: 6 };

  it("accepts an area that touches another along an edge", () => {
    expect(placementProblems({ x: 10, y: 2, w: 4, h: 6 }, [hall])).toEqual({});
    expect(placementProblems({ x: 2, y: 8, w: 8, h: 1 }, [hall])).toEqual({});
  });

  it("names the area in the way when one cell is shared", () => {
    expect(placementProblems({ x: 9, y: 7, w: 2, h: 2 }, [hall, { name: "HD-1", x: 10, y: 2, w: 4, h: 6 }])).toEqual({ cells: expect.stringContaining("Hall 2A, HD-1") });
  });

  it("refuses an area past the right or bottom edge of the 24 × 16 grid", () => {
    expect(SITE_GRID).toEqual({ columns: 24, rows: 16 });
    expect(Object.keys(placementProblems({ x: 20, y: 0, w: 5, h: 1 }, []))).toEqual(["w"]);
    expect(Object.keys(placementProblems({ x: 0, y: 15, w: 1, h: 2 }, []))).toEqual(["h"]);
    expect(placementProblems({ x: 0, y: 0, w: 24, h: 16 }, [])).toEqual({});
  });

  it("overlap is symmetric and an area always overlaps itself", () => {
    const cells = fc.record({ x: fc.integer({ min: 0, max: 23 }), y: fc.integer({ min: 0, max: 15 }), w: fc.integer({ min: 1, max: 8 }), h: fc.integer({ min: 1, max: 8 }) });
    fc.assert(
      fc.property(cells, cells, (a, b) => {
        expect(areasOverlap(a, b)).toBe(areasOverlap(b, a));
        expect(areasOverlap(a, a)).toBe(true);
      }),
    );
  });
});

describe("cellsBetween: the rectangle a drag covers", () => {
  it.each([
    [{ x: 2, y: 3 }, { x: 5, y: 6 }, { x: 2, y: 3, w: 4, h: 4 }],
    [{ x: 5, y: 6 }, { x: 2, y: 3 }, { x: 2, y: 3, w: 4, h: 4 }],
    [{ x: 7, y: 1 }, { x: 7, y: 1 }, { x: 7, y: 1, w: 1, h: 1 }],
  ])("from %o to %o covers %o", (a, b, expected) => {
    expect(cellsBetween(a, b)).toEqual(expected);
  });
});
