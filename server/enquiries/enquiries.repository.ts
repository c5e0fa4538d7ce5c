import type { Knex } from "knex";
import type { EnquiryKind, EnquiryRow, EnquiryStatus } from "#shared/schemas/enquiries.ts";
import { instant, json, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

/** An enquiry as stored: its project and owner by id (the projects and users modules name them). */
export type EnquiryRecord = Omit<EnquiryRow, "project" | "owner"> & { projectId: number; ownerId: number | null };

const toEnquiry = readRow<EnquiryRecord>({
  id: num(), projectId: num(), kind: oneOf<EnquiryKind>(), name: text(), email: text(), organisation: textOrNull(), phone: textOrNull(), message: textOrNull(),
  racks: numOrNull(), kwPerRack: numOrNull(), neededBy: textOrNull(), preferredDates: json<string[]>([]), partySize: numOrNull(),
  status: oneOf<EnquiryStatus>(), ownerId: numOrNull(), notes: text(), createdAt: instant(), updatedAt: instant(),
});

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
