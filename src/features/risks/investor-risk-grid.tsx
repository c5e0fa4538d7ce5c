import { useId } from "react";
import { Scatter, ScatterChart, XAxis, YAxis, type ScatterShapeProps } from "recharts";
import type { RiskBand, RiskSummary } from "#shared/schemas/risks.ts";
import { useElementWidth } from "../../lib/use-element-width.ts";
import { BandPattern, bandRange, INK, INK_SOFT, PAPER, type GridCell } from "./investor-risk-marks.tsx";
import { BAND_ORDER, BAND_WORD } from "./words.ts";

const MARGIN = { top: 8, right: 8, bottom: 4, left: 4 };
const Y_AXIS_WIDTH = 34;
const X_AXIS_HEIGHT = 40;

/** An axis of whole levels 1 … n, each level the middle of its row or column of squares. */
function levelAxis(n: number) {
  return {
    type: "number" as const,
    domain: [0.5, n + 0.5],
    ticks: Array.from({ length: n }, (_, i) => i + 1),
    interval: 0,
    tick: { fontSize: 11, fill: INK_SOFT },
    stroke: INK_SOFT,
  };
}

/**
 * One square of the grid, the size of its level pair: the band's pattern behind, an ink outline,
 * and the count of open risks in the middle (nothing where there are none).
 */
function cellShape(cellWidth: number, cellHeight: number, patternId: (band: RiskBand) => string) {
  return function GridSquare(p: ScatterShapeProps) {
    const cell = p.payload as GridCell;
    const cx = p.cx ?? 0;
    const cy = p.cy ?? 0;
    const x = cx - cellWidth / 2;
    const y = cy - cellHeight / 2;
    const label = Math.min(30, cellWidth * 0.5, cellHeight * 0.5);
    return (
      <g data-testid="risk-cell" data-likelihood={cell.likelihood} data-impact={cell.impact} data-count={cell.count} data-band={cell.band}>
        <rect x={x} y={y} width={cellWidth} height={cellHeight} fill={`url(#${patternId(cell.band)})`} stroke={INK} strokeWidth={1} />
        {cell.count > 0 ? (
          <g>
            <rect x={cx - label / 2} y={cy - label / 2} width={label} height={label} fill={PAPER} stroke={INK} strokeWidth={1.2} />
            <text x={cx} y={cy} dy="0.35em" textAnchor="middle" fontSize={Math.min(16, label * 0.6)} fontWeight={600} fill={INK} className="tabular">
              {cell.count}
            </text>
          </g>
        ) : null}
      </g>
    );
  };
}

/**
 * Where the open risks sit: likelihood up the side, impact along the foot, a square for each pair
 * with the count of open risks in it. Each square carries its band's pattern (plain, dotted,
 * hatched, cross-hatched) so the bands read apart without colour; the key names them.
 */
export function RiskGridChart({ summary }: { summary: Pick<RiskSummary, "scale" | "grid"> }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const id = useId().replace(/:/g, "");
  const patternId = (band: RiskBand) => `${id}-${band}`;
  const { likelihoodLevels: rows, impactLevels: cols } = summary.scale;
  const size = Math.min(width, 520);
  const cellWidth = (size - MARGIN.left - MARGIN.right - Y_AXIS_WIDTH) / cols;
  const cellHeight = Math.max(36, Math.min(64, cellWidth * 0.8));
  const height = cellHeight * rows + MARGIN.top + MARGIN.bottom + X_AXIS_HEIGHT;
  return (
    <div ref={ref} className="w-full min-w-0" data-testid="risk-grid">
      <svg aria-hidden width="0" height="0" className="absolute">
        <defs>
          {BAND_ORDER.map((b) => (
            <BandPattern key={b} id={patternId(b)} band={b} />
          ))}
        </defs>
      </svg>
      {width > 0 ? (
        <ScatterChart width={size} height={height} margin={MARGIN} accessibilityLayer={false}>
          <XAxis {...levelAxis(cols)} dataKey="impact" height={X_AXIS_HEIGHT} label={{ value: "Impact →", position: "insideBottom", offset: 2, fontSize: 11, fill: INK }} />
          <YAxis
            {...levelAxis(rows)}
            dataKey="likelihood"
            width={Y_AXIS_WIDTH}
            label={{ value: "Likelihood →", angle: -90, position: "insideLeft", offset: 8, fontSize: 11, fill: INK, style: { textAnchor: "middle" } }}
          />
          <Scatter data={summary.grid} shape={cellShape(cellWidth, cellHeight, patternId)} isAnimationActive={false} />
        </ScatterChart>
      ) : (
        <div className="h-64" />
      )}
      <ul aria-label="Key to the bands" className="mt-3 flex flex-wrap gap-x-4 gap-y-1 text-sm">
        {BAND_ORDER.map((b) => (
          <li key={b} className="flex items-center gap-1.5">
            <svg aria-hidden width="16" height="16" viewBox="0 0 16 16">
              <rect x="0.5" y="0.5" width="15" height="15" fill={`url(#${patternId(b)})`} stroke={INK} />
            </svg>
            {BAND_WORD[b]} <span className="text-ink-soft">(score {bandRange(b, summary.scale)})</span>
          </li>
        ))}
      </ul>
    </div>
  );
}
