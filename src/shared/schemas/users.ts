import { z } from "zod";
import { EmailSchema, RoleSchema } from "./common.ts";
import { plainText } from "./text.ts";

export const InviteInputSchema = z.strictObject({ email: EmailSchema, role: RoleSchema });
export type InviteInput = z.infer<typeof InviteInputSchema>;

export const UserUpdateInputSchema = z
  .strictObject({ role: RoleSchema.optional(), disabled: z.boolean().optional() })
  .refine((v) => v.role !== undefined || v.disabled !== undefined, { message: "give a role or disabled" });
export type UserUpdateInput = z.infer<typeof UserUpdateInputSchema>;

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: z.infer<typeof RoleSchema>;
  disabled: boolean;
  lastSignInAt: string | null;
  createdAt: string;
}

export interface InvitationRow {
  id: number;
  email: string;
  role: z.infer<typeof RoleSchema>;
  invitedBy: string | null;
  createdAt: string;
  expiresAt: string;
  status: "pending" | "accepted" | "expired" | "revoked";
}

export const AuditQuerySchema = z.strictObject({
  action: plainText({ trim: false }).max(64).optional(),
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

export interface AuditEvent {
  id: number;
  at: string;
  actorEmail: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  targetLabel: string | null;
  ip: string | null;
  detail: Record<string, unknown> | null;
}
