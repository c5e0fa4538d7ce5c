import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer, OutboxService } from "../mail/mail.service.ts";
import type { SubscribersService } from "../subscribers/subscribers.service.ts";
import {
  claimDeliveries,
  contentsByIds,
  finishDeliveries,
  finishRunIfDrained,
  listUnfinishedRuns,
  refreshCounts,
  skipQueuedOf,
  type ClaimedDelivery,
  type ContentRow,
} from "./digests.repository.ts";
import { personalise } from "./digests.render.ts";
import type { DigestsService } from "./digests.service.ts";

/** A claimed delivery with its reader's address and status as they are now. */
type Addressed = ClaimedDelivery & { email: string; subscriberStatus: string };

export interface DigestJobsOptions {
  /** Messages per second across this process's sending; 0 = as fast as the relay takes them. */
  ratePerSecond: number;
  /** Deliveries claimed per batch. */
  batchSize?: number;
  /** Messages handed to the transport at once. */
  concurrency?: number;
  leaseMs?: number;
  maxAttempts?: number;
  /** First retry delay after a temporary failure; doubles each time. */
  retryBaseMs?: number;
  pollMs?: number;
}

/** RFC 5321 §4.2.1: 5yz is a permanent negative reply; 4yz (and no reply) is worth trying again. */
export function smtpFailureKind(err: unknown): "permanent" | "temporary" {
  const code = (err as { responseCode?: unknown } | null)?.responseCode;
  return typeof code === "number" && code >= 500 && code < 600 ? "permanent" : "temporary";
}

/** A simple pacer: each message waits for its slot, so a burst never exceeds the configured rate. */
function pacer(ratePerSecond: number) {
  let next = 0;
  return async () => {
    if (ratePerSecond <= 0) return;
    const gap = 1000 / ratePerSecond;
    const t = Date.now();
    const slot = Math.max(t, next);
    next = slot + gap;
    if (slot > t) await new Promise((r) => setTimeout(r, slot - t));
  };
}

/**
 * The digest workers: plan queued runs, then claim due deliveries in batches
 * (`FOR UPDATE SKIP LOCKED`, with a lease), send them and record each result. Any number of
 * processes may run them against one database.
 */
