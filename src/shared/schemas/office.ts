import { z } from "zod";
import { ProjectSchema } from "./projects.ts";

/**
 * What the office overview lists as waiting, in the order it lists them. Each kind is asked of
 * the roles that do that work: a lead (or an admin) reviews updates, clears photos, answers for
 * overdue decisions and commissions units; marketing (and a lead or an admin) answers enquiries;
 * every staff role runs digests.
 */
export const WAITING_KINDS = ["updates_to_review", "photos_to_clear", "new_enquiries", "digests_due", "decisions_overdue", "units_awaiting_commissioning"] as const;
export const WaitingKindSchema = z.enum(WAITING_KINDS);
export type WaitingKind = z.infer<typeof WaitingKindSchema>;

/** One piece of waiting work in one project: `count` is at least 1 (nothing waiting is not listed). */
export const WaitingItemSchema = z.object({
  kind: WaitingKindSchema,
  project: ProjectSchema.pick({ slug: true, name: true, timeZone: true }),
  count: z.number().int().min(1),
  /** Digests due: when the first of them is sent (ISO instant); null for the other kinds. */
  nextAt: z.string().nullable(),
});
export type WaitingItem = z.infer<typeof WaitingItemSchema>;

/** GET /api/office/waiting (staff): the work waiting for the caller, by kind, then by project. */
export const OfficeWaitingSchema = z.object({ items: z.array(WaitingItemSchema) });
export type OfficeWaiting = z.infer<typeof OfficeWaitingSchema>;

/** Digests sent within this many days of now are due. */
export const DIGESTS_DUE_WITHIN_DAYS = 7;
