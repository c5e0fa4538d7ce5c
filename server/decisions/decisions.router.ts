import { Router } from "express";
import { DecisionCreateInputSchema, DecisionListQuerySchema, DecisionOutcomeInputSchema, DecisionPatchInputSchema, DecisionWithdrawInputSchema } from "#shared/schemas/decisions.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
import type { DecisionsService } from "./decisions.service.ts";

const readers = () => requireRole();
const writers = () => requireRole("lead", "admin");

/**
 * Decisions needed. Nothing of them is public: every route needs a signed-in caller (visitors
 * 401); reads are by the caller's audience in the service (investors and marketing see
 * investor-audience requests, marketing without option costs); writes are for leads and administrators.
 */
export function decisionsRouter(decisions: DecisionsService): Router {
  const r = Router();

  r.get("/projects/:slug/decisions", readers(), route({ ...projectPath, query: DecisionListQuerySchema }, ({ params, query, actor }) => decisions.list(params.slug, query, actor)));
  r.post("/projects/:slug/decisions", writers(), route({ ...projectPath, body: DecisionCreateInputSchema, status: 201 }, ({ params, body, actor }) => decisions.create(params.slug, body, actor)));
  r.get("/decisions/:id", readers(), route(itemPath, ({ params, actor }) => decisions.get(params.id, actor)));
  r.get("/decisions/:id/events", readers(), route(itemPath, ({ params, actor }) => decisions.events(params.id, actor)));
  r.patch("/decisions/:id", writers(), route({ ...itemPath, body: DecisionPatchInputSchema }, ({ params, body, actor }) => decisions.patch(params.id, body, actor)));
  r.post("/decisions/:id/outcome", writers(), route({ ...itemPath, body: DecisionOutcomeInputSchema }, ({ params, body, actor }) => decisions.recordOutcome(params.id, body, actor)));
  r.post("/decisions/:id/withdraw", writers(), route({ ...itemPath, body: DecisionWithdrawInputSchema }, ({ params, body, actor }) => decisions.withdraw(params.id, body, actor)));

  return r;
}
