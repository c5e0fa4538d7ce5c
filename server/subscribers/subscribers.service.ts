import { createHmac, timingSafeEqual } from "node:crypto";
import type { Knex } from "knex";
import { SystemSchema } from "#shared/schemas/programme.ts";
import {
  CONSENT,
  MailEventsInputSchema,
  SUBSCRIBER_LIST_LIMIT,
  type ConfirmationDone,
  type ConfirmationView,
  type ErasureResult,
  type Frequency,
  type InvestorDigestInput,
  type InvestorDigestSetting,
  type MailEventsResult,
  type PreferencesInput,
  type PreferencesView,
  type SubscriberImportInput,
  type SubscriberImportResult,
  type SubscriberList,
  type SubscriberListQuery,
  type SubscriberRow,
  type SubscriberStatus,
  type SubscriptionInput,
  type SubscriptionOptions,
  type Topics,
  type UnsubscribeView,
} from "#shared/schemas/subscribers.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { EnquiriesService } from "../enquiries/enquiries.service.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { parseSubscriberCsv, subscribersToCsv } from "./subscribers.csv.ts";
import { subscriberLinks, type SubscriberLinks } from "./subscribers.links.ts";
import { alreadySubscribedMail, confirmationMail, welcomeMail, type RenderedMail } from "./subscribers.mail.ts";
import {
  claimMailJobs,
  deletePendingBefore,
  deleteSubscribersByEmailHash,
  enqueueMailJob,
  enqueueMailJobs,
  findSubscriberById,
  findSubscriberByProjectEmail,
  findSubscriberByProjectUser,
  findSuppression,
  finishMailJob,
  insertSubscriber,
  insertSuppression,
  isSuppressed,
  isWriteConflict,
  listDigestRecipients,
  listMailJobsOf,
  listProjectEmails,
  listSubscribers,
  listSubscribersByEmailHash,
  listSubscribersOfUser,
  setStatusByEmailHash,
  skipQueuedJobs,
  suppressedAmong,
  updateSubscriber,
  type MailJob,
  type SubscriberRecord,
} from "./subscribers.repository.ts";
import { CONFIRM_TTL_MS, hashAddress, newNonce, normaliseAddress, signToken, verifyToken } from "./subscribers.tokens.ts";
import { normaliseTopics, topicsKey } from "./subscribers.topics.ts";

/** Unconfirmed addresses are forgotten this long after they were entered. */
export const PENDING_RETENTION_MS = 30 * 24 * 60 * 60 * 1000;
/** A webhook signature older than this is refused (replay). */
export const WEBHOOK_TOLERANCE_S = 300;
const MAIL_LEASE_MS = 2 * 60 * 1000;
const MAIL_MAX_ATTEMPTS = 5;
const MAIL_BATCH = 20;

export const SUBSCRIPTION_ACCEPTED = {
  ok: true,
  message: "Thank you. If this address can receive our e-mail, a message with a confirmation link is on its way. Nothing else is sent until you confirm.",
} as const;

export interface SubscribersDeps {
  db: Db;
  mailer: Mailer;
  logger: Logger;
  projects: ProjectsService;
  /** The areas subscribers may choose come from the public programme. */
  programme: Pick<ProgrammeService, "publicAreas">;
  enquiries: Pick<EnquiriesService, "listByEmail" | "eraseByEmail">;
  publicUrl: string;
  tokenSecret: string;
  unsubscribeMailto: string | null;
  webhookSecret: string | null;
  now?: () => Date;
}

function toRow(s: SubscriberRecord): SubscriberRow {
  return {
    id: s.id,
    project: { slug: s.project.slug, name: s.project.name },
    email: s.email,
    name: s.name,
    organisation: s.organisation,
    interest: s.interest,
    audience: s.audience,
    frequency: s.frequency,
    topics: s.topics,
    status: s.status,
    account: s.userId !== null,
    consentAt: s.consentAt?.toISOString() ?? null,
    consentSource: s.consentSource,
    consentVersion: s.consentVersion,
    confirmedAt: s.confirmedAt?.toISOString() ?? null,
    lastDigestAt: s.lastDigestAt?.toISOString() ?? null,
    createdAt: s.createdAt.toISOString(),
  };
}

