import type { ReportState } from "#shared/schemas/reports.ts";
import { STATE_LOOK } from "../words.ts";

/** A report's state as shape and word: □ Draft, ● Issued, ⊘ Superseded. */
export function ReportStateMark({ state }: { state: ReportState }) {
  const { word, shape } = STATE_LOOK[state];
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap text-sm font-medium" data-state={state} data-testid="report-state">
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0">
        {shape === "square" ? <rect x="1.5" y="1.5" width="9" height="9" fill="none" stroke="currentColor" strokeWidth="1.5" /> : null}
        {shape === "disc" ? <circle cx="6" cy="6" r="5" fill="currentColor" /> : null}
        {shape === "struck" ? (
          <>
            <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.5" />
            <path d="M2.5 9.5L9.5 2.5" stroke="currentColor" strokeWidth="1.5" />
          </>
        ) : null}
      </svg>
      {word}
    </span>
  );
}
