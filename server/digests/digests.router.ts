import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DigestPreviewQuerySchema, DigestRunInputSchema, DigestRunListQuerySchema, DigestTestInputSchema, DigestUpcomingQuerySchema, DigestWebParamSchema } from "#shared/schemas/digests.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { DigestsService } from "./digests.service.ts";

/** The site office's digests (lead, marketing, admin) and the signed web copy (anyone holding its link). */
export function digestsRouter(digests: DigestsService): Router {
  const r = Router();
  const staff = requireRole("admin", "lead", "marketing");

  r.post("/digests/runs", staff, async (req, res) => {
    const input = DigestRunInputSchema.parse(req.body);
    const out = await digests.requestRun(input, actorOf(req));
    res.status(out.created ? 201 : 200).json({ id: out.id, status: out.status });
  });
  r.get("/digests/runs", staff, async (req, res) => {
    res.set("Cache-Control", "no-store").json(await digests.list(DigestRunListQuerySchema.parse(req.query)));
  });
  r.get("/digests/runs/:id", staff, async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.set("Cache-Control", "no-store").json(await digests.summary(id));
  });
  r.post("/digests/runs/:id/pause", staff, async (req, res) => {
    res.json(await digests.pause(IdParamSchema.parse(req.params).id));
  });
  r.post("/digests/runs/:id/resume", staff, async (req, res) => {
    res.json(await digests.resume(IdParamSchema.parse(req.params).id));
  });
  r.get("/digests/upcoming", staff, async (req, res) => {
    res.set("Cache-Control", "no-store").json(await digests.upcoming(DigestUpcomingQuerySchema.parse(req.query).project));
  });
  r.get("/digests/preview", staff, async (req, res) => {
    res.set("Cache-Control", "no-store").json(await digests.preview(DigestPreviewQuerySchema.parse(req.query).subscriberId));
  });
  r.post("/digests/test", staff, async (req, res) => {
    res.status(202).json(await digests.sendTest(DigestTestInputSchema.parse(req.body), actorOf(req)));
  });
  r.get("/digests/web/:token", async (req, res) => {
    const { token } = DigestWebParamSchema.parse(req.params);
    const html = await digests.webCopy(token);
    res.set("Cache-Control", "private, no-store").set("X-Robots-Tag", "noindex").type("html").send(html);
  });
  return r;
}
