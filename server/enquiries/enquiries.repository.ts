import type { Knex } from "knex";
import type { EnquiryKind, EnquiryRow, EnquiryStatus } from "#shared/schemas/enquiries.ts";

type Q = Knex | Knex.Transaction;

/** An enquiry as stored: its project and owner by id (the projects and users modules name them). */
export type EnquiryRecord = Omit<EnquiryRow, "project" | "owner"> & { projectId: number; ownerId: number | null };

function toEnquiry(r: Record<string, unknown>): EnquiryRecord {
  return {
    id: Number(r.id),
    projectId: Number(r.project_id),
    kind: r.kind as EnquiryKind,
    name: String(r.name),
    email: String(r.email),
    organisation: r.organisation == null ? null : String(r.organisation),
    phone: r.phone == null ? null : String(r.phone),
    message: r.message == null ? null : String(r.message),
    racks: r.racks == null ? null : Number(r.racks),
    kwPerRack: r.kw_per_rack == null ? null : Number(r.kw_per_rack),
    neededBy: r.needed_by == null ? null : String(r.needed_by),
    preferredDates: r.preferred_dates ? (JSON.parse(String(r.preferred_dates)) as string[]) : [],
    partySize: r.party_size == null ? null : Number(r.party_size),
    status: r.status as EnquiryStatus,
    ownerId: r.owner_id == null ? null : Number(r.owner_id),
    notes: String(r.notes ?? ""),
    createdAt: (r.created_at as Date).toISOString(),
    updatedAt: (r.updated_at as Date).toISOString(),
  };
}

function base(q: Q) {
  return q("enquiries as e").select("e.*");
}

export interface EnquiryInsert {
  projectId: number;
  kind: EnquiryKind;
  name: string;
  email: string;
  organisation: string | null;
  phone: string | null;
  message: string | null;
  racks: number | null;
  kwPerRack: number | null;
  neededBy: string | null;
  preferredDates: string[] | null;
  partySize: number | null;
  rulesAcceptedAt: Date | null;
  ip: string | null;
}

export async function insertEnquiry(q: Q, e: EnquiryInsert): Promise<number> {
  const [id] = await q("enquiries").insert({
    project_id: e.projectId,
    kind: e.kind,
    name: e.name,
    email: e.email,
    organisation: e.organisation,
    phone: e.phone,
    message: e.message,
    racks: e.racks,
    kw_per_rack: e.kwPerRack,
    needed_by: e.neededBy,
    preferred_dates: e.preferredDates ? JSON.stringify(e.preferredDates) : null,
    party_size: e.partySize,
    rules_accepted_at: e.rulesAcceptedAt,
    ip: e.ip,
  });
  return Number(id);
}

export async function findEnquiry(q: Q, id: number, forUpdate = false): Promise<EnquiryRecord | null> {
  const query = base(q).where("e.id", id).first();
  if (forUpdate) query.forUpdate();
  const r = await query;
  return r ? toEnquiry(r) : null;
}

/** The newest thousand enquiries, newest first, of the status, kind and project given. */
export async function listEnquiries(q: Q, f: { status?: EnquiryStatus; kind?: EnquiryKind; projectId?: number }): Promise<EnquiryRecord[]> {
  const query = base(q).orderBy([{ column: "e.created_at", order: "desc" }, { column: "e.id", order: "desc" }]).limit(1000);
  if (f.status) query.where("e.status", f.status);
  if (f.kind) query.where("e.kind", f.kind);
  if (f.projectId !== undefined) query.where("e.project_id", f.projectId);
  return (await query).map(toEnquiry);
}

export async function listEnquiriesByEmail(q: Q, email: string): Promise<EnquiryRecord[]> {
  return (await base(q).where("e.email", email).orderBy("e.id")).map(toEnquiry);
}

export async function deleteEnquiriesByEmail(q: Q, email: string): Promise<number> {
  return q("enquiries").where({ email }).delete();
}

export async function updateEnquiry(q: Q, id: number, patch: { status?: EnquiryStatus; ownerId?: number | null; notes?: string }, now: Date): Promise<void> {
  const row: Record<string, unknown> = { updated_at: now };
  if (patch.status !== undefined) row.status = patch.status;
  if (patch.ownerId !== undefined) row.owner_id = patch.ownerId;
  if (patch.notes !== undefined) row.notes = patch.notes;
  await q("enquiries").where({ id }).update(row);
}
