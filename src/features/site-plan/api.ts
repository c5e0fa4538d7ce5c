import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type { SiteArea, SiteAreaCreateInput, SiteAreaPatchInput } from "#shared/schemas/site-plan.ts";
import { api } from "../../lib/api-client.ts";
import { projectListQueryOptions } from "../../lib/projects.ts";
import { sitePlanKeys } from "../../lib/site-plan.ts";

export { sitePlanQueryOptions } from "../../lib/site-plan.ts";

export const sitePlanProjectsQueryOptions = () => projectListQueryOptions(sitePlanKeys.projects());

/** The area names the programme's milestones already use: offered as an area's name, as a mistyped name finds no status and no photos. */
export const areaNamesQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: [...sitePlanKeys.project(slug), "area-names"] as const,
    queryFn: async () => [...new Set((await api.get<Array<{ area: string }>>(`/api/projects/${slug}/milestones`)).map((m) => m.area).filter(Boolean))].sort(),
  });

/** Leads and administrators draw the plan; marketing reads it. */
export function canEditSitePlan(user: User | null | undefined): boolean {
  return user?.role === "lead" || user?.role === "admin";
}

/** A write to the plan of `slug`: forms show their own errors, and the plan is read again after it (every page shares its key). */
function usePlanWrite<V, R>(slug: string, write: (vars: V) => Promise<R>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: write, meta: { quiet: true }, onSettled: () => void qc.invalidateQueries({ queryKey: sitePlanKeys.project(slug) }) });
}

export const useCreateArea = (slug: string) => usePlanWrite(slug, (input: SiteAreaCreateInput) => api.post<SiteArea>(`/api/projects/${slug}/site-areas`, input));
export const usePatchArea = (slug: string) => usePlanWrite(slug, ({ id, patch }: { id: number; patch: SiteAreaPatchInput }) => api.patch<SiteArea>(`/api/site-areas/${id}`, patch));
export const useDeleteArea = (slug: string) => usePlanWrite(slug, ({ id }: { id: number }) => api.delete<void>(`/api/site-areas/${id}`));
