import type { Knex } from "knex";
import type { Frequency } from "#shared/schemas/subscribers.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { createBounces } from "./subscribers.bounces.ts";
import { createSubscribersContext, type SubscribersDeps } from "./subscribers.context.ts";
import { createSubscriberDigestReads } from "./subscribers.digest-reads.ts";
import { createSubscriptionLifecycle } from "./subscribers.lifecycle.ts";
import type { SubscriberLinks } from "./subscribers.links.ts";
import { createMailQueue } from "./subscribers.mail-queue.ts";
import { createSubscriberOffice } from "./subscribers.office.ts";
import { findSubscriberById, isSuppressed, listDigestRecipients, listSubscribersOfUser, updateSubscriber, type SubscriberRecord } from "./subscribers.repository.ts";
import { hashAddress } from "./subscribers.tokens.ts";

/**
 * The subscribers module's one service, composed of its use cases: a subscription's life for
 * its owner (subscribers.lifecycle.ts), the site office's list and personal data
 * (subscribers.office.ts), the subscription mail queue (subscribers.mail-queue.ts), bounces and
 * complaints (subscribers.bounces.ts), and what digests read and record of subscribers (below,
 * and subscribers.digest-reads.ts).
 */
export function createSubscribersService(deps: SubscribersDeps) {
  const ctx = createSubscribersContext(deps);
  const { db, now } = ctx;
  const bounces = createBounces(ctx);
  const mail = createMailQueue(ctx, bounces.markUndeliverable);

  return {
    linksFor: async (subscriberId: number): Promise<SubscriberLinks> => {
      const s = await findSubscriberById(db, subscriberId);
      if (!s) throw notFound("That subscriber");
      return ctx.linksFor(s);
    },

    isSuppressed: (email: string) => isSuppressed(db, hashAddress(email)),

    /**
     * Who a digest run may send to: confirmed subscribers of the project at this
     * frequency, not suppressed, and (for investor accounts) still active. Each carries its
     * audience, topics, topics key and the end of its last digest's window.
     */
    async digestRecipients(projectId: number, frequency: Frequency): Promise<SubscriberRecord[]> {
      const confirmed = await listDigestRecipients(db, projectId, frequency);
      // A disabled investor account receives nothing, investor content above all.
      const disabled = await ctx.accounts.disabledAmong(confirmed.flatMap((s) => (s.userId === null ? [] : [s.userId])));
      return confirmed.filter((s) => s.userId === null || !disabled.has(s.userId));
    },

    ...createSubscriberDigestReads(db),

    /**
     * The subscriber a signed preferences link names, for their digest archive. A link that is not
     * ours names no archive (404, as for any unknown address); an authentic expired one is 410.
     */
    async archiveOwner(token: string): Promise<number> {
      try {
        return (await ctx.subscriberFor(token, "preferences")).s.id;
      } catch (err) {
        if (err instanceof AppError && err.code === "token_invalid") throw notFound("That digest archive");
        throw err;
      }
    },

    /** The subscriptions of an investor's account (the investor room's own digests). */
    subscriptionIdsOfUser: async (userId: number): Promise<number[]> => (await listSubscribersOfUser(db, userId)).map((s) => s.id),

    /** Records the end of the window a digest covered, so the next window starts there. */
    recordDigestDelivered: (subscriberId: number, windowEnd: Date, trx?: Knex.Transaction) => updateSubscriber(trx ?? db, subscriberId, { lastDigestAt: windowEnd }, now()),

    ...bounces,
    ...mail,
    ...createSubscriptionLifecycle(ctx, mail.sendQueuedMail),
    ...createSubscriberOffice(ctx, mail.sendQueuedMail),
  };
}
export type SubscribersService = ReturnType<typeof createSubscribersService>;
