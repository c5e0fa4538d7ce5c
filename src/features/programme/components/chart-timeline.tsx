import { Bar, BarChart, CartesianGrid, ReferenceLine, Tooltip, XAxis, type BarShapeProps, type TooltipContentProps } from "recharts";
import type { NameType, ValueType } from "recharts/types/component/DefaultTooltipContent";
import type { Milestone } from "#shared/schemas/programme.ts";
import { toDayNumber } from "#shared/domain/calendar.ts";
import { milestoneFinish, type MilestoneStatus } from "#shared/domain/programme-health.ts";
import { STATUS_LOOK, StatusKey, StatusMark, StatusShape } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import { formatAxisMonth } from "#shared/domain/locale-dates.ts";
import { monthTicks } from "../dates.ts";
import { signedDays } from "../words.ts";
import { ACCENT, barBox, ChartFrame, INK_SOFT, milestoneNameAxis, ROW_CURSOR, RULE, RULE_STRONG } from "./chart-frame.tsx";

interface Row {
  id: number;
  name: string;
  label: string;
  status: MilestoneStatus;
  baseline: [number, number];
  forecast: [number, number];
  /** A milestone without a planned start: a date, not a span. */
  point: boolean;
  /** Day numbers of the baseline and the forecast (or actual) finish. */
  b: number;
  f: number;
  /** Length in days of the stub bar a point milestone is given, so its pixels-per-day can be recovered. */
  pointDays: number;
  m: Milestone;
}

function BaselineBar(p: BarShapeProps) {
  const { row, x, w } = barBox<Row>(p, 2);
  // A point milestone's baseline is a tick on its date.
  if (row.point) return <rect x={x + w - 1.5} y={p.y - 1} width={3} height={p.height + 2} fill={RULE_STRONG} />;
  return <rect x={x} y={p.y} width={w} height={p.height} fill={RULE} stroke={RULE_STRONG} strokeWidth={1} />;
}

function ForecastBar(p: BarShapeProps) {
  const { row, x, w, cy } = barBox<Row>(p, 2);
  const { color } = STATUS_LOOK[row.status];
  if (row.point) {
    // From the baseline date to the forecast: the slip as a line, the forecast as the status shape.
    const end = x + Math.abs(p.width);
    const perDay = Math.abs(p.width) / row.pointDays;
    const base = end - (row.f - row.b) * perDay;
    return (
      <g>
        {row.f !== row.b ? <line x1={base} y1={cy} x2={end} y2={cy} stroke={color} strokeWidth={2} strokeDasharray="3 2" /> : null}
        <StatusShape status={row.status} cx={end} cy={cy} r={5} />
      </g>
    );
  }
  return (
    <g>
      <rect x={x} y={p.y} width={w} height={p.height} fill={color} />
      <StatusShape status={row.status} cx={x + w + 8} cy={cy} r={4.5} />
    </g>
  );
}

function TimelineTooltip({ active, payload }: TooltipContentProps<ValueType, NameType>) {
  const row = (active ? payload?.[0]?.payload : undefined) as Row | undefined;
  if (!row) return null;
  const m = row.m;
  return (
    <div className="border border-ink bg-sheet px-3 py-2 text-sm shadow-sm">
      <p className="font-semibold">{m.name}</p>
      <StatusMark status={m.status} />
      <p className="tabular">Baseline {formatDate(m.baselineFinish)}</p>
      <p className="tabular">
        {m.actualFinish ? "Finished" : "Forecast"} {formatDate(milestoneFinish(m))} ({signedDays(m.slipDays)})
      </p>
    </div>
  );
}