/** A 5xx reply is permanent (RFC 5321 §4.2.1): the address will not accept mail. */
function smtpCode(err: unknown): number | null {
  const code = (err as { responseCode?: unknown } | null)?.responseCode;
  return typeof code === "number" ? code : null;
}

export function createSubscribersService(deps: SubscribersDeps) {
  const { db, mailer, logger, projects, programme, enquiries, publicUrl, tokenSecret, unsubscribeMailto } = deps;
  const now = deps.now ?? (() => new Date());

  async function checkAreas(projectId: number, topics: Topics | null, field: string): Promise<void> {
    if (!topics || topics.areas.length === 0) return;
    const known = new Set(await programme.publicAreas(projectId));
    const unknown = topics.areas.filter((a) => !known.has(a));
    if (unknown.length) {
      throw new AppError("validation", `Check ${field}.`, 400, { [field]: `${unknown.map((a) => `"${a}"`).join(", ")} is not an area of this project` });
    }
  }

  async function optionsFor(projectId: number) {
    return { areas: await programme.publicAreas(projectId), systems: [...SystemSchema.options] };
  }

  async function subscriberFor(token: string, purpose: "confirm" | "preferences" | "unsubscribe", trx?: Knex.Transaction) {
    const t = verifyToken(tokenSecret, token, purpose, now());
    const s = await findSubscriberById(trx ?? db, t.subscriberId, Boolean(trx));
    if (!s) throw new AppError("not_found", "This link belongs to a subscription that no longer exists.", 404);
    return { s, t };
  }

  function linksFor(s: Pick<SubscriberRecord, "id">): SubscriberLinks {
    return subscriberLinks({ publicUrl, secret: tokenSecret, mailto: unsubscribeMailto, subscriberId: s.id, now: now() });
  }

  /**
   * Marks every subscription of an address bounced or complained, puts it on the
   * suppression list and drops its queued mail. Used for SMTP 5xx answers and the
   * provider's webhook (and by digest sending).
   */
  async function markUndeliverable(email: string, reason: "bounced" | "complained", source: string, trx?: Knex.Transaction): Promise<void> {
    const run = async (q: Knex.Transaction) => {
      const hash = hashAddress(email);
      const ids = await setStatusByEmailHash(q, hash, reason, now());
      await insertSuppression(q, { emailHash: hash, reason, source });
      await skipQueuedJobs(q, ids, `address ${reason}`);
    };
    if (trx) await run(trx);
    else await db.transaction(run);
  }

  // The outbound queue: claimed in batches, sent, and marked; a crashed worker's lease runs out.

  function render(job: MailJob, s: SubscriberRecord): RenderedMail & { headers?: Record<string, string> } {
    if (job.kind === "confirmation") {
      const token = signToken(tokenSecret, { subscriberId: s.id, purpose: "confirm", expiresAt: new Date(now().getTime() + CONFIRM_TTL_MS), nonce: s.confirmNonce });
      return confirmationMail({ project: s.project, name: s.name, confirmUrl: `${publicUrl}/subscriptions/confirm/${token}`, imported: s.consentAt === null });
    }
    const links = linksFor(s);
    const mail = job.kind === "welcome" ? welcomeMail({ project: s.project, name: s.name, frequency: s.frequency, topics: s.topics, links }) : alreadySubscribedMail({ project: s.project, name: s.name, links });
    return { ...mail, headers: links.headers };
  }

  async function processJob(job: MailJob): Promise<"sent" | "skipped" | "failed" | "retry"> {
    const s = await findSubscriberById(db, job.subscriberId);
    const due = job.kind === "confirmation" ? "pending" : "confirmed";
    if (!s || s.status !== due || (job.kind === "confirmation" && !s.confirmNonce) || (await isSuppressed(db, s.emailHash))) {
      await finishMailJob(db, job.id, { status: "skipped", error: s ? `subscriber is ${s.status}` : "subscriber gone" });
      return "skipped";
    }
    const mail = render(job, s);
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
  const timers: NodeJS.Timeout[] = [];

  /** Sends every due subscription e-mail; returns how many went. Safe to call at any time, from any process. */
  async function drainMailQueue(): Promise<number> {
    let sent = 0;
    for (;;) {
      const jobs = await claimMailJobs(db, now(), MAIL_LEASE_MS, MAIL_BATCH);
      if (jobs.length === 0) return sent;
      for (const job of jobs) if ((await processJob(job)) === "sent") sent++;
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

  async function purgeUnconfirmed(at: Date = now()): Promise<number> {
    return deletePendingBefore(db, new Date(at.getTime() - PENDING_RETENTION_MS));
  }

  function preferencesView(s: SubscriberRecord, options: { areas: string[]; systems: SubscriptionOptions["systems"] }): PreferencesView {
    return {
      email: s.email,
      name: s.name,
      organisation: s.organisation,
      interest: s.interest,
      frequency: s.frequency,
      topics: s.topics,
      status: s.status,
      project: { slug: s.project.slug, name: s.project.name },
      options,
    };
  }

  async function investorDigest(user: Express.User): Promise<InvestorDigestSetting[]> {
    const mine = await listSubscribersOfUser(db, user.id);
    const out: InvestorDigestSetting[] = [];
    for (const p of await projects.list()) {
      const s = mine.find((m) => m.projectId === p.id) ?? null;
      out.push({
        project: { slug: p.slug, name: p.name },
        enabled: s?.status === "confirmed",
        frequency: s?.frequency ?? "weekly",
        topics: s?.topics ?? null,
        status: s?.status ?? null,
        options: await optionsFor(p.id),
      });
    }
    return out;
  }

  async function unsubscribeRecord(s: SubscriberRecord, trx: Knex.Transaction): Promise<{ status: SubscriberStatus }> {
    // Leaving is idempotent; bounced and complained addresses stay as they are (and suppressed).
    if (s.status === "pending" || s.status === "confirmed") {
      await updateSubscriber(trx, s.id, { status: "unsubscribed", unsubscribedAt: now(), statusChangedAt: now(), confirmNonce: null }, now());
      await skipQueuedJobs(trx, [s.id], "unsubscribed");
      return { status: "unsubscribed" };
    }
    return { status: s.status };
  }

  return {
    linksFor: async (subscriberId: number): Promise<SubscriberLinks> => {
      const s = await findSubscriberById(db, subscriberId);
      if (!s) throw notFound("That subscriber");
      return linksFor(s);
    },
    markUndeliverable,
    drainMailQueue,
    purgeUnconfirmed,

    isSuppressed: (email: string) => isSuppressed(db, hashAddress(email)),

    /**
     * Who a digest run may send to: confirmed subscribers of the project at this
     * frequency, not suppressed, and (for investor accounts) still active. Each carries its
     * audience, topics, topics key and the end of its last digest's window.
     */
    digestRecipients: (projectId: number, frequency: Frequency) => listDigestRecipients(db, projectId, frequency),

    /** Records the end of the window a digest covered, so the next window starts there. */
    recordDigestDelivered: (subscriberId: number, windowEnd: Date, trx?: Knex.Transaction) => updateSubscriber(trx ?? db, subscriberId, { lastDigestAt: windowEnd }, now()),

    startWorkers(opts: { mailEveryMs?: number; purgeEveryMs?: number } = {}): void {
      timers.push(setInterval(kick, opts.mailEveryMs ?? 5_000));
      timers.push(
        setInterval(() => {
          purgeUnconfirmed().catch((err: unknown) => logger.error({ err }, "purging unconfirmed subscribers failed"));
        }, opts.purgeEveryMs ?? 60 * 60 * 1000),
      );
      for (const t of timers) t.unref();
    },
    stopWorkers(): void {
      stopped = true;
      for (const t of timers) clearInterval(t);
      timers.length = 0;
    },

    async options(slug: string): Promise<SubscriptionOptions> {
      const p = await projects.get(slug);
      return { project: { slug: p.slug, name: p.name, operatorName: p.operatorName }, consent: { ...CONSENT }, ...(await optionsFor(p.id)) };
    },

    /**
     * Double opt-in. The caller always answers the same, whether the address is new,
     * pending, subscribed, unsubscribed or suppressed; only its owner learns which, by
     * the e-mail (or by none).
     */
    async subscribe(input: SubscriptionInput, actor: Actor): Promise<void> {
      const project = await projects.get(input.projectSlug);
      const topics = normaliseTopics(input.topics);
      await checkAreas(project.id, topics, "topics.areas");
      const email = normaliseAddress(input.email);
      const emailHash = hashAddress(email);
      if (await isSuppressed(db, emailHash)) {
        logger.info({ projectId: project.id }, "subscription for a suppressed address ignored");
        return;
      }
      const t = now();
      const fresh = {
        name: input.name,
        organisation: input.organisation || null,
        interest: input.interest,
        frequency: input.frequency,
        topics,
        topicsKey: topicsKey(topics),
        consentAt: t,
        consentIp: actor.ip,
        consentVersion: CONSENT.version,
        consentSource: "subscribe form",
      };
      const write = () => db.transaction(async (trx) => {
        const existing = await findSubscriberByProjectEmail(trx, project.id, email, true);
        if (!existing) {
          const id = await insertSubscriber(trx, { projectId: project.id, email, emailHash, ...fresh, status: "pending", confirmNonce: newNonce(), pendingSince: t });
          await enqueueMailJob(trx, id, "confirmation", t);
          return true;
        }
        switch (existing.status) {
          case "pending":
            // The newest answers win; the confirmation link stays the same one.
            await updateSubscriber(trx, existing.id, { ...fresh, confirmNonce: existing.confirmNonce ?? newNonce() }, t);
            await enqueueMailJob(trx, existing.id, "confirmation", t);
            return true;
          case "unsubscribed":
            await updateSubscriber(trx, existing.id, { ...fresh, status: "pending", confirmNonce: newNonce(), pendingSince: t, statusChangedAt: t }, t);
            await enqueueMailJob(trx, existing.id, "confirmation", t);
            return true;
          case "confirmed":
            // Nobody but the mailbox's owner may change a confirmed subscription: tell them instead.
            await enqueueMailJob(trx, existing.id, "already_subscribed", t);
            return true;
          default:
            return false;
        }
      });
      const queued = await write().catch((err: unknown) => {
        if (isWriteConflict(err)) return write();
        throw err;
      });
      if (queued) kick();
    },

    /** What a confirmation link is for. A GET: mail scanners fetch links, so this changes nothing. */
    async describeConfirmation(token: string): Promise<ConfirmationView> {
      const { s } = await subscriberFor(token, "confirm");
      return { email: s.email, name: s.name, project: { slug: s.project.slug, name: s.project.name }, status: s.status, consent: { ...CONSENT } };
    },

    /** The button on the confirmation page: single use, within 7 days. */
    async confirm(token: string, actor: Actor): Promise<ConfirmationDone> {
      const s = await db.transaction(async (trx) => {
        const { s, t } = await subscriberFor(token, "confirm", trx);
        if (s.status === "confirmed") throw new AppError("already_confirmed", "This subscription is already confirmed.", 410);
        if (s.status !== "pending" || !s.confirmNonce || s.confirmNonce !== t.nonce) {
          throw new AppError("token_used", "This confirmation link has already been used or replaced. Subscribe again to get a new one.", 410);
        }
        const at = now();
        // An imported address without consent evidence consents here, to the wording on this page.
        const consent = s.consentAt ? {} : { consentAt: at, consentIp: actor.ip, consentVersion: CONSENT.version, consentSource: `${s.consentSource ?? "import"}, confirmed by e-mail link` };
        await updateSubscriber(trx, s.id, { status: "confirmed", confirmedAt: at, confirmIp: actor.ip, confirmNonce: null, pendingSince: null, statusChangedAt: at, ...consent }, at);
        await enqueueMailJob(trx, s.id, "welcome", at);
        return s;
      });
      kick();
      const links = linksFor(s);
      return { status: "confirmed", preferencesPath: new URL(links.preferencesUrl).pathname };
    },

    async describePreferences(token: string): Promise<PreferencesView> {
      const { s } = await subscriberFor(token, "preferences");
      return preferencesView(s, await optionsFor(s.projectId));
    },

    async updatePreferences(token: string, patch: PreferencesInput): Promise<PreferencesView> {
      const { s: before } = await subscriberFor(token, "preferences");
      const topics = patch.topics === undefined ? undefined : normaliseTopics(patch.topics);
      if (topics !== undefined) await checkAreas(before.projectId, topics, "topics.areas");
      await db.transaction(async (trx) => {
        const s = await findSubscriberById(trx, before.id, true);
        if (!s || s.status !== "confirmed") {
          throw new AppError("not_subscribed", "This address is not subscribed any more. Subscribe again to receive e-mail.", 409);
        }
        await updateSubscriber(
          trx,
          s.id,
          {
            ...(patch.name !== undefined ? { name: patch.name } : {}),
            ...(patch.organisation !== undefined ? { organisation: patch.organisation || null } : {}),
            ...(patch.frequency !== undefined ? { frequency: patch.frequency } : {}),
            ...(topics !== undefined ? { topics, topicsKey: topicsKey(topics) } : {}),
          },
          now(),
        );
      });
      const after = await findSubscriberById(db, before.id);
      return preferencesView(after!, await optionsFor(after!.projectId));
    },

    /** "Unsubscribe" on the preferences page. */
    async unsubscribeWithPreferencesLink(token: string): Promise<{ status: SubscriberStatus }> {
      return db.transaction(async (trx) => unsubscribeRecord((await subscriberFor(token, "preferences", trx)).s, trx));
    },

    async describeUnsubscribe(token: string): Promise<UnsubscribeView> {
      const { s } = await subscriberFor(token, "unsubscribe");
      return { email: s.email, project: { slug: s.project.slug, name: s.project.name }, status: s.status };
    },

    /** RFC 8058 one-click, and the button on the /u/ page: unsubscribes at once. */
    async unsubscribe(token: string): Promise<{ status: SubscriberStatus }> {
      return db.transaction(async (trx) => unsubscribeRecord((await subscriberFor(token, "unsubscribe", trx)).s, trx));
    },

    // The investor room: an investor account's own digest, against the account.

    investorDigest,

    async setInvestorDigest(user: Express.User, slug: string, input: InvestorDigestInput, actor: Actor): Promise<InvestorDigestSetting> {
      const project = await projects.get(slug);
      const topics = normaliseTopics(input.topics);
      await checkAreas(project.id, topics, "topics.areas");
      const email = normaliseAddress(user.email);
      const emailHash = hashAddress(email);
      if (input.enabled && (await isSuppressed(db, emailHash))) {
        throw new AppError("address_suppressed", "Mail to your address has been refused or reported before, so no digest can be sent to it. Ask the operator to look into it.", 422);
      }
      const t = now();
      await db.transaction(async (trx) => {
        // An earlier public subscription of the same address becomes the account's.
        const existing = (await findSubscriberByProjectUser(trx, project.id, user.id, true)) ?? (await findSubscriberByProjectEmail(trx, project.id, email, true));
        const prefs = { frequency: input.frequency, topics, topicsKey: topicsKey(topics), audience: "investor" as const, userId: user.id, interest: "investor" as const };
        const consent = { consentAt: t, consentIp: actor.ip, consentVersion: CONSENT.version, consentSource: "investor room (signed in)" };
        if (!existing) {
          if (!input.enabled) return;
          await insertSubscriber(trx, { projectId: project.id, email, emailHash, name: user.name, organisation: null, ...prefs, ...consent, status: "confirmed", confirmedAt: t, statusChangedAt: t });
          return;
        }
        if (existing.status === "bounced" || existing.status === "complained") {
          if (input.enabled) throw new AppError("address_suppressed", "Mail to your address has been refused or reported before, so no digest can be sent to it.", 422);
          return;
        }
        const statusChange = input.enabled
          ? existing.status === "confirmed"
            ? {}
            : { status: "confirmed" as const, confirmedAt: t, confirmNonce: null, pendingSince: null, statusChangedAt: t, ...consent }
          : existing.status === "unsubscribed"
            ? {}
            : { status: "unsubscribed" as const, unsubscribedAt: t, statusChangedAt: t, confirmNonce: null };
        await updateSubscriber(trx, existing.id, { ...prefs, ...statusChange }, t);
      });
      const settings = await investorDigest(user);
      return settings.find((s) => s.project.slug === project.slug)!;
    },

    // The site office

    async list(f: SubscriberListQuery): Promise<SubscriberList> {
      const { rows, total } = await listSubscribers(db, f, SUBSCRIBER_LIST_LIMIT);
      return { rows: rows.map(toRow), total };
    },

    async exportCsv(f: SubscriberListQuery): Promise<string> {
      const { rows } = await listSubscribers(db, f, null);
      return subscribersToCsv(rows);
    },

    /**
     * Checks every row first and imports nothing when any is bad. Rows with consent
     * evidence (time and source) are confirmed; the rest are sent a confirmation and
     * receive nothing else until they confirm. Addresses already on the list, and
     * suppressed ones (erased, bounced, complained), are left out and listed.
     */
    async importCsv(input: SubscriberImportInput): Promise<SubscriberImportResult> {
      const project = await projects.get(input.projectSlug);
      const t = now();
      const { rows, problems } = parseSubscriberCsv(input.csv, { allowedAreas: new Set(await programme.publicAreas(project.id)), now: t });
      if (problems.length) {
        throw new AppError(
          "csv_invalid",
          `${problems.length === 1 ? "One row has a problem" : `${problems.length} rows have problems`}; nothing was imported. Correct the file and import it again.`,
          422,
          undefined,
          { rows: problems },
        );
      }
      const result = await db.transaction(async (trx) => {
        const existing = await listProjectEmails(trx, project.id);
        const suppressed = await suppressedAmong(trx, rows.map((r) => hashAddress(r.email)));
        const skipped: SubscriberImportResult["skipped"] = [];
        const pendingIds: number[] = [];
        let confirmedOnEvidence = 0;
        for (const r of rows) {
          const emailHash = hashAddress(r.email);
          if (suppressed.has(emailHash)) {
            skipped.push({ line: r.line, reason: "on the suppression list (erased, bounced or reported as spam); not imported" });
            continue;
          }
          if (existing.has(r.email)) {
            skipped.push({ line: r.line, reason: "already on this project's list; left as it is" });
            continue;
          }
          const common = { projectId: project.id, email: r.email, emailHash, name: r.name, organisation: r.organisation, interest: r.interest, frequency: r.frequency, topics: r.topics, topicsKey: topicsKey(r.topics) };
          if (r.consent) {
            await insertSubscriber(trx, { ...common, status: "confirmed", confirmedAt: t, statusChangedAt: t, consentAt: r.consent.at, consentSource: `import: ${r.consent.source}`, consentVersion: "import" });
            confirmedOnEvidence++;
          } else {
            pendingIds.push(await insertSubscriber(trx, { ...common, status: "pending", confirmNonce: newNonce(), pendingSince: t, consentSource: "import" }));
          }
        }
        await enqueueMailJobs(trx, pendingIds, "confirmation", t);
        return { imported: confirmedOnEvidence + pendingIds.length, confirmedOnEvidence, confirmationsSent: pendingIds.length, skipped };
      });
      if (result.confirmationsSent > 0) kick();
      return result;
    },

    /** Everything kept about the person behind one subscription, across projects, as JSON. */
    async personData(id: number) {
      const s = await findSubscriberById(db, id);
      if (!s) throw notFound("That subscriber");
      const all = await listSubscribersByEmailHash(db, s.emailHash);
      const suppression = await findSuppression(db, s.emailHash);
      return {
        exportedAt: now().toISOString(),
        email: s.email,
        subscriptions: all.map((x) => ({
          ...toRow(x),
          consentIp: x.consentIp,
          confirmIp: x.confirmIp,
          unsubscribedAt: x.unsubscribedAt?.toISOString() ?? null,
          statusChangedAt: x.statusChangedAt?.toISOString() ?? null,
        })),
        mail: await listMailJobsOf(db, all.map((x) => x.id)),
        enquiries: await enquiries.listByEmail(s.email),
        suppression: suppression ? { reason: suppression.reason, since: suppression.createdAt.toISOString() } : null,
      };
    },

    /**
     * Erasure: every subscription and enquiry of the address goes; only the address's
     * hash stays, on the suppression list, so it is not imported or subscribed again.
     */
    async erase(id: number): Promise<ErasureResult> {
      const s = await findSubscriberById(db, id);
      if (!s) throw notFound("That subscriber");
      return db.transaction(async (trx) => {
        const subscriptions = await deleteSubscribersByEmailHash(trx, s.emailHash);
        const enquiriesErased = await enquiries.eraseByEmail(s.email, trx);
        await insertSuppression(trx, { emailHash: s.emailHash, reason: "erased", source: "erasure" });
        return { erased: { subscriptions, enquiries: enquiriesErased }, suppressed: true as const };
      });
    },

    /**
     * The provider's bounce and complaint events. The signature covers the raw body and
     * a timestamp, so a forged or replayed call is refused before anything is read.
     */
    async handleMailEvents(raw: Buffer | undefined, signature: string | undefined): Promise<MailEventsResult> {
      const refuse = () => new AppError("signature_invalid", "The event signature is missing or wrong.", 401);
      if (!deps.webhookSecret) {
        logger.warn("mail events refused: MAIL_WEBHOOK_SECRET is not set");
        throw refuse();
      }
      const body = Buffer.isBuffer(raw) ? raw : Buffer.alloc(0);
      const m = /^t=(\d{1,12}),v1=([0-9a-f]{64})$/.exec((signature ?? "").trim());
      if (!m) throw refuse();
      const ts = Number(m[1]);
      if (Math.abs(now().getTime() / 1000 - ts) > WEBHOOK_TOLERANCE_S) throw refuse();
      const expected = createHmac("sha256", deps.webhookSecret).update(`${m[1]}.`).update(body).digest();
      const sent = Buffer.from(m[2]!, "hex");
      if (!timingSafeEqual(sent, expected)) throw refuse();
      let json: unknown;
      try {
        json = JSON.parse(body.toString("utf8"));
      } catch {
        throw new AppError("malformed_json", "The request body is not valid JSON.", 400);
      }
      const { events } = MailEventsInputSchema.parse(json);
      let processed = 0;
      await db.transaction(async (trx) => {
        for (const e of events) {
          if (e.type === "bounce" && !e.permanent) continue;
          await markUndeliverable(e.email, e.type === "bounce" ? "bounced" : "complained", "webhook", trx);
          processed++;
        }
      });
      return { processed, ignored: events.length - processed };
    },
  };
}
export type SubscribersService = ReturnType<typeof createSubscribersService>;
