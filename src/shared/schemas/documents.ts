import { z } from "zod";
import { CalendarDateSchema, NamedSchema, patchShape } from "./common.ts";
import { RecordAudienceSchema } from "./risks.ts";
import { plainText } from "./text.ts";

/**
 * The HTTP contract of the document library (server/documents ↔ the site office and the investor
 * room): documents with versions, limited to named investor organisations if chosen, served to an
 * investor stamped for that reader, with a view log. Uploads are multipart (`file` plus the JSON
 * fields below as form fields); the server checks the real type from the bytes.
 */

export const DocumentCategorySchema = z.enum(["monitoring_report", "lender_pack", "technical", "legal", "certificate", "financial", "other"]);
export type DocumentCategory = z.infer<typeof DocumentCategorySchema>;
/** What the stored bytes are, from the bytes themselves. */
export const DocumentFileTypeSchema = z.enum(["pdf", "jpeg", "png", "webp"]);
export type DocumentFileType = z.infer<typeof DocumentFileTypeSchema>;
export const ViewKindSchema = z.enum(["view", "download"]);
export type ViewKind = z.infer<typeof ViewKindSchema>;

const DOCUMENT_FIELDS = {
  title: plainText().min(1, "is required").max(200, "must be at most 200 characters"),
  category: DocumentCategorySchema,
  /** The period it covers, in words or as a month: "November 2026", "Q4 2026". */
  period: plainText().max(60),
  /** The last day of that period, for ordering; optional. */
  periodEnd: CalendarDateSchema.nullable(),
  audience: RecordAudienceSchema,
  /** Limit to these investor organisations (empty = every investor who may see the audience). */
  organisationIds: z.array(z.number().int().positive()).max(50),
} as const;

/** The form fields of POST /api/projects/:slug/documents (multipart, with `file`). */
export const DocumentCreateFieldsSchema = z.strictObject({
  ...DOCUMENT_FIELDS,
  period: DOCUMENT_FIELDS.period.default(""),
  periodEnd: DOCUMENT_FIELDS.periodEnd.default(null),
  organisationIds: DOCUMENT_FIELDS.organisationIds.default([]),
});
export type DocumentCreateFields = z.infer<typeof DocumentCreateFieldsSchema>;

export const DocumentPatchInputSchema = z.strictObject(patchShape(DOCUMENT_FIELDS));
export type DocumentPatchInput = z.infer<typeof DocumentPatchInputSchema>;

/** The form fields of POST /api/documents/:id/versions (multipart, with `file`). */
export const DocumentVersionFieldsSchema = z.strictObject({ note: plainText().max(500).default("") });

/** GET /api/documents/:id/file?version=N&as=view|download (default: latest, download). */
export const DocumentFileQuerySchema = z.strictObject({
  version: z.coerce.number().int().positive().optional(),
  as: ViewKindSchema.default("download"),
  /** Staff only: the clean original (investors always get the stamped copy). */
  clean: z.enum(["1"]).optional(),
});

export const DocumentListQuerySchema = z.strictObject({ category: DocumentCategorySchema.optional() });
/** GET /api/documents/:id/views and /api/projects/:slug/document-views?userId&format=csv */
export const ViewLogQuerySchema = z.strictObject({ userId: z.coerce.number().int().positive().optional(), format: z.enum(["json", "csv"]).default("json") });

/** Organisations of investor accounts (admin writes). */
export const OrganisationInputSchema = z.strictObject({ name: plainText().min(1, "is required").max(120) });
/** PATCH /api/users/:id/organisation (admin): an investor's organisation, or none. */
export const UserOrganisationInputSchema = z.strictObject({ organisationId: z.number().int().positive().nullable() });

const VersionAnswerSchema = z.object({
  id: z.number(),
  number: z.number(),
  fileType: DocumentFileTypeSchema,
  bytes: z.number(),
  pages: z.number().nullable(),
  originalName: z.string(),
  note: z.string(),
  /** What was removed from the file before it was stored (JavaScript, launch actions, embedded files …). */
  removed: z.array(z.string()),
  uploadedBy: z.string().nullable(),
  uploadedAt: z.string(),
});

const DocumentAnswerSchema = z.object({
  id: z.number(),
  ...z.object(DOCUMENT_FIELDS).omit({ organisationIds: true }).shape,
  /** Staff see the organisations it is limited to; investors an empty list. */
  organisations: z.array(NamedSchema),
  latestVersion: VersionAnswerSchema,
  /** Staff: every version; investors: every version too (each served stamped). */
  versions: z.array(VersionAnswerSchema),
  /** For an investor: added or given a new version since their last visit to the documents. */
  newSinceLastVisit: z.boolean(),
  version: z.number(),
  updatedAt: z.string(),
});
export type DocumentAnswer = z.infer<typeof DocumentAnswerSchema>;

const ViewLogRowSchema = z.object({
  id: z.number(),
  documentId: z.number(),
  documentTitle: z.string(),
  versionNumber: z.number(),
  userId: z.number(),
  reader: z.string(),
  email: z.string(),
  organisation: z.string().nullable(),
  kind: ViewKindSchema,
  at: z.string(),
  address: z.string(),
  agent: z.string(),
});
export type ViewLogRow = z.infer<typeof ViewLogRowSchema>;

const OrganisationAnswerSchema = z.object({ id: z.number(), name: z.string(), investors: z.number() });

export const DOCUMENTS_ANSWERS = { document: DocumentAnswerSchema, version: VersionAnswerSchema, view: ViewLogRowSchema, organisation: OrganisationAnswerSchema } as const;
