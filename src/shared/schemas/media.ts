import { z } from "zod";
import { CalendarDateSchema } from "./common.ts";
import { SystemSchema, type System } from "./programme.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the media library (server/media ↔ src/features/media), and the
 * picture shape other modules render (posts, stories, the public site, e-mail).
 */

export const MediaStatusSchema = z.enum(["processing", "ready", "failed"]);
export type MediaStatus = z.infer<typeof MediaStatusSchema>;

/** A photo starts `unreviewed`; only a lead or an admin marks it `cleared` or `restricted`. */
export const SensitivitySchema = z.enum(["unreviewed", "cleared", "restricted"]);
export type Sensitivity = z.infer<typeof SensitivitySchema>;

export const VariantFormatSchema = z.enum(["avif", "webp", "jpeg"]);
export type VariantFormat = z.infer<typeof VariantFormatSchema>;

export const TagKindSchema = z.enum(["area", "system", "milestone"]);
export type TagKind = z.infer<typeof TagKindSchema>;

/** The system whose photos may show access points, cameras and door hardware. */
export const SECURITY_SYSTEM: System = "security";

const Area = plainText().min(1, "must not be empty").max(100, "must be at most 100 characters");

/** Tags by kind; milestones are milestone ids of the photo's own project. */
export const MediaTagsSchema = z.strictObject({
  areas: z.array(Area).max(20, "at most 20 areas"),
  systems: z.array(SystemSchema).max(SystemSchema.options.length),
  milestones: z.array(z.number().int().positive()).max(50, "at most 50 milestones"),
});
export type MediaTags = z.infer<typeof MediaTagsSchema>;

export const MediaTagsPatchSchema = MediaTagsSchema.partial();
export type MediaTagsPatch = z.infer<typeof MediaTagsPatchSchema>;

/** A point of interest as fractions of the displayed width and height, from the top left. */
export const FocalSchema = z.strictObject({
  x: z.number({ error: "must be a number" }).min(0, "must be between 0 and 1").max(1, "must be between 0 and 1"),
  y: z.number({ error: "must be a number" }).min(0, "must be between 0 and 1").max(1, "must be between 0 and 1"),
});
export type Focal = z.infer<typeof FocalSchema>;

/** Empty text means "none": stored as null. Alt text and captions are typed in text areas, so may hold line breaks. */
const OptionalText = (max: number, lines: "one" | "several") =>
  (lines === "one" ? plainText({ error: "must be text" }) : multilineText({ error: "must be text" }))
    .max(max, `must be at most ${max} characters`)
    .transform((s) => (s === "" ? null : s))
    .nullable();

/** PATCH /api/media/:id. `sensitivity` is for leads and admins only (403 otherwise). */
export const MediaPatchInputSchema = z
  .strictObject({
    altText: OptionalText(1000, "several").optional(),
    caption: OptionalText(2000, "several").optional(),
    credit: OptionalText(200, "one").optional(),
    tags: MediaTagsPatchSchema.optional(),
    focal: FocalSchema.optional(),
    sensitivity: SensitivitySchema.optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: "name at least one field to change", path: ["_"] });
export type MediaPatchInput = z.infer<typeof MediaPatchInputSchema>;

/** POST /api/media/bulk-tags: add and/or remove tags on several photos at once. */
export const BulkTagInputSchema = z
  .strictObject({
    ids: z.array(z.number().int().positive()).min(1, "choose at least one photo").max(200, "at most 200 photos at once"),
    add: MediaTagsPatchSchema.optional(),
    remove: MediaTagsPatchSchema.optional(),
  })
  .refine((v) => countTags(v.add) + countTags(v.remove) > 0, { message: "name at least one tag to add or remove", path: ["add"] });
export type BulkTagInput = z.infer<typeof BulkTagInputSchema>;

function countTags(t: MediaTagsPatch | undefined): number {
  return t ? (t.areas?.length ?? 0) + (t.systems?.length ?? 0) + (t.milestones?.length ?? 0) : 0;
}

/** POST /api/media/:id/review: the lead's decision on an unreviewed photo. */
export const ReviewInputSchema = z.strictObject({
  sensitivity: z.enum(["cleared", "restricted"], { error: "must be cleared or restricted" }),
});
export type ReviewInput = z.infer<typeof ReviewInputSchema>;

const QueryBool = z.enum(["true", "false", "1", "0"]).transform((v) => v === "true" || v === "1");
const ProjectSlug = z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address").max(100);

/** GET /api/media: the library, filtered and paginated. */
export const MediaListQuerySchema = z
  .strictObject({
    project: ProjectSlug.optional(),
    /** Any tag of any kind with exactly this value (an area name, a system, a milestone id). */
    tag: plainText().min(1).max(100).optional(),
    area: Area.optional(),
    system: SystemSchema.optional(),
    milestone: z.coerce.number().int().positive().optional(),
    takenFrom: CalendarDateSchema.optional(),
    takenTo: CalendarDateSchema.optional(),
    sensitivity: SensitivitySchema.optional(),
    status: MediaStatusSchema.optional(),
    missingAlt: QueryBool.optional(),
    flagged: QueryBool.optional(),
    q: plainText().max(100).optional(),
    page: z.coerce.number().int().min(1).max(10_000).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(48),
  })
  .refine((v) => !v.takenFrom || !v.takenTo || v.takenFrom <= v.takenTo, { message: "must not be after takenTo", path: ["takenFrom"] });
