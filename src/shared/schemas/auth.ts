import { z } from "zod";
import { EmailSchema, RoleSchema } from "./common.ts";
import { plainText } from "./text.ts";

export const LoginInputSchema = z.strictObject({
  email: EmailSchema,
  password: z.string({ error: "is required" }).min(1, "is required").max(1000),
});
export type LoginInput = z.infer<typeof LoginInputSchema>;

export const PASSWORD_MIN_LENGTH = 12;
/** Length only; the server also refuses passwords on a list of common ones. */
export const NewPasswordSchema = z
  .string({ error: "is required" })
  .min(PASSWORD_MIN_LENGTH, `must be at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, "must be at most 200 characters");

export const AcceptInvitationInputSchema = z.strictObject({
  name: plainText({ error: "is required" }).min(1, "is required").max(200),
  password: NewPasswordSchema,
});
export type AcceptInvitationInput = z.infer<typeof AcceptInvitationInputSchema>;

export const ResetRequestInputSchema = z.strictObject({ email: EmailSchema });
export const ResetPasswordInputSchema = z.strictObject({ password: NewPasswordSchema });

export const TokenParamSchema = z.strictObject({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, "is not a valid link"),
});

export const UserSchema = z.object({
  id: z.number(),
  email: z.string(),
  name: z.string(),
  role: RoleSchema,
});
export type User = z.infer<typeof UserSchema>;

/** GET /api/auth/me, and what signing in (login, an accepted invitation, a new password) answers. */
export const SignedInSchema = z.object({ user: UserSchema });
export type SignedIn = z.infer<typeof SignedInSchema>;

/** GET /api/auth/session: who is signed in, `null` for a visitor. */
export const SessionSchema = z.object({ user: UserSchema.nullable() });
export type Session = z.infer<typeof SessionSchema>;

/** GET /api/auth/invitations/:token — who the invitation is for; opening it changes nothing. */
export const InvitationViewSchema = z.object({ email: z.string(), role: RoleSchema });
export type InvitationView = z.infer<typeof InvitationViewSchema>;

/** POST /api/auth/password-reset → 202, the same answer whether or not the address has an account. */
export const ResetRequestedSchema = z.object({ ok: z.literal(true), message: z.string() });
export type ResetRequested = z.infer<typeof ResetRequestedSchema>;
