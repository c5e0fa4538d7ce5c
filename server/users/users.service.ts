import type { InviteInput, UserUpdateInput } from "#shared/schemas/users.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { AuditService } from "../audit/audit.service.ts";
import type { AuthService } from "../auth/auth.service.ts";
import { hashToken, newToken } from "../auth/passwords.ts";
import type { Mailer } from "../mail/mail.service.ts";
import { transactionalMail } from "../mail/mail.layout.ts";
import {
  countActiveAdmins,
  deleteInvitation,
  findUserByEmail,
  findUserById,
  insertInvitation,
  listInvitations,
  listUsers,
  revokeOpenInvitations,
  toUserRow,
  updateUser,
} from "./users.repository.ts";

export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000;

const ROLE_WORDS = { admin: "administrator", lead: "project lead", marketing: "marketing", investor: "investor" } as const;

export function createUsersService(deps: { db: Db; audit: AuditService; auth: AuthService; mailer: Mailer; publicUrl: string; now?: () => Date }) {
  const { db, audit, auth, mailer, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());

  return {
    list: async () => (await listUsers(db)).map(toUserRow),
    listInvitations: () => listInvitations(db, now()),

    /** Creates a single-use invitation valid 7 days and e-mails its link. */
    async invite(input: InviteInput, actor: Actor): Promise<{ id: number; email: string; role: string; expiresAt: string }> {
      if (await findUserByEmail(db, input.email)) {
        throw new AppError("account_exists", "That address already has an account.", 409, { email: "already has an account" });
      }
      const token = newToken();
      const expiresAt = new Date(now().getTime() + INVITATION_TTL_MS);
      const id = await db.transaction(async (trx) => {
        await revokeOpenInvitations(trx, input.email);
        const newId = await insertInvitation(trx, { email: input.email, role: input.role, tokenHash: hashToken(token), invitedBy: actor.user!.id, expiresAt });
        await audit.record({ action: "invitation_sent", actor, target: { type: "invitation", id: newId, label: input.email }, detail: { role: input.role } }, trx);
        return newId;
      });
      const url = `${publicUrl}/invitations/${token}`;
      const body = transactionalMail({
        heading: "You are invited to Plumbline",
        paragraphs: [
          `${actor.user!.name} has invited you to Plumbline as ${ROLE_WORDS[input.role]}.`,
          "Plumbline is where the Aldermere Campus programme, site updates and photographs are kept and published.",
          "The link works once and expires in 7 days. You will choose your name and a password.",
        ],
        action: { label: "Accept the invitation", url },
        footer: "Plumbline site office. You receive this because an administrator invited this address.",
      });
      try {
        await mailer.send({ to: input.email, subject: "Your invitation to Plumbline", ...body });
      } catch (err) {
        await deleteInvitation(db, id);
        throw new AppError("mail_failed", "The invitation could not be sent; nothing was kept. Try again.", 502, undefined, { cause: String(err) });
      }
      return { id, email: input.email, role: input.role, expiresAt: expiresAt.toISOString() };
    },

    async update(id: number, patch: UserUpdateInput, actor: Actor) {
      const target = await findUserById(db, id);
      if (!target) throw notFound("That user");
      const demotingAdmin = target.role === "admin" && patch.role !== undefined && patch.role !== "admin";
      const disablingAdmin = target.role === "admin" && patch.disabled === true && !target.disabledAt;
      if (target.id === actor.user!.id && (demotingAdmin || patch.disabled === true)) {
        throw new AppError("self_lockout", "You cannot remove your own administrator access or disable yourself.", 422);
      }
      await db.transaction(async (trx) => {
        if ((demotingAdmin || disablingAdmin) && (await countActiveAdmins(trx)) <= 1) {
          throw new AppError("last_admin", "Plumbline needs at least one active administrator.", 422);
        }
        if (patch.role !== undefined && patch.role !== target.role) {
          await updateUser(trx, id, { role: patch.role });
          await audit.record({ action: "role_changed", actor, target: { type: "user", id, label: target.email }, detail: { from: target.role, to: patch.role } }, trx);
        }
        if (patch.disabled !== undefined && patch.disabled !== (target.disabledAt !== null)) {
          await updateUser(trx, id, { disabledAt: patch.disabled ? now() : null });
          await audit.record({ action: patch.disabled ? "user_disabled" : "user_enabled", actor, target: { type: "user", id, label: target.email } }, trx);
        }
      });
      // A disabled user is signed out everywhere at once; a new role takes effect on the next request anyway.
      if (patch.disabled === true) await auth.endSessionsOf(id);
      const updated = await findUserById(db, id);
      return toUserRow(updated!);
    },
  };
}
export type UsersService = ReturnType<typeof createUsersService>;
