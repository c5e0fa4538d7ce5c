import type { Knex } from "knex";
import type { Role } from "#shared/schemas/common.ts";
import type { InvitationRow, UserRow } from "#shared/schemas/users.ts";
import { columnsOf, countOf, date, dateOrNull, num, numOrNull, oneOf, readRow, text } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface UserRecord {
  id: number;
  email: string;
  name: string;
  role: Role;
  passwordHash: string;
  disabledAt: Date | null;
  lastSignInAt: Date | null;
  createdAt: Date;
  organisationId: number | null;
}

const toUser = readRow<UserRecord>({
  id: num(), email: text(), name: text(), role: oneOf<Role>(), passwordHash: text(), disabledAt: dateOrNull(), lastSignInAt: dateOrNull(), createdAt: date(),
  organisationId: numOrNull(),
});

export function toUserRow(u: UserRecord, organisations: ReadonlyMap<number, Organisation>): UserRow {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    disabled: u.disabledAt !== null,
    lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    createdAt: u.createdAt.toISOString(),
    organisation: u.organisationId === null ? null : (organisations.get(u.organisationId) ?? null),
  };
}

export async function findUserByEmail(q: Q, email: string): Promise<UserRecord | null> {
  const r = await q("users").where({ email }).first();
  return r ? toUser(r) : null;
}

export async function findUserById(q: Q, id: number): Promise<UserRecord | null> {
  const r = await q("users").where({ id }).first();
  return r ? toUser(r) : null;
}

/** The names of these users (those that exist), by id. */
export async function findUserNames(q: Q, ids: readonly number[]): Promise<Map<number, string>> {
  if (ids.length === 0) return new Map();
  const rows = (await q("users").whereIn("id", [...new Set(ids)]).select("id", "name")) as Array<{ id: number; name: string }>;
  return new Map(rows.map((r) => [Number(r.id), String(r.name)]));
}

/** Which of these users are disabled. */
export async function findDisabledUserIds(q: Q, ids: readonly number[]): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const rows = (await q("users").whereIn("id", [...new Set(ids)]).whereNotNull("disabled_at").select("id")) as Array<{ id: number }>;
  return new Set(rows.map((r) => Number(r.id)));
}

export async function listUsers(q: Q): Promise<UserRecord[]> {
  const rows = await q("users").orderBy([{ column: "role" }, { column: "email" }]);
  return rows.map(toUser);
}

export async function insertUser(q: Q, u: { email: string; name: string; role: Role; passwordHash: string }): Promise<number> {
  const [id] = await q("users").insert({ email: u.email, name: u.name, role: u.role, password_hash: u.passwordHash });
  return Number(id);
}

export async function updateUser(
  q: Q,
  id: number,
  patch: Partial<{ role: Role; disabledAt: Date | null; passwordHash: string; lastSignInAt: Date; name: string }>,
): Promise<void> {
  await q("users").where({ id }).update({ ...columnsOf(patch, ["role", "disabledAt", "passwordHash", "lastSignInAt", "name"]), updated_at: new Date() });
}

/** Sets or clears a user's organisation. */
export async function setUserOrganisation(q: Q, id: number, organisationId: number | null): Promise<void> {
  await q("users").where({ id }).update({ organisation_id: organisationId, updated_at: new Date() });
}

export async function countActiveAdmins(q: Q): Promise<number> {
  return countOf(q("users").where({ role: "admin" }).whereNull("disabled_at"));
}

// Organisations of investor accounts

export interface Organisation {
  id: number;
  name: string;
}

/** Every organisation by name, with how many investor accounts belong to it. */
export async function listOrganisations(q: Q): Promise<Array<Organisation & { investors: number }>> {
  const rows = (await q("organisations as o")
    .leftJoin("users as u", function () {
      this.on("u.organisation_id", "o.id").andOnVal("u.role", "investor");
    })
    .groupBy("o.id", "o.name")
    .orderBy("o.name")
    .select("o.id", "o.name", q.raw("COUNT(u.id) as investors"))) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ id: Number(r.id), name: String(r.name), investors: Number(r.investors) }));
}

/** Organisations by id (an unknown id is left out). */
export async function findOrganisations(q: Q, ids: readonly number[]): Promise<Map<number, Organisation>> {
  if (ids.length === 0) return new Map();
  const rows = (await q("organisations").whereIn("id", [...new Set(ids)]).select("id", "name")) as Array<Record<string, unknown>>;
  return new Map(rows.map((r) => [Number(r.id), { id: Number(r.id), name: String(r.name) }]));
}

