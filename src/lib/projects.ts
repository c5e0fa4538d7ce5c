import { queryOptions, type QueryClient, type QueryKey } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import type { Project } from "#shared/schemas/projects.ts";
import { api } from "./api-client.ts";

/*
 * The projects the caller may see, and one project, as several features ask for them. Each
 * feature keeps them under its own key (features never import each other, and a feature's
 * invalidation reaches its own entries); the request is made here once.
 */

/** GET /api/projects under the caller's key. */
export const projectListQueryOptions = (queryKey: QueryKey) => queryOptions({ queryKey, queryFn: () => api.get<Project[]>("/api/projects") });

/** GET /api/projects/:slug under the caller's key; waits while there is no slug yet. */
export const projectDetailQueryOptions = (queryKey: QueryKey, slug: string) =>
  queryOptions({ queryKey, queryFn: () => api.get<Project>(`/api/projects/${slug}`), enabled: slug !== "" });

/** GET /api/projects/:slug/<path> (one of the project's own reads) under the caller's key; waits while there is no slug yet. */
export const projectReadOptions = <T>(queryKey: QueryKey, slug: string, path: string) =>
  queryOptions({ queryKey, queryFn: () => api.get<T>(`/api/projects/${slug}/${path}`), enabled: slug !== "" });

/**
 * The project a site-office page works on: `?project=` or the first one. Choosing another
 * keeps the page's other parameters.
 */
export function useProjectParam(projects: readonly Project[] | undefined): { slug: string; choices: Array<{ value: string; label: string }>; setSlug: (s: string) => void } {
  const [params, setParams] = useSearchParams();
  const slug = params.get("project") ?? projects?.[0]?.slug ?? "";
  return {
    slug,
    choices: (projects ?? []).map((p) => ({ value: p.slug, label: p.name })),
    setSlug: (s) =>
      setParams((prev) => {
        const next = new URLSearchParams(prev);
        next.set("project", s);
        return next;
      }),
  };
}

/** In a loader: the project a site-office page will work on (`?project=` or the first one), with the list primed. */
export async function officeProjectSlug(qc: QueryClient, list: ReturnType<typeof projectListQueryOptions>, search: URLSearchParams): Promise<string> {
  const projects = await qc.ensureQueryData(list);
  return search.get("project") ?? projects[0]?.slug ?? "";
}
