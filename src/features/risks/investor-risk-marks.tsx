import { useId } from "react";
import type { RiskAnswer, RiskBand, RiskSummary, RiskTrend } from "#shared/schemas/risks.ts";
import { BAND_ORDER, BAND_WORD, TREND_WORD } from "./words.ts";

// The paper and ink of src/index.css, as SVG wants colours as values.
export const INK = "#1d1f24";
export const INK_SOFT = "#4a4e57";
export const PAPER = "#fffdf8";

export type GridCell = RiskSummary["grid"][number];

/** An SVG pattern for a band, to be placed inside `<defs>`; filled by `url(#id)`. */
export function BandPattern({ id, band }: { id: string; band: RiskBand }) {
  return (
    <pattern id={id} patternUnits="userSpaceOnUse" width="8" height="8">
      <rect width="8" height="8" fill={PAPER} />
      {band === "medium" ? <circle cx="4" cy="4" r="1" fill={INK_SOFT} /> : null}
      {band === "high" || band === "critical" ? <path d="M-2 2l4-4M0 8l8-8M6 10l4-4" stroke={INK_SOFT} strokeWidth="1" /> : null}
      {band === "critical" ? <path d="M-2 6l4 4M0 0l8 8M6 -2l4 4" stroke={INK_SOFT} strokeWidth="1" /> : null}
    </pattern>
  );
}

/** A band as its pattern in a small square and its word ("▨ High"). */
export function BandMark({ band, score }: { band: RiskBand; score?: number }) {
  const id = useId().replace(/:/g, "");
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap text-sm font-medium" data-band={band}>
      <svg aria-hidden width="14" height="14" viewBox="0 0 14 14" className="shrink-0">
        <defs>
          <BandPattern id={id} band={band} />
        </defs>
        <rect x="0.5" y="0.5" width="13" height="13" fill={`url(#${id})`} stroke={INK} />
      </svg>
      {BAND_WORD[band]}
      {score !== undefined ? <span className="tabular font-normal text-ink-soft">· score {score}</span> : null}
    </span>
  );
}

/** The trend's shape: an arrow up or down, a level bar, a four-pointed star for a new one. */
function TrendShape({ trend }: { trend: RiskTrend }) {
  return (
    <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0" data-shape={trend}>
      {trend === "rising" ? <path d="M6 1l4.5 5H7.5v5h-3V6H1.5z" fill="currentColor" /> : null}
      {trend === "falling" ? <path d="M6 11l4.5-5H7.5V1h-3v5H1.5z" fill="currentColor" /> : null}
      {trend === "steady" ? <path d="M1 6h7M6 3l3 3-3 3" fill="none" stroke="currentColor" strokeWidth="1.8" /> : null}
      {trend === "new" ? <path d="M6 0.5l1.5 4 4 1.5-4 1.5-1.5 4-1.5-4-4-1.5 4-1.5z" fill="currentColor" /> : null}
    </svg>
  );
}

/** "▲ Rising (was 9)": the move of the score over the reporting window, by shape and word. */
export function TrendMark({ risk }: { risk: Pick<RiskAnswer, "trend" | "scoreAtWindowStart" | "score"> }) {
  const was = risk.scoreAtWindowStart !== null && risk.scoreAtWindowStart !== risk.score ? ` (was ${risk.scoreAtWindowStart})` : "";
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap text-sm" data-trend={risk.trend}>
      <TrendShape trend={risk.trend} />
      {TREND_WORD[risk.trend]}
      {was ? <span className="tabular text-ink-soft">{was}</span> : null}
    </span>
  );
}

/**
 * The grid as rows for reading: most likely first (as the chart draws it, top down), impact
 * 1 … I across, with the count in each cell. A cell the answer leaves out counts none.
 */
export function gridRows(summary: Pick<RiskSummary, "grid" | "scale">): { likelihood: number; cells: GridCell[] }[] {
  const { likelihoodLevels, impactLevels } = summary.scale;
  const byPair = new Map(summary.grid.map((c) => [`${c.likelihood}:${c.impact}`, c]));
  const rows: { likelihood: number; cells: GridCell[] }[] = [];
  for (let likelihood = likelihoodLevels; likelihood >= 1; likelihood--) {
    const cells: GridCell[] = [];
    for (let impact = 1; impact <= impactLevels; impact++) {
      cells.push(byPair.get(`${likelihood}:${impact}`) ?? { likelihood, impact, count: 0, band: "low" });
    }
    rows.push({ likelihood, cells });
  }
  return rows;
}

/** "10–15", "16–25": the scores a band covers on the project's scale. */
export function bandRange(band: RiskBand, scale: RiskSummary["scale"]): string {
  const top = scale.likelihoodLevels * scale.impactLevels;
  const { medium, high, critical } = scale.bandEdges;
  const [lo, hi] = band === "low" ? [1, medium - 1] : band === "medium" ? [medium, high - 1] : band === "high" ? [high, critical - 1] : [critical, top];
  return lo === hi ? String(lo) : `${lo}–${hi}`;
}

/** "12 open risks: 1 critical, 3 high, 5 medium, 3 low." */
export function gridSentence(summary: Pick<RiskSummary, "openRisks" | "byBand">): string {
  if (summary.openRisks === 0) return "No open risks are shared with you.";
  const parts = [...BAND_ORDER].reverse().map((b) => `${summary.byBand[b] ?? 0} ${BAND_WORD[b].toLowerCase()}`);
  return `${summary.openRisks} open risk${summary.openRisks === 1 ? "" : "s"}: ${parts.join(", ")}.`;
}
