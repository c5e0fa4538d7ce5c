import { z } from "zod";
import { EmailSchema, RoleSchema } from "./common.ts";
import { pageQueryShape } from "./paging.ts";
import { plainText } from "./text.ts";

export const AUDIT_PAGE_SIZE = 50;

export const InviteInputSchema = z.strictObject({ email: EmailSchema, role: RoleSchema });
export type InviteInput = z.infer<typeof InviteInputSchema>;

export const UserUpdateInputSchema = z
  .strictObject({ role: RoleSchema.optional(), disabled: z.boolean().optional() })
  .refine((v) => v.role !== undefined || v.disabled !== undefined, { message: "give a role or disabled" });
export type UserUpdateInput = z.infer<typeof UserUpdateInputSchema>;

/** GET /api/users (a list of these); PATCH /api/users/:id answers the changed one. */
export const UserRowSchema = z.object({
  id: z.number(),
  email: z.string(),
  name: z.string(),
  role: RoleSchema,
  disabled: z.boolean(),
  lastSignInAt: z.string().nullable(),
  createdAt: z.string(),
  /** An investor's organisation (documents may be limited to some); null for staff and for an investor without one. */
  organisation: z.object({ id: z.number(), name: z.string() }).nullable(),
});
export type UserRow = z.infer<typeof UserRowSchema>;

/** GET /api/users/invitations (a list of these). */
export const InvitationRowSchema = z.object({
  id: z.number(),
  email: z.string(),
  role: RoleSchema,
  invitedBy: z.string().nullable(),
  createdAt: z.string(),
  expiresAt: z.string(),
  status: z.enum(["pending", "accepted", "expired", "revoked"]),
});
export type InvitationRow = z.infer<typeof InvitationRowSchema>;

/** POST /api/users/invitations → 201: the invitation made (its link goes by e-mail only). */
export const InvitationSentSchema = z.object({ id: z.number(), email: z.string(), role: RoleSchema, expiresAt: z.string() });
export type InvitationSent = z.infer<typeof InvitationSentSchema>;

/** GET /api/audit: one page of events, newest first; the total matching is in `X-Total-Count`. */
export const AuditQuerySchema = z.strictObject({
  action: plainText({ trim: false }).max(64).optional(),
  before: z.coerce.number().int().positive().optional(),
  ...pageQueryShape(AUDIT_PAGE_SIZE),
});
export type AuditQuery = z.infer<typeof AuditQuerySchema>;

/** GET /api/audit (a page of these, newest first). */
export const AuditEventSchema = z.object({
  id: z.number(),
  at: z.string(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  targetLabel: z.string().nullable(),
  ip: z.string().nullable(),
  detail: z.record(z.string(), z.unknown()).nullable(),
});
export type AuditEvent = z.infer<typeof AuditEventSchema>;
