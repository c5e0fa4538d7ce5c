import { Router } from "express";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { StoryCreateInputSchema, StoryPatchInputSchema, StorySlugParamsSchema } from "#shared/schemas/stories.ts";
import { route } from "../core/route.ts";
import { cacheForReader, publishingRouter } from "../publishing/publishing.router.ts";
import type { StoriesService } from "./stories.service.ts";

/**
 * Photo stories: the list is theirs; one story by its address, writing, revisions, history and
 * the workflow steps are served as for every kind of published content (server/publishing). Read
 * by every caller as their audience allows; written by staff; published by leads and admins.
 */
export function storiesRouter(stories: StoriesService): Router {
  const r = Router();

  r.get(
    "/projects/:slug/stories",
    route({ params: SlugParamSchema }, async ({ params, actor, req, res }) => {
      const list = await stories.list(params.slug, actor);
      cacheForReader(req, res);
      return list;
    }),
  );

  r.use(
    publishingRouter(
      {
        plural: "stories",
        page: "stories",
        itemParam: "storySlug",
        slugParams: StorySlugParamsSchema,
        createInput: StoryCreateInputSchema,
        patchInput: StoryPatchInputSchema,
      },
      stories,
    ),
  );
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
