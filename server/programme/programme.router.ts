import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
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
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole, requireStaff } from "../core/auth.ts";
import type { ProgrammeService } from "./programme.service.ts";

const writers = () => requireRole("lead", "admin");
const staffAndInvestors = () => requireRole("admin", "lead", "marketing", "investor");

/**
 * The programme API. Reads are open to every caller and filtered by audience in the
 * service's queries; writes are for leads and admins.
 */
export function programmeRouter(programme: ProgrammeService): Router {
  const r = Router();

  r.get("/projects/:slug/milestones.csv", requireStaff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const { filename, csv } = await programme.exportCsv(slug);
    res.type("text/csv; charset=utf-8").attachment(filename).send(csv);
  });
  r.post("/projects/:slug/milestones/import", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const { csv } = CsvImportInputSchema.parse(req.body);
    res.json(await programme.importCsv(slug, csv, actorOf(req)));
  });
  r.post("/projects/:slug/milestones/shift", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = ShiftInputSchema.parse(req.body);
    res.json(await programme.shift(slug, input, actorOf(req)));
  });
  r.get("/projects/:slug/milestones", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = MilestoneListQuerySchema.parse({ ...req.query });
    res.json(await programme.list(slug, query, actorOf(req)));
  });
  r.post("/projects/:slug/milestones", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = MilestoneCreateInputSchema.parse(req.body);
    res.status(201).json(await programme.create(slug, input, actorOf(req)));
  });

  r.patch("/milestones/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MilestonePatchInputSchema.parse(req.body);
    res.json(await programme.patch(id, input, actorOf(req)));
  });
  // Only a milestone entered by mistake is deleted; one on record answers 409 `on_record` and is
  // removed from the programme instead (POST …/remove, with a reason), keeping its history.
  r.delete("/milestones/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MilestoneDeleteInputSchema.parse(req.body ?? {});
    await programme.delete(id, input, actorOf(req));
    res.status(204).end();
  });
  r.post("/milestones/:id/remove", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MilestoneRemovalInputSchema.parse(req.body ?? {});
    res.json(await programme.removeFromProgramme(id, input, actorOf(req)));
  });
  r.post("/milestones/:id/restore", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MilestoneRemovalInputSchema.parse(req.body ?? {});
    res.json(await programme.restore(id, input, actorOf(req)));
  });
  r.get("/milestones/:id/events", async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await programme.events(id, actorOf(req)));
  });
  r.get("/milestones/:id/drivers", async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await programme.drivers(id, actorOf(req)));
  });

  r.get("/projects/:slug/changes", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const range = RangeQuerySchema.parse({ ...req.query });
    res.json(await programme.changes(slug, range, actorOf(req)));
  });
  r.get("/projects/:slug/moves", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const range = RangeQuerySchema.parse({ ...req.query });
    res.json(await programme.moves(slug, range, actorOf(req)));
  });
  r.get("/projects/:slug/health", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = HealthQuerySchema.parse({ ...req.query });
    res.json(await programme.health(slug, query, actorOf(req)));
  });
  r.get("/projects/:slug/curve", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = CurveQuerySchema.parse({ ...req.query });
    res.json(await programme.curve(slug, query, actorOf(req)));
  });

  r.get("/projects/:slug/baselines", staffAndInvestors(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await programme.baselines(slug, actorOf(req)));
  });
  r.get("/projects/:slug/baselines/:number", staffAndInvestors(), async (req, res) => {
    const { slug, number } = BaselineParamSchema.parse(req.params);
    res.json(await programme.baseline(slug, number, actorOf(req)));
  });
  r.post("/projects/:slug/baselines", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = BaselineInputSchema.parse(req.body);
    res.status(201).json(await programme.rebaseline(slug, input, actorOf(req)));
  });

  r.get("/projects/:slug/cost-actuals", staffAndInvestors(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    res.json(await programme.costActuals(slug));
  });
  r.post("/projects/:slug/cost-actuals", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = CostActualInputSchema.parse(req.body);
    res.status(201).json(await programme.addCostActual(slug, input, actorOf(req)));
  });

  return r;
}
