import { z } from "zod";

export const SlugParamSchema = z.strictObject({
  slug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address").max(100),
});

export interface ProjectSettings {
  toleranceWorkingDays: number;
  behindWorkingDays: number;
  weekendDays: number[];
  holidays: string[];
}

export interface Project {
  id: number;
  slug: string;
  name: string;
  operatorName: string;
  locationLabel: string;
  timeZone: string;
  description: string;
  currency: string;
  visitsOffered: boolean;
  settings: ProjectSettings;
}