export type MediaListQuery = z.infer<typeof MediaListQuerySchema>;
export type MediaListFilters = Omit<MediaListQuery, "page" | "pageSize">;

export const ProjectQuerySchema = z.strictObject({ project: ProjectSlug.optional() });

/** One derivative: a same-origin URL that never changes once the photo is published. */
export interface MediaVariant {
  url: string;
  width: number;
  height: number;
  format: VariantFormat;
  bytes: number;
}

/** A photo as the site office sees it (staff only: `hadGps` and the original's link included). */
export interface MediaItem {
  id: number;
  projectId: number;
  status: MediaStatus;
  failureReason: string | null;
  name: string;
  mime: string;
  bytes: number;
  width: number;
  height: number;
  /** Camera local time `YYYY-MM-DDTHH:mm:ss[.sss][±HH:MM]`, never shifted by a server's zone. */
  takenAt: string | null;
  /** Whether the original carried location data; the coordinates themselves are never kept. */
  hadGps: boolean;
  altText: string | null;
  caption: string | null;
  credit: string | null;
  focal: Focal;
  sensitivity: Sensitivity;
  flaggedForReview: boolean;
  reviewedAt: string | null;
  reviewedBy: string | null;
  placeholder: string | null;
  dominantColor: string | null;
  isIllustration: boolean;
  tags: MediaTags;
  variants: MediaVariant[];
  originalUrl: string;
  uploadedBy: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface MediaListResponse {
  items: MediaItem[];
  total: number;
  page: number;
  pageSize: number;
}

/** What POST /api/media answers for each file, in the order sent. */
export interface MediaUploadResult {
  id: number;
  status: MediaStatus;
  name: string;
  width: number;
  height: number;
  takenAt: string | null;
  /** Set when the same bytes were already in the project's library: that item is offered instead. */
  duplicateOf: number | null;
}

/** One refused file of an upload (in `error.files` of the 4xx answer). */
export interface RefusedFile {
  index: number;
  name: string;
  code: string;
  status: number;
  message: string;
}

/** The words the library's tag pickers offer, and the upload limits. */
export interface MediaVocabulary {
  project: { id: number; slug: string; name: string };
  areas: string[];
  systems: System[];
  milestones: Array<{ id: number; name: string }>;
  limits: { maxFileMb: number; maxFiles: number; maxPixels: number };
}

/** A derivative for srcset: `url` is same-origin (`/media/v/<key>`). */
export interface PictureVariant {
  url: string;
  width: number;
  height: number;
  format: VariantFormat;
}

/** What a page, a feed or an e-mail needs to render a photo as `<picture>`. */
export interface MediaPicture {
  id: number;
  width: number;
  height: number;
  altText: string | null;
  caption: string | null;
  credit: string | null;
  placeholder: string | null;
  dominantColor: string | null;
  takenAt: string | null;
  focal: Focal;
  isIllustration: boolean;
  /** Each list in ascending width; empty until the photo is processed. */
  sources: Record<VariantFormat, PictureVariant[]>;
}

/** GET /api/projects/:slug/gallery filters. */
export const GalleryQuerySchema = z.strictObject({
  area: plainText().max(100).optional(),
  system: SystemSchema.optional(),
  month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "must be a month as YYYY-MM").optional(),
});
export type GalleryQuery = z.infer<typeof GalleryQuerySchema>;

/** One gallery photo: the picture, its area and system tags, and its month (capture, else upload). */
export interface GalleryPhoto extends MediaPicture {
  areas: string[];
  systems: System[];
  month: string | null;
}

/** The gallery answer: the photos after filtering, and the choices the filters offer (before filtering). */
export interface Gallery {
  items: GalleryPhoto[];
  areas: string[];
  systems: System[];
  months: string[];
}

/**
 * GET /media/s/:name — a signed derivative link (investor images in e-mail): `exp`, the expiry in
 * Unix seconds, and `sig`, base64url HMAC-SHA256 over the name and the expiry. A missing or wrong
 * `sig` is not a validation error but a 404, the same answer as a hidden image. Not strict: the link
 * travels through mail clients and image proxies that may append parameters, and an unsigned
 * parameter grants nothing.
 */
export const SignedVariantQuerySchema = z.object({
  exp: z
    .string({ error: "is required: the link's expiry in Unix seconds" })
    .regex(/^\d{1,12}$/, "must be a whole number of seconds (Unix time)")
    .transform(Number),
  sig: z.string({ error: "must be given once" }).optional(),
});
export type SignedVariantQuery = z.infer<typeof SignedVariantQuerySchema>;