export function createDigestJobs(
  deps: {
    db: Db;
    mailer: Mailer;
    logger: Logger;
    digests: DigestsService;
    subscribers: Pick<SubscribersService, "addressees" | "isSuppressed" | "markUndeliverable" | "idsWithAddress" | "recordDigestDelivered">;
    /** The local sink's record of accepted messages (mail module). */
    outbox: Pick<OutboxService, "accepted">;
    now?: () => Date;
  },
  opts: DigestJobsOptions,
) {
  const { db, mailer, logger, digests, subscribers, outbox } = deps;
  const now = deps.now ?? (() => new Date());
  const batchSize = opts.batchSize ?? 100;
  const concurrency = opts.concurrency ?? 8;
  const leaseMs = opts.leaseMs ?? 2 * 60_000;
  const maxAttempts = opts.maxAttempts ?? 6;
  const retryBaseMs = opts.retryBaseMs ?? 60_000;
  const pace = pacer(opts.ratePerSecond);
  const contents = new Map<number, ContentRow>();

  /**
   * Whether a message with this Message-ID already reached this address. A worker killed
   * between the relay's acceptance and the database update leaves that question open; the
   * local sink's outbox answers it (a hosted relay offers no such look-up, so there the
   * message is sent again, once).
   */
  const alreadyAccepted = (d: Addressed): Promise<boolean> => outbox.accepted(d.messageId, d.email);

  /** The batch with each reader's address; a delivery whose subscriber is gone is left out, as the claim's join once did. */
  async function addressed(batch: ClaimedDelivery[]): Promise<Addressed[]> {
    const who = await subscribers.addressees([...new Set(batch.map((d) => d.subscriberId))]);
    return batch.flatMap((d) => {
      const s = who.get(d.subscriberId);
      return s ? [{ ...d, email: s.email, subscriberStatus: s.status }] : [];
    });
  }

  async function contentOf(id: number): Promise<ContentRow | null> {
    if (!contents.has(id)) for (const [k, v] of await contentsByIds(db, [id])) contents.set(k, v);
    return contents.get(id) ?? null;
  }

  async function deliver(d: Addressed): Promise<void> {
    const suppressed = await subscribers.isSuppressed(d.email);
    if (d.subscriberStatus !== "confirmed" || suppressed) {
      await finishDeliveries(db, [d.id], { status: "skipped", error: suppressed ? "address suppressed" : `subscriber is ${d.subscriberStatus}` });
      return;
    }
    const content = d.contentId === null ? null : await contentOf(d.contentId);
    if (!content || content.empty) {
      await finishDeliveries(db, [d.id], { status: "skipped", error: "nothing to say" });
      return;
    }
    // Asked after any earlier attempt, not only a vanished worker's: a reply lost on the way back
    // (a dropped connection while the database or relay fails over) looks like a refusal here,
    // although the message was taken.
    if ((d.interrupted || d.attempts > 1) && (await alreadyAccepted(d))) {
      await finishDeliveries(db, [d.id], { status: "sent", sentAt: now(), error: "recovered after an interrupted attempt" });
      if (!d.isTest) await subscribers.recordDigestDelivered(d.subscriberId, d.windowEnd);
      return;
    }
    const links = digests.linksFor(content.id, d.subscriberId);
    await pace();
    try {
      await mailer.send({
        to: d.email,
        subject: content.subject,
        html: personalise(content.html, links),
        text: personalise(content.text, links),
        headers: { ...links.headers, "Message-ID": d.messageId },
      });
    } catch (err) {
      const error = `${(err as { responseCode?: number }).responseCode ?? "no reply"}: ${String((err as Error)?.message ?? err)}`.replace(d.email, "<address>");
      if (smtpFailureKind(err) === "permanent") {
        await finishDeliveries(db, [d.id], { status: "failed", error });
        await subscribers.markUndeliverable(d.email, "bounced", "digest-smtp-5xx");
        await skipQueuedOf(db, await subscribers.idsWithAddress(d.email), "address bounced");
        logger.info({ subscriberId: d.subscriberId }, "digest refused permanently; address suppressed");
      } else if (d.attempts >= maxAttempts) {
        await finishDeliveries(db, [d.id], { status: "failed", error });
        logger.warn({ subscriberId: d.subscriberId, attempts: d.attempts }, "digest given up after retries");
      } else {
        await finishDeliveries(db, [d.id], { status: "queued", error, nextAttemptAt: new Date(now().getTime() + retryBaseMs * 2 ** (d.attempts - 1)) });
      }
      return;
    }
    await finishDeliveries(db, [d.id], { status: "sent", sentAt: now() });
    if (!d.isTest) await subscribers.recordDigestDelivered(d.subscriberId, d.windowEnd);
  }

  /** Plans queued runs, then sends due deliveries until none is left; returns how many deliveries were worked. */
  async function drain(): Promise<number> {
    for (const id of await listUnfinishedRuns(db)) await digests.planRun(id);
    let worked = 0;
    for (;;) {
      const batch = await addressed(await claimDeliveries(db, now(), leaseMs, batchSize));
      if (batch.length === 0) break;
      const queue = [...batch];
      await Promise.all(
        Array.from({ length: Math.min(concurrency, queue.length) }, async () => {
          for (let d = queue.shift(); d; d = queue.shift()) {
            await deliver(d).catch((err: unknown) => logger.error({ err, deliveryId: d!.id }, "digest delivery failed unexpectedly; its lease will run out and it is tried again"));
          }
        }),
      );
      worked += batch.length;
      for (const runId of new Set(batch.map((d) => d.runId))) await refreshCounts(db, runId);
    }
    for (const id of await listUnfinishedRuns(db)) await finishRunIfDrained(db, id, now());
    return worked;
  }

  let timer: NodeJS.Timeout | null = null;
  let running: Promise<unknown> | null = null;
  let stopped = false;
  const tick = () => {
    if (stopped || running) return;
    running = drain()
      .catch((err: unknown) => {
        if (!stopped) logger.error({ err }, "digest worker failed");
      })
      .finally(() => {
        running = null;
      });
  };

  return {
    drain,
    start(): void {
      stopped = false;
      timer = setInterval(tick, opts.pollMs ?? 2_000);
      tick();
    },
    async stop(): Promise<void> {
      stopped = true;
      if (timer) clearInterval(timer);
      timer = null;
      await running;
    },
  };
}
export type DigestJobs = ReturnType<typeof createDigestJobs>;
