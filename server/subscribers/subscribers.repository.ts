import type { Knex } from "knex";
import type { Frequency, Interest, SubscriberAudience, SubscriberFilterQuery, SubscriberStatus, Topics } from "#shared/schemas/subscribers.ts";
import { countOf, date, dateOrNull, instant, instantOrNull, json, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface SubscriberRecord {
  id: number;
  /** The project is the projects module's to read (projects.sender / projects.senders). */
  projectId: number;
  userId: number | null;
  email: string;
  emailHash: string;
  name: string;
  organisation: string | null;
  interest: Interest;
  audience: SubscriberAudience;
  frequency: Frequency;
  topics: Topics | null;
  topicsKey: string;
  status: SubscriberStatus;
  statusChangedAt: Date | null;
  consentAt: Date | null;
  consentIp: string | null;
  consentVersion: string | null;
  consentSource: string | null;
  confirmNonce: string | null;
  pendingSince: Date | null;
  confirmedAt: Date | null;
  confirmIp: string | null;
  unsubscribedAt: Date | null;
  lastDigestAt: Date | null;
  createdAt: Date;
  updatedAt: Date;
}


const toSubscriber = readRow<SubscriberRecord>({
  id: num(), projectId: num(), userId: numOrNull(), email: text(), emailHash: text(), name: text(), organisation: textOrNull(), interest: oneOf<Interest>(),
  audience: oneOf<SubscriberAudience>(), frequency: oneOf<Frequency>(), topics: json<Topics | null>(null), topicsKey: text(), status: oneOf<SubscriberStatus>(),
  statusChangedAt: dateOrNull(), consentAt: dateOrNull(), consentIp: textOrNull(), consentVersion: textOrNull(), consentSource: textOrNull(),
  confirmNonce: textOrNull(), pendingSince: dateOrNull(), confirmedAt: dateOrNull(), confirmIp: textOrNull(), unsubscribedAt: dateOrNull(),
  lastDigestAt: dateOrNull(), createdAt: date(), updatedAt: date(),
});

function base(q: Q) {
  return q("subscribers as s").select("s.*");
}

/** Reads one subscriber; with `forUpdate` its row (and only its row) is locked. */
async function findOne(q: Q, where: Record<string, unknown>, forUpdate: boolean): Promise<SubscriberRecord | null> {
  const query = q("subscribers").where(where);
  if (forUpdate) query.forUpdate();
  const r = await query.first();
  return r ? toSubscriber(r) : null;
}

export async function findSubscriberById(q: Q, id: number, forUpdate = false): Promise<SubscriberRecord | null> {
  return findOne(q, { id }, forUpdate);
}

export async function findSubscriberByProjectEmail(q: Q, projectId: number, email: string, forUpdate = false): Promise<SubscriberRecord | null> {
  return findOne(q, { project_id: projectId, email }, forUpdate);
}

export async function findSubscriberByProjectUser(q: Q, projectId: number, userId: number, forUpdate = false): Promise<SubscriberRecord | null> {
  return findOne(q, { project_id: projectId, user_id: userId }, forUpdate);
}

export async function listSubscribersOfUser(q: Q, userId: number): Promise<SubscriberRecord[]> {
  return (await base(q).where("s.user_id", userId)).map(toSubscriber);
}

export async function listSubscribersByEmailHash(q: Q, emailHash: string): Promise<SubscriberRecord[]> {
  return (await base(q).where("s.email_hash", emailHash).orderBy("s.id")).map(toSubscriber);
}

export interface SubscriberWrite {
  projectId: number;
  userId?: number | null;
  email: string;
  emailHash: string;
  name: string;
  organisation: string | null;
  interest: Interest;
  audience?: SubscriberAudience;
  frequency: Frequency;
  topics: Topics | null;
  topicsKey: string;
  status: SubscriberStatus;
  consentAt?: Date | null;
  consentIp?: string | null;
  consentVersion?: string | null;
  consentSource?: string | null;
  confirmNonce?: string | null;
  pendingSince?: Date | null;
  confirmedAt?: Date | null;
  confirmIp?: string | null;
  unsubscribedAt?: Date | null;
  statusChangedAt?: Date | null;
}

const COLUMN: Record<string, string> = {
  projectId: "project_id",
  userId: "user_id",
  email: "email",
  emailHash: "email_hash",
  name: "name",
  organisation: "organisation",
  interest: "interest",
  audience: "audience",
  frequency: "frequency",
  topics: "topics",
  topicsKey: "topics_key",
  status: "status",
  consentAt: "consent_at",
  consentIp: "consent_ip",
  consentVersion: "consent_version",
  consentSource: "consent_source",
  confirmNonce: "confirm_nonce",
  pendingSince: "pending_since",
  confirmedAt: "confirmed_at",
  confirmIp: "confirm_ip",
  unsubscribedAt: "unsubscribed_at",
  statusChangedAt: "status_changed_at",
  lastDigestAt: "last_digest_at",
};

function toColumns(w: Partial<SubscriberWrite> & { lastDigestAt?: Date | null }): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(w)) {
    if (v === undefined) continue;
    const col = COLUMN[k];
    if (!col) throw new Error(`unknown subscriber field ${k}`);
    row[col] = k === "topics" ? (v === null ? null : JSON.stringify(v)) : v;
  }
  return row;
}

