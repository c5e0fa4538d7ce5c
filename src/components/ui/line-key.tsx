/** One line of a chart's key: how it is drawn (colour, width, dashes; `upright` for a marker such as "today") and its words. */
export interface KeyLine {
  label: string;
  stroke: string;
  width: number;
  dash?: string;
  upright?: boolean;
}

/**
 * The key under a line chart: each line drawn as it is in the chart beside its words, so the
 * lines read apart by dashes and weight, not by colour alone.
 */
export function LineKey({ lines }: { lines: readonly KeyLine[] }) {
  return (
    <ul className="flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Key">
      {lines.map((l) => (
        <li key={l.label} className="flex items-center gap-2">
          {l.upright ? (
            <svg aria-hidden width="12" height="14">
              <line x1="6" y1="0" x2="6" y2="14" stroke={l.stroke} strokeWidth={l.width} strokeDasharray={l.dash} />
            </svg>
          ) : (
            <svg aria-hidden width="28" height="8">
              <line x1="0" y1="4" x2="28" y2="4" stroke={l.stroke} strokeWidth={l.width} strokeDasharray={l.dash} />
            </svg>
          )}
          {l.label}
        </li>
      ))}
    </ul>
  );
}
