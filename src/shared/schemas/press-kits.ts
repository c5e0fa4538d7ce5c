import { z } from "zod";
import { plainText } from "./text.ts";

// Press kits (issue #15 item 4): the selection and the zip's manifest are in writing-help.ts;
// these are the project's usage terms printed beside its downloadable photographs.

/** The longest usage terms a project may set (the projects.press_usage_terms column). */
export const PRESS_USAGE_TERMS_MAX = 500;

/** PUT /api/projects/:slug/press-kit/terms (staff): one line of terms, or null (or blank) for none. */
export const PressUsageTermsInputSchema = z.strictObject({
  usageTerms: plainText().max(PRESS_USAGE_TERMS_MAX, `must be at most ${PRESS_USAGE_TERMS_MAX} characters`).nullable(),
});
export type PressUsageTermsInput = z.infer<typeof PressUsageTermsInputSchema>;

/** GET /api/projects/:slug/press-kit/terms (anyone): the terms the public download prints. */
export const PressUsageTermsSchema = z.object({ usageTerms: z.string().nullable() });
export type PressUsageTerms = z.infer<typeof PressUsageTermsSchema>;
