import type { Knex } from "knex";
import type { DocumentCategory, DocumentFileType, ViewKind } from "#shared/schemas/documents.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { insertRecordEvents, toRecordEvent, type NewRecordEvent } from "../core/record-events.ts";
import { columnsOf, countOf, date, firstRow, json, num, numOrNull, oneOf, readRow, text, textOrNull, type Row } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * The document library's stored record: documents (with the organisations they are limited to),
 * their versions (the private storage key of each cleaned original), the view log, each
 * investor's last visit, and the library's events. Who may read which document is decided in one
 * place, `whereVisible`, for every read path.
 */

/** Who reads: everything (lead, admin), investor-audience documents (marketing), or an investor of an organisation. */
export type DocumentScope = { kind: "all" } | { kind: "investor_audience" } | { kind: "investor"; organisationId: number | null };

/** The one audience rule of the library: every read of documents goes through it. */
function whereVisible(query: Knex.QueryBuilder, scope: DocumentScope, alias = "d"): Knex.QueryBuilder {
  if (scope.kind === "all") return query;
  query.where(`${alias}.audience`, "investor");
  if (scope.kind === "investor") {
    // Limited to named organisations: only investors of one of them.
    query.where((w) => {
      w.whereNotExists((s) => s.select(1).from("document_organisations as o").whereRaw("o.document_id = ??", [`${alias}.id`]));
      if (scope.organisationId !== null) {
        w.orWhereExists((s) => s.select(1).from("document_organisations as o").whereRaw("o.document_id = ??", [`${alias}.id`]).where("o.organisation_id", scope.organisationId));
      }
    });
  }
  return query;
}

export interface DocumentFields {
  title: string;
  category: DocumentCategory;
  period: string;
  periodEnd: string | null;
  audience: RecordAudience;
}

export interface DocumentRecord extends DocumentFields {
  id: number;
  projectId: number;
  organisationIds: number[];
  version: number;
  createdAt: Date;
  updatedAt: Date;
}

export interface VersionFields {
  number: number;
  fileType: DocumentFileType;
  storageKey: string;
  bytes: number;
  pages: number | null;
  sha256: string;
  originalName: string;
  note: string;
  removed: string[];
  uploadedBy: number | null;
  uploadedAt: Date;
}

export interface VersionRecord extends VersionFields {
  id: number;
  documentId: number;
}

const readDocument = readRow<Omit<DocumentRecord, "organisationIds">>({
  id: num(), projectId: num(), title: text(), category: oneOf<DocumentCategory>(), period: text(), periodEnd: textOrNull(), audience: oneOf<RecordAudience>(),
  version: num(), createdAt: date(), updatedAt: date(),
});
const toDocument = (r: Row, organisationIds: number[]): DocumentRecord => ({ ...readDocument(r), organisationIds });

const toVersion = readRow<VersionRecord>({
  id: num(), documentId: num(), number: num(), fileType: oneOf<DocumentFileType>(), storageKey: text(), bytes: num(), pages: numOrNull(), sha256: text(),
  originalName: text(), note: text(), removed: json<string[]>([]), uploadedBy: numOrNull(), uploadedAt: date(),
});

async function organisationsOf(q: Q, documentIds: readonly number[]): Promise<Map<number, number[]>> {
  const out = new Map<number, number[]>(documentIds.map((id) => [id, []]));
  if (documentIds.length === 0) return out;
  const rows = (await q("document_organisations").whereIn("document_id", documentIds).orderBy("organisation_id").select("document_id", "organisation_id")) as Array<Record<string, unknown>>;
  for (const r of rows) out.get(Number(r.document_id))?.push(Number(r.organisation_id));
  return out;
}

