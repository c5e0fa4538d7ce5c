import { Router } from "express";
import {
  BaselineInputSchema,
  BaselineParamSchema,
  CostActualInputSchema,
  CsvImportInputSchema,
  CurveQuerySchema,
  HealthQuerySchema,
  MilestoneCreateInputSchema,
  MilestoneDeleteInputSchema,
  MilestoneListQuerySchema,
  MilestonePatchInputSchema,
  MilestoneRemovalInputSchema,
  RangeQuerySchema,
  ShiftInputSchema,
} from "#shared/schemas/programme.ts";
import { requireRole, requireStaff } from "../core/auth.ts";
import { itemPath, optionalBody, projectPath, route } from "../core/route.ts";
import type { ProgrammeService } from "./programme.service.ts";

const writers = () => requireRole("lead", "admin");
const staffAndInvestors = () => requireRole("admin", "lead", "marketing", "investor");

/**
 * The programme API. Reads are open to every caller and filtered by audience in the
 * service's queries; writes are for leads and admins.
 */
export function programmeRouter(programme: ProgrammeService): Router {
  const r = Router();

  r.get(
    "/projects/:slug/milestones.csv",
    requireStaff(),
    route(projectPath, async ({ params, res }) => {
      const { filename, csv } = await programme.exportCsv(params.slug);
      res.type("text/csv; charset=utf-8").attachment(filename).send(csv);
    }),
  );
  r.post("/projects/:slug/milestones/import", writers(), route({ ...projectPath, body: CsvImportInputSchema }, ({ params, body, actor }) => programme.importCsv(params.slug, body.csv, actor)));
  r.post("/projects/:slug/milestones/shift", writers(), route({ ...projectPath, body: ShiftInputSchema }, ({ params, body, actor }) => programme.shift(params.slug, body, actor)));
  r.get("/projects/:slug/milestones", route({ ...projectPath, query: MilestoneListQuerySchema }, ({ params, query, actor }) => programme.list(params.slug, query, actor)));
  r.post("/projects/:slug/milestones", writers(), route({ ...projectPath, body: MilestoneCreateInputSchema, status: 201 }, ({ params, body, actor }) => programme.create(params.slug, body, actor)));

  r.patch("/milestones/:id", writers(), route({ ...itemPath, body: MilestonePatchInputSchema }, ({ params, body, actor }) => programme.patch(params.id, body, actor)));
  // Only a milestone entered by mistake is deleted; one on record answers 409 `on_record` and is
  // removed from the programme instead (POST …/remove, with a reason), keeping its history.
  r.delete("/milestones/:id", writers(), route({ ...itemPath, body: optionalBody(MilestoneDeleteInputSchema), status: 204 }, ({ params, body, actor }) => programme.delete(params.id, body, actor)));
  r.post("/milestones/:id/remove", writers(), route({ ...itemPath, body: optionalBody(MilestoneRemovalInputSchema) }, ({ params, body, actor }) => programme.removeFromProgramme(params.id, body, actor)));
  r.post("/milestones/:id/restore", writers(), route({ ...itemPath, body: optionalBody(MilestoneRemovalInputSchema) }, ({ params, body, actor }) => programme.restore(params.id, body, actor)));
  r.get("/milestones/:id/events", route(itemPath, ({ params, actor }) => programme.events(params.id, actor)));
  r.get("/milestones/:id/drivers", route(itemPath, ({ params, actor }) => programme.drivers(params.id, actor)));

  r.get("/projects/:slug/changes", route({ ...projectPath, query: RangeQuerySchema }, ({ params, query, actor }) => programme.changes(params.slug, query, actor)));
  r.get("/projects/:slug/moves", route({ ...projectPath, query: RangeQuerySchema }, ({ params, query, actor }) => programme.moves(params.slug, query, actor)));
  r.get("/projects/:slug/health", route({ ...projectPath, query: HealthQuerySchema }, ({ params, query, actor }) => programme.health(params.slug, query, actor)));
  r.get("/projects/:slug/curve", route({ ...projectPath, query: CurveQuerySchema }, ({ params, query, actor }) => programme.curve(params.slug, query, actor)));

  r.get("/projects/:slug/baselines", staffAndInvestors(), route(projectPath, ({ params, actor }) => programme.baselines(params.slug, actor)));
  r.get("/projects/:slug/baselines/:number", staffAndInvestors(), route({ params: BaselineParamSchema }, ({ params, actor }) => programme.baseline(params.slug, params.number, actor)));
  r.post("/projects/:slug/baselines", writers(), route({ ...projectPath, body: BaselineInputSchema, status: 201 }, ({ params, body, actor }) => programme.rebaseline(params.slug, body, actor)));

  r.get("/projects/:slug/cost-actuals", staffAndInvestors(), route(projectPath, ({ params }) => programme.costActuals(params.slug)));
  r.post("/projects/:slug/cost-actuals", writers(), route({ ...projectPath, body: CostActualInputSchema, status: 201 }, ({ params, body, actor }) => programme.addCostActual(params.slug, body, actor)));

  return r;
}
