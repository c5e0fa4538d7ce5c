import type { Logger } from "../core/logger.ts";
import { DerivativeLimitError, makeDerivatives } from "./media.pipeline.ts";
import { variantKey } from "./media.items.ts";
import type { MediaService } from "./media.service.ts";
import type { MediaStorage, UploadArea } from "./media.storage.ts";

export interface MediaJobsOptions {
  media: MediaService;
  storage: MediaStorage;
  uploads: UploadArea;
  logger: Logger;
  /** Jobs run at the same time in this process (0: this process runs none). */
  workers: number;
  maxPixels: number;
  /** How long a claim holds a job before another worker may take it over, ms. */
  leaseMs?: number;
  /** How often an idle worker looks for jobs queued by other processes, ms. */
  pollMs?: number;
  /** Age above which temporary files are swept at start-up, ms (younger ones may be another process's). */
  sweepAfterMs?: number;
  /**
   * This worker's clock for leases and retry delays. Without it the database's clock decides,
   * which every process shares; a test gives one to let a lease run out without waiting.
   */
  now?: () => Date;
}

/**
 * The derivative worker. Each loop claims a job (SKIP LOCKED, under a lease), makes every
 * derivative from the original in memory, records the keys it is about to write, writes the
 * files under content-hashed keys, and only then commits the rows and the photo's readiness
 * in one transaction. A process that dies at any point leaves no row behind and no half-written
 * file (storage writes are atomic renames); its lease runs out, another worker re-runs the job,
 * and after committing deletes whatever files the dead attempt wrote that no row refers to.
 */
export function createMediaJobs(opts: MediaJobsOptions) {
  const { media, storage, uploads, logger } = opts;
  const leaseMs = opts.leaseMs ?? 5 * 60_000;
  const pollMs = opts.pollMs ?? 2_000;
  const sweepAfterMs = opts.sweepAfterMs ?? 60 * 60_000;
  let running = false;
  let loops: Promise<void>[] = [];
  let backfill: Promise<void> = Promise.resolve();
  const wakers = new Set<() => void>();
  let unsubscribe: (() => void) | null = null;

  const wakeAll = () => {
    for (const wake of [...wakers]) wake();
  };

  /** Runs one job if one is due; false when there was none. */
  async function runOne(): Promise<boolean> {
    const job = await media.queue.claim(leaseMs, opts.now?.());
    if (!job) return false;
    const started = Date.now();
    try {
      const original = await storage.get(job.originalKey);
      if (!original) {
        await media.queue.fail(job, "The original file is missing from storage.", true, opts.now?.());
        return true;
      }
      const d = await makeDerivatives(original, { maxPixels: opts.maxPixels });
      const planned = d.variants.map((v) => ({ ...v, storageKey: variantKey(v) }));
      const earlier = await media.queue.stage(job, planned.map((v) => v.storageKey));
      if (earlier === null) return true; // another worker holds the job now
      for (const v of planned) await storage.put(v.storageKey, v.buffer);
      const committed = await media.queue.complete(job, {
        width: d.width,
        height: d.height,
        placeholder: d.placeholder,
        dominantColor: d.dominantColor,
        fingerprint: d.fingerprint,
        variants: planned.map((v) => ({ width: v.width, height: v.height, format: v.format, storageKey: v.storageKey, bytes: v.bytes })),
      });
      const mine = planned.map((v) => v.storageKey);
      if (!committed) {
        // Another worker took the job over while this one was slow: leave it to that one.
        await media.queue.abandon(job, mine);
        return true;
      }
      // Files an earlier, abandoned attempt wrote and this one did not (the encoders are
      // repeatable here, but nothing promises it) belong to no row: remove them.
      const kept = new Set(mine);
      await media.queue.discardUnreferenced(earlier.filter((key) => !kept.has(key)));
      logger.info({ mediaId: job.mediaId, variants: planned.length, ms: Date.now() - started }, "media processed");
    } catch (err) {
      if (err instanceof DerivativeLimitError) {
        logger.warn({ mediaId: job.mediaId, reason: err.message }, "media cannot be processed");
        await media.queue.fail(job, err.message, true, opts.now?.()).catch((e: unknown) => logger.error({ err: e }, "could not record the failure"));
        return true;
      }
      logger.error({ err, mediaId: job.mediaId, attempt: job.attempts }, "media processing failed");
      const reason = err instanceof Error ? err.message.split("\n")[0]! : String(err);
      await media.queue.fail(job, `Processing failed: ${reason}`, false, opts.now?.()).catch((e: unknown) => logger.error({ err: e }, "could not record the failure"));
    }
    return true;
  }

  async function loop(): Promise<void> {
    while (running) {
      let worked = false;
      try {
        worked = await runOne();
      } catch (err) {
        // The database was unreachable, say: wait and try again rather than spin.
        logger.error({ err }, "media worker could not claim a job");
      }
      if (!worked && running) {
        await new Promise<void>((resolve) => {
          const timer = setTimeout(done, pollMs);
          function done() {
            clearTimeout(timer);
            wakers.delete(done);
            resolve();
          }
          wakers.add(done);
        });
      }
    }
  }

  return {
    runOne,

    /** Runs due jobs in this process until none is left; returns how many ran. */
    async drain(): Promise<number> {
      let n = 0;
      while (await runOne()) n += 1;
      return n;
    },

    /**
     * Start-up: sweeps temporary files older than the sweep age, puts jobs whose lease ran
     * out back in the queue, then starts the worker loops.
     */
    async start(): Promise<void> {
      if (running) return;
      try {
        const swept = await uploads.sweep(sweepAfterMs);
        const requeued = await media.queue.requeueExpired(opts.now?.());
        if (swept || requeued) logger.info({ swept, requeued }, "media start-up sweep");
      } catch (err) {
        // A sweep that fails is retried at the next start; the loops still claim expired leases.
        logger.error({ err }, "media start-up sweep failed");
      }
      if (opts.workers <= 0) return;
      running = true;
      unsubscribe = media.onQueued(wakeAll);
      loops = Array.from({ length: opts.workers }, () => loop());
      // Photos processed before fingerprints were kept get theirs, once, beside the loops (decision 063).
      backfill = media
        .backfillFingerprints(logger)
        .then((n) => void (n > 0 && logger.info({ fingerprinted: n }, "media fingerprint backfill")))
        .catch((err: unknown) => logger.error({ err }, "media fingerprint backfill failed"));
    },

    /** Stops claiming; waits for jobs in hand to finish (a job cut short is re-run after its lease). */
    async stop(): Promise<void> {
      running = false;
      unsubscribe?.();
      unsubscribe = null;
      wakeAll();
      await Promise.all([...loops, backfill]);
      loops = [];
    },
  };
}
export type MediaJobs = ReturnType<typeof createMediaJobs>;