export async function insertSubscriber(q: Q, w: SubscriberWrite): Promise<number> {
  const [id] = await q("subscribers").insert(toColumns(w));
  return Number(id);
}

export async function updateSubscriber(q: Q, id: number, patch: Partial<SubscriberWrite> & { lastDigestAt?: Date | null }, now: Date): Promise<void> {
  await q("subscribers").where({ id }).update({ ...toColumns(patch), updated_at: now });
}

/** Sets the status of every row of an address (all projects); returns the ids changed. */
export async function setStatusByEmailHash(q: Q, emailHash: string, status: SubscriberStatus, now: Date): Promise<number[]> {
  const rows = await q("subscribers").where({ email_hash: emailHash }).whereNot({ status }).forUpdate().select("id");
  const ids = rows.map((r: { id: number }) => Number(r.id));
  if (ids.length) await q("subscribers").whereIn("id", ids).update({ status, status_changed_at: now, confirm_nonce: null, updated_at: now });
  return ids;
}

export async function deleteSubscribersByEmailHash(q: Q, emailHash: string): Promise<number> {
  return q("subscribers").where({ email_hash: emailHash }).delete();
}

/** Unconfirmed rows older than `before` (measured from when they became pending). */
export async function deletePendingBefore(q: Q, before: Date): Promise<number> {
  return q("subscribers").where({ status: "pending" }).andWhere("pending_since", "<", before).delete();
}

function likeEscape(s: string): string {
  return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}

/** The office's list filters, with the project already resolved from its slug to its id. */
export type SubscriberFilter = Omit<SubscriberFilterQuery, "projectSlug"> & { projectId?: number };

function filtered(q: Q, f: SubscriberFilter) {
  const query = base(q);
  if (f.projectId !== undefined) query.where("s.project_id", f.projectId);
  if (f.interest) query.where("s.interest", f.interest);
  if (f.status) query.where("s.status", f.status);
  if (f.frequency) query.where("s.frequency", f.frequency);
  if (f.topic) {
    const i = f.topic.indexOf(":");
    const path = f.topic.slice(0, i) === "system" ? "$.systems" : "$.areas";
    const value = f.topic.slice(i + 1);
    query.where((w) => w.whereNull("s.topics").orWhereRaw("JSON_CONTAINS(s.topics, JSON_QUOTE(?), ?)", [value, path]));
  }
  if (f.q) {
    const like = `%${likeEscape(f.q)}%`;
    query.where((w) => w.where("s.email", "like", like).orWhere("s.name", "like", like).orWhere("s.organisation", "like", like));
  }
  return query;
}

