import { Link, useParams } from "react-router-dom";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { useProject, useProjects } from "../../features/projects/api.ts";

export function InvestorHomePage() {
  const projects = useProjects();
  return (
    <>
      <PageHeader sheet="Investor room" title="Your projects" description="Programme health, capacity and documents of the builds you follow." />
      {projects.isPending ? (
        <Spinner />
      ) : projects.isError ? (
        <Notice tone="error">{projects.error.message}</Notice>
      ) : (
        <ul className="grid gap-4 md:grid-cols-2">
          {projects.data.map((p) => (
            <li key={p.id}>
              <Link to={`/investors/projects/${p.slug}`} className="block border border-rule bg-sheet p-5 hover:border-ink">
                <p className="label-caps">{p.operatorName}</p>
                <h2 className="mt-1 text-lg font-semibold">{p.name}</h2>
                <p className="mt-2 line-clamp-2 text-sm text-ink-soft">{p.description}</p>
              </Link>
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
      <Sheet label="Programme" title="Programme health">
        <p className="text-sm text-ink-soft">Health figures appear here once the programme is kept in Plumbline.</p>
      </Sheet>
    </>
  );
}
