import { Router, type RequestHandler } from "express";
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
import { actorOf, requireRole, requireStaff } from "../core/auth.ts";
import type { Actor } from "../core/types.ts";
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

  r.put("/projects/:slug/facility/settings", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.set("Cache-Control", "private, no-store").json(await facility.putSettings(slug, FacilitySettingsInputSchema.parse(req.body), actorOf(req)));
  });
  r.post("/projects/:slug/facility/blocks", writers(), createInProject(BlockCreateInputSchema, facility.createBlock));
  r.patch("/facility/blocks/:id", writers(), writeEntry(BlockPatchInputSchema, facility.patchBlock));
  r.delete("/facility/blocks/:id", writers(), deleteEntry(facility.deleteBlock));

  r.post("/projects/:slug/facility/systems", writers(), createInProject(SystemCreateInputSchema, facility.createSystem));
  r.patch("/facility/systems/:id", writers(), writeEntry(SystemPatchInputSchema, facility.patchSystem));
  r.delete("/facility/systems/:id", writers(), deleteEntry(facility.deleteSystem));

  r.post("/facility/systems/:id/units", writers(), writeEntry(UnitCreateInputSchema, facility.createUnit, 201));
  r.patch("/facility/units/:id", writers(), writeEntry(UnitPatchInputSchema, facility.patchUnit));
  r.post("/facility/units/:id/stage", writers(), writeEntry(UnitStageInputSchema, facility.setUnitStage));
  r.get("/facility/units/:id/events", async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await facility.unitEvents(id, actorOf(req)));
  });
  r.delete("/facility/units/:id", writers(), deleteEntry(facility.deleteUnit));

  r.post("/projects/:slug/facility/features", writers(), createInProject(FeatureCreateInputSchema, facility.createFeature));
  r.patch("/facility/features/:id", writers(), writeEntry(FeaturePatchInputSchema, facility.patchFeature));
  r.delete("/facility/features/:id", writers(), deleteEntry(facility.deleteFeature));

  return r;
}

/** What a write's body is parsed with (a schema from #shared/schemas/facility.ts). */
interface BodySchema<I> {
  parse(body: unknown): I;
}

// Every write route is the same adapter: the path's slug or id and the body parsed, one call
// to the service, its answer sent. A new entry answers 201, a delete 204 with no body.

/** A new block, system or feature in the project named by `:slug`. */
function createInProject<I>(schema: BodySchema<I>, create: (slug: string, input: I, actor: Actor) => Promise<unknown>): RequestHandler {
  return async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.status(201).json(await create(slug, schema.parse(req.body), actorOf(req)));
  };
}

/** A write to the entry `:id` (or, answering 201, a new unit of the system `:id`). */
function writeEntry<I>(schema: BodySchema<I>, write: (id: number, input: I, actor: Actor) => Promise<unknown>, status: 200 | 201 = 200): RequestHandler {
  return async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.status(status).json(await write(id, schema.parse(req.body), actorOf(req)));
  };
}

/** Deletes the entry `:id`. */
function deleteEntry(remove: (id: number, actor: Actor) => Promise<void>): RequestHandler {
  return async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await remove(id, actorOf(req));
    res.status(204).end();
  };
}
