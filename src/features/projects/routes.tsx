import { useSuspenseQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { projectsQueryOptions } from "./api.ts";

export const homeLoader: RouteLoader = (qc) => async () => {
  await qc.ensureQueryData(projectsQueryOptions());
  return null;
};

export function HomePage() {
  const projects = useSuspenseQuery(projectsQueryOptions());
  useTitle("What is being built", "Plumbline");
  return (
    <div className="mx-auto max-w-5xl px-4 py-10">
      <p className="label-caps">Construction progress</p>
      <h1 className="mt-1 max-w-3xl text-3xl font-semibold tracking-tight sm:text-4xl">What is being built, and when it will be ready</h1>
      <p className="mt-3 max-w-2xl text-ink-soft">Progress of each build, published by its operator: the programme, photographs from the site walks, and the date each hall is forecast to be ready for service.</p>
      <div className="mt-8">
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
      </div>
    </div>
  );
}
