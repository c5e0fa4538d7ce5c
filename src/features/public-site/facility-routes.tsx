import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import { Picture } from "../../components/ui/picture.tsx";
import type { RouteLoader } from "../../lib/loaders.ts";
import { siteProjectQueryOptions } from "./api.ts";
import { facilityReadQueryOptions, usePhotosOf, type PhotoSubject } from "./facility-api.ts";
import { whole } from "./facility-words.ts";
import { BlockCard } from "./components/facility-block-card.tsx";
import { KeyFacts } from "./components/facility-key-facts.tsx";
import { SystemCard } from "./components/facility-system-card.tsx";
import { ProjectMasthead } from "./components/project-nav.tsx";
import { useTitle } from "../../lib/use-title.ts";
import { sitePlanQueryOptions } from "../../lib/site-plan.ts";
import { SitePlanSection } from "./components/site-plan-section.tsx";

/*
 * The facility as a prospect reads it. The page shows what the public may see, whoever reads it
 * (a signed-in investor or lead sees what a visitor sees, as on the public timeline): the answer
 * is filtered to public blocks, systems and features here, and a block lists only public plant.
 */

/** The public part of the caller's answer: a system's labels count all its units, whoever sees it. */
export function publicPart(f: FacilityAnswer): FacilityAnswer {
  const systems = f.systems.filter((s) => s.audience === "public");
  const shown = new Set(systems.map((s) => s.id));
  return {
    ...f,
    blocks: f.blocks.filter((b) => b.audience === "public").map((b) => ({ ...b, systemIds: b.systemIds.filter((id) => shown.has(id)) })),
    systems,
    features: f.features.filter((x) => x.audience === "public"),
  };
}

export const facilityLoader: RouteLoader = (qc) => async ({ params }) => {
  const slug = params.slug ?? "";
  await Promise.all([qc.ensureQueryData(siteProjectQueryOptions(slug)), qc.ensureQueryData(facilityReadQueryOptions(slug)), qc.ensureQueryData(sitePlanQueryOptions(slug))]);
  return null;
};

/** The newest cleared photos tagged with a block or a system: a row of three, each opening the gallery. */
function Photos({ slug, about, name }: { slug: string; about: PhotoSubject; name: string }) {
  const items = usePhotosOf(slug, about);
  if (items.length === 0) return null;
  const filter = `${about.kind}=${about.id}`;
  return (
    <div>
      <p className="mb-1.5 text-xs text-ink-soft">Latest photographs of {name}</p>
      <ul className="grid grid-cols-3 gap-1.5">
        {items.map((p) => (
          <li key={p.id}>
            <Link to={`/projects/${slug}/gallery?${filter}`} className="block overflow-hidden border border-rule" aria-label={`More photographs of ${name}: ${p.altText || p.caption || "site photograph"}`}>
              <Picture picture={p} fit="cover" aspect={4 / 3} sizes="(min-width: 1024px) 10rem, 30vw" />
            </Link>
          </li>
        ))}
      </ul>
    </div>
  );
}

/** `/projects/:slug/facility`: capacity blocks, plant redundancy and the key facts, for prospects. */
export function FacilityPage() {
  const { slug = "" } = useParams();
  const project = useSuspenseQuery(siteProjectQueryOptions(slug)).data;
  const f = publicPart(useSuspenseQuery(facilityReadQueryOptions(slug)).data);
  useTitle("Capacity and readiness", project.name);
  const racks = f.blocks.reduce((s, b) => s + b.racks, 0);
  const kw = f.blocks.reduce((s, b) => s + b.itKw, 0);
  const blockName = new Map(f.blocks.map((b) => [b.id, b.name]));
  return (
    <div className="mx-auto max-w-6xl px-4 py-8">
      <ProjectMasthead slug={slug} projectName={project.name} operatorName={project.operatorName} />
      <h1 className="mt-6 text-3xl font-semibold tracking-tight">Capacity and readiness</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">
        {f.blocks.length > 0
          ? `${f.blocks.length} capacity ${f.blocks.length === 1 ? "block" : "blocks"}: ${whole(racks)} racks and ${whole(kw)} kW of IT load in all. When each is ready for service, what it is waiting for, and how resilient the plant is today.`
          : "The capacity of this build has not been published yet."}
      </p>
      <p className="mt-1 text-sm text-ink-soft">Dates are the operator's current forecasts and change as work goes on.</p>

      {f.blocks.length > 0 ? (
        <section aria-labelledby="blocks-h" className="mt-8">
          <h2 id="blocks-h" className="border-b-2 border-ink pb-2 text-xl font-semibold">
            Capacity blocks
          </h2>
          <div className="mt-4 grid gap-4 md:grid-cols-2 xl:grid-cols-3">
            {f.blocks.map((b) => (
              <BlockCard
                key={b.id}
                block={b}
                systems={f.systems}
                slug={slug}
                updatesHref={`/projects/${slug}/updates?block=${b.id}`}
                photos={<Photos slug={slug} about={{ kind: "block", id: b.id }} name={b.name} />}
              />
            ))}
          </div>
        </section>
      ) : null}

      <SitePlanSection slug={slug} className="mt-10" />

      {f.systems.length > 0 ? (
        <section aria-labelledby="plant-h" className="mt-10">
          <h2 id="plant-h" className="border-b-2 border-ink pb-2 text-xl font-semibold">
            Plant and its redundancy
          </h2>
          <p className="mt-2 max-w-3xl text-sm text-ink-soft">
            Each square is one unit. N is the number of units that carry the design load; N+1 has one to spare. “Design” is the redundancy when every planned unit is in service; “now” counts only units commissioned to L{f.availableFromLevel} or beyond.
          </p>
          <div className="mt-4 grid gap-4 md:grid-cols-2 xl:grid-cols-3">
            {f.systems.map((s) => (
              <SystemCard key={s.id} system={s} blockNames={s.serves.flatMap((id) => blockName.get(id) ?? [])} photos={<Photos slug={slug} about={{ kind: "plant", id: s.id }} name={s.name} />} />
            ))}
          </div>
        </section>
      ) : null}

      <section aria-labelledby="facts-h" className="mt-10">
        <h2 id="facts-h" className="border-b-2 border-ink pb-2 text-xl font-semibold">
          Key facts
        </h2>
        <div className="mt-4">
          <KeyFacts facility={f} slug={slug} visitsOffered={project.visitsOffered} />
        </div>
      </section>
    </div>
  );
}
