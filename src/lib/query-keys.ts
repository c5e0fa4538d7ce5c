import { queryOptions, type QueryKey } from "@tanstack/react-query";
import { api } from "./api-client.ts";

/**
 * The top of a feature's key factory: `feature` → `projects` (its project picker's list) and
 * `feature` → `project(slug)` (everything of one project, so invalidating that one key refreshes
 * every read of the project), and one key a kind of the project's reads the feature names
 * (`feature` → `project(slug)` → `kind`). A feature spreads these and adds its other keys beside them.
 */
export function featureKeys<const F extends string, const K extends string = never>(feature: F, kinds: readonly K[] = []) {
  const all = [feature] as const;
  const project = (slug: string) => [...all, "project", slug] as const;
  const ofProject = Object.fromEntries(kinds.map((kind) => [kind, (slug: string) => [...project(slug), kind] as const])) as { [P in K]: (slug: string) => readonly [F, "project", string, P] };
  return { all, projects: () => [...all, "projects"] as const, project, ...ofProject };
}

/** The read of one address (GET, JSON) under the caller's key. */
export const readOptions = <T>(queryKey: QueryKey, path: string) => queryOptions({ queryKey, queryFn: () => api.get<T>(path) });