export async function findOrganisationIdByName(q: Q, name: string): Promise<number | null> {
  const r = await q("organisations").where({ name }).first("id");
  return r ? Number(r.id) : null;
}

export async function insertOrganisation(q: Q, name: string): Promise<number> {
  const [id] = await q("organisations").insert({ name });
  return Number(id);
}

// Invitations

export interface InvitationRecord {
  id: number;
  email: string;
  role: Role;
  tokenHash: string;
  invitedBy: number | null;
  expiresAt: Date;
  acceptedAt: Date | null;
  revokedAt: Date | null;
  createdAt: Date;
}

const toInvitation = readRow<InvitationRecord>({
  id: num(), email: text(), role: oneOf<Role>(), tokenHash: text(), invitedBy: numOrNull(), expiresAt: date(), acceptedAt: dateOrNull(), revokedAt: dateOrNull(),
  createdAt: date(),
});

export async function insertInvitation(
  q: Q,
  i: { email: string; role: Role; tokenHash: string; invitedBy: number; expiresAt: Date },
): Promise<number> {
  const [id] = await q("invitations").insert({
    email: i.email,
    role: i.role,
    token_hash: i.tokenHash,
    invited_by: i.invitedBy,
    expires_at: i.expiresAt,
  });
  return Number(id);
}

export async function findInvitationByTokenHash(q: Q, tokenHash: string, forUpdate = false): Promise<InvitationRecord | null> {
  const query = q("invitations").where({ token_hash: tokenHash }).first();
  if (forUpdate) query.forUpdate();
  const r = await query;
  return r ? toInvitation(r) : null;
}

export async function markInvitationAccepted(q: Q, id: number): Promise<void> {
  await q("invitations").where({ id }).update({ accepted_at: new Date() });
}

/** Older open invitations of an address stop working when a new one is sent. */
export async function revokeOpenInvitations(q: Q, email: string): Promise<void> {
  await q("invitations").where({ email }).whereNull("accepted_at").whereNull("revoked_at").update({ revoked_at: new Date() });
}

export async function deleteInvitation(q: Q, id: number): Promise<void> {
  await q("invitations").where({ id }).delete();
}

export async function listInvitations(q: Q, now: Date): Promise<InvitationRow[]> {
  const rows = await q("invitations as i")
    .leftJoin("users as u", "u.id", "i.invited_by")
    .select("i.*", "u.email as inviter_email")
    .orderBy("i.created_at", "desc")
    .limit(200);
  return rows.map((r: Record<string, unknown>) => {
    const inv = toInvitation(r);
    const status: InvitationRow["status"] = inv.acceptedAt
      ? "accepted"
      : inv.revokedAt
        ? "revoked"
        : inv.expiresAt <= now
          ? "expired"
          : "pending";
    return {
      id: inv.id,
      email: inv.email,
      role: inv.role,
      invitedBy: (r.inviter_email as string | null) ?? null,
      createdAt: inv.createdAt.toISOString(),
      expiresAt: inv.expiresAt.toISOString(),
      status,
    };
  });
}

// Password resets

export interface ResetRecord {
  id: number;
  userId: number;
  expiresAt: Date;
  usedAt: Date | null;
}

export async function insertPasswordReset(q: Q, r: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
  await q("password_resets").insert({ user_id: r.userId, token_hash: r.tokenHash, expires_at: r.expiresAt });
}

/** Holds the user's row until the transaction ends, so two resets for one account are issued one after the other. */
export async function lockUserRow(q: Q, userId: number): Promise<void> {
  await q("users").select("id").where({ id: userId }).forUpdate().first();
}

/** A newer reset link ends the user's older ones (marked used: the same answer as a spent link). */
export async function endOpenPasswordResets(q: Q, userId: number): Promise<void> {
  await q("password_resets").where({ user_id: userId }).whereNull("used_at").update({ used_at: new Date() });
}

export async function findPasswordReset(q: Q, tokenHash: string): Promise<ResetRecord | null> {
  const r = await q("password_resets").where({ token_hash: tokenHash }).forUpdate().first();
  return r ? { id: Number(r.id), userId: Number(r.user_id), expiresAt: r.expires_at, usedAt: r.used_at ?? null } : null;
}

export async function markPasswordResetUsed(q: Q, id: number, userId: number): Promise<void> {
  await q("password_resets").where({ id }).update({ used_at: new Date() });
  // One reset ends every other outstanding link of the same user too.
  await q("password_resets").where({ user_id: userId }).whereNull("used_at").update({ used_at: new Date() });
}
