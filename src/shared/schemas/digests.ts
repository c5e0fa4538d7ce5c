import { z } from "zod";
import type { Frequency } from "./subscribers.ts";
import { plainText } from "./text.ts";

/**
 * The HTTP contract of the digests module (server/digests ↔ src/features/digests): runs and
 * their counts, upcoming runs, a subscriber's preview, a test to oneself, pause and resume.
 */

export const DigestRunStatusSchema = z.enum(["queued", "running", "done", "failed", "paused"]);
export type DigestRunStatus = z.infer<typeof DigestRunStatusSchema>;

export const DigestRunInputSchema = z.strictObject({
  projectSlug: plainText({ error: "is required" }).min(1, "is required").max(120),
  frequency: z.enum(["weekly", "monthly"], { error: "must be weekly or monthly" }),
  /** The moment the run stands for (default now): the window is the ISO week or month before it. */
  at: z.iso.datetime({ offset: true, error: "must be an ISO 8601 date-time" }).optional(),
});
export type DigestRunInput = z.infer<typeof DigestRunInputSchema>;

export const DigestTestInputSchema = z.strictObject({
  projectSlug: plainText({ error: "is required" }).min(1, "is required").max(120),
  audience: z.enum(["public", "investor"]).default("public"),
});
export type DigestTestInput = z.infer<typeof DigestTestInputSchema>;

export const DigestRunListQuerySchema = z.strictObject({
  project: plainText().min(1).max(120).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export const DigestUpcomingQuerySchema = z.strictObject({ project: plainText().min(1).max(120).optional() });

export const DigestPreviewQuerySchema = z.strictObject({ subscriberId: z.coerce.number({ error: "must be a number" }).int().positive() });

export const DigestWebParamSchema = z.strictObject({ token: z.string().min(10).max(400) });

export interface DigestCounts {
  total: number;
  queued: number;
  sent: number;
  failed: number;
  skipped: number;
}

export interface DigestRunSummary {
  id: number;
  project: { slug: string; name: string };
  frequency: Frequency;
  status: DigestRunStatus;
  test: boolean;
  windowStart: string;
  windowEnd: string;
  counts: DigestCounts;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  /** Seconds from start to finish; null while unfinished. */
  durationSeconds: number | null;
}

export interface DigestUpcoming {
  project: { slug: string; name: string; timeZone: string };
  frequency: Exclude<Frequency, "immediate">;
  /** When the run starts (UTC instant). */
  at: string;
  windowStart: string;
  windowEnd: string;
  recipients: number;
}

export interface DigestPreview {
  subscriber: { id: number; email: string; audience: "public" | "investor"; frequency: Frequency };
  windowStart: string;
  windowEnd: string;
  /** False when there is nothing to say: no e-mail would be sent. */
  wouldSend: boolean;
  subject: string;
  preheader: string;
  html: string;
  text: string;
}
