import { Router } from "express";
import { DigestArchiveCopyParamSchema, DigestArchiveLinkParamSchema, DigestArchiveQuerySchema, DigestPreviewQuerySchema, DigestRunInputSchema, DigestRunListQuerySchema, DigestTestInputSchema, DigestUpcomingQuerySchema, DigestWebParamSchema } from "#shared/schemas/digests.ts";
import { requireRole } from "../core/auth.ts";
import { itemPath, route } from "../core/route.ts";
import type { DigestsService } from "./digests.service.ts";

/** The site office's digests (lead, marketing, admin), the signed web copy (anyone holding its link) and every subscriber's archive. */
export function digestsRouter(digests: DigestsService): Router {
  const r = Router();
  const staff = requireRole("admin", "lead", "marketing");

  r.post(
    "/digests/runs",
    staff,
    route({ body: DigestRunInputSchema }, async ({ body, actor, res }) => {
      const out = await digests.requestRun(body, actor);
      res.status(out.created ? 201 : 200).json({ id: out.id, status: out.status });
    }),
  );
  r.get("/digests/runs", staff, route({ query: DigestRunListQuerySchema, headers: { "Cache-Control": "no-store" } }, ({ query }) => digests.list(query)));
  r.get("/digests/runs/:id", staff, route({ ...itemPath, headers: { "Cache-Control": "no-store" } }, ({ params }) => digests.summary(params.id)));
  r.post("/digests/runs/:id/pause", staff, route(itemPath, ({ params }) => digests.pause(params.id)));
  r.post("/digests/runs/:id/resume", staff, route(itemPath, ({ params }) => digests.resume(params.id)));
  r.get("/digests/upcoming", staff, route({ query: DigestUpcomingQuerySchema, headers: { "Cache-Control": "no-store" } }, ({ query }) => digests.upcoming(query.project)));
  r.get("/digests/preview", staff, route({ query: DigestPreviewQuerySchema, headers: { "Cache-Control": "no-store" } }, ({ query }) => digests.preview(query.subscriberId)));
  r.post("/digests/test", staff, route({ body: DigestTestInputSchema, status: 202 }, ({ body, actor }) => digests.sendTest(body, actor)));
  // Every subscriber's archive (decision 045): by the signed preferences link, or an investor's own.
  const personal = "private, no-store";
  r.get("/subscriptions/preferences/:token/digests", route({ params: DigestArchiveLinkParamSchema, query: DigestArchiveQuerySchema, headers: { "Cache-Control": personal } }, ({ params, query }) => digests.archiveByLink(params.token, query)));
  r.get("/subscriptions/preferences/:token/digests/:id", route({ params: DigestArchiveCopyParamSchema, headers: { "Cache-Control": personal, "X-Robots-Tag": "noindex" } }, ({ params }) => digests.archivedCopyByLink(params.token, params.id)));
  r.get("/me/digests", requireRole("investor"), route({ query: DigestArchiveQuerySchema, headers: { "Cache-Control": personal } }, ({ query, actor }) => digests.archiveOfUser(actor.user!.id, query)));
  r.get("/me/digests/:id", requireRole("investor"), route({ ...itemPath, headers: { "Cache-Control": personal } }, ({ params, actor }) => digests.archivedCopyOfUser(actor.user!.id, params.id)));
  r.get(
    "/digests/web/:token",
    route({ params: DigestWebParamSchema }, async ({ params, res }) => {
      const html = await digests.webCopy(params.token);
      res.set("Cache-Control", "private, no-store").set("X-Robots-Tag", "noindex").type("html").send(html);
    }),
  );
  return r;
}
