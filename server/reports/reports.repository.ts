import type { Knex } from "knex";
import type { ReportState } from "#shared/schemas/reports.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { insertRecordEvents, listRecordEvents, type NewRecordEvent } from "../core/record-events.ts";
import { retryOnDeadlock } from "../db/retry.ts";
import { countOf, date, dateOrNull, firstRow, json, num, numOrNull, oneOf, projectIdOf, readRow, text, textOrNull } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * Monthly reports as stored: the report (its month, state, audience, commentary JSON, frozen
 * figures JSON once issued, the library document of its PDF), its events, and the notices of its
 * issue, one per reader, claimed by the notices sender under a lease.
 */

export interface ReportRecord {
  id: number;
  projectId: number;
  month: string;
  state: ReportState;
  audience: RecordAudience;
  /** Section → the editor's rich-text JSON. */
  commentary: Record<string, unknown>;
  /** The frozen figures (issued and superseded reports); null while a draft. */
  figures: unknown;
  documentId: number | null;
  supersedesId: number | null;
  correctionNote: string | null;
  issuedBy: number | null;
  issuedAt: Date | null;
  createdBy: number | null;
  version: number;
  createdAt: Date;
  updatedAt: Date;
}

const toReport = readRow<ReportRecord>({
  id: num(), projectId: num(), month: text(), state: oneOf<ReportState>(), audience: oneOf<RecordAudience>(), commentary: json<Record<string, unknown>>({}),
  figures: json<unknown>(null), documentId: numOrNull(), supersedesId: numOrNull(), correctionNote: textOrNull(), issuedBy: numOrNull(), issuedAt: dateOrNull(),
  createdBy: numOrNull(), version: num(), createdAt: date(), updatedAt: date(),
});

/** Which reports a reader may see: staff every one; an investor the issued and superseded ones of investor audience. */
export type ReportScope = { kind: "staff" } | { kind: "investor" };

function scoped<T extends Knex.QueryBuilder>(query: T, scope: ReportScope): T {
  if (scope.kind === "staff") return query;
  return query.where("audience", "investor").whereIn("state", ["issued", "superseded"]) as T;
}

export async function listReports(q: Q, projectId: number, scope: ReportScope): Promise<ReportRecord[]> {
  const rows = (await scoped(q("reports").where({ project_id: projectId }), scope).orderBy([{ column: "month", order: "desc" }, { column: "id", order: "desc" }])) as Array<Record<string, unknown>>;
  return rows.map(toReport);
}

export async function findReport(q: Q, id: number, scope: ReportScope, opts: { forUpdate?: boolean } = {}): Promise<ReportRecord | null> {
  const row = await firstRow(scoped(q("reports").where({ id }), scope), opts);
  return row ? toReport(row) : null;
}

/** The reports that supersede these (by the id each supersedes). */
export async function findSuperseding(q: Q, ids: readonly number[]): Promise<Map<number, number>> {
  if (ids.length === 0) return new Map();
  const rows = (await q("reports").whereIn("supersedes_id", [...ids]).select("id", "supersedes_id")) as Array<{ id: number; supersedes_id: number }>;
  return new Map(rows.map((r) => [Number(r.supersedes_id), Number(r.id)]));
}

export const findProjectIdOfReport = (q: Q, id: number) => projectIdOf(q, "reports", id);

/** A draft of this month still open (not yet issued), if any. */
export async function findOpenDraft(q: Q, projectId: number, month: string): Promise<ReportRecord | null> {
  const row = (await q("reports").where({ project_id: projectId, month, state: "draft" }).first()) as Record<string, unknown> | undefined;
  return row ? toReport(row) : null;
}

export async function insertReport(q: Q, r: { projectId: number; month: string; audience: RecordAudience; commentary: Record<string, unknown>; supersedesId: number | null; correctionNote: string | null; createdBy: number | null; at: Date }): Promise<number> {
  const [id] = await q("reports").insert({
    project_id: r.projectId,
    month: r.month,
    audience: r.audience,
    commentary: JSON.stringify(r.commentary),
    supersedes_id: r.supersedesId,
    correction_note: r.correctionNote,
    created_by: r.createdBy,
    created_at: r.at,
    updated_at: r.at,
  });
  return Number(id);
}