/** A project's documents the scope may read, newest period first. */
export async function listDocuments(q: Q, projectId: number, scope: DocumentScope, filter: { category?: DocumentCategory } = {}): Promise<DocumentRecord[]> {
  const query = q("documents as d").where("d.project_id", projectId).orderByRaw("d.period_end IS NULL, d.period_end DESC").orderBy("d.id", "desc").select("d.*");
  if (filter.category) query.where("d.category", filter.category);
  const rows = (await whereVisible(query, scope)) as Array<Record<string, unknown>>;
  const orgs = await organisationsOf(q, rows.map((r) => Number(r.id)));
  return rows.map((r) => toDocument(r, orgs.get(Number(r.id)) ?? []));
}

/** One document if the scope may read it (null otherwise: the caller answers 404 either way). */
export async function findDocument(q: Q, id: number, scope: DocumentScope, opts: { forUpdate?: boolean } = {}): Promise<DocumentRecord | null> {
  const row = await firstRow(whereVisible(q("documents as d").where("d.id", id).select("d.*"), scope), opts);
  if (!row) return null;
  return toDocument(row, (await organisationsOf(q, [id])).get(id) ?? []);
}

export async function insertDocument(q: Q, projectId: number, f: DocumentFields, at: Date): Promise<number> {
  const [id] = await q("documents").insert({ project_id: projectId, title: f.title, category: f.category, period: f.period, period_end: f.periodEnd, audience: f.audience, created_at: at, updated_at: at });
  return Number(id);
}

export async function updateDocument(q: Q, id: number, f: Partial<DocumentFields>, at: Date): Promise<void> {
  const columns = columnsOf(f, ["title", "category", "period", "periodEnd", "audience"]);
  await q("documents").where({ id }).update({ ...columns, updated_at: at, version: q.raw("version + 1") });
}

export async function setDocumentOrganisations(q: Q, id: number, organisationIds: readonly number[]): Promise<void> {
  await replaceChildRows(q, "document_organisations", { document_id: id }, ["document_id", "organisation_id"], organisationIds.map((o) => ({ document_id: id, organisation_id: o })));
}

export async function deleteDocument(q: Q, id: number): Promise<void> {
  await q("documents").where({ id }).delete();
}

/** Every version of these documents, newest first within each. */
export async function listVersions(q: Q, documentIds: readonly number[]): Promise<Map<number, VersionRecord[]>> {
  const out = new Map<number, VersionRecord[]>(documentIds.map((id) => [id, []]));
  if (documentIds.length === 0) return out;
  const rows = (await q("document_versions").whereIn("document_id", documentIds).orderBy("number", "desc")) as Array<Record<string, unknown>>;
  for (const r of rows) out.get(Number(r.document_id))?.push(toVersion(r));
  return out;
}

export async function insertVersion(q: Q, documentId: number, v: VersionFields): Promise<number> {
  const [id] = await q("document_versions").insert({
    document_id: documentId,
    number: v.number,
    file_type: v.fileType,
    storage_key: v.storageKey,
    bytes: v.bytes,
    pages: v.pages,
    sha256: v.sha256,
    original_name: v.originalName,
    note: v.note,
    removed: JSON.stringify(v.removed),
    uploaded_by: v.uploadedBy,
    uploaded_at: v.uploadedAt,
  });
  return Number(id);
}

/** How many versions keep a stored file (a key no version names may be removed from storage). */
export async function countVersionsWithKey(q: Q, storageKey: string): Promise<number> {
  return countOf(q("document_versions").where({ storage_key: storageKey }));
}

// ---------------------------------------------------------------------------------------------
// The view log and visits
// ---------------------------------------------------------------------------------------------

export interface ViewRecord {
  id: number;
  documentId: number;
  documentTitle: string;
  versionNumber: number;
  userId: number;
  kind: ViewKind;
  at: Date;
  address: string;
  agent: string;
}

export async function insertView(q: Q, v: { projectId: number; documentId: number; versionId: number; userId: number; kind: ViewKind; at: Date; address: string; agent: string }): Promise<void> {
  await q("document_views").insert({ project_id: v.projectId, document_id: v.documentId, version_id: v.versionId, user_id: v.userId, kind: v.kind, at: v.at, address: v.address.slice(0, 64), agent: v.agent.slice(0, 500) });
}

