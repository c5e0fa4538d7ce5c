import { Router } from "express";
import { BudgetChangeCreateInputSchema, BudgetChangeListQuerySchema, BudgetChangePatchInputSchema, BudgetSettingsInputSchema } from "#shared/schemas/budget.ts";
import { HealthQuerySchema } from "#shared/schemas/programme.ts";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requireRole } from "../core/auth.ts";
import { route } from "../core/route.ts";
import type { BudgetService } from "./budget.service.ts";

/** Money is read by investors (their audience), leads and admins; marketing reads none of it (decision 036). */
const moneyReaders = () => requireRole("lead", "admin", "investor");
const writers = () => requireRole("lead", "admin");

/** The budget API: the change register and the cost position by audience; writes for leads and admins. */
export function budgetRouter(budget: BudgetService): Router {
  const r = Router();
  const project = { params: SlugParamSchema };
  const item = { params: IdParamSchema };

  r.get("/projects/:slug/budget-changes", moneyReaders(), route({ ...project, query: BudgetChangeListQuerySchema }, ({ params, query, actor }) => budget.listChanges(params.slug, query, actor)));
  r.post("/projects/:slug/budget-changes", writers(), route({ ...project, body: BudgetChangeCreateInputSchema, status: 201 }, ({ params, body, actor }) => budget.createChange(params.slug, body, actor)));
  r.get("/budget-changes/:id", moneyReaders(), route(item, ({ params, actor }) => budget.getChange(params.id, actor)));
  r.get("/budget-changes/:id/events", moneyReaders(), route(item, ({ params, actor }) => budget.changeEvents(params.id, actor)));
  r.patch("/budget-changes/:id", writers(), route({ ...item, body: BudgetChangePatchInputSchema }, ({ params, body, actor }) => budget.patchChange(params.id, body, actor)));
  r.delete("/budget-changes/:id", writers(), route({ ...item, status: 204 }, ({ params, actor }) => budget.deleteChange(params.id, actor)));

  r.get("/projects/:slug/budget", moneyReaders(), route({ ...project, query: HealthQuerySchema }, ({ params, query, actor }) => budget.position(params.slug, query, actor)));
  r.put("/projects/:slug/budget/settings", writers(), route({ ...project, body: BudgetSettingsInputSchema }, ({ params, body, actor }) => budget.putSettings(params.slug, body, actor)));

  return r;
}