function BarKey() {
  return (
    <ul className="flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Bars">
      <li className="flex items-center gap-2">
        <svg aria-hidden width="26" height="10">
          <rect x="0.5" y="1.5" width="25" height="7" fill={RULE} stroke={RULE_STRONG} />
        </svg>
        Baseline
      </li>
      <li className="flex items-center gap-2">
        <svg aria-hidden width="26" height="10">
          <rect x="0" y="1.5" width="26" height="7" fill={INK_SOFT} />
        </svg>
        Forecast or actual, ending in its status shape
      </li>
      <li className="flex items-center gap-2">
        <svg aria-hidden width="30" height="12">
          <rect x="1" y="0" width="3" height="12" fill={RULE_STRONG} />
          <line x1="2.5" y1="6" x2="24" y2="6" stroke={INK_SOFT} strokeWidth="2" strokeDasharray="3 2" />
          <circle cx="25" cy="6" r="4" fill={INK_SOFT} />
        </svg>
        A one-day milestone: baseline tick, then the forecast
      </li>
    </ul>
  );
}

/**
 * Each milestone's baseline (grey, above) and forecast or actual (in its status
 * colour, below, ending in its status shape) side by side on one date axis: where the
 * lower bar runs past the upper one, the milestone has slipped by that much.
 */
export function TimelineChart({ milestones, at }: { milestones: Milestone[]; at: string }) {
  const starts = milestones.map((m) => toDayNumber(m.plannedStart ?? m.baselineFinish));
  const ends = milestones.flatMap((m) => [toDayNumber(m.baselineFinish), toDayNumber(milestoneFinish(m))]);
  const min = Math.min(...starts, ...ends);
  const max = Math.max(...ends);
  // A point milestone has no duration; draw it as a short bar so its end (the date) can be seen.
  const pointDays = Math.max(4, Math.round((max - min) * 0.009));
  const domainMin = min - pointDays;
  const domainMax = max + Math.max(10, Math.round((max - min) * 0.04));
  const rows: Row[] = milestones.map((m) => {
    const b = toDayNumber(m.baselineFinish);
    const f = toDayNumber(milestoneFinish(m));
    const s = m.plannedStart ? toDayNumber(m.plannedStart) : null;
    const start = (end: number) => (s !== null && s < end ? s : end - pointDays);
    return { id: m.id, name: m.name, label: m.name, status: m.status, baseline: [start(b), b], forecast: [start(f), f], point: s === null || s >= Math.min(b, f), b, f, pointDays, m };
  });
  const slipped = milestones.filter((m) => m.slipDays > 0).length;
  const summary = `${milestones.length} milestones; ${slipped} forecast or finished later than their baseline. Grey bars are the baseline; the bar beneath each ends at the forecast (or actual) finish.`;
  const today = toDayNumber(at);
  return (
    <ChartFrame title="Baseline and forecast" summary={summary} testId="chart-timeline" footer={<div className="flex flex-col gap-1"><BarKey /><StatusKey /></div>}>
      {(width) => {
        const narrow = width < 520;
        return (
          <BarChart
            width={width}
            height={rows.length * (narrow ? 42 : 32) + 48}
            barSize={narrow ? 6 : undefined}
            data={rows}
            layout="vertical"
            barGap={1}
            barCategoryGap="22%"
            margin={{ top: 20, right: 18, bottom: 4, left: 0 }}
          >
            <CartesianGrid stroke={RULE} strokeDasharray="2 4" horizontal={false} />
            <XAxis
              type="number"
              domain={[domainMin, domainMax]}
              ticks={monthTicks(domainMin, domainMax, narrow ? 4 : 8)}
              interval={0}
              tickFormatter={(day: number) => formatAxisMonth(day)}
              tick={{ fontSize: 11, fill: INK_SOFT }}
              stroke={INK_SOFT}
              allowDataOverflow
            />
            {milestoneNameAxis(width, narrow)}
            <Tooltip content={TimelineTooltip} isAnimationActive={false} cursor={ROW_CURSOR} />
            <ReferenceLine x={today} stroke={ACCENT} strokeDasharray="3 2" label={{ value: "Today", position: "top", fill: ACCENT, fontSize: 11 }} />
            <Bar dataKey="baseline" name="Baseline" shape={BaselineBar} isAnimationActive={false} />
            <Bar dataKey="forecast" name="Forecast" shape={ForecastBar} isAnimationActive={false} />
          </BarChart>
        );
      }}
    </ChartFrame>
  );
}
