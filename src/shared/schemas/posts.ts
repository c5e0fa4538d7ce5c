import { z } from "zod";
import { AudienceSchema, CalendarDateSchema, type Audience, type Role } from "./common.ts";
import type { MediaPicture } from "./media.ts";
import { RichTextDocSchema, type RichTextDoc } from "./rich-text.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of updates (server/posts ↔ src/features/posts and the public pages).
 *
 * Lists are JSON arrays; the total number of matching posts is in the `X-Total-Count`
 * header (10 a page, `page` from 1). Instants are ISO 8601 with offset; calendar dates
 * `YYYY-MM-DD`. Errors are `{ error: { code, message, fields? } }`; a publishing check that
 * fails answers 422 `{ error: { code: "publishing_blocked", message, problems: PublishingProblem[] } }`.
 */

export const POSTS_PAGE_SIZE = 10;

export const PostStatusSchema = z.enum(["draft", "in_review", "approved", "scheduled", "published", "withdrawn"]);
export type PostStatus = z.infer<typeof PostStatusSchema>;

/** A post or story address within its project: lower-case words joined by hyphens. */
export const ContentSlugSchema = z
  .string()
  .trim()
  .toLowerCase()
  .min(1, "is required")
  .max(120, "must be at most 120 characters")
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "may hold only lower-case letters, digits and single hyphens");

/** A tag of a post: an area ("Hall 2A") or a system ("cooling"). */
export const PostTagSchema = z.strictObject({
  kind: z.enum(["area", "system"]),
  value: plainText().min(1, "is empty").max(100, "must be at most 100 characters"),
});
export type PostTag = z.infer<typeof PostTagSchema>;

const Title = plainText({ error: "is required" }).min(1, "is required").max(200, "must be at most 200 characters");
const Summary = multilineText().max(600, "must be at most 600 characters");
const MediaId = z.number().int().positive();

/** POST /api/projects/:slug/posts (marketing, lead, admin) → 201 `{ id, slug, status }`. Without `slug`, one is made from the title. */
export const PostCreateInputSchema = z.strictObject({
  title: Title,
  summary: Summary.default(""),
  body: RichTextDocSchema,
  audience: AudienceSchema,
  coverMediaId: MediaId.nullable().optional(),
  milestoneIds: z.array(z.number().int().positive()).max(50).optional(),
  tags: z.array(PostTagSchema).max(30).optional(),
  slug: ContentSlugSchema.optional(),
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
    title: Title.optional(),
    summary: Summary.optional(),
    body: RichTextDocSchema.optional(),
    audience: AudienceSchema.optional(),
    coverMediaId: MediaId.nullable().optional(),
    milestoneIds: z.array(z.number().int().positive()).max(50).optional(),
    tags: z.array(PostTagSchema).max(30).optional(),
    slug: ContentSlugSchema.optional(),
    note: plainText().max(500).optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== "version" && k !== "note"), { message: "change at least one field" });
export type PostPatchInput = z.infer<typeof PostPatchInputSchema>;

/** GET /api/projects/:slug/posts query. `status` is for staff only (others see published posts). */
export const PostListQuerySchema = z.strictObject({
  page: z.coerce.number({ error: "must be a number" }).int().min(1).max(10_000).default(1),
  tag: plainText().min(1).max(100).optional(),
  q: plainText().min(1, "is empty").max(200, "must be at most 200 characters").optional(),
  status: PostStatusSchema.optional(),
  audience: AudienceSchema.optional(),
});
export type PostListQuery = z.infer<typeof PostListQuerySchema>;

export const PostSlugParamsSchema = z.strictObject({
  slug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address").max(100),
  postSlug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid address").max(120),
});

/** POST /api/posts/:id/return (lead, admin): back to draft with the reviewer's comments. */
export const ReturnInputSchema = z.strictObject({
  comment: multilineText({ error: "say what to change" }).min(1, "say what to change").max(4000, "must be at most 4000 characters"),
});

/**
 * POST /api/posts/:id/schedule (lead, admin): an instant with offset, or a wall-clock date and
 * time in the project's time zone. It must be in the future.
 */
export const ScheduleInputSchema = z.strictObject({
  at: z.union([
    z.iso.datetime({ offset: true, error: "must be an instant with its offset, or { date, time }" }),
    z.strictObject({
      date: CalendarDateSchema,
      time: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "must be a time as HH:MM"),
    }),
  ]),
});
export type ScheduleInput = z.infer<typeof ScheduleInputSchema>;

