/**
 * The top of a feature's key factory: `feature` → `projects` (its project picker's list) and
 * `feature` → `project(slug)` (everything of one project, so invalidating that one key refreshes
 * every read of the project). A feature spreads these and adds its own kinds beneath them.
 */
export function featureKeys<const F extends string>(feature: F) {
  const all = [feature] as const;
  return {
    all,
    projects: () => [...all, "projects"] as const,
    project: (slug: string) => [...all, "project", slug] as const,
  };
}
