import { z } from "zod";
import { IdParamSchema } from "./common.ts";
import { pageAnswerShape } from "./paging.ts";
import { ProjectRefSchema, ProjectSchema } from "./projects.ts";
import { FrequencySchema, SubscriberRowSchema } from "./subscribers.ts";
import { plainText } from "./text.ts";

/**
 * The HTTP contract of the digests module (server/digests ↔ src/features/digests): runs and
 * their counts, upcoming runs, a subscriber's preview, a test to oneself, pause and resume.
 */

export const DigestRunStatusSchema = z.enum(["queued", "running", "done", "failed", "paused"]);
export type DigestRunStatus = z.infer<typeof DigestRunStatusSchema>;

/** The project a run or a test message is for, by its address. */
const ProjectSlug = plainText({ error: "is required" }).min(1, "is required").max(120);
/** `?project=`: one project's runs only, by its address. */
const ProjectFilter = plainText().min(1).max(120).optional();

export const DigestRunInputSchema = z.strictObject({
  projectSlug: ProjectSlug,
  frequency: z.enum(["weekly", "monthly"], { error: "must be weekly or monthly" }),
  /** The moment the run stands for (default now): the window is the ISO week or month before it. */
  at: z.iso.datetime({ offset: true, error: "must be an ISO 8601 date-time" }).optional(),
});
export type DigestRunInput = z.infer<typeof DigestRunInputSchema>;

export const DigestTestInputSchema = z.strictObject({
  projectSlug: ProjectSlug,
  audience: z.enum(["public", "investor"]).default("public"),
});
export type DigestTestInput = z.infer<typeof DigestTestInputSchema>;

export const DigestRunListQuerySchema = z.strictObject({
  project: ProjectFilter,
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export const DigestUpcomingQuerySchema = z.strictObject({ project: ProjectFilter });

export const DigestPreviewQuerySchema = z.strictObject({ subscriberId: z.coerce.number({ error: "must be a number" }).int().positive() });

export const DigestWebParamSchema = z.strictObject({ token: z.string().min(10).max(400) });

/** The period of news a digest run covers, as UTC instants. */
const windowShape = { windowStart: z.string(), windowEnd: z.string() };

export const DigestCountsSchema = z.object({
  total: z.number(),
  queued: z.number(),
  sent: z.number(),
  failed: z.number(),
  skipped: z.number(),
});
export type DigestCounts = z.infer<typeof DigestCountsSchema>;

/** GET /api/digests/runs (a list of these), GET /api/digests/runs/:id, and what pause and resume answer. */
export const DigestRunSummarySchema = z.object({
  id: z.number(),
  project: ProjectRefSchema,
  frequency: FrequencySchema,
  status: DigestRunStatusSchema,
  test: z.boolean(),
  ...windowShape,
  counts: DigestCountsSchema,
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  /** Seconds from start to finish; null while unfinished. */
  durationSeconds: z.number().nullable(),
});
export type DigestRunSummary = z.infer<typeof DigestRunSummarySchema>;

/** POST /api/digests/runs → 201 (a new run) or 200 (that period's run already exists). */
export const DigestRunStartedSchema = z.object({ id: z.number(), status: DigestRunStatusSchema });
export type DigestRunStarted = z.infer<typeof DigestRunStartedSchema>;

/** GET /api/digests/upcoming (a list of these). */
export const DigestUpcomingSchema = z.object({
  project: ProjectSchema.pick({ slug: true, name: true, timeZone: true }),
  frequency: FrequencySchema.exclude(["immediate"]),
  /** When the run starts (UTC instant). */
  at: z.string(),
  ...windowShape,
  recipients: z.number(),
});
export type DigestUpcoming = z.infer<typeof DigestUpcomingSchema>;

/** GET /api/digests/preview?subscriberId= */
export const DigestPreviewSchema = z.object({
  subscriber: SubscriberRowSchema.pick({ id: true, email: true, audience: true, frequency: true }),
  ...windowShape,
  /** False when there is nothing to say: no e-mail would be sent. */
  wouldSend: z.boolean(),
  subject: z.string(),
  preheader: z.string(),
  html: z.string(),
  text: z.string(),
});
export type DigestPreview = z.infer<typeof DigestPreviewSchema>;

/** POST /api/digests/test → 202: the test message, sent to the caller. */
export const DigestTestSentSchema = z.object({ messageId: z.string() });
export type DigestTestSent = z.infer<typeof DigestTestSentSchema>;

// A subscriber's archive of the digests they were sent (decision 045).

/** `?page=` of a subscriber's archive: 20 digests a page, newest first. */
export const DigestArchiveQuerySchema = z.strictObject({ page: z.coerce.number({ error: "must be a number" }).int().min(1).max(10_000).default(1) });
export type DigestArchiveQuery = z.infer<typeof DigestArchiveQuerySchema>;
export const DIGEST_ARCHIVE_PAGE_SIZE = 20;

/** The signed preferences link is the credential; the signature check, not the shape, decides (a link not ours is 404). */
export const DigestArchiveLinkParamSchema = z.strictObject({ token: z.string().min(1).max(500) });
export const DigestArchiveCopyParamSchema = DigestArchiveLinkParamSchema.extend({ id: IdParamSchema.shape.id });

/** One sent digest in the list: when, what about, the window it covered, and where to read it. */
export const DigestArchiveItemSchema = z.object({
  id: z.number(),
  project: ProjectRefSchema,
  frequency: FrequencySchema,
  subject: z.string(),
  sentAt: z.string(),
  ...windowShape,
  /** The days the window covered, in the project's time zone (YYYY-MM-DD). */
  firstDay: z.string(),
  lastDay: z.string(),
  /** The signed "view in the browser" copy; null for a digest the archive withholds whole. */
  webUrl: z.string().nullable(),
});
export type DigestArchiveItem = z.infer<typeof DigestArchiveItemSchema>;

export const DigestArchivePageSchema = z.object({ items: z.array(DigestArchiveItemSchema), ...pageAnswerShape });
export type DigestArchivePage = z.infer<typeof DigestArchivePageSchema>;

/**
 * One digest as it was sent, less whatever has since become hidden from its reader. `html` is
 * null when the whole digest is withheld (sent before Plumbline kept what each digest held).
 */
export const DigestArchiveCopySchema = DigestArchiveItemSchema.extend({
  html: z.string().nullable(),
  withheld: z.object({ count: z.number(), whole: z.boolean(), notice: z.string() }).nullable(),
});
export type DigestArchiveCopy = z.infer<typeof DigestArchiveCopySchema>;
