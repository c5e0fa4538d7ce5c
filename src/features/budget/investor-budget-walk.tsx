import { Bar, BarChart, CartesianGrid, XAxis, YAxis, type BarShapeProps } from "recharts";
import type { BudgetPosition } from "#shared/schemas/budget.ts";
import { formatMoney } from "../../lib/format.ts";
import { useElementWidth } from "../../lib/use-element-width.ts";
import { STEP_LOOK, walkBars, walkFloor, type WalkBar } from "./investor-walk-steps.ts";

// The paper and ink of src/index.css, as recharts wants colours as values.
const INK = "#1d1f24";
const INK_SOFT = "#4a4e57";
const RULE = "#d9d3c4";
const PAPER = "#fffdf8";

/**
 * One step drawn from its start to its end: totals solid ink, a rise hatched, a saving an open box,
 * the projection a dashed outline (it is an estimate); the figure beside it, and on a phone the
 * step's name above its row.
 */
function stepShape(currency: string, narrow: boolean, hatchId: string) {
  return function WalkStep(p: BarShapeProps) {
    const bar = p.payload as WalkBar;
    const x = Math.min(p.x, p.x + p.width);
    const w = Math.max(2, Math.abs(p.width));
    const cy = p.y + p.height / 2;
    const look = STEP_LOOK[bar.look];
    const fill = look.fill === "solid" ? INK : look.fill === "hatch" ? `url(#${hatchId})` : PAPER;
    return (
      <g data-testid="walk-step" data-kind={bar.kind} data-from={bar.from} data-to={bar.to}>
        <rect x={x} y={p.y} width={w} height={p.height} fill={fill} stroke={INK} strokeWidth={1.2} strokeDasharray={look.dashed ? "4 3" : undefined} />
        {narrow ? (
          <text x={1} y={p.y - 5} fontSize={10.5} fill={INK}>
            {bar.label}
          </text>
        ) : null}
        <text x={x + w + 6} y={cy} dy="0.35em" fontSize={11} fill={INK} className="tabular">
          {bar.kind === "change" ? `${bar.amount > 0 ? "+" : "−"}${formatMoney(Math.abs(bar.amount), currency)}` : formatMoney(bar.to, currency)}
        </text>
      </g>
    );
  };
}

/**
 * The budget walk: the original budget, each approved change that moved it, the current approved
 * budget and the projected final cost, as a sideways waterfall (each change floats from the level
 * before it to the level after; the totals stand on zero).
 */
export function BudgetWalkChart({ position }: { position: Pick<BudgetPosition, "walk" | "currency"> }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  const steps = walkBars(position.walk);
  const floor = walkFloor(steps);
  // Totals stand on the scale's start when it is not zero.
  const bars = steps.map((b) => ({ ...b, span: [Math.max(floor, b.span[0]), b.span[1]] as [number, number] }));
  const narrow = width < 560;
  // The figure beside each bar sits inside the plot (a scale that does not start at zero clips at
  // the plot's edges), so the scale runs on past the highest level to leave it room.
  const top = Math.max(0, ...bars.map((b) => Math.max(b.from, b.to)));
  const hatchId = "budget-walk-rise";
  const money = (v: number) => formatMoney(v, position.currency);
  return (
    <div ref={ref} className="w-full min-w-0" data-testid="budget-walk">
      <svg aria-hidden width="0" height="0" className="absolute">
        <defs>
          <pattern id={hatchId} patternUnits="userSpaceOnUse" width="6" height="6">
            <rect width="6" height="6" fill={PAPER} />
            <path d="M-1 1l2-2M0 6l6-6M5 7l2-2" stroke={INK} strokeWidth="1" />
          </pattern>
        </defs>
      </svg>
      {width > 0 ? (
        <BarChart width={width} height={bars.length * (narrow ? 44 : 34) + 40} data={bars} layout="vertical" barCategoryGap="28%" margin={{ top: narrow ? 16 : 8, right: 16, bottom: 4, left: narrow ? 4 : 0 }} accessibilityLayer={false}>
          <CartesianGrid stroke={RULE} strokeDasharray="2 4" horizontal={false} />
          <XAxis type="number" domain={[floor, top + (top - floor) * (narrow ? 0.3 : 0.16)]} allowDataOverflow tickFormatter={money} tickCount={narrow ? 3 : 5} tick={{ fontSize: 11, fill: INK_SOFT }} stroke={INK_SOFT} />
          <YAxis type="category" dataKey="label" width={narrow ? 1 : 190} interval={0} tick={narrow ? false : { fontSize: 11, fill: INK }} tickLine={false} stroke={INK_SOFT} />
          <Bar dataKey="span" shape={stepShape(position.currency, narrow, hatchId)} isAnimationActive={false} />
        </BarChart>
      ) : (
        <div className="h-64" />
      )}
      {floor > 0 ? (
        <p className="text-xs text-ink-soft" data-testid="walk-floor">
          The scale starts at {money(floor)}, not at zero, so the changes can be seen.
        </p>
      ) : null}
    </div>
  );
}
