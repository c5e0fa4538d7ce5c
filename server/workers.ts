import type { Config, WorkerTask } from "./config.ts";
import type { Logger } from "./core/logger.ts";
import { createIntervalTask, type IntervalTask } from "./core/interval-task.ts";
import type { Db } from "./db/knex.ts";
import type { Mailer } from "./mail/mail.service.ts";
import { createMediaJobs, type MediaJobs } from "./media/media.jobs.ts";
import { createPublishingTicker, type PublishingTicker } from "./publishing/publishing.scheduler.ts";
import { createDigestJobs, type DigestJobs } from "./digests/digests.jobs.ts";
import { createDigestScheduler, type DigestScheduler } from "./digests/digests.schedule.ts";
import type { Services } from "./services.ts";

export interface WorkerDeps {
  db: Db;
  config: Config;
  logger: Logger;
  mailer: Mailer;
}

/** How often the lighter background work runs. */
const SUBSCRIPTION_MAIL_EVERY_MS = 5_000;
const SESSION_SWEEP_EVERY_MS = 10 * 60_000;
const UNCONFIRMED_PURGE_EVERY_MS = 60 * 60_000;

export interface Workers {
  /** Photo derivatives; tests drain it. */
  mediaJobs: MediaJobs;
  /** Scheduled publication of updates and photo stories; tests tick it with a chosen `now`. */
  publishing: PublishingTicker;
  /** Digest sending; tests drain it. */
  digestJobs: DigestJobs;
  /** Weekly, monthly and as-it-happens runs; tests tick it with a chosen `now`. */
  digestSchedule: DigestScheduler;
  /** The subscription mail queue's poll (retries, and mail queued by other processes). */
  subscriptionMail: IntervalTask;
  /** Issued reports' notices, one e-mail per reader (run with the subscription mail); tests call `services.reports.sendNotices`. */
  reportNotices: IntervalTask;
  /** Expired sessions, and unconfirmed subscriptions past their retention. */
  sweeps: { sessions: IntervalTask; unconfirmedSubscribers: IntervalTask };
  /** What `start` started, in order (for the log, and for tests of the roles). */
  readonly started: readonly WorkerTask[];
  /** Starts the tasks that config.PLUMBLINE_WORKERS names (digest sending only when DIGEST_WORKERS > 0). */
  start(): Promise<void>;
  /** Stops what `start` started, waiting for passes under way. */
  stop(): Promise<void>;
}

/**
 * The background work of the worker role, built over the services but not started: building
 * it runs nothing, so tests drive each part directly with a chosen `now`. Every part is safe
 * with several worker processes (claims skip rows another holds; runs have unique keys).
 */
export function createWorkers(services: Services, deps: WorkerDeps): Workers {
  const { db, config, logger, mailer } = deps;
  const { media, mediaStorage, mediaUploads, posts, stories, projects, digests, subscribers, sessions } = services;

  const mediaJobs = createMediaJobs({ media, storage: mediaStorage, uploads: mediaUploads, logger, workers: config.MEDIA_WORKERS, maxPixels: config.MEDIA_MAX_PIXELS });
  const publishing = createPublishingTicker({ posts, stories }, logger, config.PUBLISH_CHECK_SECONDS * 1000);
  const digestJobs = createDigestJobs({ db, mailer, logger, digests, subscribers, outbox: services.outbox }, { ratePerSecond: config.DIGEST_SEND_RATE_PER_SECOND, leaseMs: config.DIGEST_LEASE_SECONDS * 1000, retryBaseMs: config.DIGEST_RETRY_BASE_SECONDS * 1000 });
  const digestSchedule = createDigestScheduler({ projects, digests, logger });
  const subscriptionMail = createIntervalTask({
    name: "subscription mail",
    everyMs: SUBSCRIPTION_MAIL_EVERY_MS,
    run: async () => subscribers.sendQueuedMail(),
    logger,
  });
  const reportNotices = createIntervalTask({ name: "report notices", everyMs: SUBSCRIPTION_MAIL_EVERY_MS, run: () => services.reports.sendNotices(), logger });
  const sweeps = {
    sessions: createIntervalTask({ name: "session sweep", everyMs: SESSION_SWEEP_EVERY_MS, run: () => sessions.deleteExpired(), logger }),
    unconfirmedSubscribers: createIntervalTask({ name: "unconfirmed subscriber purge", everyMs: UNCONFIRMED_PURGE_EVERY_MS, run: () => subscribers.purgeUnconfirmed(), logger }),
  };

  // Each task's start and stop, in the order they start (stopped in reverse).
  const tasks: Record<WorkerTask, { start(): Promise<void> | void; stop(): Promise<void> | void }> = {
    // Sweeps what a crash left (temporary files, jobs whose lease ran out), then processes photos.
    media: mediaJobs,
    publishing,
    "digest-runs": { start: () => digestSchedule.start(), stop: () => digestSchedule.stop() },
    "digest-sending": digestJobs,
    // Transactional mail from the record: subscription mail and issued reports' notices.
    "subscription-mail": {
      start: () => {
        subscriptionMail.start();
        reportNotices.start();
      },
      stop: async () => {
        await subscriptionMail.stop();
        await reportNotices.stop();
      },
    },
    sweeps: {
      start: () => {
        sweeps.sessions.start();
        sweeps.unconfirmedSubscribers.start();
      },
      stop: async () => {
        await sweeps.sessions.stop();
        await sweeps.unconfirmedSubscribers.stop();
      },
    },
  };
  const started: WorkerTask[] = [];

  return {
    mediaJobs,
    publishing,
    digestJobs,
    digestSchedule,
    subscriptionMail,
    reportNotices,
    sweeps,
    started,
    async start() {
      for (const name of Object.keys(tasks) as WorkerTask[]) {
        if (!config.PLUMBLINE_WORKERS.includes(name) || started.includes(name)) continue;
        if (name === "digest-sending" && config.DIGEST_WORKERS === 0) continue;
        await tasks[name].start();
        started.push(name);
      }
    },
    async stop() {
      for (const name of started.splice(0).reverse()) await tasks[name].stop();
    },
  };
}
