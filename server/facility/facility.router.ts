import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import {
  BlockCreateInputSchema,
  BlockPatchInputSchema,
  FacilityEventsQuerySchema,
  FacilityQuerySchema,
  FacilitySettingsInputSchema,
  FeatureCreateInputSchema,
  FeaturePatchInputSchema,
  SystemCreateInputSchema,
  SystemPatchInputSchema,
  UnitCreateInputSchema,
  UnitPatchInputSchema,
  UnitStageInputSchema,
} from "#shared/schemas/facility.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requireRole, requireStaff } from "../core/auth.ts";
import { route } from "../core/route.ts";
import type { FacilityService } from "./facility.service.ts";

const writers = () => requireRole("lead", "admin");

/**
 * The facility API. The facility itself is open to every caller and shown by audience in the
 * service (staff alone may ask for another day); a unit's history follows its system's
 * audience; the project's event list is staff's; writes are for leads and admins.
 */
export function facilityRouter(facility: FacilityService): Router {
  const r = Router();
  const project = { params: SlugParamSchema };
  const item = { params: IdParamSchema };

  r.get("/projects/:slug/facility", route({ ...project, query: FacilityQuerySchema }, ({ params, query, actor }) => facility.facility(params.slug, query, actor)));
  r.get("/projects/:slug/facility/events", requireStaff(), route({ ...project, query: FacilityEventsQuerySchema }, ({ params, query }) => facility.projectEvents(params.slug, query)));

  r.put("/projects/:slug/facility/settings", writers(), route({ ...project, body: FacilitySettingsInputSchema, headers: { "Cache-Control": "private, no-store" } }, ({ params, body, actor }) => facility.putSettings(params.slug, body, actor)));
  r.post("/projects/:slug/facility/blocks", writers(), route({ ...project, body: BlockCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createBlock(params.slug, body, actor)));
  r.patch("/facility/blocks/:id", writers(), route({ ...item, body: BlockPatchInputSchema }, ({ params, body, actor }) => facility.patchBlock(params.id, body, actor)));
  r.delete("/facility/blocks/:id", writers(), route({ ...item, status: 204 }, ({ params, actor }) => facility.deleteBlock(params.id, actor)));

  r.post("/projects/:slug/facility/systems", writers(), route({ ...project, body: SystemCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createSystem(params.slug, body, actor)));
  r.patch("/facility/systems/:id", writers(), route({ ...item, body: SystemPatchInputSchema }, ({ params, body, actor }) => facility.patchSystem(params.id, body, actor)));
  r.delete("/facility/systems/:id", writers(), route({ ...item, status: 204 }, ({ params, actor }) => facility.deleteSystem(params.id, actor)));

  // A new unit of the system `:id`.
  r.post("/facility/systems/:id/units", writers(), route({ ...item, body: UnitCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createUnit(params.id, body, actor)));
  r.patch("/facility/units/:id", writers(), route({ ...item, body: UnitPatchInputSchema }, ({ params, body, actor }) => facility.patchUnit(params.id, body, actor)));
  r.post("/facility/units/:id/stage", writers(), route({ ...item, body: UnitStageInputSchema }, ({ params, body, actor }) => facility.setUnitStage(params.id, body, actor)));
  r.get("/facility/units/:id/events", route(item, ({ params, actor }) => facility.unitEvents(params.id, actor)));
  r.delete("/facility/units/:id", writers(), route({ ...item, status: 204 }, ({ params, actor }) => facility.deleteUnit(params.id, actor)));

  r.post("/projects/:slug/facility/features", writers(), route({ ...project, body: FeatureCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createFeature(params.slug, body, actor)));
  r.patch("/facility/features/:id", writers(), route({ ...item, body: FeaturePatchInputSchema }, ({ params, body, actor }) => facility.patchFeature(params.id, body, actor)));
  r.delete("/facility/features/:id", writers(), route({ ...item, status: 204 }, ({ params, actor }) => facility.deleteFeature(params.id, actor)));

  return r;
}
