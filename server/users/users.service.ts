import type { InviteInput, UserRow, UserUpdateInput } from "#shared/schemas/users.ts";
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
  findOrganisationIdByName,
  findOrganisations,
  findUserById,
  insertInvitation,
  insertOrganisation,
  listInvitations,
  listOrganisations,
  listUsers,
  revokeOpenInvitations,
  setUserOrganisation,
  toUserRow,
  updateUser,
  type Organisation,
  type UserRecord,
} from "./users.repository.ts";

export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000;

const ROLE_WORDS = { admin: "administrator", lead: "project lead", marketing: "marketing", investor: "investor" } as const;

export function createUsersService(deps: { db: Db; audit: AuditService; auth: AuthService; mailer: Mailer; publicUrl: string; now?: () => Date }) {
  const { db, audit, auth, mailer, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());

  /** Users as the admin's list shows them, with their organisations named (one read for all). */
  async function rows(users: readonly UserRecord[]): Promise<UserRow[]> {
    const organisations = await findOrganisations(db, users.flatMap((u) => (u.organisationId === null ? [] : [u.organisationId])));
    return users.map((u) => toUserRow(u, organisations));
  }

  return {
    list: async () => rows(await listUsers(db)),
    /** Active staff by name (id, name, role): who may own a risk or an action, for the lead's forms. */
    listStaff: async () =>
      (await listUsers(db))
        .filter((u) => u.role !== "investor" && u.disabledAt === null)
        .map((u) => ({ id: u.id, name: u.name, role: u.role }))
        .sort((a, b) => a.name.localeCompare(b.name)),
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
          // Only investors belong to an organisation: staff read every document anyway.
          if (patch.role !== "investor" && target.organisationId !== null) await setUserOrganisation(trx, id, null);
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
      return (await rows([updated!]))[0]!;
    },

    /** Investor organisations by name, with how many investor accounts each has. */
    listOrganisations: () => listOrganisations(db),

    async createOrganisation(input: { name: string }, actor: Actor): Promise<Organisation & { investors: number }> {
      const id = await db.transaction(async (trx) => {
        if ((await findOrganisationIdByName(trx, input.name)) !== null) {
          throw new AppError("organisation_exists", "An organisation of that name exists already.", 409, { name: "is already the name of an organisation" });
        }
        const newId = await insertOrganisation(trx, input.name);
        await audit.record({ action: "organisation_created", actor, target: { type: "organisation", id: newId, label: input.name } }, trx);
        return newId;
      });
      return { id, name: input.name, investors: 0 };
    },

    /** Gives an investor an organisation, or none: only investors may have one (documents may be limited to organisations). */
    async setOrganisation(id: number, input: { organisationId: number | null }, actor: Actor): Promise<UserRow> {
      const target = await findUserById(db, id);
      if (!target) throw notFound("That user");
      if (input.organisationId !== null && target.role !== "investor") {
        throw new AppError("not_an_investor", "Only investors belong to an organisation.", 422, { organisationId: "may be set only for an investor" });
      }
      const organisation = input.organisationId === null ? null : ((await findOrganisations(db, [input.organisationId])).get(input.organisationId) ?? null);
      if (input.organisationId !== null && !organisation) throw new AppError("invalid_organisation", "Check organisationId.", 422, { organisationId: "names no organisation" });
      if (target.organisationId !== input.organisationId) {
        await db.transaction(async (trx) => {
          await setUserOrganisation(trx, id, input.organisationId);
          await audit.record(
            { action: "user_organisation_changed", actor, target: { type: "user", id, label: target.email }, detail: { from: target.organisationId, to: input.organisationId, organisation: organisation?.name ?? null } },
            trx,
          );
        });
      }
      return (await rows([(await findUserById(db, id))!]))[0]!;
    },

    /** A user's organisation (the documents' stamp and limits name it); null when they have none. */
    async organisationOf(userId: number): Promise<Organisation | null> {
      const user = await findUserById(db, userId);
      if (!user || user.organisationId === null) return null;
      return (await findOrganisations(db, [user.organisationId])).get(user.organisationId) ?? null;
    },
  };
}
export type UsersService = ReturnType<typeof createUsersService>;
