import { HOME_HERO_SIZES } from "#shared/domain/picture-sizes.ts";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import type { HomeBuild } from "#shared/schemas/project-hero.ts";
import { PrimaryLink } from "../../components/ui/button.tsx";
import { formatDateLong } from "../../lib/format.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { homeQueryOptions } from "./api.ts";
import { HeroImage, IllustrationMark } from "./components/hero-image.tsx";

export const homeLoader: RouteLoader = (qc) => async () => {
  await qc.ensureQueryData(homeQueryOptions());
  return null;
};

/** The one figure and the next ready-for-service date of a build, in words a glance takes in. */
function BuildFigures({ build, large }: { build: HomeBuild; large: boolean }) {
  return (
    <div className="flex flex-col gap-1">
      {build.percentComplete !== null ? (
        <p className="flex items-baseline gap-2" data-testid="home-figure">
          <span className={`tabular font-semibold ${large ? "text-4xl" : "text-2xl"}`}>{Math.round(build.percentComplete)}%</span>
          <span className="text-ink-soft">complete, across the whole programme</span>
        </p>
      ) : null}
      <p className={large ? "text-lg" : "text-[0.95rem]"} data-testid="home-next-ready">
        {build.nextReady ? (
          <>
            Next ready for service: <strong className="font-semibold">{build.nextReady.blockName}</strong>, forecast <time dateTime={build.nextReady.date}>{formatDateLong(build.nextReady.date)}</time>
          </>
        ) : (
          "No capacity block is waiting for a ready-for-service date."
        )}
      </p>
    </div>
  );
}

/** One build alone: its hero beside the figure, the date and the way in, all on the first screen of a phone or a desktop. */
function OneBuild({ build }: { build: HomeBuild }) {
  return (
    <article className="mt-6 grid gap-5 md:grid-cols-[3fr_2fr] md:items-center" data-testid="home-build">
      {build.picture ? (
        <figure className="min-w-0">
          <HeroImage picture={build.picture} focus={build.focus} frame="home" eager sizes={HOME_HERO_SIZES} />
          {build.picture.caption || build.picture.isIllustration ? (
            <figcaption className="mt-2 text-sm text-ink-soft">
              {build.picture.caption}
              {build.picture.isIllustration ? <IllustrationMark /> : null}
            </figcaption>
          ) : null}
        </figure>
      ) : null}
      <div className="min-w-0">
        <p className="label-caps">
          {build.operatorName}
          {build.locationLabel ? ` · ${build.locationLabel}` : ""}
        </p>
        <h2 className="mt-1 text-2xl font-semibold">{build.name}</h2>
        <div className="mt-3">
          <BuildFigures build={build} large />
        </div>
        <p className="mt-5">
          <PrimaryLink to={`/projects/${build.slug}`}>Follow this build →</PrimaryLink>
        </p>
      </div>
    </article>
  );
}

/** Several builds: a card each with its picture and figure. */
function BuildList({ builds }: { builds: HomeBuild[] }) {
  return (
    <ul className="mt-8 grid gap-4 sm:grid-cols-2">
      {builds.map((b) => (
        <li key={b.slug} data-testid="home-build">
          <Link to={`/projects/${b.slug}`} className="block h-full border border-rule bg-sheet hover:border-ink">
            {b.picture ? <HeroImage picture={b.picture} focus={b.focus} frame="card" alt="" sizes="(min-width: 640px) 480px, 100vw" /> : null}
            <div className="p-5">
              <p className="label-caps">{b.operatorName}</p>
              <h2 className="mt-1 text-xl font-semibold">{b.name}</h2>
              <div className="mt-3">
                <BuildFigures build={b} large={false} />
              </div>
              <p className="mt-4 text-sm font-medium underline underline-offset-4">Follow this build →</p>
            </div>
          </Link>
        </li>
      ))}
    </ul>
  );
}

/** `/`: one build shown whole, or every build with its picture and figure. */
export function HomePage() {
  const home = useSuspenseQuery(homeQueryOptions()).data;
  useTitle("What is being built", "Plumbline");
  return (
    <div className="mx-auto max-w-5xl px-4 py-8 sm:py-10">
      <p className="label-caps">Construction progress</p>
      <h1 className="mt-1 max-w-3xl text-2xl font-semibold tracking-tight sm:text-4xl">What is being built, and when it will be ready</h1>
      {/* On a phone the build's own figures say this better, and must be on the first screen. */}
      <p className="mt-3 hidden max-w-2xl text-ink-soft sm:block">Progress of each build, published by its operator: the programme, photographs from the site walks, and the date each hall is forecast to be ready for service.</p>
      {home.builds.length === 1 ? <OneBuild build={home.builds[0]!} /> : <BuildList builds={home.builds} />}
    </div>
  );
}
