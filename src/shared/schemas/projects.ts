import { z } from "zod";

export const SlugParamSchema = z.strictObject({
  slug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address").max(100),
});

export const ProjectSettingsSchema = z.object({
  toleranceWorkingDays: z.number(),
  behindWorkingDays: z.number(),
  weekendDays: z.array(z.number()),
  holidays: z.array(z.string()),
  /** The commissioning level (1 … 5) from which a plant unit counts as available to carry load; default 4 (functional test). */
  availableFromLevel: z.number(),
});
export type ProjectSettings = z.infer<typeof ProjectSettingsSchema>;

/** GET /api/projects (a list of these) and GET /api/projects/:slug. */
export const ProjectSchema = z.object({
  id: z.number(),
  slug: z.string(),
  name: z.string(),
  operatorName: z.string(),
  locationLabel: z.string(),
  timeZone: z.string(),
  description: z.string(),
  currency: z.string(),
  visitsOffered: z.boolean(),
  settings: ProjectSettingsSchema,
});
export type Project = z.infer<typeof ProjectSchema>;

/** A project as other answers name it: its slug and name. */
export const ProjectRefSchema = ProjectSchema.pick({ slug: true, name: true });
