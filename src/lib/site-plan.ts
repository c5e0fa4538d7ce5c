import type { SiteArea, SitePlan } from "#shared/schemas/site-plan.ts";
import { featureKeys } from "./query-keys.ts";
import { projectReadOptions } from "./projects.ts";

/*
 * The site plan as every page reads it (the office editor, the public facility and project
 * pages, the gallery's filter, the site walk): one key per project, so the editor's writes
 * invalidate every page's copy, and features need not import one another.
 */

export const sitePlanKeys = featureKeys("site-plan", ["plan"]);

export const sitePlanQueryOptions = (slug: string) => projectReadOptions<SitePlan>(sitePlanKeys.plan(slug), slug, "site-plan");

/** The public part of a plan: what the public pages draw whoever reads them, as they do for the facility. */
export function publicPlan(plan: SitePlan): SitePlan {
  return { ...plan, areas: plan.areas.filter((a: SiteArea) => a.audience === "public") };
}
