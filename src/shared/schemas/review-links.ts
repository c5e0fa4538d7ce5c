import { z } from "zod";
import { EmailSchema, type Audience } from "./common.ts";
import type { MediaPicture } from "./media.ts";
import type { StoryItem } from "./stories.ts";
import { multilineText, plainText } from "./text.ts";

/** A review link lasts this many days unless its maker chooses otherwise, and never longer than the maximum. */
export const REVIEW_LINK_DEFAULT_DAYS = 7;
export const REVIEW_LINK_MAX_DAYS = 30;

export const ReviewContentKindSchema = z.enum(["post", "story"]);
export type ReviewContentKind = z.infer<typeof ReviewContentKindSchema>;

export const ReviewVerdictSchema = z.enum(["looks_right", "needs_changes"]);
export type ReviewVerdict = z.infer<typeof ReviewVerdictSchema>;

/** POST /api/posts/:id/review-links and POST /api/stories/:id/review-links (staff; the content in draft or in review). */
export const ReviewLinkInputSchema = z.strictObject({
  name: plainText().min(1, "Enter the reviewer's name").max(200),
  email: EmailSchema,
  organisation: plainText().max(200).optional(),
  days: z.coerce
    .number({ error: "must be a number of days" })
    .int("must be a whole number of days")
    .min(1, "must be at least 1 day")
    .max(REVIEW_LINK_MAX_DAYS, `must be at most ${REVIEW_LINK_MAX_DAYS} days`)
    .default(REVIEW_LINK_DEFAULT_DAYS),
});
export type ReviewLinkInput = z.infer<typeof ReviewLinkInputSchema>;

/** 201 from creating a link: `url` is absolute and works without signing in. Shown once, to its maker only. */
export const ReviewLinkCreatedSchema = z.object({ id: z.number(), url: z.string() });
export type ReviewLinkCreated = z.infer<typeof ReviewLinkCreatedSchema>;

/** One opening or answer of a link, as staff see it in the content's history. */
export const ReviewLinkEventSchema = z.object({
  kind: z.enum(["opened", "answered"]),
  verdict: ReviewVerdictSchema.nullable(),
  comment: z.string().nullable(),
  revisionNumber: z.number(),
  ip: z.string().nullable(),
  at: z.string(),
});
export type ReviewLinkEvent = z.infer<typeof ReviewLinkEventSchema>;

/** A link as staff list it (GET /api/posts/:id/review-links): never its token or URL. */
export const ReviewLinkSchema = z.object({
  id: z.number(),
  contentKind: ReviewContentKindSchema,
  contentId: z.number(),
  revisionNumber: z.number(),
  reviewer: z.object({ name: z.string(), email: z.string(), organisation: z.string().nullable() }),
  createdBy: z.object({ id: z.number().nullable(), name: z.string() }),
  createdAt: z.string(),
  expiresAt: z.string(),
  revokedAt: z.string().nullable(),
  state: z.enum(["live", "expired", "revoked"]),
  events: z.array(ReviewLinkEventSchema),
});
export type ReviewLink = z.infer<typeof ReviewLinkSchema>;
export const ReviewLinkListSchema = z.object({ links: z.array(ReviewLinkSchema) });

/** The reviewer's answer (POST /api/review/:token/answer). */
export const ReviewAnswerInputSchema = z.strictObject({
  verdict: ReviewVerdictSchema,
  comment: multilineText().max(4000).optional(),
});
export type ReviewAnswerInput = z.infer<typeof ReviewAnswerInputSchema>;

/** A review link's token in the path: the signed-token module's shape, checked there. */
export const ReviewTokenParamSchema = z.strictObject({ token: z.string().min(1).max(800) });

/**
 * Which revision the reviewer reads (GET /api/review/:token, POST …/answer): without it, the one
 * the link was made for; `latest`, the newest revision of the same content, through the same link.
 */
export const ReviewRevisionQuerySchema = z.strictObject({ revision: z.literal("latest").optional() });
export type ReviewRevisionQuery = z.infer<typeof ReviewRevisionQuerySchema>;

/**
 * GET /api/review/:token: one revision of a post or story, read-only, for the link's reviewer.
 * `newerRevision`: the content's newest revision when it is not the one shown (else null).
 * `summary` and `html` are an update's; `intro` and `items` a photo story's.
 */
export interface ReviewCopy {
  kind: ReviewContentKind;
  projectName: string;
  reviewerName: string;
  expiresAt: string;
  revisionNumber: number;
  /** The revision the link was made for (equal to `revisionNumber` unless the newest was asked for). */
  linkRevision: number;
  newerRevision: number | null;
  title: string;
  audience: Audience;
  summary: string | null;
  html: string | null;
  /** Pictures' files are served under the link's own address, for as long as the link lives. */
  cover: MediaPicture | null;
  intro: string | null;
  items: StoryItem[];
  /** The reviewer's own earlier answers, newest first. */
  answers: Array<{ verdict: ReviewVerdict; comment: string | null; revisionNumber: number; at: string }>;
}
