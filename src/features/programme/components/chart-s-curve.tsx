import { CartesianGrid, Line, LineChart, ReferenceLine, Tooltip, XAxis, YAxis } from "recharts";
import { fromDayNumber, toDayNumber } from "#shared/domain/calendar.ts";
import { LineKey, type KeyLine } from "../../../components/ui/line-key.tsx";
import { formatDate } from "../../../lib/format.ts";
import type { CurveResponse } from "#shared/schemas/programme.ts";
import { formatAxisMonth } from "#shared/domain/locale-dates.ts";
import { monthTicks } from "../dates.ts";
import { formatPercent } from "../words.ts";
import { ACCENT, ChartFrame, INK_SOFT, RULE } from "./chart-frame.tsx";

interface Point {
  day: number;
  planned: number;
  earned: number | null;
}

const KEY: readonly KeyLine[] = [
  { label: "Planned (baseline)", stroke: INK_SOFT, width: 2, dash: "6 4" },
  { label: "Earned (work done)", stroke: ACCENT, width: 3 },
  { label: "Today", stroke: ACCENT, width: 1.5, dash: "3 2", upright: true },
];

/**
 * The S-curve: weighted planned percent from the current baseline against earned
 * percent reconstructed from the history, with today marked. Planned is dashed and
 * earned solid, so the two read apart without colour.
 */
export function SCurveChart({ curve }: { curve: CurveResponse }) {
  const points: Point[] = curve.points.map((p) => ({ day: toDayNumber(p.date), planned: p.plannedPercent, earned: p.earnedPercent }));
  const today = toDayNumber(curve.at);
  const first = points[0]?.day ?? today;
  const last = points[points.length - 1]?.day ?? today;
  const atPoint = curve.points.find((p) => p.date === curve.at) ?? [...curve.points].reverse().find((p) => p.earnedPercent !== null);
  const summary = atPoint
    ? `On ${formatDate(curve.at)} the baseline planned ${formatPercent(atPoint.plannedPercent)} of the work to be done; ${formatPercent(atPoint.earnedPercent)} is done.`
    : "No points to draw yet.";
  return (
    <ChartFrame title="Planned against earned" summary={summary} testId="chart-s-curve" footer={<LineKey lines={KEY} />}>
      {(width) => (
        <LineChart width={width} height={width < 480 ? 240 : 320} data={points} margin={{ top: 16, right: 16, bottom: 4, left: 0 }}>
          <CartesianGrid stroke={RULE} strokeDasharray="2 4" />
          <XAxis
            dataKey="day"
            type="number"
            domain={[first, last]}
            ticks={monthTicks(first, last, width < 480 ? 4 : 8)}
            tickFormatter={(day: number) => formatAxisMonth(day)}
            interval={0}
            tick={{ fontSize: 11, fill: INK_SOFT }}
            stroke={INK_SOFT}
          />
          <YAxis domain={[0, 100]} ticks={[0, 25, 50, 75, 100]} tickFormatter={(v: number) => `${v}%`} width={42} tick={{ fontSize: 11, fill: INK_SOFT }} stroke={INK_SOFT} />
          <Tooltip
            isAnimationActive={false}
            labelFormatter={(d) => formatDate(fromDayNumber(Number(d)))}
            formatter={(v, name) => [formatPercent(typeof v === "number" ? v : null), name === "planned" ? "Planned" : "Earned"]}
          />
          <ReferenceLine x={today} stroke={ACCENT} strokeDasharray="3 2" label={{ value: "Today", position: "insideTopLeft", fill: ACCENT, fontSize: 11 }} />
          <Line dataKey="planned" name="planned" type="linear" stroke={INK_SOFT} strokeWidth={2} strokeDasharray="6 4" dot={false} isAnimationActive={false} />
          <Line dataKey="earned" name="earned" type="linear" stroke={ACCENT} strokeWidth={3} dot={false} connectNulls={false} isAnimationActive={false} />
        </LineChart>
      )}
    </ChartFrame>
  );
}
