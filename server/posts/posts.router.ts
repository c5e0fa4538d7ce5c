import { Router } from "express";
import { PostCreateInputSchema, PostListQuerySchema, PostPatchInputSchema, PostSlugParamsSchema } from "#shared/schemas/posts.ts";
import { SlugParamSchema } from "#shared/schemas/projects.ts";
import { route } from "../core/route.ts";
import { cacheForReader, publishingRouter } from "../publishing/publishing.router.ts";
import type { PostsService } from "./posts.service.ts";

/**
 * Updates. The list with its filters and paging is theirs; one update by its address, writing,
 * revisions, history and the workflow steps are served as for every kind of published content
 * (server/publishing). Reads are open to every caller and filtered by audience in the service.
 */
export function postsRouter(posts: PostsService): Router {
  const r = Router();

  r.get(
    "/projects/:slug/posts",
    route({ params: SlugParamSchema, query: PostListQuerySchema }, async ({ params, query, actor, req, res }) => {
      const { items, total } = await posts.list(params.slug, query, actor);
      cacheForReader(req, res);
      res.set("X-Total-Count", String(total));
      return items;
    }),
  );

  r.use(
    publishingRouter(
      {
        plural: "posts",
        page: "updates",
        itemParam: "postSlug",
        slugParams: PostSlugParamsSchema,
        createInput: PostCreateInputSchema,
        patchInput: PostPatchInputSchema,
      },
      posts,
    ),
  );
  return r;
}
