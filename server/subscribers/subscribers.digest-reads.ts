import type { Frequency, SubscriberAudience, SubscriberStatus, Topics } from "#shared/schemas/subscribers.ts";
import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import { countDigestSubscribers, findAddressees, findSubscriberById, subscriberIdsByEmailHash } from "./subscribers.repository.ts";
import { hashAddress } from "./subscribers.tokens.ts";

/** One reader of digests as the digests module needs them: whom, for which project, what they chose. */
export interface DigestReader {
  id: number;
  email: string;
  projectId: number;
  audience: SubscriberAudience;
  frequency: Frequency;
  topics: Topics | null;
  /** The end of the window their last digest covered; their next one starts there. */
  lastDigestAt: Date | null;
}

/**
 * The reads the digests module makes of subscribers, with internal arguments (ids, a project and
 * frequency, an address), so that the subscribers' tables are named only in this module.
 */
export function createSubscriberDigestReads(db: Db) {
  return {
    /** A subscriber whatever their status (the office previews anyone's next digest); 404 if there is none. */
    async digestReader(subscriberId: number): Promise<DigestReader> {
      const s = await findSubscriberById(db, subscriberId);
      if (!s) throw notFound("That subscriber");
      return { id: s.id, email: s.email, projectId: s.projectId, audience: s.audience, frequency: s.frequency, topics: s.topics, lastDigestAt: s.lastDigestAt };
    },

    /** How many confirmed, not suppressed subscribers a project has at this frequency. */
    countDigestRecipients: (projectId: number, frequency: Frequency): Promise<number> => countDigestSubscribers(db, projectId, frequency),

    /** Each subscriber's address and status now, read when their digest is about to leave. */
    addressees: (subscriberIds: readonly number[]): Promise<Map<number, { email: string; status: SubscriberStatus }>> => findAddressees(db, subscriberIds),

    /** Every subscription of this address, in any project (a bounce stops them all). */
    idsWithAddress: (email: string): Promise<number[]> => subscriberIdsByEmailHash(db, hashAddress(email)),
  };
}
export type SubscriberDigestReads = ReturnType<typeof createSubscriberDigestReads>;
