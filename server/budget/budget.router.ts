import { Router } from "express";
import { BudgetChangeCreateInputSchema, BudgetChangeListQuerySchema, BudgetChangePatchInputSchema, BudgetSettingsInputSchema } from "#shared/schemas/budget.ts";
import { HealthQuerySchema } from "#shared/schemas/programme.ts";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { BudgetService } from "./budget.service.ts";

/** Money is read by investors (their audience), leads and admins; marketing reads none of it (decision 036). */
const moneyReaders = () => requireRole("lead", "admin", "investor");
const writers = () => requireRole("lead", "admin");

/** The budget API: the change register and the cost position by audience; writes for leads and admins. */
export function budgetRouter(budget: BudgetService): Router {
  const r = Router();

  r.get("/projects/:slug/budget-changes", moneyReaders(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = BudgetChangeListQuerySchema.parse({ ...req.query });
    res.json(await budget.listChanges(slug, query, actorOf(req)));
  });
  r.post("/projects/:slug/budget-changes", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = BudgetChangeCreateInputSchema.parse(req.body);
    res.status(201).json(await budget.createChange(slug, input, actorOf(req)));
  });
  r.get("/budget-changes/:id", moneyReaders(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await budget.getChange(id, actorOf(req)));
  });
  r.get("/budget-changes/:id/events", moneyReaders(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await budget.changeEvents(id, actorOf(req)));
  });
  r.patch("/budget-changes/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = BudgetChangePatchInputSchema.parse(req.body);
    res.json(await budget.patchChange(id, input, actorOf(req)));
  });
  r.delete("/budget-changes/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await budget.deleteChange(id, actorOf(req));
    res.status(204).end();
  });

  r.get("/projects/:slug/budget", moneyReaders(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = HealthQuerySchema.parse({ ...req.query });
    res.json(await budget.position(slug, query, actorOf(req)));
  });
  r.put("/projects/:slug/budget/settings", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = BudgetSettingsInputSchema.parse(req.body);
    res.json(await budget.putSettings(slug, input, actorOf(req)));
  });

  return r;
}
