import type { Knex } from "knex";
import type { DigestCounts, DigestRunStatus } from "#shared/schemas/digests.ts";
import type { Frequency } from "#shared/schemas/subscribers.ts";
import { parseItemRefs, type DigestItemRef } from "./digests.items.ts";
import { bool, countOf, date, dateOrNull, num, numOrNull, oneOf, readRow, text, textOrNull, type Row } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface DigestRunRecord {
  id: number;
  projectId: number;
  frequency: Frequency;
  runKey: string;
  windowStart: Date;
  windowEnd: Date;
  postId: number | null;
  status: DigestRunStatus;
  isTest: boolean;
  requestedBy: number | null;
  counts: DigestCounts;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

const toCounts = (r: Row): DigestRunRecord["counts"] => {
  const total = Number(r.queued_count);
  const sent = Number(r.sent_count);
  const failed = Number(r.failed_count);
  const skipped = Number(r.skipped_count);
  return { total, queued: Math.max(0, total - sent - failed - skipped), sent, failed, skipped };
};

const toRun = readRow<DigestRunRecord>({
  id: num(), projectId: num(), frequency: oneOf<Frequency>(), runKey: text(), windowStart: date(), windowEnd: date(), postId: numOrNull(),
  status: oneOf<DigestRunStatus>(), isTest: bool(), requestedBy: numOrNull(), counts: toCounts, createdAt: date(), startedAt: dateOrNull(), finishedAt: dateOrNull(),
});

// A run's project is named by the projects service (the service adds slug and name to what it shows).
const runQuery = (q: Q) => q("digest_runs as r").select("r.*");

export async function findRun(q: Q, id: number): Promise<DigestRunRecord | null> {
  const r = await runQuery(q).where("r.id", id).first();
  return r ? toRun(r) : null;
}

export async function findRunByKey(q: Q, projectId: number, runKey: string): Promise<DigestRunRecord | null> {
  const r = await runQuery(q).where({ "r.project_id": projectId, "r.run_key": runKey }).first();
  return r ? toRun(r) : null;
}

export async function listRuns(q: Q, f: { projectId?: number; limit: number }): Promise<DigestRunRecord[]> {
  const query = runQuery(q).orderBy("r.id", "desc").limit(f.limit);
  if (f.projectId) query.where("r.project_id", f.projectId);
  return (await query).map(toRun);
}

/** Inserts a run unless its period already has one; returns the run of that period either way. */
export async function insertRunOnce(
  q: Q,
  row: { projectId: number; frequency: Frequency; runKey: string; windowStart: Date; windowEnd: Date; postId?: number | null; isTest?: boolean; requestedBy?: number | null },
): Promise<{ id: number; created: boolean }> {
  const existing = await q("digest_runs").where({ project_id: row.projectId, run_key: row.runKey }).first("id");
  if (existing) return { id: Number(existing.id), created: false };
  const inserted = await q("digest_runs")
    .insert({
      project_id: row.projectId,
      frequency: row.frequency,
      run_key: row.runKey,
      window_start: row.windowStart,
      window_end: row.windowEnd,
      post_id: row.postId ?? null,
      is_test: row.isTest ?? false,
      requested_by: row.requestedBy ?? null,
    })
    .onConflict(["project_id", "run_key"])
    .ignore();
  const id = Number(inserted[0] ?? 0);
  if (id > 0) return { id, created: true };
  const again = await q("digest_runs").where({ project_id: row.projectId, run_key: row.runKey }).first("id");
  return { id: Number(again.id), created: false };
}

export async function setRunStatus(q: Q, id: number, status: DigestRunStatus, at: Date, from?: DigestRunStatus[]): Promise<number> {
  const patch: Record<string, unknown> = { status };
  if (status === "running") patch.started_at = q.raw("COALESCE(started_at, ?)", [at]);
  if (status === "done" || status === "failed") patch.finished_at = at;
  const query = q("digest_runs").where({ id });
  if (from) query.whereIn("status", from);
  return query.update(patch);
}

/** Recounts a run from its deliveries (counts are derived, never incremented, so no race can skew them). */
export async function refreshCounts(q: Q, runId: number): Promise<DigestCounts> {
  const rows = await q("digest_deliveries").where({ run_id: runId }).groupBy("status").select("status").count({ n: "*" });
  const by: Record<string, number> = {};
  for (const r of rows as Array<{ status: string; n: number }>) by[r.status] = Number(r.n);
  const total = Object.values(by).reduce((a, b) => a + b, 0);
  const counts = { total, queued: (by.queued ?? 0) + (by.sending ?? 0), sent: by.sent ?? 0, failed: by.failed ?? 0, skipped: by.skipped ?? 0 };
  await q("digest_runs").where({ id: runId }).update({ queued_count: total, sent_count: counts.sent, failed_count: counts.failed, skipped_count: counts.skipped });
  return counts;
}

/**
 * Marks a planned run done once none of its deliveries is left to send. Only a `running` run: a
 * `queued` one has no deliveries because nobody has planned it yet (it may have been created
 * a moment ago, after this worker's own planning pass), not because they were all sent.
 */
export async function finishRunIfDrained(q: Q, runId: number, at: Date): Promise<boolean> {
  const open = await q("digest_deliveries").where({ run_id: runId }).whereIn("status", ["queued", "sending"]).first("id");
  if (open) return false;
  await refreshCounts(q, runId);
  return (await setRunStatus(q, runId, "done", at, ["running"])) > 0;
}

export async function listUnfinishedRuns(q: Q): Promise<number[]> {
  const rows = await q("digest_runs").whereIn("status", ["queued", "running"]).orderBy("id").select("id");
  return rows.map((r: { id: number }) => Number(r.id));
}

// Contents

export interface ContentRow {
  id: number;
  contentKey: string;
  audience: "public" | "investor";
  topicsKey: string;
  empty: boolean;
  subject: string;
  preheader: string;
  html: string;
  text: string;
  percentComplete: number | null;
  forecastReady: string | null;
  /** What the content tells of, by reference (decision 045); null for a content rendered before they were kept. */
  itemRefs: DigestItemRef[] | null;
}

const toContent = readRow<ContentRow>({
  id: num(), contentKey: text(), audience: oneOf<ContentRow["audience"]>(), topicsKey: text(), empty: bool(), subject: text(), preheader: text(), html: text(),
  text: text(), percentComplete: numOrNull(), forecastReady: textOrNull(), itemRefs: (row) => parseItemRefs(row.item_refs == null ? null : String(row.item_refs)),
});

export async function insertContent(q: Q, runId: number, c: Omit<ContentRow, "id">): Promise<number> {
  await q("digest_contents")
    .insert({
      run_id: runId,
      content_key: c.contentKey,
      audience: c.audience,
      topics_key: c.topicsKey,
      empty: c.empty,
      subject: c.subject.slice(0, 300),
      preheader: c.preheader.slice(0, 300),
      html: c.html,
      text: c.text,
      percent_complete: c.percentComplete,
      forecast_ready: c.forecastReady,
      item_refs: c.itemRefs === null ? null : JSON.stringify(c.itemRefs),
    })
    .onConflict(["run_id", "content_key"])
    .ignore();
  const r = await q("digest_contents").where({ run_id: runId, content_key: c.contentKey }).first("id");
  return Number(r.id);
}

export async function findContent(q: Q, id: number): Promise<ContentRow | null> {
  const r = await q("digest_contents").where({ id }).first();
  return r ? toContent(r) : null;
}

export async function contentsByIds(q: Q, ids: number[]): Promise<Map<number, ContentRow>> {
  const out = new Map<number, ContentRow>();
  if (ids.length === 0) return out;
  for (const r of await q("digest_contents").whereIn("id", ids)) out.set(Number(r.id), toContent(r));
  return out;
}

/** The figures of each subscriber's last sent digest (the baseline of "since your last digest"). */
export async function lastFiguresOf(q: Q, subscriberIds: number[]): Promise<Map<number, { percentComplete: number | null; forecastReady: string | null }>> {
  const out = new Map<number, { percentComplete: number | null; forecastReady: string | null }>();
  for (let i = 0; i < subscriberIds.length; i += 1000) {
    const chunk = subscriberIds.slice(i, i + 1000);
    const rows = await q("digest_deliveries as d")
      .join("digest_contents as c", "c.id", "d.content_id")
      .join("digest_runs as r", "r.id", "d.run_id")
      .whereIn("d.subscriber_id", chunk)
      .andWhere("d.status", "sent")
      .andWhere("r.is_test", false)
      .andWhereNot("r.frequency", "immediate")
      .andWhereRaw("d.id = (SELECT MAX(d2.id) FROM digest_deliveries d2 JOIN digest_runs r2 ON r2.id = d2.run_id WHERE d2.subscriber_id = d.subscriber_id AND d2.status = 'sent' AND d2.content_id IS NOT NULL AND r2.is_test = 0 AND r2.frequency <> 'immediate')")
      .select("d.subscriber_id", "c.percent_complete", "c.forecast_ready");
    for (const r of rows) out.set(Number(r.subscriber_id), { percentComplete: r.percent_complete == null ? null : Number(r.percent_complete), forecastReady: r.forecast_ready ?? null });
  }
  return out;
}

// Deliveries

export interface DeliveryInsert {
  subscriberId: number;
  contentId: number | null;
  contentKey: string | null;
  windowStart: Date;
  status: "queued" | "skipped";
  messageId: string;
  error?: string | null;
}

export async function insertDeliveries(q: Q, runId: number, rows: DeliveryInsert[], at: Date): Promise<void> {
  for (let i = 0; i < rows.length; i += 1000) {
    const chunk = rows.slice(i, i + 1000).map((d) => ({
      run_id: runId,
      subscriber_id: d.subscriberId,
      content_id: d.contentId,
      content_key: d.contentKey,
      window_start: d.windowStart,
      status: d.status,
      message_id: d.messageId,
      error: d.error ?? null,
      next_attempt_at: at,
    }));
    // Unique (run, subscriber): planning a run twice adds nobody twice.
    await q("digest_deliveries").insert(chunk).onConflict(["run_id", "subscriber_id"]).ignore();
  }
}

export async function deliveredSubscriberIds(q: Q, runId: number): Promise<Set<number>> {
  const rows = await q("digest_deliveries").where({ run_id: runId }).select("subscriber_id");
  return new Set(rows.map((r: { subscriber_id: number }) => Number(r.subscriber_id)));
}

export interface ClaimedDelivery {
  id: number;
  runId: number;
  subscriberId: number;
  contentId: number | null;
  attempts: number;
  messageId: string;
  /** The previous attempt was claimed and its worker vanished before recording the result. */
  interrupted: boolean;
  windowEnd: Date;
  isTest: boolean;
}

/**
 * Claims up to `limit` due deliveries of running runs, skipping rows other workers hold, and
 * leases them. A delivery whose lease ran out (its worker died) is claimed again.
 */
export async function claimDeliveries(db: Knex, now: Date, leaseMs: number, limit: number): Promise<ClaimedDelivery[]> {
  return db.transaction(async (trx) => {
    const rows = await trx("digest_deliveries as d")
      .join("digest_runs as r", "r.id", "d.run_id")
      .where("r.status", "running")
      .andWhere((w) =>
        w.where((a) => a.where("d.status", "queued").andWhere("d.next_attempt_at", "<=", now)).orWhere((b) => b.where("d.status", "sending").andWhere("d.lease_until", "<", now)),
      )
      .orderBy("d.id")
      .limit(limit)
      .forUpdate("d")
      .skipLocked()
      .select("d.id", "d.status");
    if (rows.length === 0) return [];
    const ids = rows.map((r: { id: number }) => Number(r.id));
    const interrupted = new Set(rows.filter((r: { status: string }) => r.status === "sending").map((r: { id: number }) => Number(r.id)));
    await trx("digest_deliveries").whereIn("id", ids).update({ status: "sending", lease_until: new Date(now.getTime() + leaseMs), attempts: trx.raw("attempts + 1") });
    const full = await trx("digest_deliveries as d")
      .join("digest_runs as r", "r.id", "d.run_id")
      .whereIn("d.id", ids)
      .orderBy("d.id")
      .select("d.id", "d.run_id", "d.subscriber_id", "d.content_id", "d.attempts", "d.message_id", "r.window_end", "r.is_test");
    return full.map((r) => ({
      id: Number(r.id),
      runId: Number(r.run_id),
      subscriberId: Number(r.subscriber_id),
      contentId: r.content_id == null ? null : Number(r.content_id),
      attempts: Number(r.attempts),
      messageId: String(r.message_id),
      interrupted: interrupted.has(Number(r.id)),
      windowEnd: new Date(r.window_end),
      isTest: Boolean(r.is_test),
    }));
  });
}

export async function finishDeliveries(q: Q, ids: number[], patch: { status: "sent" | "failed" | "skipped" | "queued"; error?: string | null; sentAt?: Date; nextAttemptAt?: Date }): Promise<void> {
  if (ids.length === 0) return;
  const row: Record<string, unknown> = { status: patch.status, lease_until: null, error: patch.error?.slice(0, 500) ?? null };
  if (patch.sentAt) row.sent_at = patch.sentAt;
  if (patch.nextAttemptAt) row.next_attempt_at = patch.nextAttemptAt;
  // Only a row still leased is finished: a delivery already recorded by another worker stays as it is.
  await q("digest_deliveries").whereIn("id", ids).andWhere("status", "sending").update(row);
}

/** Drops the queued deliveries of these subscribers (unsubscribed, bounced, complained). */
export async function skipQueuedOf(q: Q, subscriberIds: number[], reason: string): Promise<void> {
  if (subscriberIds.length === 0) return;
  await q("digest_deliveries").whereIn("subscriber_id", subscriberIds).whereIn("status", ["queued"]).update({ status: "skipped", error: reason });
}

/** This subscriber's delivery of this content (the web copy shows it to no one else): its project and window, or null. */
export async function deliveryOfContent(q: Q, contentId: number, subscriberId: number): Promise<{ projectId: number; windowStart: Date; windowEnd: Date } | null> {
  const r = await q("digest_deliveries as d").join("digest_runs as r", "r.id", "d.run_id").where({ "d.content_id": contentId, "d.subscriber_id": subscriberId }).first("r.project_id", "d.window_start", "r.window_end");
  return r ? { projectId: Number(r.project_id), windowStart: new Date(r.window_start), windowEnd: new Date(r.window_end) } : null;
}

/** Of these posts, the ones that already have an "as it happens" run. */
export async function postsWithImmediateRun(q: Q, postIds: readonly number[]): Promise<Set<number>> {
  if (postIds.length === 0) return new Set();
  const rows = await q("digest_runs").whereIn("post_id", [...postIds]).andWhere("frequency", "immediate").select("post_id");
  return new Set(rows.map((r: { post_id: number }) => Number(r.post_id)));
}

// A subscriber's archive (decision 045)

export interface ArchivedDelivery {
  id: number;
  subscriberId: number;
  projectId: number;
  frequency: Frequency;
  contentId: number;
  subject: string;
  sentAt: Date;
  windowStart: Date;
  windowEnd: Date;
  /** Rendered before digests kept what they hold (decision 045). */
  unrecorded: boolean;
}

/** Sent, non-test deliveries with a content that said something: what a reader actually received. */
const archiveQuery = (q: Q, subscriberIds: readonly number[]) =>
  q("digest_deliveries as d")
    .join("digest_runs as r", "r.id", "d.run_id")
    .join("digest_contents as c", "c.id", "d.content_id")
    .whereIn("d.subscriber_id", [...subscriberIds])
    .andWhere("d.status", "sent")
    .andWhere("r.is_test", false)
    .andWhere("c.empty", false);

const toArchived = readRow<ArchivedDelivery>({
  id: num(), subscriberId: num(), projectId: num(), frequency: oneOf<Frequency>(), contentId: num(), subject: text(),
  sentAt: (row) => new Date((row.sent_at ?? row.created_at) as string), windowStart: date(), windowEnd: date(), unrecorded: bool(),
});

const archiveColumns = (q: Q) => ["d.id", "d.subscriber_id", "d.content_id", "d.window_start", "d.sent_at", "r.project_id", "r.frequency", "r.window_end", "r.created_at", "c.subject", q.raw("c.item_refs IS NULL AS unrecorded")];

/** These subscribers' received digests, newest first, one page, and how many there are in all. */
export async function listArchivedDeliveries(q: Q, subscriberIds: readonly number[], page: { limit: number; offset: number }): Promise<{ rows: ArchivedDelivery[]; total: number }> {
  if (subscriberIds.length === 0) return { rows: [], total: 0 };
  const total = await countOf(archiveQuery(q, subscriberIds));
  const rows = await archiveQuery(q, subscriberIds).orderBy("d.sent_at", "desc").orderBy("d.id", "desc").limit(page.limit).offset(page.offset).select(archiveColumns(q));
  return { rows: rows.map(toArchived), total };
}

/** One received digest of these subscribers, or null (another reader's, skipped, failed or unknown). */
export async function findArchivedDelivery(q: Q, subscriberIds: readonly number[], id: number): Promise<ArchivedDelivery | null> {
  if (subscriberIds.length === 0) return null;
  const r = await archiveQuery(q, subscriberIds).andWhere("d.id", id).first(archiveColumns(q));
  return r ? toArchived(r) : null;
}
