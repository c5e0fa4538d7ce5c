import type { MilestoneStatus } from "#shared/domain/programme-health.ts";

/**
 * Milestone status by word, shape and colour together, so no one needs the colour:
 * a filled disc for done, an open ring for on programme, a triangle for at risk and
 * a square for behind.
 */
export const STATUS_LOOK: Record<MilestoneStatus, { word: string; glyph: string; color: string; shape: "disc" | "ring" | "triangle" | "square" }> = {
  complete: { word: "Complete", glyph: "●", color: "#1d1f24", shape: "disc" },
  on_programme: { word: "On programme", glyph: "○", color: "#2f6b3a", shape: "ring" },
  at_risk: { word: "At risk", glyph: "▲", color: "#8a5a00", shape: "triangle" },
  behind: { word: "Behind", glyph: "■", color: "#a32020", shape: "square" },
};

export const STATUS_ORDER: readonly MilestoneStatus[] = ["complete", "on_programme", "at_risk", "behind"];

/** The shape alone as SVG elements centred on (cx, cy); for charts, which draw inside an SVG. */
export function StatusShape({ status, cx, cy, r = 5 }: { status: MilestoneStatus; cx: number; cy: number; r?: number }) {
  const { color, shape } = STATUS_LOOK[status];
  switch (shape) {
    case "disc":
      return <circle cx={cx} cy={cy} r={r} fill={color} />;
    case "ring":
      return <circle cx={cx} cy={cy} r={r - 0.9} fill="#fffdf8" stroke={color} strokeWidth={1.8} />;
    case "triangle":
      return <path d={`M${cx} ${cy - r * 1.05}L${cx + r * 1.1} ${cy + r * 0.85}H${cx - r * 1.1}Z`} fill={color} />;
    case "square":
      return <rect x={cx - r * 0.85} y={cy - r * 0.85} width={r * 1.7} height={r * 1.7} fill={color} />;
  }
}

/** The shape as a small inline icon beside text. */
export function StatusIcon({ status, size = 12 }: { status: MilestoneStatus; size?: number }) {
  return (
    <svg aria-hidden width={size} height={size} viewBox="0 0 12 12" className="inline-block shrink-0" data-shape={STATUS_LOOK[status].shape}>
      <StatusShape status={status} cx={6} cy={6} r={5} />
    </svg>
  );
}

/**
 * A status as shape and word ("▲ At risk"). With `wordHidden` the word is still read
 * out by screen readers; use it only where the word is printed nearby.
 */
export function StatusMark({ status, wordHidden = false, className = "" }: { status: MilestoneStatus; wordHidden?: boolean; className?: string }) {
  const { word, color } = STATUS_LOOK[status];
  return (
    <span className={`inline-flex items-center gap-1.5 whitespace-nowrap font-medium ${className}`} style={{ color }} data-status={status}>
      <StatusIcon status={status} />
      <span className={wordHidden ? "sr-only" : undefined}>{word}</span>
    </span>
  );
}

/** The key to the shapes, for charts and tables. */
export function StatusKey({ className = "" }: { className?: string }) {
  return (
    <ul aria-label="Status key" className={`flex flex-wrap gap-x-4 gap-y-1 text-sm ${className}`}>
      {STATUS_ORDER.map((s) => (
        <li key={s}>
          <StatusMark status={s} />
        </li>
      ))}
    </ul>
  );
}
