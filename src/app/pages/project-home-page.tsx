import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import type { Milestone } from "#shared/schemas/programme.ts";
import { milestoneFinish } from "#shared/domain/programme-health.ts";
import { StatusMark } from "../../components/ui/status-mark.tsx";
import { healthQueryOptions, milestonesQueryOptions, useHealth, useMilestones } from "../../features/programme/api.ts";
import { formatMonthYear } from "#shared/domain/locale-dates.ts";
import { describeDates } from "../../features/programme/public-routes.tsx";
import { WholeProgrammeNote } from "../../features/programme/components/whole-programme-note.tsx";
import { describePublicProgress, slipInWords } from "../../features/programme/words.ts";
import { heroQueryOptions, projectQueryOptions } from "../../features/projects/api.ts";
import { ProjectHero } from "../../features/projects/components/project-hero.tsx";
import { SiteVisitRules } from "../../features/projects/components/site-visit-rules.tsx";
import { HeroPhoto, LatestUpdates, StoryList } from "../../features/public-site/components/latest-updates.tsx";
import { ProjectNav } from "../../features/public-site/components/project-nav.tsx";
import { ReadinessAtAGlance } from "../../features/public-site/components/readiness-glance.tsx";
import { SitePlanSection } from "../../features/public-site/components/site-plan-section.tsx";
import { sitePlanQueryOptions } from "../../lib/site-plan.ts";
import { facilityReadQueryOptions } from "../../features/public-site/facility-api.ts";
import { storiesQueryOptions, updatesQueryOptions } from "../../features/public-site/api.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";

// The milestones are asked for as the public sees them, so a signed-in member of staff
// reading the public page sees the same list as a visitor. (Percent complete comes from
// the health figures, which the server computes over the whole programme for every caller.)
const PUBLIC = { audience: "public" } as const;

/** Percent complete and the forecast finish of the whole phase, in plain words. */
function ProgressInWords({ slug, milestones }: { slug: string; milestones: Milestone[] }) {
  const health = useHealth(slug);
  return (
    <div className="flex flex-col gap-2" data-testid="progress-words">
      {health.data ? (
        <p className="flex items-baseline gap-3">
          <span className="tabular text-4xl font-semibold">{Math.round(health.data.percentComplete)}%</span>
          <span className="text-ink-soft">of the work is complete, weighted by the size of each milestone.</span>
        </p>
      ) : null}
      {health.data ? <WholeProgrammeNote /> : null}
      <p className="text-[0.95rem]" data-testid="public-progress">
        {describePublicProgress(milestones)}
      </p>
      {health.data?.forecastCompletion ? (
        <p className="text-[0.95rem]">
          The last milestone of this phase is forecast for {formatMonthYear(health.data.forecastCompletion)}
          {health.data.completionSlipDays === null || health.data.completionSlipDays === 0 ? ", as planned" : `, ${slipInWords(health.data.completionSlipDays)}`}.
        </p>
      ) : null}
    </div>
  );
}

/** The next open milestones, soonest first. */
function NextMilestones({ milestones }: { milestones: Milestone[] }) {
  const next = milestones
    .filter((m) => m.actualFinish === null)
    .sort((a, b) => milestoneFinish(a).localeCompare(milestoneFinish(b)) || a.id - b.id)
    .slice(0, 3);
  if (next.length === 0) return null;
  return (
    <div className="mt-5">
      <h3 className="label-caps">Next milestones</h3>
      <ol className="mt-2 divide-y divide-rule border-y border-rule">
        {next.map((m) => (
          <li key={m.id} className="flex flex-col gap-0.5 py-2.5 sm:flex-row sm:items-baseline sm:justify-between sm:gap-4" data-testid="next-milestone">
            <div className="min-w-0">
              <p className="font-medium">{m.name}</p>
              <p className="text-sm text-ink-soft">{describeDates(m)}</p>
            </div>
            <StatusMark status={m.status} className="text-sm" />
          </li>
        ))}
      </ol>
    </div>
  );
}

