import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Project } from "#shared/schemas/projects.ts";
import { api } from "../../lib/api-client.ts";
import { projectListQueryOptions } from "../../lib/projects.ts";

export const projectKeys = {
  all: ["projects"] as const,
  list: () => [...projectKeys.all, "list"] as const,
  detail: (slug: string) => [...projectKeys.all, "detail", slug] as const,
};

export const projectsQueryOptions = () => projectListQueryOptions(projectKeys.list());
export const projectQueryOptions = (slug: string) => queryOptions({ queryKey: projectKeys.detail(slug), queryFn: () => api.get<Project>(`/api/projects/${slug}`) });

export const useProjects = () => useQuery(projectsQueryOptions());
