import { Router, type Request, type Response } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import { DiffQuerySchema, ReturnInputSchema, RevisionParamsSchema, ScheduleInputSchema } from "#shared/schemas/posts.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { StoryCreateInputSchema, StoryPatchInputSchema, StorySlugParamsSchema } from "#shared/schemas/stories.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { StoriesService } from "./stories.service.ts";

const staff = () => requireRole("admin", "lead", "marketing");
const approvers = () => requireRole("lead", "admin");

/** A visitor's answers may be kept by a CDN for a minute; a signed-in caller's are private. */
function cacheFor(req: Request, res: Response): void {
  res.vary("Cookie");
  res.set("Cache-Control", req.user ? "private, no-cache" : "public, max-age=60, stale-while-revalidate=300");
}

/** Photo stories: read by every caller as their audience allows; written by staff; published by leads and admins. */
export function storiesRouter(stories: StoriesService): Router {
  const r = Router();

  r.get("/projects/:slug/stories", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const list = await stories.list(slug, actorOf(req));
    cacheFor(req, res);
    res.json(list);
  });
  r.get("/projects/:slug/stories/:storySlug", async (req, res) => {
    const { slug, storySlug } = StorySlugParamsSchema.parse(req.params);
    const found = await stories.getBySlug(slug, storySlug, actorOf(req));
    cacheFor(req, res);
    if ("redirectTo" in found) {
      // As for updates: fetch() follows the Location to the current address; the body names the page to show.
      res
        .status(301)
        .location(`/api/projects/${slug}/stories/${found.redirectTo}`)
        .json({ redirectTo: `/projects/${slug}/stories/${found.redirectTo}` });
      return;
    }
    res.json(found);
  });
  r.post("/projects/:slug/stories", staff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = StoryCreateInputSchema.parse(req.body);
    res.status(201).json(await stories.create(slug, input, actorOf(req)));
  });
  r.get("/stories/:id", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.set("Cache-Control", "private, no-cache").json(await stories.getById(id, actorOf(req)));
  });
  r.patch("/stories/:id", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = StoryPatchInputSchema.parse(req.body);
    res.json(await stories.patch(id, input, actorOf(req)));
  });
  r.get("/stories/:id/revisions", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.revisions(id));
  });
  r.get("/stories/:id/history", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.history(id));
  });
  r.get("/stories/:id/revisions/:n/diff", staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    const { against } = DiffQuerySchema.parse({ ...req.query });
    res.json(await stories.diff(id, n, against));
  });
  r.post("/stories/:id/revisions/:n/restore", staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    res.json(await stories.restore(id, n, actorOf(req)));
  });
  r.post("/stories/:id/submit", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.submit(id, actorOf(req)));
  });
  r.post("/stories/:id/approve", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.approve(id, actorOf(req)));
  });
  r.post("/stories/:id/return", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const { comment } = ReturnInputSchema.parse(req.body);
    res.json(await stories.returnToDraft(id, comment, actorOf(req)));
  });
  r.post("/stories/:id/publish", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.publish(id, actorOf(req)));
  });
  r.post("/stories/:id/schedule", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const { at } = ScheduleInputSchema.parse(req.body);
    res.json(await stories.schedule(id, at, actorOf(req)));
  });
  r.post("/stories/:id/withdraw", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await stories.withdraw(id, actorOf(req)));
  });
  return r;
}

/**
 * The public page of a story's old address answers 301 to its current page, as an update's
 * does, before the HTML shell is served. Mounted at the root (not under /api); any other
 * request passes on.
 */
export function storyPagesRouter(stories: StoriesService): Router {
  const r = Router();
  r.get("/projects/:slug/stories/:storySlug", async (req, res, next) => {
    const parsed = StorySlugParamsSchema.safeParse(req.params);
    if (!parsed.success) return next();
    const { slug, storySlug } = parsed.data;
    const to = await stories.pageRedirectOf(slug, storySlug);
    if (!to) return next();
    res.redirect(301, `/projects/${slug}/stories/${to}`);
  });
  return r;
}