/** The matching subscribers, newest first: one page of them (`window`), or all (null, for the export). */
export async function listSubscribers(q: Q, f: SubscriberFilter, window: { offset: number; limit: number } | null): Promise<{ rows: SubscriberRecord[]; total: number }> {
  const query = filtered(q, f).orderBy([{ column: "s.created_at", order: "desc" }, { column: "s.id", order: "desc" }]);
  if (window !== null) query.offset(window.offset).limit(window.limit);
  const rows = (await query).map(toSubscriber);
  return { rows, total: await countOf(filtered(q, f).clearSelect()) };
}

/** Every email address of a project already on its list (for imports). */
export async function listProjectEmails(q: Q, projectId: number): Promise<Set<string>> {
  const rows = await q("subscribers").where({ project_id: projectId }).select("email");
  return new Set(rows.map((r: { email: string }) => r.email));
}

/**
 * Confirmed, not suppressed subscribers of a project at one frequency, ordered by id so batches
 * are stable. (Whether an investor's account is still active is the users module's to say.)
 */
export async function listDigestRecipients(q: Q, projectId: number, frequency: Frequency): Promise<SubscriberRecord[]> {
  const rows = await base(q)
    .leftJoin("suppressions as x", "x.email_hash", "s.email_hash")
    .where({ "s.project_id": projectId, "s.frequency": frequency, "s.status": "confirmed" })
    .whereNull("x.id")
    .orderBy("s.id");
  return rows.map(toSubscriber);
}

// Suppressions

export async function isSuppressed(q: Q, emailHash: string): Promise<boolean> {
  return Boolean(await q("suppressions").where({ email_hash: emailHash }).first("id"));
}

export async function suppressedAmong(q: Q, hashes: string[]): Promise<Set<string>> {
  if (hashes.length === 0) return new Set();
  const found = new Set<string>();
  for (let i = 0; i < hashes.length; i += 1000) {
    const rows = await q("suppressions").whereIn("email_hash", hashes.slice(i, i + 1000)).select("email_hash");
    for (const r of rows as Array<{ email_hash: string }>) found.add(r.email_hash);
  }
  return found;
}

/** The first reason an address was suppressed is kept. */
export async function insertSuppression(q: Q, s: { emailHash: string; reason: "bounced" | "complained" | "erased"; source: string }): Promise<void> {
  await q("suppressions").insert({ email_hash: s.emailHash, reason: s.reason, source: s.source }).onConflict("email_hash").ignore();
}

export async function findSuppression(q: Q, emailHash: string): Promise<{ reason: string; source: string; createdAt: Date } | null> {
  const r = await q("suppressions").where({ email_hash: emailHash }).first();
  return r ? { reason: String(r.reason), source: String(r.source), createdAt: r.created_at as Date } : null;
}

// The outbound queue of subscription e-mails

export type MailJobKind = "confirmation" | "welcome" | "already_subscribed";

export interface MailJob {
  id: number;
  subscriberId: number;
  kind: MailJobKind;
  attempts: number;
}

export async function enqueueMailJob(q: Q, subscriberId: number, kind: MailJobKind, runAfter: Date): Promise<void> {
  await q("subscriber_mail_jobs").insert({ subscriber_id: subscriberId, kind, status: "queued", run_after: runAfter });
}

export async function enqueueMailJobs(q: Q, subscriberIds: number[], kind: MailJobKind, runAfter: Date): Promise<void> {
  for (let i = 0; i < subscriberIds.length; i += 500) {
    await q("subscriber_mail_jobs").insert(subscriberIds.slice(i, i + 500).map((id) => ({ subscriber_id: id, kind, status: "queued", run_after: runAfter })));
  }
}

/**
 * Claims up to `limit` due jobs under a lease: SKIP LOCKED lets several processes claim
 * side by side, and a lease that runs out (a crashed worker) frees the job again.
 */
