import { z } from "zod";
import { CalendarDateSchema, IdParamSchema } from "./common.ts";
import { multilineText } from "./text.ts";

/**
 * The HTTP contract of the publishing workflow that updates (/api/posts) and photo stories
 * (/api/stories) share, served by server/publishing for both: the states and the steps between
 * them, the problems that block a publication, the history of steps, the revisions and their
 * diff, the schedule, and the addresses. Each kind's own fields are in posts.ts and stories.ts;
 * which step is open to whom is `workflowStep` in domain/publishing-workflow.ts.
 *
 * Every path below is under `/api/posts/:id/…` and `/api/stories/:id/…` alike.
 */

/** The states of published work (DESIGN.md names the codes "post status"; photo stories use the same). */
export const PostStatusSchema = z.enum(["draft", "in_review", "approved", "scheduled", "published", "withdrawn"]);
export type PostStatus = z.infer<typeof PostStatusSchema>;

/** The workflow steps, in the order the office offers them. */
export const WORKFLOW_ACTIONS = ["submit", "approve", "return", "publish", "schedule", "withdraw"] as const;
export type WorkflowAction = (typeof WORKFLOW_ACTIONS)[number];

/** A post or story address within its project: lower-case words joined by hyphens. */
export const ContentSlugSchema = z
  .string()
  .trim()
  .toLowerCase()
  .min(1, "is required")
  .max(120, "must be at most 120 characters")
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "may hold only lower-case letters, digits and single hyphens");

/** The same address in a page's path (`:postSlug`, `:storySlug`), checked as it comes. */
export const ContentSlugParamSchema = z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid address").max(120);

/** POST …/:id/return (lead, admin): back to draft with the reviewer's comments. */
export const ReturnInputSchema = z.strictObject({
  comment: multilineText({ error: "say what to change" }).min(1, "say what to change").max(4000, "must be at most 4000 characters"),
});

/**
 * POST …/:id/schedule (lead, admin): an instant with offset, or a wall-clock date and time in
 * the project's time zone. It must be in the future.
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

/** GET …/:id/revisions/:n/diff?against=m (staff); without `against`, the revision before n. */
export const RevisionParamsSchema = IdParamSchema.extend({ n: z.coerce.number().int().positive() });
export const DiffQuerySchema = z.strictObject({ against: z.coerce.number().int().positive().optional() });

/**
 * One problem that stops publication. A check that fails answers 422
 * `{ error: { code: "publishing_blocked", message, problems: PublishingProblem[] } }`.
 */
export interface PublishingProblem {
  code: "no_cover" | "missing_alt_text" | "not_cleared" | "restricted" | "media_missing" | "media_not_ready" | "milestone_missing" | "milestone_not_visible" | "pair_dates" | "no_items";
  message: string;
  mediaId?: number;
  milestoneId?: number;
}

/** The answer of every workflow step. */
export interface WorkflowResult {
  id: number;
  status: PostStatus;
  scheduledFor?: string | null;
}

/** A row of GET …/:id/revisions (newest first). */
export interface RevisionSummary {
  number: number;
  createdAt: string;
  authorName: string;
  title: string;
  status: PostStatus;
  note: string | null;
}

/** GET …/:id/revisions/:n/diff: a word diff of the text as read (newlines are their own parts). */
export interface RevisionDiff {
  from: number;
  to: number;
  parts: Array<{ op: "equal" | "insert" | "delete"; text: string }>;
  inserted: number;
  deleted: number;
}

/**
 * History entries that are not workflow steps: an outside reviewer's answer through a review link
 * (decision 060), one code per verdict so a reader knows the verdict without parsing words. The
 * item's state does not change (`from` = `to`).
 */
export const OUTSIDE_REVIEW_ACTIONS = { looks_right: "outside_review_looks_right", needs_changes: "outside_review_needs_changes" } as const;
export type OutsideReviewAction = (typeof OUTSIDE_REVIEW_ACTIONS)[keyof typeof OUTSIDE_REVIEW_ACTIONS];

/**
 * A row of GET …/:id/history (newest first): a workflow step (`WorkflowAction`), an edit that sent
 * approved work back (`edited`), the scheduler's publication or hold-back (`schedule_failed`), or an
 * outside reviewer's answer (`OutsideReviewAction`).
 */
export interface PublishingEvent {
  action: string;
  from: PostStatus;
  to: PostStatus;
  /** Who took the step ("Name (outside reviewer, Organisation)" for a review answer); null when the scheduler held it back. */
  by: string | null;
  comment: string | null;
  at: string;
}
