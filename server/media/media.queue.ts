import { randomBytes } from "node:crypto";
import type { Knex } from "knex";
import type { MediaItem, VariantFormat } from "#shared/schemas/media.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import type { MediaContext } from "./media.context.ts";
import type { ItemReader } from "./media.items.ts";
import { countItemsWithOriginal, countVariantsWithKey, findMediaById } from "./media.repository.ts";
import {
  claimJob,
  deleteJob,
  insertVariants,
  isKeyStaged,
  lockHeldJob,
  lockJob,
  markMediaFailed,
  markMediaReady,
  requeueExpiredLeases,
  requeueJob,
  requeueMedia,
  setStagedKeys,
  type ClaimedJob,
  type StagedKeys,
} from "./media.queue.repository.ts";

/** A job is tried this many times (a crash counts as a try) before its photo is marked failed. */
export const MAX_JOB_ATTEMPTS = 3;

/** What the derivative worker commits for one photo. */
export interface DerivativeResult {
  width: number;
  height: number;
  placeholder: string;
  dominantColor: string;
  /** The perceptual fingerprint, 16 hex digits (media.fingerprint.ts). */
  fingerprint?: string;
  variants: Array<{ width: number; height: number; format: VariantFormat; storageKey: string; bytes: number }>;
}

const allStaged = (staged: StagedKeys): string[] => [...new Set(Object.values(staged).flat())];

/**
 * The photo-processing queue: a job per uploaded photo, claimed under a lease by the worker in
 * media.jobs.ts, committed with its derivatives, retried, or failed. `at` is the worker's clock
 * where it has one; without it the database's clock decides when a lease has run out.
 */
export function createMediaQueue(ctx: MediaContext, items: ItemReader) {
  const { db, storage } = ctx;
  const queuedListeners = new Set<() => void>();

  const notifyQueued = () => {
    for (const listener of queuedListeners) listener();
  };

  /** A key is in use while a derivative or an original row refers to it, or an attempt has recorded it. */
  async function keyInUse(q: Db | Knex.Transaction, key: string, except?: ClaimedJob): Promise<boolean> {
    if ((await countVariantsWithKey(q, key)) + (await countItemsWithOriginal(q, key)) > 0) return true;
    return isKeyStaged(q, key, except ? { jobId: except.jobId, leaseToken: except.leaseToken } : undefined);
  }

  async function discardUnreferenced(keys: readonly string[]): Promise<number> {
    let n = 0;
    for (const key of new Set(keys)) {
      if (await keyInUse(db, key)) continue;
      await storage.delete(key);
      n += 1;
    }
    return n;
  }

  return {
    /** Called whenever a job is queued in this process, so a local worker starts at once. */
    onQueued(listener: () => void): () => void {
      queuedListeners.add(listener);
      return () => queuedListeners.delete(listener);
    },

    /** Tells this process's worker that a job was queued (by an upload or a retry). */
    notifyQueued,

    /** Puts a failed photo back in the processing queue. */
    async retry(id: number): Promise<MediaItem> {
      const item = await findMediaById(db, id);
      if (!item) throw notFound("That photo");
      if (item.status !== "failed") throw new AppError("not_failed", "Only a photo whose processing failed can be tried again.", 409);
      await db.transaction((trx) => requeueMedia(trx, id));
      notifyQueued();
      return items.getItem(id);
    },

    /** The processing queue, for the worker in media.jobs.ts. */
    queue: {
      /**
       * Claims the next due job under a new lease. A job already tried MAX_JOB_ATTEMPTS
       * times (crashes included) is not tried again: its photo is marked failed.
       */
      async claim(leaseMs: number, at?: Date): Promise<ClaimedJob | null> {
        for (;;) {
          const token = randomBytes(16).toString("hex");
          const outcome = await db.transaction(async (trx) => {
            const job = await claimJob(trx, token, leaseMs, at);
            if (!job) return { job: null, leftover: null };
            if (job.attempts > MAX_JOB_ATTEMPTS) {
              const row = await lockJob(trx, job.jobId);
              await markMediaFailed(trx, job.mediaId, `Processing stopped after ${MAX_JOB_ATTEMPTS} attempts.`);
              await deleteJob(trx, job.jobId);
              return { job: null, leftover: allStaged(row?.staged ?? {}) };
            }
            return { job, leftover: null };
          });
          if (!outcome.leftover) return outcome.job;
          await discardUnreferenced(outcome.leftover);
        }
      },

      /**
       * Records the keys this attempt is about to write (before writing any), and returns the
       * keys earlier attempts recorded; null when the lease was lost to another worker.
       */
      async stage(job: ClaimedJob, keys: readonly string[]): Promise<string[] | null> {
        return db.transaction(async (trx) => {
          const held = await lockHeldJob(trx, job.jobId, job.leaseToken);
          if (!held) return null;
          const { [job.leaseToken]: _mine, ...earlier } = held.staged;
          await setStagedKeys(trx, job.jobId, { ...held.staged, [job.leaseToken]: [...new Set(keys)] });
          return allStaged(earlier);
        });
      },

      /** Commits the derivatives' rows and the photo's readiness in one transaction; false when the lease was lost. */
      async complete(job: ClaimedJob, result: DerivativeResult): Promise<boolean> {
        return db.transaction(async (trx) => {
          if (!(await lockHeldJob(trx, job.jobId, job.leaseToken))) return false;
          await insertVariants(trx, job.mediaId, result.variants);
          await markMediaReady(trx, job.mediaId, result);
          await deleteJob(trx, job.jobId);
          return true;
        });
      },

      /**
       * A failed attempt: tried again later; or (permanent, or out of attempts) the photo is
       * marked failed and every file its attempts wrote goes.
       */
      async fail(job: ClaimedJob, reason: string, permanent: boolean, at?: Date): Promise<void> {
        const leftover = await db.transaction(async (trx) => {
          const held = await lockHeldJob(trx, job.jobId, job.leaseToken);
          if (!held) return [];
          if (permanent || held.attempts >= MAX_JOB_ATTEMPTS) {
            await markMediaFailed(trx, job.mediaId, reason);
            await deleteJob(trx, job.jobId);
            return allStaged(held.staged);
          }
          await requeueJob(trx, job.jobId, reason, held.attempts * 5_000, at);
          return [];
        });
        await discardUnreferenced(leftover);
      },

      /**
       * After this attempt lost its lease: its files go, unless a row or another attempt uses
       * them. The job row stays locked meanwhile, so the new holder cannot record the same key
       * between the check and the delete.
       */
      async abandon(job: ClaimedJob, keys: readonly string[]): Promise<void> {
        await db.transaction(async (trx) => {
          const row = await lockJob(trx, job.jobId);
          for (const key of new Set(keys)) {
            if (!(await keyInUse(trx, key, job))) await storage.delete(key);
          }
          if (row && row.staged[job.leaseToken]) {
            const { [job.leaseToken]: _mine, ...rest } = row.staged;
            await setStagedKeys(trx, job.jobId, rest);
          }
        });
      },

      /** Deletes those of `keys` that no row and no attempt in progress refers to; how many went. */
      discardUnreferenced: (keys: readonly string[]) => discardUnreferenced(keys),

      requeueExpired: (at?: Date) => requeueExpiredLeases(db, at),
    },
  };
}
