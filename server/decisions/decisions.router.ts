import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DecisionCreateInputSchema, DecisionListQuerySchema, DecisionOutcomeInputSchema, DecisionPatchInputSchema, DecisionWithdrawInputSchema } from "#shared/schemas/decisions.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole } from "../core/auth.ts";
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

  r.get("/projects/:slug/decisions", readers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = DecisionListQuerySchema.parse({ ...req.query });
    res.json(await decisions.list(slug, query, actorOf(req)));
  });
  r.post("/projects/:slug/decisions", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = DecisionCreateInputSchema.parse(req.body);
    res.status(201).json(await decisions.create(slug, input, actorOf(req)));
  });
  r.get("/decisions/:id", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await decisions.get(id, actorOf(req)));
  });
  r.get("/decisions/:id/events", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await decisions.events(id, actorOf(req)));
  });
  r.patch("/decisions/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = DecisionPatchInputSchema.parse(req.body);
    res.json(await decisions.patch(id, input, actorOf(req)));
  });
  r.post("/decisions/:id/outcome", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = DecisionOutcomeInputSchema.parse(req.body);
    res.json(await decisions.recordOutcome(id, input, actorOf(req)));
  });
  r.post("/decisions/:id/withdraw", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = DecisionWithdrawInputSchema.parse(req.body);
    res.json(await decisions.withdraw(id, input, actorOf(req)));
  });

  return r;
}
