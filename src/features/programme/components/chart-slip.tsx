import { Bar, BarChart, CartesianGrid, ReferenceLine, Tooltip, XAxis, type BarShapeProps, type TooltipContentProps } from "recharts";
import type { NameType, ValueType } from "recharts/types/component/DefaultTooltipContent";
import type { Milestone } from "#shared/schemas/programme.ts";
import { STATUS_LOOK, StatusKey, StatusMark, StatusShape } from "../../../components/ui/status-mark.tsx";
import { signedDays } from "../words.ts";
import { barBox, ChartFrame, INK, INK_SOFT, milestoneNameAxis, ROW_CURSOR, RULE } from "./chart-frame.tsx";

interface Row {
  label: string;
  slip: number;
  m: Milestone;
}

function SlipBar(p: BarShapeProps) {
  const { row, x, w, cy } = barBox<Row>(p);
  const { color } = STATUS_LOOK[row.m.status];
  // The label sits beyond the bar's end, on the side it grows towards.
  const later = row.slip >= 0;
  const end = later ? x + w : x;
  return (
    <g>
      {w > 0 ? <rect x={x} y={p.y} width={w} height={p.height} fill={color} /> : null}
      <StatusShape status={row.m.status} cx={later ? end + 8 : end - 8} cy={cy} r={4.5} />
      <text x={later ? end + 17 : end - 17} y={cy} dy="0.35em" textAnchor={later ? "start" : "end"} fontSize={11} fill={INK} className="tabular">
        {signedDays(row.slip)}
      </text>
    </g>
  );
}

function SlipTooltip({ active, payload }: TooltipContentProps<ValueType, NameType>) {
  const row = (active ? payload?.[0]?.payload : undefined) as Row | undefined;
  if (!row) return null;
  return (
    <div className="border border-ink bg-sheet px-3 py-2 text-sm shadow-sm">
      <p className="font-semibold">{row.m.name}</p>
      <StatusMark status={row.m.status} />
      <p className="tabular">
        {signedDays(row.m.slipDays)} · {row.m.slipWorkingDays} working days
      </p>
    </div>
  );
}

/** Days of slip per milestone (forecast or actual finish against baseline), largest first; bars left of zero were pulled in. */
export function SlipChart({ milestones }: { milestones: Milestone[] }) {
  const rows: Row[] = [...milestones]
    .sort((a, b) => b.slipDays - a.slipDays || a.name.localeCompare(b.name))
    .map((m) => ({ label: m.name, slip: m.slipDays, m }));
  const maxLate = Math.max(0, ...rows.map((r) => r.slip));
  const maxEarly = Math.min(0, ...rows.map((r) => r.slip));
  const worst = rows[0];
  const summary =
    worst && worst.slip > 0
      ? `${rows.filter((r) => r.slip > 0).length} of ${rows.length} milestones are later than their baseline; the most is ${worst.m.name}, ${signedDays(worst.slip)} (calendar days).`
      : "No milestone is later than its baseline.";
  // Ticks on whole weeks (or multiples), with room beyond the longest bar for its shape and figure.
  const axis = (maxTicks: number) => {
    const span = Math.max(7, maxLate - maxEarly);
    const step = [7, 14, 28, 56, 91, 182].find((s) => span / s <= maxTicks) ?? 364;
    const pad = Math.max(8, Math.round(span * 0.22));
    const lo = maxEarly < 0 ? -Math.ceil((-maxEarly + pad) / step) * step : 0;
    const hi = Math.ceil((maxLate + pad) / step) * step;
    const ticks: number[] = [];
    for (let t = lo; t <= hi; t += step) ticks.push(t);
    return { lo, hi, ticks };
  };
  return (
    <ChartFrame title="Slip by milestone" summary={summary} testId="chart-slip" footer={<StatusKey />}>
      {(width) => {
        const narrow = width < 520;
        const { lo, hi, ticks } = axis(narrow ? 4 : 7);
        return (
          <BarChart width={width} height={rows.length * (narrow ? 36 : 26) + 48} barSize={narrow ? 9 : undefined} data={rows} layout="vertical" barCategoryGap="25%" margin={{ top: 8, right: 12, bottom: 4, left: narrow ? 14 : 0 }}>
            <CartesianGrid stroke={RULE} strokeDasharray="2 4" horizontal={false} />
            <XAxis
              type="number"
              domain={[lo, hi]}
              ticks={ticks}
              tickFormatter={(v: number) => signedDays(v)}
              interval={0}
              tick={{ fontSize: 11, fill: INK_SOFT }}
              stroke={INK_SOFT}
              allowDecimals={false}
            />
            {milestoneNameAxis(width, narrow)}
            <Tooltip content={SlipTooltip} isAnimationActive={false} cursor={ROW_CURSOR} />
            <ReferenceLine x={0} stroke={INK} />
            <Bar dataKey="slip" name="Slip" shape={SlipBar} isAnimationActive={false} minPointSize={0} />
          </BarChart>
        );
      }}
    </ChartFrame>
  );
}
