import { Router } from "express";
import { BudgetChangeCreateInputSchema, BudgetChangeListQuerySchema, BudgetChangePatchInputSchema, BudgetSettingsInputSchema } from "#shared/schemas/budget.ts";
import { HealthQuerySchema } from "#shared/schemas/programme.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
import type { BudgetService } from "./budget.service.ts";

/** Money is read by investors (their audience), leads and admins; marketing reads none of it (decision 036). */
const moneyReaders = () => requireRole("lead", "admin", "investor");
const writers = () => requireRole("lead", "admin");

/** The budget API: the change register and the cost position by audience; writes for leads and admins. */
export function budgetRouter(budget: BudgetService): Router {
  const r = Router();

  r.get("/projects/:slug/budget-changes", moneyReaders(), route({ ...projectPath, query: BudgetChangeListQuerySchema }, ({ params, query, actor }) => budget.listChanges(params.slug, query, actor)));
  r.post("/projects/:slug/budget-changes", writers(), route({ ...projectPath, body: BudgetChangeCreateInputSchema, status: 201 }, ({ params, body, actor }) => budget.createChange(params.slug, body, actor)));
  r.get("/budget-changes/:id", moneyReaders(), route(itemPath, ({ params, actor }) => budget.getChange(params.id, actor)));
  r.get("/budget-changes/:id/events", moneyReaders(), route(itemPath, ({ params, actor }) => budget.changeEvents(params.id, actor)));
  r.patch("/budget-changes/:id", writers(), route({ ...itemPath, body: BudgetChangePatchInputSchema }, ({ params, body, actor }) => budget.patchChange(params.id, body, actor)));
  r.delete("/budget-changes/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => budget.deleteChange(params.id, actor)));

  r.get("/projects/:slug/budget", moneyReaders(), route({ ...projectPath, query: HealthQuerySchema }, ({ params, query, actor }) => budget.position(params.slug, query, actor)));
  r.put("/projects/:slug/budget/settings", writers(), route({ ...projectPath, body: BudgetSettingsInputSchema }, ({ params, body, actor }) => budget.putSettings(params.slug, body, actor)));

  return r;
}