export async function claimMailJobs(db: Knex, now: Date, leaseMs: number, limit: number): Promise<MailJob[]> {
  return db.transaction(async (trx) => {
    const rows = await trx("subscriber_mail_jobs")
      .where({ status: "queued" })
      .andWhere("run_after", "<=", now)
      .andWhere((w) => w.whereNull("lease_until").orWhere("lease_until", "<=", now))
      .orderBy("id")
      .limit(limit)
      .forUpdate()
      .skipLocked()
      .select("id", "subscriber_id", "kind", "attempts");
    if (rows.length === 0) return [];
    const ids = rows.map((r: { id: number }) => Number(r.id));
    await trx("subscriber_mail_jobs")
      .whereIn("id", ids)
      .update({ lease_until: new Date(now.getTime() + leaseMs), attempts: trx.raw("attempts + 1") });
    return rows.map((r: Record<string, unknown>) => ({ id: Number(r.id), subscriberId: Number(r.subscriber_id), kind: r.kind as MailJobKind, attempts: Number(r.attempts) + 1 }));
  });
}

export async function finishMailJob(
  q: Q,
  id: number,
  f: { status: "sent" | "failed" | "skipped" | "queued"; messageId?: string; error?: string; runAfter?: Date; sentAt?: Date },
): Promise<void> {
  await q("subscriber_mail_jobs")
    .where({ id })
    .update({
      status: f.status,
      lease_until: null,
      ...(f.messageId ? { message_id: f.messageId.slice(0, 255) } : {}),
      ...(f.error ? { last_error: f.error.slice(0, 500) } : {}),
      ...(f.runAfter ? { run_after: f.runAfter } : {}),
      ...(f.sentAt ? { sent_at: f.sentAt } : {}),
    });
}

/** Queued mail to these subscribers will not go (they were suppressed). */
export async function skipQueuedJobs(q: Q, subscriberIds: number[], reason: string): Promise<void> {
  if (subscriberIds.length === 0) return;
  await q("subscriber_mail_jobs").whereIn("subscriber_id", subscriberIds).andWhere({ status: "queued" }).update({ status: "skipped", last_error: reason, lease_until: null });
}

const toMailJob = readRow<{ subscriberId: number; kind: string; status: string; attempts: number; createdAt: string; sentAt: string | null; messageId: string | null }>({
  subscriberId: num(), kind: text(), status: text(), attempts: num(), createdAt: instant(), sentAt: instantOrNull(), messageId: textOrNull(),
});

export async function listMailJobsOf(q: Q, subscriberIds: number[]) {
  if (subscriberIds.length === 0) return [];
  const rows = await q("subscriber_mail_jobs").whereIn("subscriber_id", subscriberIds).orderBy("id");
  return rows.map(toMailJob);
}

/** Two requests for one new address at once: one hits the unique key or a deadlock and can simply run again. */
export function isWriteConflict(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code;
  return code === "ER_DUP_ENTRY" || code === "ER_LOCK_DEADLOCK";
}

// What the digests module reads of subscribers (through subscribers.digest-reads.ts)

/** Confirmed, not suppressed subscribers of a project at one frequency: the office's "recipients" figure. */
export async function countDigestSubscribers(q: Q, projectId: number, frequency: Frequency): Promise<number> {
  const r = await q("subscribers as s")
    .leftJoin("suppressions as x", "x.email_hash", "s.email_hash")
    .where({ "s.project_id": projectId, "s.frequency": frequency, "s.status": "confirmed" })
    .whereNull("x.id")
    .count({ n: "*" })
    .first();
  return Number(r?.n ?? 0);
}

/** The address and status of each of these subscribers (those that still exist). */
export async function findAddressees(q: Q, ids: readonly number[]): Promise<Map<number, { email: string; status: SubscriberStatus }>> {
  const out = new Map<number, { email: string; status: SubscriberStatus }>();
  if (ids.length === 0) return out;
  const rows = await q("subscribers").whereIn("id", [...ids]).select("id", "email", "status");
  for (const r of rows as Array<{ id: number; email: string; status: string }>) out.set(Number(r.id), { email: String(r.email), status: r.status as SubscriberStatus });
  return out;
}

export async function subscriberIdsByEmailHash(q: Q, emailHash: string): Promise<number[]> {
  const rows = await q("subscribers").where({ email_hash: emailHash }).select("id");
  return rows.map((r: { id: number }) => Number(r.id));
}
