import type { User } from "#shared/schemas/auth.ts";
import { AppError } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { AuditService } from "../audit/audit.service.ts";
import type { Mailer } from "../mail/mail.service.ts";
import { transactionalMail } from "../mail/mail.layout.ts";
import { createAccountsService, type Account, type AccountsService } from "../users/users.accounts.ts";
import { assertPasswordAcceptable, burnVerify, hashPassword, hashToken, newToken, verifyPassword } from "./passwords.ts";
import type { SessionRepository } from "./session.repository.ts";

export const RESET_TTL_MS = 60 * 60 * 1000;

const publicUser = (u: Account): User => ({ id: u.id, email: u.email, name: u.name, role: u.role });

const invalid = () => new AppError("invalid_credentials", "That e-mail address and password do not match an active account.", 401);

export function createAuthService(deps: {
  db: Db;
  audit: AuditService;
  mailer: Mailer;
  sessions: SessionRepository;
  publicUrl: string;
  logger: Logger;
  /** The users module's accounts; by default one over `db` (it keeps no state of its own). */
  accounts?: AccountsService;
  now?: () => Date;
}) {
  const { db, audit, mailer, sessions, publicUrl, logger } = deps;
  const accounts = deps.accounts ?? createAccountsService({ db });
  const now = deps.now ?? (() => new Date());

  /** The reset behind a link and its account, when both are still usable; an unknown, used, expired or disabled one is the same 410. */
  async function liveReset(trx: Parameters<AccountsService["findPasswordReset"]>[0], token: string) {
    const reset = await accounts.findPasswordReset(trx, hashToken(token));
    const u = reset && !reset.usedAt && reset.expiresAt > now() ? await accounts.findById(reset.userId, trx) : undefined;
    if (!reset || !u || u.disabledAt) throw new AppError("reset_invalid", "This reset link has expired or was already used. Ask for a new one.", 410);
    return { reset, u };
  }

  /** Issues a reset link (ending the account's earlier ones) and mails it. */
  async function sendResetLink(user: Account): Promise<void> {
    const token = newToken();
    // One reset at a time per account, across processes: the newest link is the only live one.
    await db.transaction((trx) => accounts.issuePasswordReset(trx, { userId: user.id, tokenHash: hashToken(token), expiresAt: new Date(now().getTime() + RESET_TTL_MS) }));
    const url = `${publicUrl}/reset-password/${token}`;
    const body = transactionalMail({
      heading: "Reset your Plumbline password",
      paragraphs: [
        `Someone asked to reset the password of the Plumbline account ${user.email}.`,
        "The link below works once, for one hour, and only until a newer reset link is sent. Setting a new password signs you out everywhere else.",
        "If you did not ask for this, ignore this message; your password stays as it is.",
      ],
      action: { label: "Choose a new password", url },
      footer: "Plumbline site office. You receive this because a reset was requested for your account.",
    });
    await mailer.send({ to: user.email, subject: "Reset your Plumbline password", ...body });
  }

  return {
    /** Checks an e-mail and password; the same error for an unknown address, a wrong password and a disabled account. */
    async verifyCredentials(email: string, password: string, actor: Actor): Promise<User> {
      const user = await accounts.findByEmail(email);
      const ok = user ? await verifyPassword(user.passwordHash, password) : await burnVerify(password);
      if (!user || !ok || user.disabledAt) {
        await audit.record({ action: "sign_in_failed", actor, actorEmail: email, detail: { reason: !user ? "unknown" : !ok ? "password" : "disabled" } });
        throw invalid();
      }
      return publicUser(user);
    },

    async recordSignIn(user: User, actor: Actor): Promise<void> {
      await accounts.recordSignIn(user.id, now());
      await audit.record({ action: "sign_in", actor: { ...actor, user } });
    },

    async recordSignOut(actor: Actor): Promise<void> {
      if (actor.user) await audit.record({ action: "sign_out", actor });
    },

    /** The user a session names, or null when gone or disabled (which ends the session). */
    async sessionUser(id: number): Promise<User | null> {
      const u = await accounts.findById(id);
      return u && !u.disabledAt ? publicUser(u) : null;
    },

    describeInvitation: (token: string): Promise<{ email: string; role: User["role"] }> => accounts.describeInvitation(hashToken(token), now()),

    async acceptInvitation(token: string, input: { name: string; password: string }, actor: Actor): Promise<User> {
      const tokenHash = hashToken(token);
      assertPasswordAcceptable(input.password, await accounts.invitedAddress(tokenHash));
      const passwordHash = await hashPassword(input.password);
      return db.transaction(async (trx) => {
        const user = await accounts.acceptInvitation(trx, tokenHash, { name: input.name, passwordHash }, now());
        await audit.record({ action: "invitation_accepted", actor: { ...actor, user }, target: { type: "user", id: user.id, label: user.email } }, trx);
        return user;
      });
    },

    /**
     * Always answers the same, along the same path: the request looks the address up and
     * records the attempt, and only then, after the answer, does an active account get its
     * link (issued and handed to SMTP in the background). Waiting for the SMTP hand-off in the
     * request would tell a known address from an unknown one by the time it takes.
     */
    async requestPasswordReset(email: string, actor: Actor): Promise<void> {
      const user = await accounts.findByEmail(email);
      const known = Boolean(user && !user.disabledAt);
      await audit.record({ action: "password_reset_requested", actor, actorEmail: email, detail: { known } });
      if (!user || !known) return;
      // A process that stops before the hand-off loses the link; the person asks again.
      void sendResetLink(user).catch((err: unknown) => {
        logger.error({ err, userId: user.id }, "the password reset link could not be sent");
      });
    },

    /** Whether a reset link can still be used, without spending it: the reset page asks first, so a dead link shows its error, not the form. */
    async checkPasswordReset(token: string): Promise<void> {
      await db.transaction((trx) => liveReset(trx, token));
    },

    async resetPassword(token: string, password: string, actor: Actor): Promise<User> {
      const passwordHash = await hashPassword(password);
      const user = await db.transaction(async (trx) => {
        const { reset, u } = await liveReset(trx, token);
        assertPasswordAcceptable(password, u.email);
        await accounts.usePasswordReset(trx, { id: reset.id, userId: u.id }, passwordHash);
        await audit.record({ action: "password_reset", actor: { ...actor, user: publicUser(u) }, target: { type: "user", id: u.id, label: u.email } }, trx);
        return publicUser(u);
      });
      await sessions.destroyForUser(user.id);
      return user;
    },

    endSessionsOf: (userId: number) => sessions.destroyForUser(userId),
  };
}
export type AuthService = ReturnType<typeof createAuthService>;
