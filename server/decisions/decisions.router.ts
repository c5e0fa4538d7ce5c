import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DecisionCreateInputSchema, DecisionListQuerySchema, DecisionOutcomeInputSchema, DecisionPatchInputSchema, DecisionWithdrawInputSchema } from "#shared/schemas/decisions.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { requireRole } from "../core/auth.ts";
import { route } from "../core/route.ts";
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
  const project = { params: SlugParamSchema };
  const item = { params: IdParamSchema };

  r.get("/projects/:slug/decisions", readers(), route({ ...project, query: DecisionListQuerySchema }, ({ params, query, actor }) => decisions.list(params.slug, query, actor)));
  r.post("/projects/:slug/decisions", writers(), route({ ...project, body: DecisionCreateInputSchema, status: 201 }, ({ params, body, actor }) => decisions.create(params.slug, body, actor)));
  r.get("/decisions/:id", readers(), route(item, ({ params, actor }) => decisions.get(params.id, actor)));
  r.get("/decisions/:id/events", readers(), route(item, ({ params, actor }) => decisions.events(params.id, actor)));
  r.patch("/decisions/:id", writers(), route({ ...item, body: DecisionPatchInputSchema }, ({ params, body, actor }) => decisions.patch(params.id, body, actor)));
  r.post("/decisions/:id/outcome", writers(), route({ ...item, body: DecisionOutcomeInputSchema }, ({ params, body, actor }) => decisions.recordOutcome(params.id, body, actor)));
  r.post("/decisions/:id/withdraw", writers(), route({ ...item, body: DecisionWithdrawInputSchema }, ({ params, body, actor }) => decisions.withdraw(params.id, body, actor)));

  return r;
}
