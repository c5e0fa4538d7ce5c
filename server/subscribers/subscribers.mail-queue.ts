import type { SubscriberProject, SubscribersContext } from "./subscribers.context.ts";
import { alreadySubscribedMail, confirmationMail, welcomeMail, type RenderedMail } from "./subscribers.mail.ts";
import { claimMailJobs, findSubscriberById, finishMailJob, isSuppressed, type MailJob, type SubscriberRecord } from "./subscribers.repository.ts";
import { CONFIRM_TTL_MS, signToken } from "./subscribers.tokens.ts";

const MAIL_LEASE_MS = 2 * 60 * 1000;
const MAIL_MAX_ATTEMPTS = 5;
const MAIL_BATCH = 20;

/** A 5xx reply is permanent (RFC 5321 §4.2.1): the address will not accept mail. */
function smtpCode(err: unknown): number | null {
  const code = (err as { responseCode?: unknown } | null)?.responseCode;
  return typeof code === "number" ? code : null;
}

/**
 * The subscription mail queue (confirmation, welcome, already subscribed): claimed in batches,
 * sent and marked, from any process; a crashed sender's lease runs out. An SMTP 5xx suppresses
 * the address through `markUndeliverable`.
 */
export function createMailQueue(
  ctx: SubscribersContext,
  markUndeliverable: (email: string, reason: "bounced", source: string) => Promise<void>,
) {
  const { db, mailer, logger, projects, publicUrl, tokenSecret, now, linksFor } = ctx;

  function render(job: MailJob, s: SubscriberRecord, project: SubscriberProject): RenderedMail & { headers?: Record<string, string> } {
    if (job.kind === "confirmation") {
      const token = signToken(tokenSecret, { subscriberId: s.id, purpose: "confirm", expiresAt: new Date(now().getTime() + CONFIRM_TTL_MS), nonce: s.confirmNonce });
      return confirmationMail({ project, name: s.name, confirmUrl: `${publicUrl}/subscriptions/confirm/${token}`, imported: s.consentAt === null });
    }
    const links = linksFor(s);
    const mail = job.kind === "welcome" ? welcomeMail({ project, name: s.name, frequency: s.frequency, topics: s.topics, links }) : alreadySubscribedMail({ project, name: s.name, links });
    return { ...mail, headers: links.headers };
  }

  async function processJob(job: MailJob, projectOf: (projectId: number) => Promise<SubscriberProject>): Promise<"sent" | "skipped" | "failed" | "retry"> {
    const s = await findSubscriberById(db, job.subscriberId);
    const due = job.kind === "confirmation" ? "pending" : "confirmed";
    if (!s || s.status !== due || (job.kind === "confirmation" && !s.confirmNonce) || (await isSuppressed(db, s.emailHash))) {
      await finishMailJob(db, job.id, { status: "skipped", error: s ? `subscriber is ${s.status}` : "subscriber gone" });
      return "skipped";
    }
    const mail = render(job, s, await projectOf(s.projectId));
    try {
      const { messageId } = await mailer.send({ to: s.email, ...mail });
      await finishMailJob(db, job.id, { status: "sent", messageId, sentAt: now() });
      return "sent";
    } catch (err) {
      const code = smtpCode(err);
      const error = `${code ?? "no reply"}: ${String((err as Error)?.message ?? err)}`.replace(s.email, "<address>");
      if (code !== null && code >= 500 && code < 600) {
        await finishMailJob(db, job.id, { status: "failed", error });
        await markUndeliverable(s.email, "bounced", `smtp-${code}`);
        logger.info({ subscriberId: s.id, code }, "subscription mail refused permanently; address suppressed");
        return "failed";
      }
      if (job.attempts >= MAIL_MAX_ATTEMPTS) {
        await finishMailJob(db, job.id, { status: "failed", error });
        logger.warn({ subscriberId: s.id, attempts: job.attempts }, "subscription mail given up after retries");
        return "failed";
      }
      // Temporary failure (4xx, connection): try again later, doubling the wait.
      const runAfter = new Date(now().getTime() + 30_000 * 2 ** (job.attempts - 1));
      await finishMailJob(db, job.id, { status: "queued", error, runAfter });
      return "retry";
    }
  }

  let draining: Promise<number> | null = null;
  let again = false;
  let stopped = false;

  /** Sends every due subscription e-mail; returns how many went. Safe to call at any time, from any process. */
  async function drainMailQueue(): Promise<number> {
    let sent = 0;
    for (;;) {
      const jobs = await claimMailJobs(db, now(), MAIL_LEASE_MS, MAIL_BATCH);
      if (jobs.length === 0) return sent;
      // Each project of a batch is read once, not once per e-mail.
      const read = new Map<number, Promise<SubscriberProject>>();
      const projectOf = (projectId: number) => {
        let p = read.get(projectId);
        if (!p) read.set(projectId, (p = projects.sender(projectId)));
        return p;
      };
      for (const job of jobs) if ((await processJob(job, projectOf)) === "sent") sent++;
    }
  }

  function kick(): void {
    if (stopped) return;
    if (draining) {
      again = true;
      return;
    }
    draining = drainMailQueue()
      .catch((err: unknown) => {
        if (!stopped) logger.error({ err }, "subscription mail queue failed");
        return 0;
      })
      .finally(() => {
        draining = null;
        if (again) {
          again = false;
          kick();
        }
      });
  }

  return {
    drainMailQueue,

    /**
     * Starts sending what the queue holds, unless a send is under way (then it goes once more
     * after it); never throws. Requests call it for the mail they queue; workers poll it for retries.
     */
    sendQueuedMail: kick,

    /** The process is stopping: no further send starts (one under way finishes). */
    stop(): void {
      stopped = true;
    },
  };
}
