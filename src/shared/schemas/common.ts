import { z } from "zod";
import { DATE_ERROR } from "../domain/locale-dates.ts";

export const RoleSchema = z.enum(["admin", "lead", "marketing", "investor"]);
export type Role = z.infer<typeof RoleSchema>;
export const STAFF_ROLES = ["admin", "lead", "marketing"] as const satisfies readonly Role[];

export const AudienceSchema = z.enum(["public", "investor", "internal"]);
export type Audience = z.infer<typeof AudienceSchema>;

/** The version a write read: a stale one is refused with 409. */
export const VersionSchema = z.number().int().positive();

/**
 * A PATCH body's fields: any subset of the entity's fields, without their defaults (a field left
 * out keeps its stored value), and the version read.
 */
export function patchShape<S extends z.ZodRawShape>(fields: S) {
  return { ...z.object(fields).partial().shape, version: VersionSchema };
}

/** A linked record as an answer names it. */
export const NamedSchema = z.object({ id: z.number(), name: z.string() });

export const IdParamSchema = z.strictObject({ id: z.coerce.number().int().positive() });

export const EmailSchema = z
  .string({ error: "is required" })
  .trim()
  .toLowerCase()
  .max(254, "is too long")
  .pipe(z.email({ error: "is not a valid e-mail address" }));

/**
 * A calendar date, `YYYY-MM-DD`, that exists on the calendar. The date field sends what it could
 * not read as typed, so this one sentence is what a person sees beside the field, from the
 * browser's check and the server's alike (decision 057).
 */
export const CalendarDateSchema = z
  .string({ error: DATE_ERROR })
  .regex(/^\d{4}-\d{2}-\d{2}$/, DATE_ERROR)
  .refine((s) => {
    const [y, m, d] = s.split("-").map(Number) as [number, number, number];
    const t = new Date(Date.UTC(y, m - 1, d));
    return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
  }, DATE_ERROR);

/** Every error answer of the API: `{ error: { code, message, fields? } }` (the fixed shape). */
export const ApiErrorBodySchema = z.object({
  error: z.object({ code: z.string(), message: z.string(), fields: z.record(z.string(), z.string()).optional() }),
});
export type ApiErrorBody = z.infer<typeof ApiErrorBodySchema>;
