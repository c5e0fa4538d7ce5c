import { z } from "zod";
import { AudienceSchema, type Audience } from "./common.ts";
import { facilityTagQueryShape, type MediaPicture } from "./media.ts";
import { SlugParamSchema } from "./projects.ts";
import { ContentSlugParamSchema, ContentSlugSchema, PostStatusSchema, type PostStatus, type PublishingProblem, type RevisionSummary } from "./publishing.ts";
import { RichTextDocSchema, type RichTextDoc } from "./rich-text.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of updates (server/posts ↔ src/features/posts and the public pages).
 *
 * Lists are JSON arrays; the total number of matching posts is in the `X-Total-Count`
 * header (10 a page, `page` from 1). Instants are ISO 8601 with offset; calendar dates
 * `YYYY-MM-DD`. Errors are `{ error: { code, message, fields? } }`. The workflow (states, steps,
 * problems, schedule, revisions, history) is publishing.ts, the same for photo stories.
 */

export const POSTS_PAGE_SIZE = 10;

/**
 * A tag of a post: an area ("Hall 2A"), a system ("cooling"), or a capacity block or plant system
 * of the facility (`block` / `plant`, the id as text: "12"). A block or system must be one of the
 * post's project, and one its audience may see (422 otherwise).
 */
export const PostTagSchema = z
  .strictObject({
    kind: z.enum(["area", "system", "block", "plant"]),
    value: plainText().min(1, "is empty").max(100, "must be at most 100 characters"),
  })
  .refine((t) => (t.kind !== "block" && t.kind !== "plant") || /^[1-9][0-9]{0,9}$/.test(t.value), { message: "must be the id of a block or plant system", path: ["value"] });
export type PostTag = z.infer<typeof PostTagSchema>;
/** A tag as an answer gives it: a block or plant system carries its name (tags the reader may not see are left out). */
export type PostTagAnswer = PostTag & { name?: string };

const Title = plainText({ error: "is required" }).min(1, "is required").max(200, "must be at most 200 characters");
const Summary = multilineText().max(600, "must be at most 600 characters");
const MediaId = z.number().int().positive();

const POST_FIELDS = {
  title: Title,
  summary: Summary,
  body: RichTextDocSchema,
  audience: AudienceSchema,
  coverMediaId: MediaId.nullable(),
  milestoneIds: z.array(z.number().int().positive()).max(50),
  tags: z.array(PostTagSchema).max(30),
  slug: ContentSlugSchema,
} as const;

/** POST /api/projects/:slug/posts (marketing, lead, admin) → 201 `{ id, slug, status }`. Without `slug`, one is made from the title. */
export const PostCreateInputSchema = z.strictObject({
  ...POST_FIELDS,
  summary: POST_FIELDS.summary.default(""),
  coverMediaId: POST_FIELDS.coverMediaId.optional(),
  milestoneIds: POST_FIELDS.milestoneIds.optional(),
  tags: POST_FIELDS.tags.optional(),
  slug: POST_FIELDS.slug.optional(),
});
export type PostCreateInput = z.infer<typeof PostCreateInputSchema>;

/**
 * PATCH /api/posts/:id → 200 PostDetail. `version` is the one last read; a stale one → 409
 * `conflict` with `current`. Every save keeps a revision (`note` is kept with it).
 * An edit by marketing to an approved or scheduled post returns it to draft (the approval
 * was for the old text); a published post may be edited by a lead or admin only, and the
 * publishing checks run again before the change goes live.
 */
export const PostPatchInputSchema = z
  .strictObject({
    version: z.number().int().min(1).optional(),
    ...z.object(POST_FIELDS).partial().shape,
    note: plainText().max(500).optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== "version" && k !== "note"), { message: "change at least one field" });
export type PostPatchInput = z.infer<typeof PostPatchInputSchema>;

/** GET /api/projects/:slug/posts query. `status` is for staff only (others see published posts). */
export const PostListQuerySchema = z.strictObject({
  page: z.coerce.number({ error: "must be a number" }).int().min(1).max(10_000).default(1),
  tag: plainText().min(1).max(100).optional(),
  ...facilityTagQueryShape,
  q: plainText().min(1, "is empty").max(200, "must be at most 200 characters").optional(),
  status: PostStatusSchema.optional(),
  audience: AudienceSchema.optional(),
});
export type PostListQuery = z.infer<typeof PostListQuerySchema>;

export const PostSlugParamsSchema = SlugParamSchema.extend({ postSlug: ContentSlugParamSchema });

/** Photos are described by the media module (pictureFor); re-exported for the pages that import posts only. */
export type { MediaPicture, PictureVariant } from "./media.ts";

/** A milestone's figures at one moment. */
export interface MilestoneSnapshot {
  status: "complete" | "on_programme" | "at_risk" | "behind";
  baselineFinish: string | null;
  forecastFinish: string | null;
  actualFinish: string | null;
  percentComplete: number;
}

/**
 * A milestone linked to a post: `then` as captured at publication (null before it), `now` as
 * it stands today (null when the caller may no longer see the milestone, or it was deleted);
 * `changed` when now differs from then in status or dates.
 */
export interface PostMilestone {
  id: number;
  name: string;
  then: MilestoneSnapshot | null;
  now: MilestoneSnapshot | null;
  changed: boolean;
}

/** A row of GET /api/projects/:slug/posts. */
export interface PostSummary {
  id: number;
  slug: string;
  title: string;
  summary: string;
  audience: Audience;
  status: PostStatus;
  publishedAt: string | null;
  scheduledFor: string | null;
  cover: MediaPicture | null;
  tags: PostTagAnswer[];
  authorName: string;
  updatedAt: string;
}

/**
 * GET /api/projects/:slug/posts/:postSlug and GET /api/posts/:id. `body`, `version`,
 * `revisions`, `reviewComment` and `problems` are for staff only (absent otherwise).
 * An old slug answers 301 with `Location` = the API address under the current slug (so fetch()
 * follows it and gets this detail, whose `slug` then differs from the one asked for) and body
 * `{ redirectTo }` = the page path under the current slug. The page itself answers 301 too.
 */
export interface PostDetail extends PostSummary {
  projectSlug: string;
  html: string;
  milestones: PostMilestone[];
  images: MediaPicture[];
  coverMediaId: number | null;
  milestoneIds: number[];
  body?: RichTextDoc;
  version?: number;
  revisions?: RevisionSummary[];
  reviewComment?: string | null;
  problems?: PublishingProblem[];
}

export interface PostRedirect {
  redirectTo: string;
}
