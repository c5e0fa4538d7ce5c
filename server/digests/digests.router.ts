import { Router } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DigestArchiveCopyParamSchema, DigestArchiveLinkParamSchema, DigestArchiveQuerySchema, DigestPreviewQuerySchema, DigestRunInputSchema, DigestRunListQuerySchema, DigestTestInputSchema, DigestUpcomingQuerySchema, DigestWebParamSchema } from "#shared/schemas/digests.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { DigestsService } from "./digests.service.ts";

/** The site office's digests (lead, marketing, admin), the signed web copy (anyone holding its link) and every subscriber's archive. */
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
  // Every subscriber's archive (decision 045): by the signed preferences link, or an investor's own.
  const personal = "private, no-store";
  r.get("/subscriptions/preferences/:token/digests", async (req, res) => {
    const { token } = DigestArchiveLinkParamSchema.parse(req.params);
    const query = DigestArchiveQuerySchema.parse({ ...req.query });
    res.set("Cache-Control", personal).json(await digests.archiveByLink(token, query));
  });
  r.get("/subscriptions/preferences/:token/digests/:id", async (req, res) => {
    const { token, id } = DigestArchiveCopyParamSchema.parse(req.params);
    res.set("Cache-Control", personal).set("X-Robots-Tag", "noindex").json(await digests.archivedCopyByLink(token, id));
  });
  r.get("/me/digests", requireRole("investor"), async (req, res) => {
    const query = DigestArchiveQuerySchema.parse({ ...req.query });
    res.set("Cache-Control", personal).json(await digests.archiveOfUser(req.user!.id, query));
  });
  r.get("/me/digests/:id", requireRole("investor"), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.set("Cache-Control", personal).json(await digests.archivedCopyOfUser(req.user!.id, id));
  });
  r.get("/digests/web/:token", async (req, res) => {
    const { token } = DigestWebParamSchema.parse(req.params);
    const html = await digests.webCopy(token);
    res.set("Cache-Control", "private, no-store").set("X-Robots-Tag", "noindex").type("html").send(html);
  });
  return r;
}
