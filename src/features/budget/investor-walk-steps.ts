import type { BudgetPosition } from "#shared/schemas/budget.ts";

type Step = BudgetPosition["walk"][number];

/** How a step is drawn: totals solid, a rise hatched, a saving open, the projection a dashed outline. */
export type StepLook = "total" | "rise" | "saving" | "projection";

export const STEP_LOOK: Record<StepLook, { fill: "solid" | "hatch" | "open"; dashed: boolean; word: string }> = {
  total: { fill: "solid", dashed: false, word: "A budget total (solid)" },
  rise: { fill: "hatch", dashed: false, word: "An approved change that adds (hatched)" },
  saving: { fill: "open", dashed: false, word: "An approved change that saves (open)" },
  projection: { fill: "open", dashed: true, word: "Projected final cost, an estimate (dashed)" },
};

export interface WalkBar {
  label: string;
  kind: Step["kind"];
  /** The change for a change step; the level for the others. */
  amount: number;
  /** The level before the step and after it (a total starts from zero). */
  from: number;
  to: number;
  /** [low, high] of the bar, for a range bar. */
  span: [number, number];
  look: StepLook;
}

/**
 * The walk as bars of a waterfall: start, subtotal and projection are levels, standing on zero;
 * a change floats from the level before it to the level after it.
 */
export function walkBars(walk: readonly Step[]): WalkBar[] {
  let level = 0;
  return walk.map((s) => {
    if (s.kind === "change") {
      const from = level;
      level += s.amount;
      return { label: s.label, kind: s.kind, amount: s.amount, from, to: level, span: [Math.min(from, level), Math.max(from, level)], look: s.amount >= 0 ? "rise" : "saving" };
    }
    level = s.amount;
    return { label: s.label, kind: s.kind, amount: s.amount, from: 0, to: s.amount, span: [0, s.amount], look: s.kind === "projection" ? "projection" : "total" };
  });
}

/**
 * Where the walk's scale starts. A change of a few per cent drawn on a scale from zero is a hair, so
 * when every level lies well away from zero the scale starts one round step below the lowest level
 * less the walk's own spread; the page says so. Zero when the levels are near it or spread wide.
 */
export function walkFloor(bars: readonly WalkBar[]): number {
  const levels = bars.flatMap((b) => (b.kind === "change" ? [b.from, b.to] : [b.to]));
  if (levels.length === 0) return 0;
  const lo = Math.min(...levels);
  const hi = Math.max(...levels);
  if (lo <= 0 || hi - lo > hi / 2) return 0;
  const spread = Math.max(hi - lo, hi / 100);
  const power = 10 ** Math.floor(Math.log10(spread / 2));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= spread / 2) ?? 10 * power;
  return Math.max(0, Math.floor((lo - spread) / step) * step);
}
