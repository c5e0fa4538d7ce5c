import { z } from "zod";
import { CalendarDateSchema } from "./common.ts";
import { pageAnswerShape } from "./paging.ts";
import { SystemSchema, type System } from "./programme.ts";
import { ProjectSchema, SlugParamSchema } from "./projects.ts";
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

/** `block` and `plant`: a capacity block or a plant system of the facility, the id as text. */
export const TagKindSchema = z.enum(["area", "system", "milestone", "block", "plant"]);
export type TagKind = z.infer<typeof TagKindSchema>;

/** The system whose photos may show access points, cameras and door hardware. */
export const SECURITY_SYSTEM: System = "security";

const Area = plainText().min(1, "must not be empty").max(100, "must be at most 100 characters");

/**
 * Tags by kind; milestones, blocks and plants are ids of the photo's own project's milestones,
 * capacity blocks and plant systems. A photo that can be published (not restricted) may not
 * carry an internal block or system.
 */
export const MediaTagsSchema = z.strictObject({
  areas: z.array(Area).max(20, "at most 20 areas"),
  systems: z.array(SystemSchema).max(SystemSchema.options.length),
  milestones: z.array(z.number().int().positive()).max(50, "at most 50 milestones"),
  blocks: z.array(z.number().int().positive()).max(20, "at most 20 capacity blocks"),
  plants: z.array(z.number().int().positive()).max(50, "at most 50 plant systems"),
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

/** What the office writes about a photo: its words, its point of interest and who may see it. */
const DESCRIPTION_FIELDS = {
  altText: OptionalText(1000, "several"),
  caption: OptionalText(2000, "several"),
  credit: OptionalText(200, "one"),
  focal: FocalSchema,
  sensitivity: SensitivitySchema,
} as const;

/** PATCH /api/media/:id. `sensitivity` is for leads and admins only (403 otherwise). */
export const MediaPatchInputSchema = z
  .strictObject({ ...z.object(DESCRIPTION_FIELDS).partial().shape, tags: MediaTagsPatchSchema.optional() })
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
  return t ? (t.areas?.length ?? 0) + (t.systems?.length ?? 0) + (t.milestones?.length ?? 0) + (t.blocks?.length ?? 0) + (t.plants?.length ?? 0) : 0;
}

/** POST /api/media/:id/review: the lead's decision on an unreviewed photo. */
export const ReviewInputSchema = z.strictObject({
  sensitivity: z.enum(["cleared", "restricted"], { error: "must be cleared or restricted" }),
});
export type ReviewInput = z.infer<typeof ReviewInputSchema>;

const QueryBool = z.enum(["true", "false", "1", "0"]).transform((v) => v === "true" || v === "1");
const ProjectSlug = SlugParamSchema.shape.slug;

/** GET /api/media: the library, filtered and paginated. */
export const MediaListQuerySchema = z
  .strictObject({
    project: ProjectSlug.optional(),
    /** Any tag of any kind with exactly this value (an area name, a system, a milestone id). */
    tag: plainText().min(1).max(100).optional(),
    area: Area.optional(),
    system: SystemSchema.optional(),
    milestone: z.coerce.number().int().positive().optional(),
    /** Tagged with this capacity block (id). */
    block: z.coerce.number().int().positive().optional(),
    /** Tagged with this plant system (id). */
    plant: z.coerce.number().int().positive().optional(),
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

/** A derivative for srcset: `url` is same-origin (`/media/v/<key>`). */
export const PictureVariantSchema = z.object({
  url: z.string(),
  width: z.number(),
  height: z.number(),
  format: VariantFormatSchema,
});
export type PictureVariant = z.infer<typeof PictureVariantSchema>;

/** One derivative with its size in bytes: a same-origin URL that never changes once the photo is published. */
export const MediaVariantSchema = PictureVariantSchema.extend({ bytes: z.number() });
export type MediaVariant = z.infer<typeof MediaVariantSchema>;

/** A photo as the site office sees it (staff only: `hadGps` and the original's link included). */
export const MediaItemSchema = z.object({
  id: z.number(),
  projectId: z.number(),
  status: MediaStatusSchema,
  failureReason: z.string().nullable(),
  name: z.string(),
  mime: z.string(),
  bytes: z.number(),
  width: z.number(),
  height: z.number(),
  /** Camera local time `YYYY-MM-DDTHH:mm:ss[.sss][±HH:MM]`, never shifted by a server's zone. */
  takenAt: z.string().nullable(),
  /** Whether the original carried location data; the coordinates themselves are never kept. */
  hadGps: z.boolean(),
  ...DESCRIPTION_FIELDS,
  flaggedForReview: z.boolean(),
  reviewedAt: z.string().nullable(),
  reviewedBy: z.string().nullable(),
  placeholder: z.string().nullable(),
  dominantColor: z.string().nullable(),
  isIllustration: z.boolean(),
  tags: MediaTagsSchema,
  variants: z.array(MediaVariantSchema),
  originalUrl: z.string(),
  uploadedBy: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type MediaItem = z.infer<typeof MediaItemSchema>;

/** GET /api/media */
export const MediaListResponseSchema = z.object({ items: z.array(MediaItemSchema), ...pageAnswerShape });
export type MediaListResponse = z.infer<typeof MediaListResponseSchema>;

/** POST /api/media/bulk-tags: how many photos changed, and each as it is now. */
export const BulkTagResultSchema = z.object({ updated: z.number(), items: z.array(MediaItemSchema) });
export type BulkTagResult = z.infer<typeof BulkTagResultSchema>;

/** What POST /api/media answers for each file, in the order sent. */
export const MediaUploadResultSchema = MediaItemSchema.pick({ id: true, status: true, name: true, width: true, height: true, takenAt: true }).extend({
  /** Set when the same bytes were already in the project's library: that item is offered instead. */
  duplicateOf: z.number().nullable(),
});
export type MediaUploadResult = z.infer<typeof MediaUploadResultSchema>;

/** One refused file of an upload (in `error.files` of the 4xx answer). */
export const RefusedFileSchema = z.object({
  index: z.number(),
  name: z.string(),
  code: z.string(),
  status: z.number(),
  message: z.string(),
});
export type RefusedFile = z.infer<typeof RefusedFileSchema>;

/** GET /api/media/vocabulary: the words the library's tag pickers offer, and the upload limits. */
export const MediaVocabularySchema = z.object({
  project: ProjectSchema.pick({ id: true, slug: true, name: true }),
  areas: z.array(z.string()),
  systems: z.array(SystemSchema),
  milestones: z.array(z.object({ id: z.number(), name: z.string() })),
  limits: z.object({ maxFileMb: z.number(), maxFiles: z.number(), maxPixels: z.number() }),
});
export type MediaVocabulary = z.infer<typeof MediaVocabularySchema>;

/** What a page, a feed or an e-mail needs to render a photo as `<picture>`. */
export const MediaPictureSchema = MediaItemSchema.pick({
  id: true,
  width: true,
  height: true,
  altText: true,
  caption: true,
  credit: true,
  placeholder: true,
  dominantColor: true,
  takenAt: true,
  focal: true,
  isIllustration: true,
}).extend({
  /** Each list in ascending width; empty until the photo is processed. */
  sources: z.record(VariantFormatSchema, z.array(PictureVariantSchema)),
});
export type MediaPicture = z.infer<typeof MediaPictureSchema>;

/** `?block=&plant=` of the public lists (the gallery, updates): what is tagged with that capacity block or plant system. */
export const facilityTagQueryShape = {
  /** Tagged with this capacity block (id); 404 when the reader may not see it. */
  block: z.coerce.number({ error: "must be a number" }).int("must be a whole number").positive("must be a block's id").optional(),
  /** Tagged with this plant system (id); 404 when the reader may not see it. */
  plant: z.coerce.number({ error: "must be a number" }).int("must be a whole number").positive("must be a plant system's id").optional(),
};

/**
 * GET /api/projects/:slug/gallery filters. `block` / `plant`: photos tagged with that capacity
 * block or plant system (404 when the reader may not see it).
 */
export const GalleryQuerySchema = z.strictObject({
  area: plainText().max(100).optional(),
  system: SystemSchema.optional(),
  ...facilityTagQueryShape,
  month: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/, "must be a month as YYYY-MM").optional(),
});
export type GalleryQuery = z.infer<typeof GalleryQuerySchema>;

/** A capacity block or plant system a photo or an update is tagged with, named for the reader (only those they may see). */
const FacilityTagSchema = z.object({ kind: z.enum(["block", "plant"]), id: z.number(), name: z.string() });
export type FacilityTag = z.infer<typeof FacilityTagSchema>;

/** One gallery photo: the picture, its area, system and facility tags, and its month (capture, else upload). */
export const GalleryPhotoSchema = MediaPictureSchema.extend({
  areas: z.array(z.string()),
  systems: z.array(SystemSchema),
  facilityTags: z.array(FacilityTagSchema),
  month: z.string().nullable(),
});
export type GalleryPhoto = z.infer<typeof GalleryPhotoSchema>;

/** GET /api/projects/:slug/gallery: the photos after filtering, and the choices the filters offer (before filtering). */
export const GallerySchema = z.object({
  items: z.array(GalleryPhotoSchema),
  areas: z.array(z.string()),
  systems: z.array(SystemSchema),
  months: z.array(z.string()),
});
export type Gallery = z.infer<typeof GallerySchema>;

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
