import { z } from "zod";
import { UserSchema } from "./auth.ts";
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
export const UserRowSchema = UserSchema.extend({
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
export const InvitationSentSchema = InvitationRowSchema.pick({ id: true, email: true, role: true, expiresAt: true });
export type InvitationSent = z.infer<typeof InvitationSentSchema>;

/**
 * Every kind of event the audit log keeps, with the words the office shows for it (the server
 * records only these; the filter offers them all).
 */
export const AUDIT_ACTION_LABELS = {
  sign_in: "Signed in",
  sign_in_failed: "Sign-in refused",
  sign_out: "Signed out",
  invitation_sent: "Invitation sent",
  invitation_accepted: "Invitation accepted",
  password_reset_requested: "Reset requested",
  password_reset: "Password reset",
  role_changed: "Role changed",
  user_disabled: "Account disabled",
  user_enabled: "Account enabled",
  milestone_created: "Milestone added",
  milestone_updated: "Milestone changed",
  milestone_removed: "Milestone removed",
  milestone_restored: "Milestone restored",
  milestone_deleted: "Milestone deleted",
  milestones_shifted: "Milestones moved together",
  programme_rebaselined: "Programme re-baselined",
  programme_imported: "Programme imported",
  cost_actual_recorded: "Cost recorded",
  facility_block_created: "Capacity block added",
  facility_block_updated: "Capacity block changed",
  facility_block_deleted: "Capacity block deleted",
  facility_system_created: "Plant system added",
  facility_system_updated: "Plant system changed",
  facility_system_deleted: "Plant system deleted",
  facility_unit_created: "Plant unit added",
  facility_unit_updated: "Plant unit changed",
  facility_unit_stage_changed: "Plant unit's stage changed",
  facility_unit_deleted: "Plant unit deleted",
  facility_feature_created: "Site feature added",
  facility_feature_updated: "Site feature changed",
  facility_feature_deleted: "Site feature deleted",
  facility_settings_changed: "Commissioning level for carrying load changed",
  site_area_created: "Site plan area drawn",
  site_area_updated: "Site plan area changed",
  site_area_deleted: "Site plan area removed",
  risk_created: "Risk added",
  risk_updated: "Risk changed",
  risk_deleted: "Risk deleted",
  risk_became_issue: "Risk became an issue",
  issue_created: "Issue added",
  issue_updated: "Issue changed",
  issue_deleted: "Issue deleted",
  risk_mitigation_added: "Mitigation added",
  risk_mitigation_updated: "Mitigation changed",
  risk_mitigation_deleted: "Mitigation deleted",
  decision_created: "Decision asked for",
  decision_updated: "Decision request changed",
  decision_decided: "Decision made",
  decision_withdrawn: "Decision request withdrawn",
  budget_change_created: "Budget change added",
  budget_change_updated: "Budget change edited",
  budget_change_deleted: "Budget change deleted",
  budget_settings_changed: "Contingency or final cost method changed",
  organisation_created: "Investor organisation added",
  user_organisation_changed: "Investor's organisation changed",
  document_created: "Document added",
  document_version_added: "Document's new version added",
  document_updated: "Document changed",
  document_deleted: "Document deleted",
  report_drafted: "Monthly report drafted",
  report_updated: "Monthly report edited",
  report_issued: "Monthly report issued",
  report_correction_drafted: "Correction to a report drafted",
  project_hero_changed: "Home page photograph changed",
  press_usage_terms_changed: "Press usage terms changed",
  press_kit_downloaded: "Press kit downloaded by staff",
  review_link_created: "Outside review link made",
  review_link_revoked: "Outside review link revoked",
  review_link_opened: "Outside reviewer opened the draft",
  review_link_answered: "Outside reviewer answered",
} as const satisfies Record<string, string>;
export type AuditAction = keyof typeof AUDIT_ACTION_LABELS;

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
