import { z } from "zod";
import { VersionSchema } from "./common.ts";
import { RichTextDocSchema } from "./rich-text.ts";
import { RecordAudienceSchema } from "./risks.ts";
import { plainText } from "./text.ts";

/**
 * The HTTP contract of monthly investor reports (server/reports ↔ the site office and the investor
 * room) and of calendar feeds. A report's figures are the record as it stood at the month's end
 * (project time zone); once issued they are frozen, and the PDF is a document of the library.
 */

export const ReportStateSchema = z.enum(["draft", "issued", "superseded"]);
export type ReportState = z.infer<typeof ReportStateSchema>;

/** The report's sections, in order; each may carry the lead's commentary. */
export const REPORT_SECTIONS = ["summary", "schedule", "budget", "facility", "risks", "decisions", "photos", "cautions"] as const;
export const ReportSectionSchema = z.enum(REPORT_SECTIONS);
export type ReportSection = z.infer<typeof ReportSectionSchema>;

const Month = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "must be a month YYYY-MM");

/** POST /api/projects/:slug/reports: a draft for a month that has ended (422 otherwise). */
export const ReportCreateInputSchema = z.strictObject({
  month: Month,
  audience: RecordAudienceSchema.default("investor"),
});
export type ReportCreateInput = z.infer<typeof ReportCreateInputSchema>;

/** PATCH /api/reports/:id (drafts only): commentary per section. */
export const ReportPatchInputSchema = z.strictObject({
  commentary: z.partialRecord(ReportSectionSchema, RichTextDocSchema.nullable()).optional(),
  audience: RecordAudienceSchema.optional(),
  version: VersionSchema,
});
export type ReportPatchInput = z.infer<typeof ReportPatchInputSchema>;

/** POST /api/reports/:id/issue (lead, admin): freezes figures and PDF, notifies readers once. */
export const ReportIssueInputSchema = z.strictObject({ version: VersionSchema });
/** POST /api/reports/:id/correct (issued only): a new draft that will supersede it, saying what changed. */
export const ReportCorrectInputSchema = z.strictObject({ note: plainText().min(1, "is required").max(2000), version: VersionSchema });

/** GET /api/reports/:id/pdf?as=view|download (investors always stamped; drafts: staff preview). */
export const ReportPdfQuerySchema = z.strictObject({ as: z.enum(["view", "download"]).default("download") });

/** GET /api/projects/:slug/reports (FIXED) item. */
const ReportListItemSchema = z.object({
  id: z.number(),
  month: z.string(),
  state: ReportStateSchema,
  issuedAt: z.string().nullable(),
  audience: RecordAudienceSchema,
  supersedes: z.object({ id: z.number(), month: z.string() }).nullable(),
  supersededBy: z.object({ id: z.number() }).nullable(),
  correctionNote: z.string().nullable(),
  version: z.number(),
});
export type ReportListItem = z.infer<typeof ReportListItemSchema>;

/**
 * GET /api/reports/:id: the report with its figures (frozen when issued, computed at the month end
 * while a draft) and the commentary rendered to sanitised HTML per section. `figures` is the one
 * object both the PDF and the web page are drawn from; its shape is src/shared/domain/report-figures.ts.
 */
const ReportDetailSchema = ReportListItemSchema.extend({
  monthEnd: z.string(),
  commentary: z.record(z.string(), z.unknown()),
  commentaryHtml: z.record(z.string(), z.string()),
  figures: z.record(z.string(), z.unknown()),
  documentId: z.number().nullable(),
});
export type ReportDetail = z.infer<typeof ReportDetailSchema>;

/** Calendar feeds: POST /api/projects/:slug/calendar-feed (signed-in; a new token, old ones revoked), DELETE to revoke. */
const CalendarFeedSchema = z.object({ url: z.string(), createdAt: z.string() });
export type CalendarFeed = z.infer<typeof CalendarFeedSchema>;

export const REPORTS_ANSWERS = { item: ReportListItemSchema, detail: ReportDetailSchema, calendarFeed: CalendarFeedSchema } as const;
