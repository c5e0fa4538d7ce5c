import { NavLink } from "react-router-dom";

/** The public pages of one project, as a row of links under its name. */
export function ProjectNav({ slug }: { slug: string }) {
  const links = [
    { to: `/projects/${slug}`, label: "Overview", end: true },
    { to: `/projects/${slug}/updates`, label: "Updates" },
    { to: `/projects/${slug}/gallery`, label: "Gallery" },
    { to: `/projects/${slug}/timeline`, label: "Timeline" },
    { to: `/projects/${slug}/facility`, label: "Capacity" },
    { to: `/projects/${slug}/search`, label: "Search" },
  ];
  return (
    <nav aria-label="This project" className="-mx-4 mt-4 overflow-x-auto border-b border-rule px-4">
      <ul className="flex gap-1">
        {links.map((l) => (
          <li key={l.to}>
            <NavLink
              to={l.to}
              end={l.end}
              className={({ isActive }) => `block whitespace-nowrap border-b-2 px-3 py-2 text-sm ${isActive ? "border-ink font-semibold text-ink" : "border-transparent text-ink-soft hover:text-ink"}`}
            >
              {l.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}

/** The head of a project's public page: whose build, its name, the project's links. */
export function ProjectMasthead({ slug, projectName, operatorName }: { slug: string; projectName?: string; operatorName?: string }) {
  return (
    <div>
      <p className="label-caps">
        {operatorName ? `${operatorName} · ` : ""}
        <NavLink to={`/projects/${slug}`} className="underline underline-offset-4">
          {projectName ?? slug}
        </NavLink>
      </p>
      <ProjectNav slug={slug} />
    </div>
  );
}
