import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { SiteAreaCreateInputSchema, SiteAreaPatchInputSchema } from "#shared/schemas/site-plan.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { SitePlanService } from "./site-plan.service.ts";

const writers = () => requireRole("lead", "admin");

/**
 * The site plan. The plan is open to every caller, shown by audience in the service; drawing,
 * moving and deleting areas is for leads and administrators.
 */
export function sitePlanRouter(sitePlan: SitePlanService): Router {
  const r = Router();

  r.get("/projects/:slug/site-plan", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await sitePlan.plan(slug, actorOf(req)));
  });
  r.post("/projects/:slug/site-areas", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = SiteAreaCreateInputSchema.parse(req.body);
    res.status(201).json(await sitePlan.create(slug, input, actorOf(req)));
  });
  r.patch("/site-areas/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = SiteAreaPatchInputSchema.parse(req.body);
    res.json(await sitePlan.patch(id, input, actorOf(req)));
  });
  r.delete("/site-areas/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await sitePlan.delete(id, actorOf(req));
    res.status(204).end();
  });

  return r;
}
