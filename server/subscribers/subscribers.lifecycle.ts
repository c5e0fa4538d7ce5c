import type { Knex } from "knex";
import {
  CONSENT,
  INVESTOR_CONSENT,
  type ConfirmationDone,
  type ConfirmationView,
  type InvestorDigestInput,
  type InvestorDigestSetting,
  type PreferencesInput,
  type PreferencesView,
  type SubscriberStatus,
  type SubscriptionInput,
  type SubscriptionOptions,
  type UnsubscribeView,
} from "#shared/schemas/subscribers.ts";
import { AppError } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { SubscribersContext } from "./subscribers.context.ts";
import {
  deletePendingBefore,
  enqueueMailJob,
  findSubscriberById,
  findSubscriberByProjectEmail,
  findSubscriberByProjectUser,
  insertSubscriber,
  isSuppressed,
  isWriteConflict,
  listSubscribersOfUser,
  skipQueuedJobs,
  updateSubscriber,
  type SubscriberRecord,
} from "./subscribers.repository.ts";
import { hashAddress, newNonce, normaliseAddress } from "./subscribers.tokens.ts";
import { normaliseTopics, topicsKey } from "./subscribers.topics.ts";

/** Unconfirmed addresses are forgotten this long after they were entered. */
export const PENDING_RETENTION_MS = 30 * 24 * 60 * 60 * 1000;

export const SUBSCRIPTION_ACCEPTED = {
  ok: true,
  message: "Thank you. If this address can receive our e-mail, a message with a confirmation link is on its way. Nothing else is sent until you confirm.",
} as const;

/**
 * A subscription's life, for its owner: subscribe (double opt-in), confirm, change preferences,
 * unsubscribe, by signed link and without an account; and an investor account's own digest.
 * `sendQueuedMail` starts sending the mail a step queued.
 */
export function createSubscriptionLifecycle(ctx: SubscribersContext, sendQueuedMail: () => void) {
  const { db, logger, projects, now, checkAreas, optionsFor, subscriberFor, linksFor } = ctx;
  const kick = sendQueuedMail;

  async function purgeUnconfirmed(at: Date = now()): Promise<number> {
    return deletePendingBefore(db, new Date(at.getTime() - PENDING_RETENTION_MS));
  }

  /** The project a subscription page names (read from the projects module, by id). */
  async function projectName(s: Pick<SubscriberRecord, "projectId">): Promise<{ slug: string; name: string }> {
    const p = await projects.sender(s.projectId);
    return { slug: p.slug, name: p.name };
  }

  async function preferencesView(s: SubscriberRecord): Promise<PreferencesView> {
    const project = await projectName(s);
    const options = await optionsFor(s.projectId);
    return {
      email: s.email,
      name: s.name,
      organisation: s.organisation,
      interest: s.interest,
      frequency: s.frequency,
      topics: s.topics,
      status: s.status,
      project,
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
    purgeUnconfirmed,

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
      return { email: s.email, name: s.name, project: await projectName(s), status: s.status, consent: { ...CONSENT } };
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
      return preferencesView(s);
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
      return preferencesView(after!);
    },

    /** "Unsubscribe" on the preferences page. */
    async unsubscribeWithPreferencesLink(token: string): Promise<{ status: SubscriberStatus }> {
      return db.transaction(async (trx) => unsubscribeRecord((await subscriberFor(token, "preferences", trx)).s, trx));
    },

    async describeUnsubscribe(token: string): Promise<UnsubscribeView> {
      const { s } = await subscriberFor(token, "unsubscribe");
      return { email: s.email, project: await projectName(s), status: s.status };
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
        const consent = { consentAt: t, consentIp: actor.ip, consentVersion: INVESTOR_CONSENT.version, consentSource: "investor room (signed in)" };
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
  };
}
