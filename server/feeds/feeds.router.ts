import { Router } from "express";
import { z } from "zod";
import { AppError } from "../core/app-error.ts";
import type { FeedsService } from "./feeds.service.ts";

const FeedParamSchema = z.strictObject({
  file: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*\.atom$/, "is not a feed address").max(110),
});

/** Public documents a CDN may keep for five minutes and then revalidate with the ETag. */
const PUBLIC_CACHE = "public, max-age=300, stale-while-revalidate=600";

/** The feed, sitemap and robots.txt, mounted at the root (not under /api). */
export function feedsRouter(site: FeedsService): Router {
  const r = Router();
  r.get("/feed/:file", async (req, res) => {
    const parsed = FeedParamSchema.safeParse(req.params);
    if (!parsed.success) throw new AppError("not_found", "There is no such feed.", 404);
    const xml = await site.feed(parsed.data.file.replace(/\.atom$/, ""));
    res.set("Cache-Control", PUBLIC_CACHE).type("application/atom+xml; charset=utf-8").send(xml);
  });
  r.get("/sitemap.xml", async (_req, res) => {
    res.set("Cache-Control", PUBLIC_CACHE).type("application/xml; charset=utf-8").send(await site.sitemap());
  });
  r.get("/robots.txt", (_req, res) => {
    res.set("Cache-Control", PUBLIC_CACHE).type("text/plain; charset=utf-8").send(site.robots());
  });
  return r;
}
