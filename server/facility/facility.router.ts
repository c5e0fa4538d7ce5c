import { Router } from "express";
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
import { requireRole, requireStaff } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
import type { FacilityService } from "./facility.service.ts";

const writers = () => requireRole("lead", "admin");

/**
 * The facility API. The facility itself is open to every caller and shown by audience in the
 * service (staff alone may ask for another day); a unit's history follows its system's
 * audience; the project's event list is staff's; writes are for leads and admins.
 */
export function facilityRouter(facility: FacilityService): Router {
  const r = Router();

  r.get("/projects/:slug/facility", route({ ...projectPath, query: FacilityQuerySchema }, ({ params, query, actor }) => facility.facility(params.slug, query, actor)));
  r.get("/projects/:slug/facility/events", requireStaff(), route({ ...projectPath, query: FacilityEventsQuerySchema }, ({ params, query }) => facility.projectEvents(params.slug, query)));

  r.put("/projects/:slug/facility/settings", writers(), route({ ...projectPath, body: FacilitySettingsInputSchema, headers: { "Cache-Control": "private, no-store" } }, ({ params, body, actor }) => facility.putSettings(params.slug, body, actor)));
  r.post("/projects/:slug/facility/blocks", writers(), route({ ...projectPath, body: BlockCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createBlock(params.slug, body, actor)));
  r.patch("/facility/blocks/:id", writers(), route({ ...itemPath, body: BlockPatchInputSchema }, ({ params, body, actor }) => facility.patchBlock(params.id, body, actor)));
  r.delete("/facility/blocks/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => facility.deleteBlock(params.id, actor)));

  r.post("/projects/:slug/facility/systems", writers(), route({ ...projectPath, body: SystemCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createSystem(params.slug, body, actor)));
  r.patch("/facility/systems/:id", writers(), route({ ...itemPath, body: SystemPatchInputSchema }, ({ params, body, actor }) => facility.patchSystem(params.id, body, actor)));
  r.delete("/facility/systems/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => facility.deleteSystem(params.id, actor)));

  // A new unit of the system `:id`.
  r.post("/facility/systems/:id/units", writers(), route({ ...itemPath, body: UnitCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createUnit(params.id, body, actor)));
  r.patch("/facility/units/:id", writers(), route({ ...itemPath, body: UnitPatchInputSchema }, ({ params, body, actor }) => facility.patchUnit(params.id, body, actor)));
  r.post("/facility/units/:id/stage", writers(), route({ ...itemPath, body: UnitStageInputSchema }, ({ params, body, actor }) => facility.setUnitStage(params.id, body, actor)));
  r.get("/facility/units/:id/events", route(itemPath, ({ params, actor }) => facility.unitEvents(params.id, actor)));
  r.delete("/facility/units/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => facility.deleteUnit(params.id, actor)));

  r.post("/projects/:slug/facility/features", writers(), route({ ...projectPath, body: FeatureCreateInputSchema, status: 201 }, ({ params, body, actor }) => facility.createFeature(params.slug, body, actor)));
  r.patch("/facility/features/:id", writers(), route({ ...itemPath, body: FeaturePatchInputSchema }, ({ params, body, actor }) => facility.patchFeature(params.id, body, actor)));
  r.delete("/facility/features/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => facility.deleteFeature(params.id, actor)));

  return r;
}
