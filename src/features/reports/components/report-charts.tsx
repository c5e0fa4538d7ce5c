import { Bar, BarChart, CartesianGrid, Line, LineChart, ReferenceLine, XAxis, YAxis, type BarShapeProps } from "recharts";
import { toDayNumber, type CalendarDate } from "#shared/domain/calendar.ts";
import { formatAxisMonth } from "#shared/domain/locale-dates.ts";
import type { ReportSchedule } from "#shared/domain/report-figures.ts";
import { formatDate } from "../../../lib/format.ts";
import { useElementWidth } from "../../../lib/use-element-width.ts";
import { slipWords } from "../words.ts";

// The paper and ink of src/index.css, as recharts wants colours as values.
const INK = "#1d1f24";
const INK_SOFT = "#4a4e57";
const RULE = "#d9d3c4";
const PAPER = "#fffdf8";

/** Lines of the trend chart read apart by dashes and markers, never by colour alone. */
const DASHES = ["", "6 3", "2 3", "10 3 2 3", "1 5", "14 4"] as const;
const MARKS = ["disc", "square", "triangle", "ring", "diamond", "cross"] as const;

interface SlipRow {
  name: string;
  slip: number;
}

/** "12 late" on a phone, where the words would not fit beside the bar. */
const shortSlip = (days: number) => (days === 0 ? "on time" : `${Math.abs(days)} ${days > 0 ? "late" : "early"}`);

/** A bar from zero to its slip; on a phone the milestone's name sits above its bar, as the axis has no room. */
function slipShape(narrow: boolean) {
  return function SlipShape(p: BarShapeProps) {
    const row = p.payload as SlipRow;
    const x = Math.min(p.x, p.x + p.width);
    const w = Math.abs(p.width);
    const late = row.slip > 0;
    const cy = p.y + p.height / 2;
    const end = late ? x + w : x;
    return (
      <g data-testid="slip-bar" data-slip={row.slip}>
        {narrow ? (
          <text x={4} y={p.y - 4} fontSize={11} fill={INK}>
            {row.name.length > 52 ? `${row.name.slice(0, 51)}…` : row.name}
          </text>
        ) : null}
        {/* Late: solid ink; early: an open box, so the two read apart without colour. */}
        {w > 0 ? <rect x={x} y={p.y} width={w} height={p.height} fill={late ? INK : PAPER} stroke={INK} /> : null}
        <text x={late ? end + 6 : end - 6} y={cy} dy="0.35em" textAnchor={late ? "start" : "end"} fontSize={11} fill={INK}>
          {narrow ? shortSlip(row.slip) : slipWords(row.slip)}
        </text>
      </g>
    );
  };
}

/** Working days each milestone stands from its baseline: late bars solid to the right, early ones open to the left. */
export function SlipBars({ slips }: { slips: ReportSchedule["slips"] }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const rows: SlipRow[] = [...slips].sort((a, b) => b.slipWorkingDays - a.slipWorkingDays).map((s) => ({ name: s.name, slip: s.slipWorkingDays }));
  const narrow = width < 560;
  const most = Math.max(1, ...rows.map((r) => Math.abs(r.slip)));
  const height = rows.length * (narrow ? 40 : 28) + 40;
  return (
    <div ref={ref} className="w-full min-w-0" data-testid="report-slip-chart">
      {width > 0 ? (
        <BarChart width={width} height={height} data={rows} layout="vertical" barCategoryGap={narrow ? "45%" : "20%"} margin={{ top: narrow ? 14 : 4, right: narrow ? 56 : 150, bottom: 4, left: narrow ? 44 : 4 }}>
          <CartesianGrid horizontal={false} stroke={RULE} />
          <XAxis type="number" domain={[Math.min(0, -most), most]} tick={{ fontSize: 11, fill: INK_SOFT }} allowDecimals={false} />
          <YAxis type="category" dataKey="name" width={narrow ? 0 : 220} hide={narrow} tick={{ fontSize: 11, fill: INK }} interval={0} />
          <ReferenceLine x={0} stroke={INK} />
          <Bar dataKey="slip" shape={slipShape(narrow)} isAnimationActive={false} />
        </BarChart>
      ) : null}
    </div>
  );
}

