import { Router } from "express";
import { SiteAreaCreateInputSchema, SiteAreaPatchInputSchema } from "#shared/schemas/site-plan.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
import type { SitePlanService } from "./site-plan.service.ts";

const writers = () => requireRole("lead", "admin");

/**
 * The site plan. The plan is open to every caller, shown by audience in the service; drawing,
 * moving and deleting areas is for leads and administrators.
 */
export function sitePlanRouter(sitePlan: SitePlanService): Router {
  const r = Router();

  r.get("/projects/:slug/site-plan", route(projectPath, ({ params, actor }) => sitePlan.plan(params.slug, actor)));
  r.post("/projects/:slug/site-areas", writers(), route({ ...projectPath, body: SiteAreaCreateInputSchema, status: 201 }, ({ params, body, actor }) => sitePlan.create(params.slug, body, actor)));
  r.patch("/site-areas/:id", writers(), route({ ...itemPath, body: SiteAreaPatchInputSchema }, ({ params, body, actor }) => sitePlan.patch(params.id, body, actor)));
  r.delete("/site-areas/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => sitePlan.delete(params.id, actor)));

  return r;
}
