import { Router, type Request, type Response } from "express";
import { IdParamSchema } from "#shared/schemas/common.ts";
import {
  DiffQuerySchema,
  PostCreateInputSchema,
  PostListQuerySchema,
  PostPatchInputSchema,
  PostSlugParamsSchema,
  ReturnInputSchema,
  RevisionParamsSchema,
  ScheduleInputSchema,
} from "#shared/schemas/posts.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { actorOf, requireRole } from "../core/auth.ts";
import type { PostsService } from "./posts.service.ts";

const staff = () => requireRole("admin", "lead", "marketing");
const approvers = () => requireRole("lead", "admin");

/**
 * Reads a CDN may keep: a visitor's answers are public for a minute (ETag revalidation
 * answers 304 after that); a signed-in caller's are private to them.
 */
function cacheFor(req: Request, res: Response): void {
  res.vary("Cookie");
  res.set("Cache-Control", req.user ? "private, no-cache" : "public, max-age=60, stale-while-revalidate=300");
}

/**
 * Updates. Reads are open to every caller and filtered by audience in the repository;
 * writing is for staff; approving, returning, publishing, scheduling and withdrawing for
 * leads and admins (the workflow rules in the service refine who may do what when).
 */
export function postsRouter(posts: PostsService): Router {
  const r = Router();

  r.get("/projects/:slug/posts", async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const query = PostListQuerySchema.parse({ ...req.query });
    const { items, total } = await posts.list(slug, query, actorOf(req));
    cacheFor(req, res);
    res.set("X-Total-Count", String(total)).json(items);
  });
  r.get("/projects/:slug/posts/:postSlug", async (req, res) => {
    const { slug, postSlug } = PostSlugParamsSchema.parse(req.params);
    const found = await posts.getBySlug(slug, postSlug, actorOf(req));
    cacheFor(req, res);
    if ("redirectTo" in found) {
      // fetch() follows the Location to the current address; the body names the page to show.
      res
        .status(301)
        .location(`/api/projects/${slug}/posts/${found.redirectTo}`)
        .json({ redirectTo: `/projects/${slug}/updates/${found.redirectTo}` });
      return;
    }
    res.json(found);
  });
  r.post("/projects/:slug/posts", staff(), async (req, res) => {
    const { slug } = SlugParamSchema.parse(req.params);
    const input = PostCreateInputSchema.parse(req.body);
    res.status(201).json(await posts.create(slug, input, actorOf(req)));
  });

  r.get("/posts/:id", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.set("Cache-Control", "private, no-cache").json(await posts.getById(id, actorOf(req)));
  });
  r.patch("/posts/:id", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const input = PostPatchInputSchema.parse(req.body);
    res.json(await posts.patch(id, input, actorOf(req)));
  });
  r.get("/posts/:id/revisions", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.revisions(id));
  });
  r.get("/posts/:id/history", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.history(id));
  });
  r.get("/posts/:id/revisions/:n/diff", staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    const { against } = DiffQuerySchema.parse({ ...req.query });
    res.json(await posts.diff(id, n, against));
  });
  r.post("/posts/:id/revisions/:n/restore", staff(), async (req, res) => {
    const { id, n } = RevisionParamsSchema.parse(req.params);
    res.json(await posts.restore(id, n, actorOf(req)));
  });

  r.post("/posts/:id/submit", staff(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.submit(id, actorOf(req)));
  });
  r.post("/posts/:id/approve", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.approve(id, actorOf(req)));
  });
  r.post("/posts/:id/return", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const { comment } = ReturnInputSchema.parse(req.body);
    res.json(await posts.returnToDraft(id, comment, actorOf(req)));
  });
  r.post("/posts/:id/publish", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.publish(id, actorOf(req)));
  });
  r.post("/posts/:id/schedule", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    const { at } = ScheduleInputSchema.parse(req.body);
    res.json(await posts.schedule(id, at, actorOf(req)));
  });
  r.post("/posts/:id/withdraw", approvers(), async (req, res) => {
    const { id } = IdParamSchema.parse(req.params);
    res.json(await posts.withdraw(id, actorOf(req)));
  });

  return r;
}
