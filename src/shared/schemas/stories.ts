import { z } from "zod";
import { AudienceSchema, type Audience } from "./common.ts";
import type { MediaPicture } from "./media.ts";
import { SlugParamSchema } from "./projects.ts";
import { ContentSlugParamSchema, ContentSlugSchema, type PostStatus, type PublishingProblem, type RevisionSummary } from "./publishing.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of photo stories (server/stories ↔ src/features/stories and the public pages).
 * Stories go through the same workflow as posts (publishing.ts; `workflowStep` in
 * domain/publishing-workflow.ts) and the same photo checks (alt text, cleared, not restricted). A then-and-now pair must show two different
 * photos that both carry a capture time, taken on different calendar dates; the earlier one is
 * `before`. Lists are JSON arrays (no paging: a project has a handful of stories).
 *
 * Also as for posts (publishing.ts): POST /api/stories/:id/schedule takes `ScheduleInputSchema`;
 * every save keeps a revision (GET /api/stories/:id/revisions, …/revisions/:n/diff, POST
 * …/revisions/:n/restore); GET /api/stories/:id/history lists the workflow steps; an old address
 * answers 301 (see StoryDetail). The diff compares the story's text as read: the title, the
 * introduction, then one line per item in order (its kind, a pair's area, its caption).
 */

const Caption = multilineText().max(1000, "must be at most 1000 characters");
const MediaId = z.number({ error: "must name a photo from the media library" }).int().positive();

export const StoryItemInputSchema = z.discriminatedUnion("kind", [
  z.strictObject({ kind: z.literal("photo"), mediaId: MediaId, caption: Caption.default("") }),
  z
    .strictObject({
      kind: z.literal("pair"),
      area: plainText().min(1, "name the area both photos show").max(100),
      beforeMediaId: MediaId,
      afterMediaId: MediaId,
      caption: Caption.default(""),
    })
    .refine((p) => p.beforeMediaId !== p.afterMediaId, { path: ["afterMediaId"], message: "must be a different photo from the before photo" }),
]);
export type StoryItemInput = z.infer<typeof StoryItemInputSchema>;

const Items = z.array(StoryItemInputSchema).max(200, "a story holds at most 200 items");

/** POST /api/projects/:slug/stories (marketing, lead, admin) → 201 `{ id, slug, status }`. */
export const StoryCreateInputSchema = z.strictObject({
  title: plainText({ error: "is required" }).min(1, "is required").max(200, "must be at most 200 characters"),
  intro: multilineText().max(4000, "must be at most 4000 characters").default(""),
  audience: AudienceSchema,
  slug: ContentSlugSchema.optional(),
  items: Items.default([]),
});
export type StoryCreateInput = z.infer<typeof StoryCreateInputSchema>;

/**
 * PATCH /api/stories/:id: `items` replaces the whole list (order = array order). Stale `version`
 * → 409. Every save keeps a revision (`note` is kept with it). Marketing's edit of an approved or
 * scheduled story returns it to draft; a published one is changed by a lead or admin only.
 */
export const StoryPatchInputSchema = z
  .strictObject({
    version: z.number().int().min(1).optional(),
    title: plainText().min(1, "is required").max(200, "must be at most 200 characters").optional(),
    intro: multilineText().max(4000, "must be at most 4000 characters").optional(),
    audience: AudienceSchema.optional(),
    slug: ContentSlugSchema.optional(),
    items: Items.optional(),
    note: plainText().max(500, "must be at most 500 characters").optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== "version" && k !== "note"), { message: "change at least one field" });
export type StoryPatchInput = z.infer<typeof StoryPatchInputSchema>;

export const StorySlugParamsSchema = SlugParamSchema.extend({ storySlug: ContentSlugParamSchema });

/**
 * One item as read. A picture is null only for staff, when the photo is missing or still
 * processing; public readers get only items whose photos can be shown.
 */
export type StoryItem =
  | { kind: "photo"; mediaId: number; media: MediaPicture | null; caption: string }
  | {
      kind: "pair";
      area: string;
      beforeMediaId: number;
      afterMediaId: number;
      before: MediaPicture | null;
      after: MediaPicture | null;
      caption: string;
    };

/** A row of GET /api/projects/:slug/stories. */
export interface StorySummary {
  id: number;
  slug: string;
  title: string;
  intro: string;
  audience: Audience;
  status: PostStatus;
  publishedAt: string | null;
  /** When a scheduled story goes out (null unless scheduled). */
  scheduledFor: string | null;
  cover: MediaPicture | null;
  itemCount: number;
  authorName: string;
  updatedAt: string;
}

/**
 * GET /api/projects/:slug/stories/:storySlug and GET /api/stories/:id. `version`, `reviewComment`,
 * `revisions` and `problems` for staff only. An old address answers as posts do: 301 with
 * `Location` = the API address under the current slug and body `StoryRedirect`; the page
 * /projects/:slug/stories/:oldSlug answers 301 to the current page.
 */
export interface StoryDetail extends StorySummary {
  projectSlug: string;
  items: StoryItem[];
  version?: number;
  reviewComment?: string | null;
  revisions?: RevisionSummary[];
  problems?: PublishingProblem[];
}

export interface StoryRedirect {
  /** The page path under the current slug. */
  redirectTo: string;
}
