import type { Knex } from "knex";
import { escapeLike, type VariantRecord } from "./media.repository.ts";

/*
 * The photo-processing queue (`media_jobs`) and what a job commits to its photo. Times are the
 * database's clock, which every process shares, unless the caller passes `at` (a worker given a
 * clock, as the tests do to let a lease run out without waiting for it).
 */

type Q = Knex | Knex.Transaction;

/** `at` as a value, or the database's clock. */
const clock = (q: Q, at: Date | undefined) => at ?? q.raw("NOW(3)");

export interface ClaimedJob {
  jobId: number;
  mediaId: number;
  leaseToken: string;
  attempts: number;
  originalKey: string;
}

export async function insertJob(q: Q, mediaId: number): Promise<void> {
  await q("media_jobs").insert({ media_id: mediaId });
}

/**
 * Claims the oldest job that is due, or whose holder's lease ran out (its process died),
 * under a fresh lease token. `SKIP LOCKED` lets several workers, in several processes,
 * claim at the same moment without waiting on each other or taking the same job. Times
 * come from the database clock, which every process shares, unless `at` is given.
 */
export async function claimJob(trx: Knex.Transaction, leaseToken: string, leaseMs: number, at?: Date): Promise<ClaimedJob | null> {
  const now = clock(trx, at);
  const row = (await trx("media_jobs")
    .where((w) =>
      w
        .where((a) => a.where("state", "queued").andWhere("run_after", "<=", now))
        .orWhere((b) => b.where("state", "running").andWhere("lease_until", "<", now)),
    )
    .orderBy("id")
    .first("id", "media_id", "attempts")
    .forUpdate()
    .skipLocked()) as { id: number; media_id: number; attempts: number } | undefined;
  if (!row) return null;
  await trx("media_jobs")
    .where({ id: row.id })
    .update({
      state: "running",
      lease_token: leaseToken,
      lease_until: trx.raw("DATE_ADD(?, INTERVAL ? MICROSECOND)", [now, Math.round(leaseMs * 1000)]),
      attempts: trx.raw("attempts + 1"),
    });
  const item = (await trx("media_items").where({ id: row.media_id }).first("original_key")) as { original_key: string } | undefined;
  return {
    jobId: Number(row.id),
    mediaId: Number(row.media_id),
    leaseToken,
    attempts: Number(row.attempts) + 1,
    originalKey: String(item?.original_key ?? ""),
  };
}

/** Storage keys each attempt (by lease token) recorded before writing them. */
export type StagedKeys = Record<string, string[]>;

const parseStaged = (v: unknown): StagedKeys => (v ? (JSON.parse(String(v)) as StagedKeys) : {});

/** Locks the job row while its lease token is still the one given; null when the lease was lost. */
export async function lockHeldJob(trx: Knex.Transaction, jobId: number, leaseToken: string): Promise<{ staged: StagedKeys; attempts: number } | null> {
  const row = (await trx("media_jobs").where({ id: jobId, lease_token: leaseToken }).first("staged_keys", "attempts").forUpdate()) as
    | { staged_keys: string | null; attempts: number }
    | undefined;
  if (!row) return null;
  return { staged: parseStaged(row.staged_keys), attempts: Number(row.attempts) };
}

/** Locks a job row whoever holds it; null when it is gone (its photo is committed or failed). */
export async function lockJob(trx: Knex.Transaction, jobId: number): Promise<{ staged: StagedKeys } | null> {
  const row = (await trx("media_jobs").where({ id: jobId }).first("staged_keys").forUpdate()) as { staged_keys: string | null } | undefined;
  return row ? { staged: parseStaged(row.staged_keys) } : null;
}

export async function setStagedKeys(q: Q, jobId: number, staged: StagedKeys): Promise<void> {
  await q("media_jobs").where({ id: jobId }).update({ staged_keys: JSON.stringify(staged) });
}

/** Whether any attempt of any job, other than the one excepted, recorded this key. */
export async function isKeyStaged(q: Q, key: string, except?: { jobId: number; leaseToken: string }): Promise<boolean> {
  const rows = (await q("media_jobs").where("staged_keys", "like", `%${escapeLike(JSON.stringify(key))}%`).select("id", "staged_keys")) as Array<{ id: number; staged_keys: string }>;
  return rows.some((r) =>
    Object.entries(parseStaged(r.staged_keys)).some(([token, keys]) => keys.includes(key) && !(except && Number(r.id) === except.jobId && token === except.leaseToken)),
  );
}

export async function deleteJob(q: Q, jobId: number): Promise<void> {
  await q("media_jobs").where({ id: jobId }).delete();
}

/** Back into the queue after a failed attempt, not before `delayMs` has passed. */
export async function requeueJob(q: Q, jobId: number, error: string, delayMs: number, at?: Date): Promise<void> {
  await q("media_jobs")
    .where({ id: jobId })
    .update({
      state: "queued",
      lease_token: null,
      lease_until: null,
      last_error: error.slice(0, 2000),
      run_after: q.raw("DATE_ADD(?, INTERVAL ? MICROSECOND)", [clock(q, at), Math.round(delayMs * 1000)]),
    });
}

/** Jobs whose holder's lease ran out go back to the queue (their process died or hung). */
export async function requeueExpiredLeases(q: Q, at?: Date): Promise<number> {
  return Number(
    await q("media_jobs")
      .where("state", "running")
      .andWhere("lease_until", "<", clock(q, at))
      .update({ state: "queued", lease_token: null, lease_until: null, last_error: "the lease ran out; the worker that held it stopped" }),
  );
}

/**
 * The caller holds the job's lease, so the photo has no variants yet. (No defensive DELETE
 * first: on an empty range it takes gap locks that deadlock two workers committing at once.)
 */
export async function insertVariants(q: Q, mediaId: number, variants: ReadonlyArray<Omit<VariantRecord, "mediaId">>): Promise<void> {
  if (variants.length === 0) return;
  await q("media_variants").insert(
    variants.map((v) => ({ media_id: mediaId, width: v.width, height: v.height, format: v.format, storage_key: v.storageKey, bytes: v.bytes })),
  );
}

export async function markMediaReady(
  q: Q,
  mediaId: number,
  d: { width: number; height: number; placeholder: string; dominantColor: string; fingerprint?: string },
): Promise<void> {
  await q("media_items").where({ id: mediaId }).update({
    status: "ready",
    failure_reason: null,
    width: d.width,
    height: d.height,
    placeholder: d.placeholder,
    dominant_color: d.dominantColor,
    ...(d.fingerprint ? { fingerprint: d.fingerprint } : {}),
    updated_at: q.raw("CURRENT_TIMESTAMP(3)"),
  });
}

export async function markMediaFailed(q: Q, mediaId: number, reason: string): Promise<void> {
  await q("media_items").where({ id: mediaId }).update({ status: "failed", failure_reason: reason.slice(0, 2000), updated_at: q.raw("CURRENT_TIMESTAMP(3)") });
}

export async function requeueMedia(q: Q, mediaId: number): Promise<void> {
  await q("media_items").where({ id: mediaId }).update({ status: "processing", failure_reason: null, updated_at: q.raw("CURRENT_TIMESTAMP(3)") });
  await q("media_jobs").insert({ media_id: mediaId }).onConflict("media_id").ignore();
}