const dayOf = (d: string) => toDayNumber(d as CalendarDate);

function Mark({ kind, cx, cy }: { kind: (typeof MARKS)[number]; cx: number; cy: number }) {
  const r = 4;
  switch (kind) {
    case "disc":
      return <circle cx={cx} cy={cy} r={r} fill={INK} />;
    case "ring":
      return <circle cx={cx} cy={cy} r={r} fill={PAPER} stroke={INK} />;
    case "square":
      return <rect x={cx - r} y={cy - r} width={2 * r} height={2 * r} fill={INK} />;
    case "triangle":
      return <path d={`M${cx} ${cy - r}L${cx + r} ${cy + r}L${cx - r} ${cy + r}Z`} fill={INK} />;
    case "diamond":
      return <path d={`M${cx} ${cy - r}L${cx + r} ${cy}L${cx} ${cy + r}L${cx - r} ${cy}Z`} fill={PAPER} stroke={INK} />;
    default:
      return <path d={`M${cx - r} ${cy - r}L${cx + r} ${cy + r}M${cx + r} ${cy - r}L${cx - r} ${cy + r}`} stroke={INK} strokeWidth={1.5} />;
  }
}

const dayWord = (day: number) => formatAxisMonth(day);

/**
 * The milestone trend: for each key milestone, its forecast date as it stood at each past month
 * end. A flat line is a steady forecast; a line that climbs is a date drifting later.
 */
export function MilestoneTrend({ trend }: { trend: ReportSchedule["trend"] }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const ends = trend[0]?.points.map((p) => p.monthEnd) ?? [];
  const rows = ends.map((monthEnd, i) => {
    const row: Record<string, number | string | null> = { monthEnd: dayWord(dayOf(monthEnd)) };
    trend.forEach((t, k) => {
      const f = t.points[i]?.forecast ?? null;
      row[`m${k}`] = f === null ? null : dayOf(f);
    });
    return row;
  });
  const days = trend.flatMap((t) => t.points.map((p) => p.forecast)).filter((d): d is string => d !== null).map(dayOf);
  const lo = Math.min(...days) - 14;
  const hi = Math.max(...days) + 14;
  return (
    <div className="flex flex-col gap-2" data-testid="report-trend-chart">
      <ul className="flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Key">
        {trend.map((t, k) => (
          <li key={t.milestone} className="flex items-center gap-2">
            <svg aria-hidden width="28" height="10">
              <line x1="0" y1="5" x2="28" y2="5" stroke={INK} strokeWidth={1.5} strokeDasharray={DASHES[k % DASHES.length]} />
              <Mark kind={MARKS[k % MARKS.length]!} cx={14} cy={5} />
            </svg>
            {t.milestone}
            <span className="text-ink-soft">(baseline {formatDate(t.baseline)})</span>
          </li>
        ))}
      </ul>
      <div ref={ref} className="w-full min-w-0">
        {width > 0 && days.length > 0 ? (
          <LineChart width={width} height={260} data={rows} margin={{ top: 8, right: 16, bottom: 4, left: 8 }}>
            <CartesianGrid stroke={RULE} />
            <XAxis dataKey="monthEnd" tick={{ fontSize: 11, fill: INK_SOFT }} />
            <YAxis type="number" domain={[lo, hi]} tickFormatter={dayWord} tick={{ fontSize: 11, fill: INK_SOFT }} width={56} />
            {trend.map((t, k) => (
              <Line
                key={t.milestone}
                dataKey={`m${k}`}
                name={t.milestone}
                stroke={INK}
                strokeWidth={1.5}
                strokeDasharray={DASHES[k % DASHES.length]}
                connectNulls={false}
                isAnimationActive={false}
                dot={(p: { cx?: number; cy?: number; index?: number }) => (p.cx === undefined || p.cy === undefined ? <g key={`${k}-${p.index}`} /> : <Mark key={`${k}-${p.index}`} kind={MARKS[k % MARKS.length]!} cx={p.cx} cy={p.cy} />)}
              />
            ))}
          </LineChart>
        ) : null}
      </div>
    </div>
  );
}
