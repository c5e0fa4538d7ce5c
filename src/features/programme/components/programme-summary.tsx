import { Link } from "react-router-dom";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import type { ProgrammeHealthResponse } from "#shared/schemas/programme.ts";
import { useHealth } from "../api.ts";
import { COUNTED_STATUSES, formatIndex, formatPercent, signedDays } from "../words.ts";

/** Counts by status, each as shape, word and number. */
export function StatusCounts({ counts }: { counts: ProgrammeHealthResponse["counts"] }) {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm" aria-label="Milestones by status">
      {COUNTED_STATUSES.map(({ status, count }) => (
        <li key={status} className="flex items-center gap-1.5">
          <StatusMark status={status} /> <span className="tabular">{counts[count]}</span>
        </li>
      ))}
    </ul>
  );
}

/** The programme's headline figures in one strip: percent complete, SPI, forecast against baseline completion, counts. */
export function HealthStrip({ health }: { health: ProgrammeHealthResponse }) {
  const slip = health.completionSlipDays;
  return (
    <div className="flex flex-col gap-3">
      <dl className="tabular grid grid-cols-2 gap-3 sm:grid-cols-3">
        <div>
          <dt className="label-caps">Complete</dt>
          <dd className="text-xl font-semibold">{formatPercent(health.percentComplete)}</dd>
          <dd className="text-xs text-ink-soft">planned {formatPercent(health.plannedPercent)}</dd>
        </div>
        <div>
          <dt className="label-caps">SPI</dt>
          <dd className="text-xl font-semibold">{formatIndex(health.spi)}</dd>
          <dd className="text-xs text-ink-soft">SPI(t) {formatIndex(health.earnedSchedule.spiT)}</dd>
        </div>
        <div className="col-span-2 sm:col-span-1">
          <dt className="label-caps">Forecast completion</dt>
          <dd className="text-xl font-semibold">{formatDate(health.forecastCompletion)}</dd>
          <dd className="text-xs text-ink-soft">
            baseline {formatDate(health.baselineCompletion)}
            {slip !== null && slip !== 0 ? ` (${signedDays(slip)})` : ""}
          </dd>
        </div>
      </dl>
      <StatusCounts counts={health.counts} />
    </div>
  );
}

/** One project's health, fetched by slug, for lists (office home, investor room). */
export function ProjectHealthSummary({ slug, href, linkLabel }: { slug: string; href?: string; linkLabel?: string }) {
  const health = useHealth(slug);
  if (health.isPending) return <Spinner label="Computing programme health" />;
  if (health.isError) return <Notice tone="error">{health.error.message}</Notice>;
  return (
    <div className="flex flex-col gap-3" data-testid={`health-${slug}`}>
      <HealthStrip health={health.data} />
      {href ? (
        <p>
          <Link to={href} className="font-medium text-ink underline underline-offset-4">
            {linkLabel ?? "Open the programme"}
          </Link>
        </p>
      ) : null}
    </div>
  );
}
