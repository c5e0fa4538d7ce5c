import { z } from "zod";
import { FocalSchema, MediaPictureSchema } from "./media.ts";
import { ProjectSchema } from "./projects.ts";

/**
 * The project's hero photograph and the home page's builds (docs/decisions/055-hero-home-gallery.md).
 */

/**
 * PUT /api/projects/:slug/hero (lead, admin): a cleared photo of the project and the point of it a
 * crop keeps, or `mediaId: null` for none (the pages fall back to the latest cover). `version` is the
 * hero's version the caller loaded; a stale one is refused with 409.
 */
export const HeroInputSchema = z.strictObject({
  mediaId: z.number({ error: "must be a photo's id or null" }).int("must be a whole number").positive("must be a photo's id").nullable(),
  focus: FocalSchema.optional(),
  version: z.number({ error: "must be the version you loaded" }).int("must be a whole number").min(0, "must not be negative"),
});
export type HeroInput = z.infer<typeof HeroInputSchema>;

/** GET /api/projects/:slug/hero: the chosen photo as the public may see it (null when none or no longer cleared). */
export const HeroSchema = z.object({
  picture: MediaPictureSchema.nullable(),
  /** The point of the photo a crop keeps, fractions of width and height from the top left. */
  focus: FocalSchema,
  /** The stored choice, for the site office (a photo no longer cleared keeps its id here but shows no picture). */
  mediaId: z.number().nullable(),
  version: z.number(),
});
export type Hero = z.infer<typeof HeroSchema>;

/** One build on the home page: its picture (hero, else the latest cover), the headline figure and the next ready-for-service date. */
export const HomeBuildSchema = ProjectSchema.pick({ slug: true, name: true, operatorName: true, locationLabel: true, description: true }).extend({
  picture: MediaPictureSchema.nullable(),
  /** Where the picture came from: the chosen hero, or the latest public update's cover. */
  pictureIs: z.enum(["hero", "cover"]).nullable(),
  focus: FocalSchema,
  /** The one percent complete of the build (the whole programme, every audience alike: decision 004). */
  percentComplete: z.number().nullable(),
  /** The earliest public capacity block not yet ready for service, with its forecast date (YYYY-MM-DD). */
  nextReady: z.object({ blockName: z.string(), date: z.string() }).nullable(),
});
export type HomeBuild = z.infer<typeof HomeBuildSchema>;

/** GET /api/home: every build, by name. The same for every caller (public figures only). */
export const HomeSchema = z.object({ builds: z.array(HomeBuildSchema) });
export type Home = z.infer<typeof HomeSchema>;