export async function updateReport(
  q: Q,
  id: number,
  f: { state?: ReportState; audience?: RecordAudience; commentary?: Record<string, unknown>; figures?: unknown; documentId?: number; issuedBy?: number | null; issuedAt?: Date; at: Date },
): Promise<void> {
  const row: Record<string, unknown> = { updated_at: f.at, version: q.raw("version + 1") };
  if (f.state !== undefined) row.state = f.state;
  if (f.audience !== undefined) row.audience = f.audience;
  if (f.commentary !== undefined) row.commentary = JSON.stringify(f.commentary);
  if (f.figures !== undefined) row.figures = JSON.stringify(f.figures);
  if (f.documentId !== undefined) row.document_id = f.documentId;
  if (f.issuedBy !== undefined) row.issued_by = f.issuedBy;
  if (f.issuedAt !== undefined) row.issued_at = f.issuedAt;
  await q("reports").where({ id }).update(row);
}

export const insertReportEvents = (q: Q, events: ReadonlyArray<NewRecordEvent>) => insertRecordEvents(q, "report_events", "report_id", events);
export const listReportEvents = (q: Q, reportId: number) => listRecordEvents(q, "report_events", "report_id", reportId);

// Notices: one row per (report, reader); the unique key makes a second issue add none.

export async function insertNotices(q: Q, reportId: number, readers: ReadonlyArray<{ userId: number; messageId: string }>): Promise<number> {
  if (readers.length === 0) return 0;
  const before = await countNotices(q, reportId);
  await q("report_notices")
    .insert(readers.map((r) => ({ report_id: reportId, user_id: r.userId, message_id: r.messageId })))
    .onConflict(["report_id", "user_id"])
    .ignore();
  return (await countNotices(q, reportId)) - before;
}

async function countNotices(q: Q, reportId: number): Promise<number> {
  return countOf(q("report_notices").where({ report_id: reportId }));
}

export interface ClaimedNotice {
  id: number;
  reportId: number;
  userId: number;
  messageId: string;
  attempts: number;
}

/**
 * Claims up to `limit` notices due to be sent, under a lease: SKIP LOCKED lets several workers
 * claim side by side without taking the same row, and a lease that runs out (a crashed worker)
 * frees the notice again. Two claims meeting on the index's gap may still make one of them a
 * deadlock's victim (rolled back whole, nothing claimed): it simply claims again (decision 064).
 */
export async function claimNotices(db: Knex, now: Date, leaseMs: number, limit: number): Promise<ClaimedNotice[]> {
  return retryOnDeadlock(() => db.transaction(async (trx) => {
    const rows = (await trx("report_notices")
      // Queued (a retry waits out its lease), or being sent by a worker whose lease ran out.
      .where((w) => w.whereIn("status", ["queued", "sending"]).andWhere((l) => l.whereNull("lease_until").orWhere("lease_until", "<=", now)))
      .orderBy("id")
      .limit(limit)
      .forUpdate()
      .skipLocked()
      .select("id", "report_id", "user_id", "message_id", "attempts")) as Array<Record<string, unknown>>;
    if (rows.length === 0) return [];
    await trx("report_notices")
      .whereIn(
        "id",
        rows.map((r) => Number(r.id)),
      )
      .update({ status: "sending", lease_until: new Date(now.getTime() + leaseMs), attempts: trx.raw("attempts + 1") });
    return rows.map((r) => ({ id: Number(r.id), reportId: Number(r.report_id), userId: Number(r.user_id), messageId: String(r.message_id), attempts: Number(r.attempts) + 1 }));
  }));
}

/** A notice's outcome; a retry (`queued`) waits until `retryAt`. */
export async function finishNotice(q: Q, id: number, f: { status: "sent" | "failed" | "queued"; sentAt?: Date; error?: string | null; retryAt?: Date }): Promise<void> {
  await q("report_notices")
    .where({ id })
    .update({ status: f.status, sent_at: f.sentAt ?? null, error: f.error ? f.error.slice(0, 500) : null, lease_until: f.retryAt ?? null });
}

export async function listNotices(q: Q, reportId: number): Promise<Array<{ userId: number; status: string; sentAt: Date | null }>> {
  const rows = (await q("report_notices").where({ report_id: reportId }).orderBy("id")) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ userId: Number(r.user_id), status: String(r.status), sentAt: (r.sent_at as Date | null) ?? null }));
}
