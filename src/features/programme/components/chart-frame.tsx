import type { ReactNode } from "react";
import { YAxis, type BarShapeProps } from "recharts";
import { useElementWidth } from "../../../lib/use-element-width.ts";

export const INK = "#1d1f24";
export const INK_SOFT = "#4a4e57";
export const RULE = "#d9d3c4";
export const RULE_STRONG = "#b9b09c";
export const ACCENT = "#c2410c";
/** The band behind the row under the pointer in a sideways bar chart. */
export const ROW_CURSOR = { fill: "rgba(29,31,36,0.05)" };

/**
 * A sideways bar's row and its box from left to right (recharts gives a bar that grows
 * leftwards, a negative value, a negative width), at least `minWidth` pixels wide so a
 * zero-length bar still shows; `cy` is the bar's middle.
 */
export function barBox<R>(p: BarShapeProps, minWidth = 0): { row: R; x: number; w: number; cy: number } {
  return { row: p.payload as R, x: Math.min(p.x, p.x + p.width), w: Math.max(minWidth, Math.abs(p.width)), cy: p.y + p.height / 2 };
}

/**
 * A chart as a figure: a title, the drawing at the width available, and a sentence
 * that says what the drawing shows for anyone who cannot see it.
 */
export function ChartFrame({ title, summary, children, testId, footer }: { title: string; summary: ReactNode; children: (width: number) => ReactNode; testId: string; footer?: ReactNode }) {
  const [ref, width] = useElementWidth<HTMLDivElement>();
  return (
    <figure className="flex flex-col gap-2" data-testid={testId}>
      <figcaption>
        <p className="font-semibold">{title}</p>
        <p className="text-sm text-ink-soft">{summary}</p>
      </figcaption>
      <div ref={ref} className="w-full min-w-0">
        {width > 0 ? children(width) : <div className="h-64" />}
      </div>
      {footer}
    </figure>
  );
}

/** Shortens a label to `max` characters with an ellipsis, for axis ticks on narrow screens. */
export function truncate(s: string, max: number): string {
  return s.length <= max ? s : `${s.slice(0, Math.max(1, max - 1)).trimEnd()}…`;
}

/**
 * A category tick drawn above its row, from the left edge of the plot: on a phone the
 * names get the whole width instead of a narrow column beside the bars.
 */
export function tickAboveRow(maxChars: number) {
  return function TickAboveRow(props: { x?: number | string; y?: number | string; payload?: { value?: unknown } }) {
    const y = Number(props.y ?? 0);
    // The axis is a hairline at the plot's left edge, so the name starts at the drawing's edge.
    return (
      <text x={1} y={y - 9} textAnchor="start" fontSize={10.5} fill={INK}>
        {truncate(String(props.payload?.value ?? ""), maxChars)}
      </text>
    );
  };
}

/** A category tick on one line, shortened to fit the axis. */
export function tickOneLine(maxChars: number) {
  return function TickOneLine(props: { x?: number | string; y?: number | string; payload?: { value?: unknown } }) {
    return (
      <text x={Number(props.x ?? 0) - 4} y={Number(props.y ?? 0)} dy="0.35em" textAnchor="end" fontSize={11} fill={INK}>
        {truncate(String(props.payload?.value ?? ""), maxChars)}
      </text>
    );
  };
}

/**
 * The milestone names down a sideways bar chart. On a phone (`narrow`) the names sit above
 * their rows; on a wide screen, in a column beside them. Called as a function rather than
 * drawn as a component, so the chart gets the axis itself as its child.
 */
export function milestoneNameAxis(width: number, narrow: boolean) {
  return <YAxis type="category" dataKey="label" width={narrow ? 2 : 220} interval={0} tick={narrow ? tickAboveRow(Math.floor(width / 5.8)) : tickOneLine(33)} tickLine={false} />;
}
