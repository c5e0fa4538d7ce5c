import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Hero, HeroInput, Home } from "#shared/schemas/project-hero.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { api } from "../../lib/api-client.ts";
import { projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { readOptions } from "../../lib/query-keys.ts";

export const projectKeys = {
  all: ["projects"] as const,
  list: () => [...projectKeys.all, "list"] as const,
  detail: (slug: string) => [...projectKeys.all, "detail", slug] as const,
  hero: (slug: string) => [...projectKeys.all, "hero", slug] as const,
  home: () => [...projectKeys.all, "home"] as const,
};

export const projectsQueryOptions = () => projectListQueryOptions(projectKeys.list());
export const projectQueryOptions = (slug: string) => readOptions<Project>(projectKeys.detail(slug), `/api/projects/${slug}`);
/** The project's chosen hero photograph (decision 055). */
export const heroQueryOptions = (slug: string) => projectReadOptions<Hero>(projectKeys.hero(slug), slug, "hero");
/** The home page's builds: picture, figure and next ready-for-service date of each. */
export const homeQueryOptions = () => readOptions<Home>(projectKeys.home(), "/api/home");

export const useProjects = () => useQuery(projectsQueryOptions());
export const useHero = (slug: string) => useQuery(heroQueryOptions(slug));

/** Choose or clear the hero (leads and admins). */
export function useSetHero(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: HeroInput) => api.put<Hero>(`/api/projects/${slug}/hero`, input),
    onSuccess: (hero) => {
      qc.setQueryData(projectKeys.hero(slug), hero);
      void qc.invalidateQueries({ queryKey: projectKeys.home() });
    },
  });
}
