import { queryOptions } from "@tanstack/react-query";
import type { SiteArea, SitePlan } from "#shared/schemas/site-plan.ts";
import { api } from "./api-client.ts";
import { featureKeys } from "./query-keys.ts";

/*
 * The site plan as every page reads it (the office editor, the public facility and project
 * pages, the gallery's filter, the site walk): one key per project, so the editor's writes
 * invalidate every page's copy, and features need not import one another.
 */

export const sitePlanKeys = {
  ...featureKeys("site-plan"),
  plan: (slug: string) => [...sitePlanKeys.project(slug), "plan"] as const,
};

export const sitePlanQueryOptions = (slug: string) =>
  queryOptions({ queryKey: sitePlanKeys.plan(slug), queryFn: () => api.get<SitePlan>(`/api/projects/${slug}/site-plan`), enabled: slug !== "" });

/** The public part of a plan: what the public pages draw whoever reads them, as they do for the facility. */
export function publicPlan(plan: SitePlan): SitePlan {
  return { ...plan, areas: plan.areas.filter((a: SiteArea) => a.audience === "public") };
}
