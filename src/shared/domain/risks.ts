import type { RiskBand, RiskScale, RiskTrend } from "../schemas/risks.ts";

/**
 * The pure computation of the risks and issues register: score, band, the score as it stood at
 * the start of a reporting window, the trend, the expected cost exposure and the likelihood ×
 * impact grid. Data in, data out; money in integer minor units, results unrounded (round only for
 * display). The rules and their sources are in docs/decisions/035-investor-record-computation.md.
 */

/** Score = likelihood × impact. Common practice (no published source): the product of the two levels. */
export function riskScore(likelihood: number, impact: number): number {
  return likelihood * impact;
}

/**
 * The band of a score on the project's scale: low below `bandEdges.medium`, then medium, high and
 * critical from each edge upwards (an edge belongs to the band it opens).
 */
export function riskBand(score: number, scale: RiskScale): RiskBand {
  const { medium, high, critical } = scale.bandEdges;
  if (score >= critical) return "critical";
  if (score >= high) return "high";
  if (score >= medium) return "medium";
  return "low";
}

/** One recorded change of a risk's field (from risk_events): only `likelihood` and `impact` move the score. */
export interface LevelEvent {
  field: string;
  from: string | null;
  to: string | null;
  /** ISO instant. */
  at: string;
}

/** Instants compared as time, so "2026-01-01T00:00:00Z" and "2026-01-01T00:00:00.000Z" are the same moment. */
function instantMs(iso: string): number {
  const ms = Date.parse(iso);
  if (Number.isNaN(ms)) throw new RangeError(`not an instant: ${iso}`);
  return ms;
}

/**
 * The score as it stood at `instant`: start from today's levels and undo, latest first, every
 * `likelihood` or `impact` event after `instant` (setting the field back to its `from`). An event
 * at exactly `instant` has happened. Null when the risk was created after `instant`.
 */
export function scoreAt(current: { likelihood: number; impact: number; createdAt: string }, events: readonly LevelEvent[], instant: string): number | null {
  const at = instantMs(instant);
  if (instantMs(current.createdAt) > at) return null;
  const levels = { likelihood: current.likelihood, impact: current.impact };
  const later = events
    .filter((e) => (e.field === "likelihood" || e.field === "impact") && instantMs(e.at) > at)
    .sort((a, b) => instantMs(b.at) - instantMs(a.at));
  for (const e of later) {
    const before = e.from === null ? Number.NaN : Number(e.from);
    // A `from` that is not a level (the field was first set by this event) leaves nothing to undo.
    if (Number.isFinite(before)) levels[e.field as "likelihood" | "impact"] = before;
  }
  return riskScore(levels.likelihood, levels.impact);
}

/**
 * The trend over the reporting window: "new" when the item did not exist at its start, otherwise
 * the direction the score moved. Any move of the score counts, even within a band: an investor
 * reading "steady" beside a risk whose likelihood rose would be misled (common practice, no
 * published source: registers compare scores period on period). `scale` is taken so a project
 * rule by band can be added without changing callers.
 */
export function riskTrend(scoreNow: number, scoreAtWindowStart: number | null, scale: RiskScale): RiskTrend {
  void scale;
  if (scoreAtWindowStart === null) return "new";
  if (scoreNow > scoreAtWindowStart) return "rising";
  if (scoreNow < scoreAtWindowStart) return "falling";
  return "steady";
}

/**
 * The PERT mean of a three-point estimate, (min + 4 · most likely + max) / 6.
 * Source: Malcolm, Roseboom, Clark & Fazar, "Application of a technique for research and
 * development program evaluation", Operations Research 7(5), 1959 (the beta approximation);
 * PMI PMBOK Guide, "three-point estimating" (secondary).
 */
export function pertMean(min: number, mostLikely: number, max: number): number {
  return (min + 4 * mostLikely + max) / 6;
}

/** Expected cost = probability × most likely cost (minor units, unrounded). */
export function expectedCost(e: { probability: number; mostLikely: number }): number {
  return e.probability * e.mostLikely;
}

/** Expected cost on the PERT alternative = probability × PERT mean of the three points. */
export function expectedCostPert(e: { probability: number; min: number; mostLikely: number; max: number }): number {
  return e.probability * pertMean(e.min, e.mostLikely, e.max);
}

/** Only open risks carry an exposure: a closed one is gone, and an issue's cost is no longer a chance. */
function isOpenRisk(r: { status: string; kind: string }): boolean {
  return r.kind === "risk" && r.status === "open";
}

/** The summed expected cost exposure of the open risks, both ways. */
export function exposureTotals(
  risks: readonly { status: string; kind: string; costExposure: { min: number; mostLikely: number; max: number; probability: number } | null }[],
): { expected: number; pert: number } {
  let expected = 0;
  let pert = 0;
  for (const r of risks) {
    if (!isOpenRisk(r) || r.costExposure === null) continue;
    expected += expectedCost(r.costExposure);
    pert += expectedCostPert(r.costExposure);
  }
  return { expected, pert };
}

function clampLevel(level: number, levels: number): number {
  return Math.min(levels, Math.max(1, Math.round(level)));
}

/**
 * Every cell of the likelihood × impact grid, likelihood 1 … L outer and impact 1 … I inner, with
 * the count of open risks in it and the cell's band. A risk whose level lies outside the scale
 * (the scale was shrunk after it was scored) is counted at the nearest edge, so no open risk
 * drops off the grid.
 */
export function riskGrid(
  risks: readonly { likelihood: number; impact: number; status: string; kind: string }[],
  scale: RiskScale,
): { likelihood: number; impact: number; count: number; band: RiskBand }[] {
  const counts = new Map<string, number>();
  for (const r of risks) {
    if (!isOpenRisk(r)) continue;
    const key = `${clampLevel(r.likelihood, scale.likelihoodLevels)}:${clampLevel(r.impact, scale.impactLevels)}`;
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const cells: { likelihood: number; impact: number; count: number; band: RiskBand }[] = [];
  for (let likelihood = 1; likelihood <= scale.likelihoodLevels; likelihood++) {
    for (let impact = 1; impact <= scale.impactLevels; impact++) {
      cells.push({ likelihood, impact, count: counts.get(`${likelihood}:${impact}`) ?? 0, band: riskBand(riskScore(likelihood, impact), scale) });
    }
  }
  return cells;
}

/** Whole levels from 1 to the project's scale; one problem per field, naming it. */
export function validateLevels(likelihood: number, impact: number, scale: RiskScale): { field: "likelihood" | "impact"; message: string }[] {
  const problems: { field: "likelihood" | "impact"; message: string }[] = [];
  const check = (field: "likelihood" | "impact", value: number, levels: number) => {
    if (!Number.isInteger(value) || value < 1 || value > levels) problems.push({ field, message: `must be a whole level from 1 to ${levels}` });
  };
  check("likelihood", likelihood, scale.likelihoodLevels);
  check("impact", impact, scale.impactLevels);
  return problems;
}
