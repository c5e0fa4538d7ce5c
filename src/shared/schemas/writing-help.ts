import { z } from "zod";
import { AudienceSchema } from "./common.ts";
import { MediaPictureSchema } from "./media.ts";
import { plainText } from "./text.ts";

// Drafts suggested by the programme, then-and-now pairs and press kits (issue #15). The
// suggestion itself is computed by src/shared/domain/draft-suggestion.ts.

/** GET /api/projects/:slug/draft-suggestion?audience= (lead, marketing, admin). */
export const DraftSuggestionQuerySchema = z.strictObject({ audience: AudienceSchema.default("public") });
export type DraftSuggestionQuery = z.infer<typeof DraftSuggestionQuerySchema>;

export const SuggestionMoveKindSchema = z.enum(["milestone_completed", "forecast_moved", "unit_commissioned", "system_label_reached", "block_ready_moved", "risk", "decision"]);
export type SuggestionMoveKind = z.infer<typeof SuggestionMoveKindSchema>;

/** One thing that happened in the window, in words, with what it refers to. */
export const SuggestionMoveSchema = z.object({
  kind: SuggestionMoveKindSchema,
  /** What it is about, as the audience may see it (never a hidden item's name). */
  title: z.string(),
  /** The change in words, e.g. "forecast moved 12 days later, to 15 Jan 2027". */
  detail: z.string(),
  /** Calendar day or instant it happened. */
  at: z.string(),
  milestoneId: z.number().nullable(),
  /** Forecast moves: days later (positive) or earlier (negative). */
  days: z.number().nullable(),
});
export type SuggestionMove = z.infer<typeof SuggestionMoveSchema>;

export const SuggestedPhotoSchema = z.object({
  mediaId: z.number(),
  caption: z.string().nullable(),
  /** The caption offered as alt text, for the writer to check. */
  altCandidate: z.string(),
  takenAt: z.string().nullable(),
  /** Why it was picked: the milestones, areas or systems it is tagged with that moved. */
  because: z.array(z.string()),
  thumbUrl: z.string().nullable(),
});
export type SuggestedPhoto = z.infer<typeof SuggestedPhotoSchema>;

/** The suggestion, or `null` when nothing happened since the last published update of that audience. */
export const DraftSuggestionSchema = z.object({
  audience: AudienceSchema,
  since: z.string().nullable(),
  until: z.string(),
  title: z.string(),
  groups: z.array(z.object({ heading: z.string(), moves: z.array(SuggestionMoveSchema) })),
  milestoneIds: z.array(z.number()),
  photos: z.array(SuggestedPhotoSchema),
});
export type DraftSuggestion = z.infer<typeof DraftSuggestionSchema>;
export const DraftSuggestionAnswerSchema = z.object({ suggestion: DraftSuggestionSchema.nullable() });
export type DraftSuggestionAnswer = z.infer<typeof DraftSuggestionAnswerSchema>;

/** POST /api/projects/:slug/draft-suggestion/draft: make a draft from the suggestion as it stands now. */
export const DraftFromSuggestionInputSchema = z.strictObject({ audience: AudienceSchema });

/** Then-and-now pairs: defaults a caller may narrow (GET /api/projects/:slug/then-and-now?audience=&area=&minDays=). */
export const THEN_AND_NOW_MIN_DAYS = 30;
/** Hamming distance of two 64-bit difference hashes under which two photos count as the same framing. */
export const THEN_AND_NOW_MAX_DISTANCE = 12;
export const ThenAndNowQuerySchema = z.strictObject({
  audience: AudienceSchema.default("public"),
  area: plainText().max(100).optional(),
  minDays: z.coerce.number().int().min(1).max(3650).default(THEN_AND_NOW_MIN_DAYS),
  limit: z.coerce.number().int().min(1).max(100).default(20),
});
export type ThenAndNowQuery = z.infer<typeof ThenAndNowQuerySchema>;

const PairPhotoSchema = z.object({
  mediaId: z.number(),
  takenAt: z.string(),
  caption: z.string().nullable(),
  thumbUrl: z.string().nullable(),
  /** Added for the editors: the photo as a `<picture>` draws it (every derivative), as a story item shows it. */
  picture: MediaPictureSchema,
});
export const ThenAndNowPairSchema = z.object({
  area: z.string(),
  then: PairPhotoSchema,
  now: PairPhotoSchema,
  daysApart: z.number(),
  /** Hamming distance of the fingerprints, 0 (same) to 64. */
  distance: z.number(),
});
export type ThenAndNowPair = z.infer<typeof ThenAndNowPairSchema>;
export const ThenAndNowAnswerSchema = z.object({ pairs: z.array(ThenAndNowPairSchema) });
export type ThenAndNowAnswer = z.infer<typeof ThenAndNowAnswerSchema>;

/** Press kits: a derivative width, or the metadata-stripped original (staff only). */
export const PRESS_KIT_SIZES = ["640", "1200", "2400", "original"] as const;
export const PressKitSizeSchema = z.enum(PRESS_KIT_SIZES);
export const PRESS_KIT_MAX_PHOTOS = 1000;

/** POST /api/projects/:slug/press-kit (staff): a selection, a story or a gallery filter, streamed back as one zip. */
export const PressKitInputSchema = z
  .strictObject({
    mediaIds: z.array(z.number().int().positive()).min(1).max(PRESS_KIT_MAX_PHOTOS).optional(),
    storyId: z.number().int().positive().optional(),
    filter: z.strictObject({ area: plainText().max(100).optional(), system: plainText().max(40).optional(), month: z.string().regex(/^\d{4}-\d{2}$/).optional() }).optional(),
    size: PressKitSizeSchema.default("2400"),
  })
  .refine((v) => [v.mediaIds, v.storyId, v.filter].filter((x) => x !== undefined).length === 1, { error: "Choose photos, a story or a gallery filter — one of them" });
export type PressKitInput = z.infer<typeof PressKitInputSchema>;

/** GET /projects/:slug/press-kit.zip?area=&story= (public; cleared public photos only; rate-limited). */
export const PublicPressKitQuerySchema = z.strictObject({
  area: plainText().max(100).optional(),
  story: plainText().max(120).optional(),
  size: z.enum(["1200", "2400"]).default("1200"),
});

/** The manifest's columns, in order (CSV header and the plain-text listing). */
export const PRESS_KIT_MANIFEST_COLUMNS = ["file", "caption", "credit", "date", "area", "alt"] as const;
