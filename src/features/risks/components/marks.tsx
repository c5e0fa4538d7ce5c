import type { RiskBand, RiskTrend } from "#shared/schemas/risks.ts";
import { BAND_ORDER, BAND_WORD, TREND_WORD } from "../words.ts";

/**
 * A band as a four-step gauge: one step filled for low up to four for critical, with the word
 * beside it, so the band reads without colour (and without the milestone status shapes).
 */
export function BandMark({ band, score }: { band: RiskBand; score?: number }) {
  const steps = BAND_ORDER.indexOf(band) + 1;
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap" data-band={band}>
      <svg aria-hidden width="22" height="12" viewBox="0 0 22 12" className="shrink-0" data-shape={`gauge-${steps}`}>
        {[0, 1, 2, 3].map((i) => (
          <rect key={i} x={i * 5.5 + 0.5} y={9 - i * 2.6} width="4.2" height={2.5 + i * 2.6} fill={i < steps ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1" />
        ))}
      </svg>
      {score !== undefined ? <span className="tabular font-semibold">{score}</span> : null}
      <span className={band === "critical" || band === "high" ? "font-semibold" : undefined}>{BAND_WORD[band]}</span>
    </span>
  );
}

const ARROW: Record<RiskTrend, string> = {
  rising: "M6 1.5 10.5 7H7.4v3.5H4.6V7H1.5z",
  falling: "M6 10.5 1.5 5h3.1V1.5h2.8V5h3.1z",
  steady: "M10.5 6 5 1.5v3.1H1.5v2.8H5v3.1z",
  new: "M6 1l1.3 3.4L11 4.6 8.1 7l1 3.6L6 8.6 2.9 10.6l1-3.6L1 4.6l3.7-.2z",
};

/** The trend as an arrow (up, down, across) or a star for a new item, with its word. */
export function TrendMark({ trend }: { trend: RiskTrend }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap" data-trend={trend}>
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0" data-shape={`trend-${trend}`}>
        <path d={ARROW[trend]} fill={trend === "steady" ? "none" : "currentColor"} stroke="currentColor" strokeWidth={trend === "steady" ? 1.2 : 0} />
      </svg>
      {TREND_WORD[trend]}
    </span>
  );
}
