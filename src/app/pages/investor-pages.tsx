import { Link, useParams } from "react-router-dom";
import { Notice, PageHeader, Spinner } from "../../components/ui/sheet.tsx";
import { InvestorProgramme } from "../../features/programme/components/investor-programme.tsx";
import { ProjectHealthSummary } from "../../features/programme/components/programme-summary.tsx";
import { useProject, useProjects } from "../../features/projects/api.ts";

export function InvestorHomePage() {
  const projects = useProjects();
  return (
    <>
      <PageHeader sheet="Investor room" title="Your projects" description="Programme health, capacity and documents of the builds you follow. Figures are computed over the milestones shared with investors." />
      {projects.isPending ? (
        <Spinner />
      ) : projects.isError ? (
        <Notice tone="error">{projects.error.message}</Notice>
      ) : (
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
      )}
    </>
  );
}

export function InvestorProjectPage() {
  const { slug = "" } = useParams();
  const project = useProject(slug);
  if (project.isPending) return <Spinner />;
  if (project.isError) return <Notice tone="error">{project.error.message}</Notice>;
  return (
    <>
      <PageHeader sheet="Investor room · Project" title={project.data.name} description={project.data.description} />
      <InvestorProgramme slug={slug} currency={project.data.currency} />
    </>
  );
}
