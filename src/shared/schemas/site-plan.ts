import { z } from "zod";
import { AudienceSchema, patchShape } from "./common.ts";
import { MilestoneStatusSchema } from "./programme.ts";
import { plainText } from "./text.ts";
import { SITE_GRID } from "../domain/site-plan.ts";

/** What an area of the site is: the word drawn under its name in the legend. */
export const SiteAreaKindSchema = z.enum(["hall", "suite", "plant_yard", "energy_centre", "client_area", "other"]);
export type SiteAreaKind = z.infer<typeof SiteAreaKindSchema>;

const cell = (max: number, what: string) => z.number({ error: `must be a whole number of cells` }).int("must be a whole number of cells").min(0, `must be 0 or more`).max(max, `must be at most ${max} (${what})`);
const span = (max: number) => z.number({ error: "must be a whole number of cells" }).int("must be a whole number of cells").min(1, "must be at least 1 cell").max(max, `must be at most ${max} cells`);

/**
 * An area's name is the same words the programme's milestones and photos use for it ("Hall 2A",
 * "Energy centre"): that is how the plan finds its status and its photos. Angle brackets are
 * refused: a name is words, never markup, wherever it is drawn.
 */
const AreaName = plainText()
  .min(1, "is required")
  .max(100, "must be at most 100 characters")
  .refine((v) => !/[<>]/.test(v), "must be words, without < or >");

const AREA_FIELDS = {
  name: AreaName,
  kind: SiteAreaKindSchema,
  audience: AudienceSchema,
  x: cell(SITE_GRID.columns - 1, "the plan is 24 cells wide"),
  y: cell(SITE_GRID.rows - 1, "the plan is 16 cells tall"),
  w: span(SITE_GRID.columns),
  h: span(SITE_GRID.rows),
};

/** POST /api/projects/:slug/site-areas. The service checks the area fits the grid and overlaps no other. */
export const SiteAreaCreateInputSchema = z.strictObject(AREA_FIELDS);
export type SiteAreaCreateInput = z.infer<typeof SiteAreaCreateInputSchema>;

/** PATCH /api/site-areas/:id: any of the fields, with the version the editor loaded (409 when stale). */
export const SiteAreaPatchInputSchema = z.strictObject(patchShape(AREA_FIELDS));
export type SiteAreaPatchInput = z.infer<typeof SiteAreaPatchInputSchema>;

/** One area as a caller sees it; `version` only for staff, who edit. */
export const SiteAreaSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: SiteAreaKindSchema,
  x: z.number().int(),
  y: z.number().int(),
  w: z.number().int(),
  h: z.number().int(),
  /** From every milestone in the area (decision 004); null when the programme has none there. */
  status: MilestoneStatusSchema.nullable(),
  /** How many of the area's milestones are complete, of how many: counts only, never names. */
  milestonesComplete: z.number().int(),
  milestonesTotal: z.number().int(),
  /** So a public page read by a signed-in caller can draw only the public areas, as it does for everything else. */
  audience: AudienceSchema,
  version: z.number().int().optional(),
});
export type SiteArea = z.infer<typeof SiteAreaSchema>;

/** GET /api/projects/:slug/site-plan: the grid and the areas this caller may see. */
export const SitePlanSchema = z.object({
  grid: z.object({ columns: z.number().int(), rows: z.number().int() }),
  areas: z.array(SiteAreaSchema),
});
export type SitePlan = z.infer<typeof SitePlanSchema>;
