import type { MilestoneStatus } from "./programme-health.ts";

/**
 * The site plan: the site's areas (halls, suites, plant yard, energy centre, client areas) as
 * rectangles of whole cells on one grid per project. A diagram, not a survey: no map, no real
 * coordinates, so the plan says "where on the campus" without saying where the campus is.
 */

/** The grid every plan is drawn on, in cells: wide enough for a campus's halls side by side, short enough to read on a phone. */
export const SITE_GRID = { columns: 24, rows: 16 } as const;

/** An area's place on the grid, in whole cells from the top-left corner. */
export interface AreaCells {
  x: number;
  y: number;
  w: number;
  h: number;
}

/** True when two areas share at least one cell (touching edges do not overlap). */
export function areasOverlap(a: AreaCells, b: AreaCells): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}

/**
 * Why an area cannot be placed where asked, by field (`x`, `y`, `w`, `h`, `cells`), or an empty
 * object when it fits: inside the grid, and sharing no cell with any other area of the plan.
 * `others` are the plan's other areas, named so the message can say which one is in the way.
 */
export function placementProblems(area: AreaCells, others: ReadonlyArray<AreaCells & { name: string }>, grid: { columns: number; rows: number } = SITE_GRID): Record<string, string> {
  const problems: Record<string, string> = {};
  if (area.x + area.w > grid.columns) problems.w = `reaches past the plan's right edge: x + w may be at most ${grid.columns}`;
  if (area.y + area.h > grid.rows) problems.h = `reaches past the plan's bottom edge: y + h may be at most ${grid.rows}`;
  const inTheWay = others.filter((o) => areasOverlap(area, o)).map((o) => o.name);
  if (inTheWay.length > 0) problems.cells = `overlap ${inTheWay.join(", ")}: areas of a plan may touch but not overlap`;
  return problems;
}

/**
 * An area's status from the statuses of the programme's milestones in it (those whose `area` is
 * the area's name), every milestone counted whoever reads, as the headline figures are (decision
 * 004): the milestones themselves are listed by audience, their effect on the area is not.
 * Complete once every milestone is complete; otherwise the worst of the rest (behind, then at
 * risk, then on programme), so a late piece of work is never hidden by finished ones. Null when
 * the programme has no milestone in the area: the plan says so in words rather than guess.
 */
export function areaStatus(statuses: readonly MilestoneStatus[]): MilestoneStatus | null {
  if (statuses.length === 0) return null;
  if (statuses.every((s) => s === "complete")) return "complete";
  if (statuses.includes("behind")) return "behind";
  if (statuses.includes("at_risk")) return "at_risk";
  return "on_programme";
}

/** The cells a drag from one cell to another covers, whichever way it went: the rectangle with both cells as corners. */
export function cellsBetween(a: { x: number; y: number }, b: { x: number; y: number }): AreaCells {
  const x = Math.min(a.x, b.x);
  const y = Math.min(a.y, b.y);
  return { x, y, w: Math.abs(a.x - b.x) + 1, h: Math.abs(a.y - b.y) + 1 };
}
