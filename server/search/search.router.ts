import { Router } from "express";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { SearchQuerySchema } from "#shared/schemas/search.ts";
import { route } from "../core/route.ts";
import type { SearchService } from "./search.service.ts";

/** GET /api/projects/:slug/search?q= (fixed interface): open to every caller, filtered by audience in the service. */
export function searchRouter(search: SearchService): Router {
  const r = Router();
  r.get("/projects/:slug/search", route({ params: SlugParamSchema, query: SearchQuerySchema }, async ({ params, query, actor, req, res }) => {
    const answer = await search.search(params.slug, query.q, actor);
    // Each audience has its own answer: a shared cache keeps only visitors' (as the other public reads).
    res.vary("Cookie").set("Cache-Control", req.user ? "private, no-cache" : "public, max-age=60, stale-while-revalidate=300");
    return answer;
  }));
  return r;
}