/** GET /api/posts/:id/revisions/:n/diff?against=m (staff); without `against`, the revision before n. */
export const RevisionParamsSchema = z.strictObject({
  id: z.coerce.number().int().positive(),
  n: z.coerce.number().int().positive(),
});
export const DiffQuerySchema = z.strictObject({ against: z.coerce.number().int().positive().optional() });

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
  tags: PostTag[];
  authorName: string;
  updatedAt: string;
}

/** One problem that stops publication. */
export interface PublishingProblem {
  code: "no_cover" | "missing_alt_text" | "not_cleared" | "restricted" | "media_missing" | "media_not_ready" | "milestone_missing" | "milestone_not_visible" | "pair_dates" | "no_items";
  message: string;
  mediaId?: number;
  milestoneId?: number;
}

export interface PostRevisionSummary {
  number: number;
  createdAt: string;
  authorName: string;
  title: string;
  status: PostStatus;
  note: string | null;
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
  revisions?: PostRevisionSummary[];
  reviewComment?: string | null;
  problems?: PublishingProblem[];
}

export interface PostRedirect {
  redirectTo: string;
}

/** The answer of every workflow action. */
export interface WorkflowResult {
  id: number;
  status: PostStatus;
  scheduledFor?: string | null;
}

/** GET /api/posts/:id/revisions/:n/diff: a word diff of the rendered text (newlines are their own parts). */
export interface RevisionDiff {
  from: number;
  to: number;
  parts: Array<{ op: "equal" | "insert" | "delete"; text: string }>;
  inserted: number;
  deleted: number;
}

// ---- The publishing workflow, shared with photo stories ----

export type WorkflowAction = "submit" | "approve" | "return" | "publish" | "schedule" | "withdraw";

/**
 * What the workflow allows. `by` is the caller's role; `ownWork` whether the caller wrote it.
 * Answers the next status, or a reason the step is not open ("role" → 403, "state" → 409).
 *
 * draft → in_review (submit: marketing, lead, admin) → approved (approve: lead, admin)
 * → published (publish) or scheduled (schedule: lead, admin) → withdrawn (withdraw: lead, admin).
 * Return sends in_review, approved or scheduled back to draft with comments (lead, admin).
 * A lead or admin may publish or schedule their own draft or in-review post without approval.
 * A withdrawn post may be submitted again, or published again by a lead or admin.
 * Withdrawing a scheduled post cancels the schedule (back to approved).
 */
export function workflowStep(
  action: WorkflowAction,
  from: PostStatus,
  by: Role,
  ownWork: boolean,
): { ok: true; to: PostStatus } | { ok: false; reason: "role" | "state"; message: string } {
  const approver = by === "lead" || by === "admin";
  const staff = approver || by === "marketing";
  const role = (message: string) => ({ ok: false as const, reason: "role" as const, message });
  const state = (message: string) => ({ ok: false as const, reason: "state" as const, message });
  switch (action) {
    case "submit":
      if (!staff) return role("Only staff submit for review.");
      if (from === "draft" || from === "withdrawn") return { ok: true, to: "in_review" };
      return state(`It is ${STATUS_WORDS[from]}; only a draft or a withdrawn one can be submitted.`);
    case "approve":
      if (!approver) return role("Only a lead or an admin approves.");
      if (from === "in_review") return { ok: true, to: "approved" };
      return state(`It is ${STATUS_WORDS[from]}; only one in review can be approved.`);
    case "return":
      if (!approver) return role("Only a lead or an admin returns work with comments.");
      if (from === "in_review" || from === "approved" || from === "scheduled") return { ok: true, to: "draft" };
      return state(`It is ${STATUS_WORDS[from]}; only one in review, approved or scheduled can be returned.`);
    case "publish":
    case "schedule": {
      if (!approver) return role("Only a lead or an admin publishes.");
      const to: PostStatus = action === "publish" ? "published" : "scheduled";
      if (from === "approved" || (action === "publish" && (from === "withdrawn" || from === "scheduled"))) return { ok: true, to };
      if ((from === "draft" || from === "in_review") && ownWork) return { ok: true, to };
      if (from === "draft" || from === "in_review") return state("It has not been approved yet; approve it first (a lead may publish only their own work without approval).");
      return state(`It is ${STATUS_WORDS[from]} already.`);
    }
    case "withdraw":
      if (!approver) return role("Only a lead or an admin withdraws.");
      if (from === "published") return { ok: true, to: "withdrawn" };
      if (from === "scheduled") return { ok: true, to: "approved" };
      return state(`It is ${STATUS_WORDS[from]}; only a published or scheduled one can be withdrawn.`);
  }
}

/** Words for people (the codes stay in JSON). */
export const STATUS_WORDS: Record<PostStatus, string> = {
  draft: "a draft",
  in_review: "in review",
  approved: "approved",
  scheduled: "scheduled",
  published: "published",
  withdrawn: "withdrawn",
};