/** The view log, newest first: of a project (optionally one document, one reader), within what the scope may read. */
export async function listViews(q: Q, f: { projectId: number; documentId?: number; userId?: number; scope: DocumentScope; limit?: number }): Promise<ViewRecord[]> {
  const query = q("document_views as v")
    .join("documents as d", "d.id", "v.document_id")
    .join("document_versions as dv", "dv.id", "v.version_id")
    .where("v.project_id", f.projectId)
    .orderBy("v.at", "desc")
    .orderBy("v.id", "desc")
    .select("v.id", "v.document_id", "d.title", "dv.number", "v.user_id", "v.kind", "v.at", "v.address", "v.agent");
  if (f.documentId !== undefined) query.where("v.document_id", f.documentId);
  if (f.userId !== undefined) query.where("v.user_id", f.userId);
  if (f.limit !== undefined) query.limit(f.limit);
  const rows = (await whereVisible(query, f.scope)) as Array<Record<string, unknown>>;
  return rows.map((r) => ({
    id: Number(r.id),
    documentId: Number(r.document_id),
    documentTitle: String(r.title),
    versionNumber: Number(r.number),
    userId: Number(r.user_id),
    kind: r.kind as ViewKind,
    at: r.at as Date,
    address: String(r.address),
    agent: String(r.agent),
  }));
}

export async function findLastVisit(q: Q, projectId: number, userId: number): Promise<Date | null> {
  const row = (await q("document_visits").where({ project_id: projectId, user_id: userId }).first("last_visit_at")) as { last_visit_at: Date } | undefined;
  return row?.last_visit_at ?? null;
}

export async function recordVisit(q: Q, projectId: number, userId: number, at: Date): Promise<void> {
  await q("document_visits").insert({ project_id: projectId, user_id: userId, last_visit_at: at }).onConflict(["project_id", "user_id"]).merge({ last_visit_at: at });
}

// ---------------------------------------------------------------------------------------------
// Events and the digests' window
// ---------------------------------------------------------------------------------------------

// The rows have the record's one event shape (server/core/record-events.ts); the subject is the
// document, which the library calls `documentId`.

export interface NewDocumentEvent extends Omit<NewRecordEvent<number | null>, "subjectId"> {
  /** Null: a deleted document (its row has gone; the event stays in the project's history). */
  documentId: number | null;
}

export const insertDocumentEvents = (q: Q, events: readonly NewDocumentEvent[]) =>
  insertRecordEvents(
    q,
    "document_events",
    "document_id",
    events.map(({ documentId, ...e }) => ({ ...e, subjectId: documentId })),
  );

/** A document's history, oldest first. */
export async function listDocumentEvents(q: Q, documentId: number): Promise<Array<NewDocumentEvent & { id: number }>> {
  const rows = (await q("document_events").where({ document_id: documentId }).orderBy("at").orderBy("id")) as Array<Record<string, unknown>>;
  return rows.map((r) => {
    const { subjectId, at, ...e } = toRecordEvent(r, "document_id");
    return { ...e, documentId: subjectId, at: new Date(at) };
  });
}

/** Versions uploaded in [from, to) of documents the scope may read (version 1 is the document's arrival). */
export async function listVersionsUploadedIn(q: Q, projectId: number, from: Date, to: Date, scope: DocumentScope): Promise<Array<{ documentId: number; title: string; audience: RecordAudience; number: number; at: Date }>> {
  const query = q("document_versions as dv")
    .join("documents as d", "d.id", "dv.document_id")
    .where("d.project_id", projectId)
    .where("dv.uploaded_at", ">=", from)
    .where("dv.uploaded_at", "<", to)
    .orderBy("dv.uploaded_at")
    .orderBy("dv.id")
    .select("d.id", "d.title", "d.audience", "dv.number", "dv.uploaded_at");
  const rows = (await whereVisible(query, scope)) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ documentId: Number(r.id), title: String(r.title), audience: r.audience as RecordAudience, number: Number(r.number), at: r.uploaded_at as Date }));
}
