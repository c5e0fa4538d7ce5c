import { Router } from "express";
import { z } from "zod";
import { CalendarDateSchema } from "#shared/schemas/common.ts";
import { MitigationInputSchema, MitigationPatchInputSchema, RiskCreateInputSchema, RiskListQuerySchema, RiskPatchInputSchema, RiskToIssueInputSchema } from "#shared/schemas/risks.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, projectPath, route } from "../core/route.ts";
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

  r.get("/projects/:slug/risks", readers(), route({ ...projectPath, query: RiskListQuerySchema }, ({ params, query, actor }) => risks.list(params.slug, query, actor)));
  r.get("/projects/:slug/risks/summary", readers(), route({ ...projectPath, query: SinceQuerySchema }, ({ params, query, actor }) => risks.summary(params.slug, query, actor)));
  r.post("/projects/:slug/risks", writers(), route({ ...projectPath, body: RiskCreateInputSchema, status: 201 }, ({ params, body, actor }) => risks.create(params.slug, body, actor)));

  r.get("/risks/:id", readers(), route({ ...itemPath, query: SinceQuerySchema }, ({ params, query, actor }) => risks.get(params.id, actor, query.since)));
  r.get("/risks/:id/events", readers(), route(itemPath, ({ params, actor }) => risks.events(params.id, actor)));
  r.patch("/risks/:id", writers(), route({ ...itemPath, body: RiskPatchInputSchema }, ({ params, body, actor }) => risks.patch(params.id, body, actor)));
  r.post("/risks/:id/issue", writers(), route({ ...itemPath, body: RiskToIssueInputSchema, status: 201 }, ({ params, body, actor }) => risks.toIssue(params.id, body, actor)));
  r.delete("/risks/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => risks.delete(params.id, actor)));

  r.post("/risks/:id/mitigations", writers(), route({ ...itemPath, body: MitigationInputSchema, status: 201 }, ({ params, body, actor }) => risks.addMitigation(params.id, body, actor)));
  r.patch("/mitigations/:id", writers(), route({ ...itemPath, body: MitigationPatchInputSchema }, ({ params, body, actor }) => risks.patchMitigation(params.id, body, actor)));
  r.delete("/mitigations/:id", writers(), route({ ...itemPath, status: 204 }, ({ params, actor }) => risks.deleteMitigation(params.id, actor)));

  return r;
}