function FollowLinks({ slug }: { slug: string }) {
  return (
    <section aria-labelledby="follow" className="border border-rule bg-sheet p-4">
      <h2 id="follow" className="font-semibold">
        Follow this build
      </h2>
      <ul className="mt-2 flex flex-col gap-2 text-[0.95rem]">
        <li>
          <Link to={`/projects/${slug}/subscribe`} className="inline-flex min-h-6 items-center font-medium text-ink underline underline-offset-4">
            Get updates by e-mail
          </Link>
          <span className="block text-sm text-ink-soft">As they happen, weekly or monthly; unsubscribe with one click.</span>
        </li>
        <li>
          <Link to={`/projects/${slug}/enquire`} className="inline-flex min-h-6 items-center font-medium underline underline-offset-4">
            Ask about capacity or a site visit
          </Link>
        </li>
        <li>
          <Link to={`/projects/${slug}/gallery`} className="inline-flex min-h-6 items-center underline underline-offset-4">
            Photographs from the site
          </Link>
        </li>
        <li>
          <a href={`/feed/${slug}.atom`} className="inline-flex min-h-6 items-center underline underline-offset-4">
            News feed (Atom)
          </a>
        </li>
      </ul>
    </section>
  );
}

/** The project must be there; the programme is asked for alongside and may fail on its own. */
export const projectHomeLoader: RouteLoader = (qc) => async ({ params }) => {
  const slug = params.slug ?? "";
  // The headline figure and the latest updates and stories too: a page rendered on the server
  // (decision 059) carries only what its loader fetched.
  await Promise.all([
    qc.ensureQueryData(projectQueryOptions(slug)),
    qc.prefetchQuery(milestonesQueryOptions(slug, PUBLIC)),
    qc.prefetchQuery(healthQueryOptions(slug)),
    qc.prefetchQuery(facilityReadQueryOptions(slug)),
    qc.prefetchQuery(heroQueryOptions(slug)),
    qc.prefetchQuery(sitePlanQueryOptions(slug)),
    qc.prefetchQuery(updatesQueryOptions(slug)),
    qc.prefetchQuery(storiesQueryOptions(slug)),
  ]);
  return null;
};

/** `/projects/:slug`: what is being built, how far it has got, when it will be ready, and the latest from the site. */
export function ProjectHomePage() {
  const { slug = "" } = useParams();
  const p = useSuspenseQuery(projectQueryOptions(slug)).data;
  // The build's own page is titled by its name alone (not "<name> · <name>").
  useTitle(p.name);
  // The programme is a part of the page, not the page: if it cannot be read the rest still shows.
  const milestones = useMilestones(slug, PUBLIC);
  return (
    <div className="mx-auto max-w-5xl px-4 py-8">
      <p className="label-caps">
        {p.operatorName} · {p.locationLabel}
      </p>
      <h1 className="mt-1 text-3xl font-semibold tracking-tight sm:text-4xl">{p.name}</h1>
      <ProjectNav slug={p.slug} />
      {/* "Ready when?" is what a prospect comes for: it comes first, above the photograph (decision 050). */}
      <ReadinessAtAGlance slug={p.slug} publicOnly detailsHref={`/projects/${p.slug}/facility`} className="mt-4" />
      {/* The photograph staff chose (decision 055), else the latest cover. */}
      <ProjectHero slug={p.slug} fallback={<HeroPhoto slug={p.slug} />} />
      <p className="mt-6 max-w-3xl font-serif text-lg leading-relaxed">{p.description}</p>
      <div className="mt-8 grid gap-6 md:grid-cols-[2fr_1fr]">
        <section aria-labelledby="progress" className="border border-rule bg-sheet p-5">
          <h2 id="progress" className="font-semibold">
            Progress
          </h2>
          <div className="mt-2">
            {milestones.data ? <ProgressInWords slug={p.slug} milestones={milestones.data} /> : null}
          </div>
          {milestones.data ? <NextMilestones milestones={milestones.data} /> : null}
          <p className="mt-3">
            <Link to={`/projects/${p.slug}/timeline`} className="font-medium text-ink underline underline-offset-4">
              See the timeline: when each part will be ready →
            </Link>
          </p>
          <p className="mt-4 text-sm text-ink-soft">
            The programme, updates and photographs of this build are published here as the work goes on. Dates are the operator's current forecasts; times on this page are in {p.timeZone.replace("_", " ")}.
          </p>
        </section>
        <div className="flex flex-col gap-6">
          <FollowLinks slug={p.slug} />
          {p.visitsOffered ? <SiteVisitRules /> : null}
        </div>
      </div>
      <SitePlanSection slug={p.slug} className="mt-10" />
      <div className="mt-10 flex flex-col gap-10">
        <LatestUpdates slug={p.slug} timeZone={p.timeZone} />
        <StoryList slug={p.slug} timeZone={p.timeZone} />
      </div>
    </div>
  );
}
