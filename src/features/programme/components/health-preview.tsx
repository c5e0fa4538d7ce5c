import type { ReactNode } from "react";
import { daysBetween } from "#shared/domain/calendar.ts";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import type { PreviewResult } from "../preview.ts";
import { formatIndex, formatPercent, signedDays } from "../words.ts";

function BeforeAfter({ label, before, after, changed, note }: { label: string; before: ReactNode; after: ReactNode; changed: boolean; note?: ReactNode }) {
  return (
    <div className="flex flex-col gap-0.5" data-testid={`preview-${label.toLowerCase().replace(/\W+/g, "-")}`}>
      <dt className="label-caps">{label}</dt>
      <dd className="tabular flex flex-wrap items-baseline gap-x-2 text-[0.95rem]">
        <span className={changed ? "text-ink-faint line-through decoration-1" : ""}>{before}</span>
        <span aria-hidden>→</span>
        <span className="sr-only">becomes</span>
        <span className={changed ? "font-semibold text-ink" : ""}>{after}</span>
        {note ? <span className="text-xs text-ink-soft">{note}</span> : null}
      </dd>
    </div>
  );
}

/**
 * What a pending change does to the programme, before it is saved: percent complete,
 * SPI, forecast completion and each changed milestone's status, before → after.
 */
export function HealthPreview({ preview, title = "Before you save", maxStatuses = 8, children }: { preview: PreviewResult; title?: string; maxStatuses?: number; children?: ReactNode }) {
  const { before, after, error } = preview;
  // Milestones whose status changes come first: they are the news.
  const statuses = [...preview.statuses].sort((a, b) => Number(b.before !== b.after) - Number(a.before !== a.after));
  const hidden = Math.max(0, statuses.length - maxStatuses);
  const fcMoved = before.forecastCompletion && after.forecastCompletion ? daysBetween(before.forecastCompletion, after.forecastCompletion) : 0;
  return (
    <section aria-label={title} aria-live="polite" className="border-2 border-ink bg-accent-wash/40 p-3" data-testid="health-preview">
      <p className="label-caps text-ink">{title}</p>
      {error ? (
        <p role="alert" className="mt-1 text-sm text-bad">
          ▲ {error}
        </p>
      ) : null}
      <dl className="mt-2 grid gap-3 sm:grid-cols-3">
        <BeforeAfter label="Percent complete" before={formatPercent(before.percentComplete)} after={formatPercent(after.percentComplete)} changed={formatPercent(before.percentComplete) !== formatPercent(after.percentComplete)} />
        <BeforeAfter label="SPI" before={formatIndex(before.spi)} after={formatIndex(after.spi)} changed={formatIndex(before.spi) !== formatIndex(after.spi)} />
        <BeforeAfter
          label="Forecast completion"
          before={formatDate(before.forecastCompletion)}
          after={formatDate(after.forecastCompletion)}
          changed={fcMoved !== 0}
          note={fcMoved !== 0 ? `(${signedDays(fcMoved)})` : undefined}
        />
      </dl>
      {statuses.length > 0 ? (
        <ul className="mt-3 flex flex-col gap-1 border-t border-rule pt-2 text-sm">
          {statuses.slice(0, maxStatuses).map((s) => (
            <li key={s.id} className="flex flex-wrap items-center gap-x-2" data-testid="preview-status">
              <span className="font-medium">{s.name}:</span>
              <StatusMark status={s.before} />
              <span aria-hidden>→</span>
              <span className="sr-only">becomes</span>
              <StatusMark status={s.after} />
              <span className="tabular text-ink-soft">
                slip {signedDays(s.slipBefore)} → {signedDays(s.slipAfter)}
              </span>
            </li>
          ))}
          {hidden > 0 ? <li className="text-ink-soft">and {hidden} more milestone{hidden === 1 ? "" : "s"}</li> : null}
        </ul>
      ) : null}
      {children ? <div className="mt-3 flex flex-wrap gap-2">{children}</div> : null}
    </section>
  );
}
