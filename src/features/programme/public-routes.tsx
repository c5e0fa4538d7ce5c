import { useSuspenseQuery } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { Link, useParams } from "react-router-dom";
import type { Milestone } from "#shared/schemas/programme.ts";
import { milestoneFinish } from "#shared/domain/programme-health.ts";
import { StatusIcon, STATUS_LOOK, StatusMark } from "../../components/ui/status-mark.tsx";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { healthQueryOptions, milestonesQueryOptions, programmeProjectQueryOptions } from "./api.ts";
import { WholeProgrammeNote } from "./components/whole-programme-note.tsx";
import { formatLongDate, formatMonthYear } from "#shared/domain/locale-dates.ts";
import { todayIn } from "../../lib/format.ts";
import { countInWords, describePublicProgress, slipInWords } from "./words.ts";

// Public pages: public milestones only (asked for explicitly, so a signed-in member of
// staff sees what a visitor sees), plain words, no money and no schedule indices.
const PUBLIC = { audience: "public" } as const;

/** When a milestone is (or was) due, in words: planned against expected or actual. */
export function describeDates(m: Milestone): string {
  if (m.actualFinish) {
    return m.slipDays === 0 ? `Finished ${formatLongDate(m.actualFinish)}, on the planned date.` : `Finished ${formatLongDate(m.actualFinish)}, ${slipInWords(m.slipDays)}.`;
  }
  const expected = milestoneFinish(m);
  if (m.slipDays === 0) return `Expected ${formatLongDate(expected)}, as planned.`;
  return `Planned for ${formatLongDate(m.baselineFinish)}; now expected ${formatLongDate(expected)}, ${slipInWords(m.slipDays)}.`;
}

function TimelineItem({ m }: { m: Milestone }) {
  const look = STATUS_LOOK[m.status];
  return (
    <li id={`milestone-${m.id}`} className="relative scroll-mt-20 pb-6 pl-8 last:pb-0" data-testid="timeline-item" data-milestone-id={m.id}>
      <span aria-hidden className="absolute left-[5px] top-1.5 bottom-0 w-px bg-rule-strong" />
      <span aria-hidden className="absolute left-0 top-1 flex size-3 items-center justify-center bg-paper">
        <StatusIcon status={m.status} size={12} />
      </span>
      <h3 className="font-semibold leading-snug">{m.name}</h3>
      {m.area ? <p className="text-xs text-ink-faint">{m.area}</p> : null}
      <p className="mt-1 text-[0.95rem]">{describeDates(m)}</p>
      <p className="mt-0.5 text-sm" style={{ color: look.color }}>
        <StatusMark status={m.status} />
      </p>
      {m.description ? <p className="mt-1 font-serif text-sm text-ink-soft">{m.description}</p> : null}
    </li>
  );
}

/** One side of today on the timeline, left out when it has no milestone. */
function TimelinePart({ id, title, milestones }: { id: string; title: string; milestones: Milestone[] }) {
  if (milestones.length === 0) return null;
  return (
    <section aria-labelledby={id}>
      <h2 id={id} className="label-caps mb-3">
        {title}
      </h2>
      <ol>
        {milestones.map((m) => (
          <TimelineItem key={m.id} m={m} />
        ))}
      </ol>
    </section>
  );
}

/** Milestones in date order, with "today" between what is done and what is to come. */
function Timeline({ milestones, today }: { milestones: Milestone[]; today: string }) {
  const ordered = [...milestones].sort((a, b) => milestoneFinish(a).localeCompare(milestoneFinish(b)) || a.id - b.id);
  const past = ordered.filter((m) => milestoneFinish(m) <= today);
  const future = ordered.filter((m) => milestoneFinish(m) > today);
  return (
    <div className="flex flex-col gap-4">
      <TimelinePart id="tl-past" title="Up to today" milestones={past} />
      <p className="flex items-center gap-2 text-sm font-semibold text-ink" aria-label={`Today, ${formatLongDate(today)}`}>
        <span aria-hidden className="h-0.5 w-6 bg-ink" />
        Today · {formatLongDate(today)}
        <span aria-hidden className="h-0.5 flex-1 bg-ink/30" />
      </p>
      <TimelinePart id="tl-future" title="Still to come" milestones={future} />
    </div>
  );
}

function countsInWords(milestones: Milestone[]): string {
  const n = (s: Milestone["status"]) => milestones.filter((m) => m.status === s).length;
  const parts = [
    [n("complete"), "complete"],
    [n("on_programme"), "on programme"],
    [n("at_risk"), "at risk of running late"],
    [n("behind"), "behind"],
  ] as const;
  return parts
    .filter(([c]) => c > 0)
    .map(([c, w]) => `${countInWords(c)} ${w}`)
    .join(", ");
}

/** `/projects/:slug/timeline`: the project and its public milestones; an unknown project is the route's error element. */
export const publicTimelineLoader: RouteLoader = (qc) => async ({ params }) => {
  const slug = params.slug ?? "";
  await Promise.all([qc.ensureQueryData(programmeProjectQueryOptions(slug)), qc.ensureQueryData(milestonesQueryOptions(slug, PUBLIC)), qc.ensureQueryData(healthQueryOptions(slug))]);
  return null;
};

/** The public programme timeline of a project; `glance` is what the app shows under the heading (each block's readiness). */
export function PublicTimelinePage({ glance }: { glance?: ReactNode } = {}) {
  const { slug = "" } = useParams();
  const p = useSuspenseQuery(programmeProjectQueryOptions(slug)).data;
  useTitle("Timeline", p.name);
  const list = useSuspenseQuery(milestonesQueryOptions(slug, PUBLIC)).data;
  const health = useSuspenseQuery(healthQueryOptions(slug)).data;
  const today = todayIn(p.timeZone);
  return (
    <div className="mx-auto max-w-3xl px-4 py-10">
      <p className="label-caps">
        <Link to={`/projects/${p.slug}`} className="underline underline-offset-4">
          {p.name}
        </Link>{" "}
        · Timeline
      </p>
      <h1 className="mt-1 text-3xl font-semibold tracking-tight">When each part will be ready</h1>
      {glance}
      <p className="mt-4 text-lg leading-relaxed" data-testid="public-summary">
        {describePublicProgress(list)}
      </p>
      {list.length > 0 ? <p className="mt-1 text-sm text-ink-soft">Of the published milestones: {countsInWords(list)}.</p> : null}
      {health.forecastCompletion ? (
        <div className="mt-3" data-testid="timeline-headline">
          <p className="text-[0.95rem]">
            The build is <span className="tabular font-semibold">{Math.round(health.percentComplete)}%</span> complete; the last milestone is forecast for {formatMonthYear(health.forecastCompletion)}.
          </p>
          <WholeProgrammeNote />
        </div>
      ) : null}
      <p className="mt-1 text-sm text-ink-soft">
        Dates are the operator's current forecasts and change as work goes on. Days are counted in {p.timeZone.replace("_", " ")}.
      </p>
      <p className="mt-2 text-sm">
        {/* A file for calendar apps, not a page of the app: a plain link, so the browser fetches it. */}
        <a href={`/projects/${p.slug}/calendar.ics`} className="font-medium underline underline-offset-4" data-testid="add-to-calendar">
          Add to calendar
        </a>{" "}
        <span className="text-ink-soft">— subscribe and your calendar moves each date when the forecast moves.</span>
      </p>
      <div className="mt-8">{list.length > 0 ? <Timeline milestones={list} today={today} /> : null}</div>
    </div>
  );
}
