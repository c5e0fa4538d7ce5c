import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { PageHeader } from "../../components/ui/sheet.tsx";
import { InvestorProgramme } from "../../features/programme/components/investor-programme.tsx";
import { ProjectHealthSummary } from "../../features/programme/components/programme-summary.tsx";
import { projectQueryOptions, projectsQueryOptions } from "../../features/projects/api.ts";
import { InvestorFacility } from "../../features/public-site/components/facility-investor.tsx";
import { INVESTOR_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";

export const investorHomeLoader: RouteLoader = (qc) => () => primeWhenAllowed(qc, INVESTOR_ROLES, () => qc.ensureQueryData(projectsQueryOptions()));

export const investorProjectLoader: RouteLoader = (qc) => ({ params }) => primeWhenAllowed(qc, INVESTOR_ROLES, () => qc.ensureQueryData(projectQueryOptions(params.slug ?? "")));

export function InvestorHomePage() {
  const projects = useSuspenseQuery(projectsQueryOptions());
  return (
    <>
      <PageHeader sheet="Investor room" title="Your projects" description="Programme health, capacity and documents of the builds you follow. Figures are computed over the milestones shared with investors." />
      <ul className="grid gap-4 lg:grid-cols-2">
          {projects.data.map((p) => (
            <li key={p.id} className="flex flex-col gap-3 border border-rule bg-sheet p-5">
              <div>
                <p className="label-caps">{p.operatorName}</p>
                <h2 className="mt-1 text-lg font-semibold">
                  <Link to={`/investors/projects/${p.slug}`} className="underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
                    {p.name}
                  </Link>
                </h2>
                <p className="mt-1 line-clamp-2 text-sm text-ink-soft">{p.description}</p>
              </div>
              <ProjectHealthSummary slug={p.slug} href={`/investors/projects/${p.slug}`} linkLabel="Programme health, charts and what moved" />
            </li>
          ))}
        </ul>
    </>
  );
}

export function InvestorProjectPage() {
  const { slug = "" } = useParams();
  const project = useSuspenseQuery(projectQueryOptions(slug));
  return (
    <>
      <PageHeader
        sheet="Investor room · Project"
        title={project.data.name}
        description={project.data.description}
        actions={
          <a href="#facility" className="text-sm font-medium underline underline-offset-4">
            Capacity ramp and readiness ↓
          </a>
        }
      />
      <div className="flex flex-col gap-6">
        <InvestorProgramme slug={slug} currency={project.data.currency} />
        <InvestorFacility slug={slug} />
      </div>
    </>
  );
}
