import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import {
  BlockCreateInputSchema,
  BlockPatchInputSchema,
  FacilityEventsQuerySchema,
  FacilityQuerySchema,
  FeatureCreateInputSchema,
  FeaturePatchInputSchema,
  SystemCreateInputSchema,
  SystemPatchInputSchema,
  UnitCreateInputSchema,
  UnitPatchInputSchema,
  UnitStageInputSchema,
} from "#shared/schemas/facility.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole, requireStaff } from "../core/auth.ts";
import type { FacilityService } from "./facility.service.ts";

const writers = () => requireRole("lead", "admin");

/**
 * The facility API. The facility itself is open to every caller and shown by audience in the
 * service (staff alone may ask for another day); a unit's history follows its system's
 * audience; the project's event list is staff's; writes are for leads and admins.
 */
export function facilityRouter(facility: FacilityService): Router {
  const r = Router();

  r.get("/projects/:slug/facility", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = FacilityQuerySchema.parse({ ...req.query });
    res.json(await facility.facility(slug, query, actorOf(req)));
  });
  r.get("/projects/:slug/facility/events", requireStaff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const range = FacilityEventsQuerySchema.parse({ ...req.query });
    res.json(await facility.projectEvents(slug, range));
  });

  r.post("/projects/:slug/facility/blocks", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = BlockCreateInputSchema.parse(req.body);
    res.status(201).json(await facility.createBlock(slug, input, actorOf(req)));
  });
  r.patch("/facility/blocks/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = BlockPatchInputSchema.parse(req.body);
    res.json(await facility.patchBlock(id, input, actorOf(req)));
  });
  r.delete("/facility/blocks/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await facility.deleteBlock(id, actorOf(req));
    res.status(204).end();
  });

  r.post("/projects/:slug/facility/systems", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = SystemCreateInputSchema.parse(req.body);
    res.status(201).json(await facility.createSystem(slug, input, actorOf(req)));
  });
  r.patch("/facility/systems/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = SystemPatchInputSchema.parse(req.body);
    res.json(await facility.patchSystem(id, input, actorOf(req)));
  });
  r.delete("/facility/systems/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await facility.deleteSystem(id, actorOf(req));
    res.status(204).end();
  });

  r.post("/facility/systems/:id/units", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = UnitCreateInputSchema.parse(req.body);
    res.status(201).json(await facility.createUnit(id, input, actorOf(req)));
  });
  r.patch("/facility/units/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = UnitPatchInputSchema.parse(req.body);
    res.json(await facility.patchUnit(id, input, actorOf(req)));
  });
  r.post("/facility/units/:id/stage", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = UnitStageInputSchema.parse(req.body);
    res.json(await facility.setUnitStage(id, input, actorOf(req)));
  });
  r.get("/facility/units/:id/events", async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await facility.unitEvents(id, actorOf(req)));
  });
  r.delete("/facility/units/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await facility.deleteUnit(id, actorOf(req));
    res.status(204).end();
  });

  r.post("/projects/:slug/facility/features", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = FeatureCreateInputSchema.parse(req.body);
    res.status(201).json(await facility.createFeature(slug, input, actorOf(req)));
  });
  r.patch("/facility/features/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = FeaturePatchInputSchema.parse(req.body);
    res.json(await facility.patchFeature(id, input, actorOf(req)));
  });
  r.delete("/facility/features/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await facility.deleteFeature(id, actorOf(req));
    res.status(204).end();
  });

  return r;
}
