import { Link, useParams } from "react-router-dom";
import { Notice, Spinner } from "../../components/ui/sheet.tsx";
import { useProject, useProjects } from "./api.ts";
import { SiteVisitRules } from "./components/site-visit-rules.tsx";

export function HomePage() {
  const projects = useProjects();
  return (
    <div className="mx-auto max-w-5xl px-4 py-10">
      <p className="label-caps">Construction progress</p>
      <h1 className="mt-1 max-w-3xl text-3xl font-semibold tracking-tight sm:text-4xl">What is being built, and when it will be ready</h1>
      <p className="mt-3 max-w-2xl text-ink-soft">Progress of each build, published by its operator: the programme, photographs from the site walks, and the date each hall is forecast to be ready for service.</p>
      <div className="mt-8">
        {projects.isPending ? (
          <Spinner />
        ) : projects.isError ? (
          <Notice tone="error">{projects.error.message}</Notice>
        ) : (
          <ul className="grid gap-4 sm:grid-cols-2">
            {projects.data.map((p) => (
              <li key={p.id}>
                <Link to={`/projects/${p.slug}`} className="block h-full border border-rule bg-sheet p-5 hover:border-ink">
                  <p className="label-caps">{p.operatorName}</p>
                  <h2 className="mt-1 text-xl font-semibold">{p.name}</h2>
                  <p className="mt-2 line-clamp-3 text-sm text-ink-soft">{p.description}</p>
                  <p className="mt-4 text-sm font-medium text-accent">Follow this build →</p>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}

export function ProjectHomePage() {
  const { slug = "" } = useParams();
  const project = useProject(slug);
  if (project.isPending) return <Spinner />;
  if (project.isError) {
    return (
      <div className="mx-auto max-w-3xl px-4 py-10">
        <Notice tone="error" title="Project not found">
          {project.error.message}
        </Notice>
      </div>
    );
  }
  const p = project.data;
  return (
    <div className="mx-auto max-w-5xl px-4 py-10">
      <p className="label-caps">
        {p.operatorName} · {p.locationLabel}
      </p>
      <h1 className="mt-1 text-3xl font-semibold tracking-tight sm:text-4xl">{p.name}</h1>
      <p className="mt-4 max-w-3xl font-serif text-lg leading-relaxed">{p.description}</p>
      <div className="mt-8 grid gap-6 md:grid-cols-[2fr_1fr]">
        <section className="border border-rule bg-sheet p-5">
          <h2 className="font-semibold">Progress</h2>
          <p className="mt-2 text-sm text-ink-soft">The programme, updates and photographs of this build are published here as the work goes on. Times on this page are in {p.timeZone.replace("_", " ")}.</p>
        </section>
        {p.visitsOffered ? <SiteVisitRules /> : null}
      </div>
    </div>
  );
}
