import { LINK_TTL_MS, signToken } from "./subscribers.tokens.ts";

/**
 * The list headers of every e-mail sent to a subscriber.
 * RFC 8058 §3.1: `List-Unsubscribe` holds one HTTPS URI in angle brackets and
 * `List-Unsubscribe-Post: List-Unsubscribe=One-Click` says a POST to it unsubscribes.
 * RFC 2369 §3.2: URIs in angle brackets, comma-separated, in order of preference; a
 * `mailto:` may follow the HTTPS one.
 */
export function listUnsubscribeHeaders(unsubscribeUrl: string, mailto: string | null = null): Record<string, string> {
  const uris = [`<${unsubscribeUrl}>`];
  if (mailto) uris.push(`<mailto:${mailto}?subject=unsubscribe>`);
  return { "List-Unsubscribe": uris.join(", "), "List-Unsubscribe-Post": "List-Unsubscribe=One-Click" };
}

export interface SubscriberLinks {
  /** The page where the subscriber changes topics and frequency, or leaves. */
  preferencesUrl: string;
  /** The RFC 8058 one-click URL (a GET shows a page with the button). */
  unsubscribeUrl: string;
  /** List-Unsubscribe and List-Unsubscribe-Post, ready for the message. */
  headers: Record<string, string>;
}

/** Fresh signed links for one subscriber: cheap (two HMACs), so digests personalise only these. */
export function subscriberLinks(p: { publicUrl: string; secret: string; mailto: string | null; subscriberId: number; now: Date }): SubscriberLinks {
  const expiresAt = new Date(p.now.getTime() + LINK_TTL_MS);
  const preferences = signToken(p.secret, { subscriberId: p.subscriberId, purpose: "preferences", expiresAt });
  const unsubscribe = signToken(p.secret, { subscriberId: p.subscriberId, purpose: "unsubscribe", expiresAt });
  const unsubscribeUrl = `${p.publicUrl}/u/${unsubscribe}`;
  return {
    preferencesUrl: `${p.publicUrl}/subscriptions/preferences/${preferences}`,
    unsubscribeUrl,
    headers: listUnsubscribeHeaders(unsubscribeUrl, p.mailto),
  };
}
