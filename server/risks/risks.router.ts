import { Router } from "express";
import { z } from "zod";
import { CalendarDateSchema, IdParamSchema } from "#shared/schemas/common.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { MitigationInputSchema, MitigationPatchInputSchema, RiskCreateInputSchema, RiskListQuerySchema, RiskPatchInputSchema, RiskToIssueInputSchema } from "#shared/schemas/risks.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { RisksService } from "./risks.service.ts";

const readers = () => requireRole();
const writers = () => requireRole("lead", "admin");
/** The reporting window's start for one item's trend (default: 30 days before today on site). */
const SinceQuerySchema = z.strictObject({ since: CalendarDateSchema.optional() });

/**
 * The risks and issues register. Nothing of it is public: every route needs a signed-in caller
 * (visitors 401); reads are by the caller's audience in the service (investors and marketing see
 * investor-audience items, marketing without money); writes are for leads and administrators.
 */
export function risksRouter(risks: RisksService): Router {
  const r = Router();

  r.get("/projects/:slug/risks", readers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = RiskListQuerySchema.parse({ ...req.query });
    res.json(await risks.list(slug, query, actorOf(req)));
  });
  r.get("/projects/:slug/risks/summary", readers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = SinceQuerySchema.parse({ ...req.query });
    res.json(await risks.summary(slug, query, actorOf(req)));
  });
  r.post("/projects/:slug/risks", writers(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = RiskCreateInputSchema.parse(req.body);
    res.status(201).json(await risks.create(slug, input, actorOf(req)));
  });

  r.get("/risks/:id", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const { since } = SinceQuerySchema.parse({ ...req.query });
    res.json(await risks.get(id, actorOf(req), since));
  });
  r.get("/risks/:id/events", readers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await risks.events(id, actorOf(req)));
  });
  r.patch("/risks/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = RiskPatchInputSchema.parse(req.body);
    res.json(await risks.patch(id, input, actorOf(req)));
  });
  r.post("/risks/:id/issue", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = RiskToIssueInputSchema.parse(req.body);
    res.status(201).json(await risks.toIssue(id, input, actorOf(req)));
  });
  r.delete("/risks/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await risks.delete(id, actorOf(req));
    res.status(204).end();
  });

  r.post("/risks/:id/mitigations", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MitigationInputSchema.parse(req.body);
    res.status(201).json(await risks.addMitigation(id, input, actorOf(req)));
  });
  r.patch("/mitigations/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = MitigationPatchInputSchema.parse(req.body);
    res.json(await risks.patchMitigation(id, input, actorOf(req)));
  });
  r.delete("/mitigations/:id", writers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    await risks.deleteMitigation(id, actorOf(req));
    res.status(204).end();
  });

  return r;
}
