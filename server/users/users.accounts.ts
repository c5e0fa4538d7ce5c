import type { Knex } from "knex";
import type { User } from "#shared/schemas/auth.ts";
import { AppError } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import {
  endOpenPasswordResets,
  findInvitationByTokenHash,
  findPasswordReset,
  findUserByEmail,
  findDisabledUserIds,
  findUserById,
  findUserNames,
  insertPasswordReset,
  insertUser,
  lockUserRow,
  markInvitationAccepted,
  markPasswordResetUsed,
  updateUser,
  type InvitationRecord,
  type ResetRecord,
  type UserRecord,
} from "./users.repository.ts";

/** An account as the auth module sees it: with its password hash, which never leaves the server. */
export type Account = UserRecord;

/**
 * What other modules read and write of accounts, which the users module keeps (users,
 * invitations, password_resets): signing in, password resets and accepting an invitation (the auth
 * service, with internal arguments: ids, token hashes, its transaction), people's names for
 * display (the media library) and disabled accounts (digest recipients). It stands apart from the users service because that one needs the
 * auth service (a disabled user's sessions end at once), and it needs nothing but the database.
 */
export function createAccountsService(deps: { db: Db }) {
  const { db } = deps;

  /** The invitation a link's token names, if it may still be accepted; else why not. */
  async function openInvitation(tokenHash: string, at: Date, trx?: Knex.Transaction): Promise<InvitationRecord> {
    const inv = await findInvitationByTokenHash(trx ?? db, tokenHash, Boolean(trx));
    if (!inv || inv.revokedAt) throw new AppError("invitation_invalid", "This invitation link is not valid. Ask for a new one.", 404);
    if (inv.acceptedAt) throw new AppError("invitation_used", "This invitation has already been used. Sign in instead.", 410);
    if (inv.expiresAt <= at) throw new AppError("invitation_expired", "This invitation has expired. Ask for a new one.", 410);
    return inv;
  }

  return {
    /**
     * Display names by user id, for records that name who did something (a deleted user has none).
     * A caller inside a transaction passes it, so the read takes no second connection from the pool.
     */
    namesOf: (ids: readonly number[], trx?: Knex.Transaction): Promise<Map<number, string>> => findUserNames(trx ?? db, ids),

    /** Which of these accounts are disabled (an unknown id is not). */
    disabledAmong: (ids: readonly number[]): Promise<Set<number>> => findDisabledUserIds(db, ids),

    findByEmail: (email: string): Promise<Account | null> => findUserByEmail(db, email),
    findById: (id: number, trx?: Knex.Transaction): Promise<Account | null> => findUserById(trx ?? db, id),

    recordSignIn: (userId: number, at: Date) => updateUser(db, userId, { lastSignInAt: at }),

    /** The invitation's address and role, while it may still be accepted. */
    async describeInvitation(tokenHash: string, at: Date): Promise<{ email: string; role: User["role"] }> {
      const inv = await openInvitation(tokenHash, at);
      return { email: inv.email, role: inv.role };
    },

    /** The address an invitation was sent to, whatever its state (to check a chosen password against). */
    invitedAddress: async (tokenHash: string): Promise<string | undefined> => (await findInvitationByTokenHash(db, tokenHash))?.email,

    /**
     * Turns an invitation into an account, once: the invitation row stays locked in the caller's
     * transaction, so two submissions of one link make one account.
     */
    async acceptInvitation(trx: Knex.Transaction, tokenHash: string, input: { name: string; passwordHash: string }, at: Date): Promise<User> {
      const inv = await openInvitation(tokenHash, at, trx);
      if (await findUserByEmail(trx, inv.email)) {
        throw new AppError("account_exists", "An account with this address already exists. Sign in instead.", 409);
      }
      const id = await insertUser(trx, { email: inv.email, name: input.name, role: inv.role, passwordHash: input.passwordHash });
      await markInvitationAccepted(trx, inv.id);
      return { id, email: inv.email, name: input.name, role: inv.role };
    },

    /**
     * Records a new reset link for the account and ends its earlier ones. The account's row is
     * locked first, so across processes the newest link is the only live one.
     */
    async issuePasswordReset(trx: Knex.Transaction, reset: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
      await lockUserRow(trx, reset.userId);
      await endOpenPasswordResets(trx, reset.userId);
      await insertPasswordReset(trx, reset);
    },

    /** The reset a link's token names, locked in the caller's transaction; null when there is none. */
    findPasswordReset: (trx: Knex.Transaction, tokenHash: string): Promise<ResetRecord | null> => findPasswordReset(trx, tokenHash),

    /** Sets the account's new password and spends the reset (and the account's other open ones). */
    async usePasswordReset(trx: Knex.Transaction, reset: Pick<ResetRecord, "id" | "userId">, passwordHash: string): Promise<void> {
      await updateUser(trx, reset.userId, { passwordHash });
      await markPasswordResetUsed(trx, reset.id, reset.userId);
    },
  };
}
export type AccountsService = ReturnType<typeof createAccountsService>;
