import { AppError, notFound } from "../core/app-error.ts";
import { createTokenSigner, verifyLegacyToken } from "../core/signed-token.ts";
import type { Db } from "../db/knex.ts";
import { escapeHtml } from "../mail/mail.layout.ts";
import type { MediaService } from "../media/media.service.ts";
import { subscriberLinks } from "../subscribers/subscribers.links.ts";
import { linkExpiry } from "./digests.assemble.ts";
import type { DigestVisibility } from "./digests.archive.ts";
import { withheldNotice, withholdItems } from "./digests.items.ts";
import { deliveryOfContent, findContent } from "./digests.repository.ts";
import { personalise, type PersonalLinks } from "./digests.render.ts";

/** Web copies of a digest stay readable this long after the run (a year, like the footer links). */
const WEB_TTL_MS = 365 * 24 * 60 * 60 * 1000;
/** The web copy's pictures: long enough for a reading, rounded the same way as the e-mail's. */
const WEB_MEDIA_LINK_TTL_DAYS = 1;

export interface DigestWebCopyDeps {
  db: Db;
  media: Pick<MediaService, "refreshSignedUrls">;
  /** What of a digest its reader may no longer see (decision 045). */
  visibility: DigestVisibility;
  publicUrl: string;
  tokenSecret: string;
  unsubscribeMailto: string | null;
  now: () => Date;
}

/** The withheld notice at the top of a web copy's body. */
function withNotice(html: string, notice: string): string {
  const banner = `<p role="note" style="margin:0;padding:12px;background:#fff4d6;border-bottom:2px solid #8a5a00;font:15px Helvetica,Arial,sans-serif;color:#1d1f24">${escapeHtml(notice)}</p>`;
  return /<body[^>]*>/i.test(html) ? html.replace(/<body[^>]*>/i, (tag) => `${tag}${banner}`) : `${banner}${html}`;
}

/**
 * "View in the browser": each reader's signed link to the content they were sent, and the
 * personal links (web copy, preferences, unsubscribe) every digest carries.
 */
export function createDigestWebCopy(deps: DigestWebCopyDeps) {
  const { db, media, publicUrl, tokenSecret, now } = deps;
  const signer = createTokenSigner(tokenSecret);
  const webClaims = (c: Record<string, unknown>) => (Number.isSafeInteger(c.c) && Number.isSafeInteger(c.s) ? { c: c.c as number, s: c.s as number } : null);

  function webToken(contentId: number, subscriberId: number, expiresAt: Date): string {
    return signer.sign("digestWebCopy", { c: contentId, s: subscriberId }, expiresAt);
  }

  /** 400 for an altered, non-canonical, forged or other-purpose token; 410 for an authentic expired one. */
  function verifyWebToken(token: string): { contentId: number; subscriberId: number } {
    let result = signer.verify("digestWebCopy", token, now(), webClaims);
    // Web copies linked before decision 016 keep working until their own expiry.
    if (!result.ok && result.reason === "forged") result = verifyLegacyToken(tokenSecret, "digestWebCopy", token, now(), webClaims);
    if (!result.ok) {
      if (result.reason === "expired") throw new AppError("token_expired", "This link has expired.", 410);
      throw new AppError("token_invalid", "This link is not valid. Use the link in your latest digest.", 400);
    }
    return { contentId: result.claims.c, subscriberId: result.claims.s };
  }

  /** The personal links of one reader of one content: cheap HMACs, no database. */
  function linksFor(contentId: number, subscriberId: number): PersonalLinks & { headers: Record<string, string> } {
    const at = now();
    const l = subscriberLinks({ publicUrl, secret: tokenSecret, mailto: deps.unsubscribeMailto, subscriberId, now: at });
    return { webUrl: `${publicUrl}/api/digests/web/${webToken(contentId, subscriberId, new Date(at.getTime() + WEB_TTL_MS))}`, preferencesUrl: l.preferencesUrl, unsubscribeUrl: l.unsubscribeUrl, headers: l.headers };
  }

  /** The web copy behind "view in the browser": only the content its reader was sent. */
  async function webCopy(token: string): Promise<string> {
    const { contentId, subscriberId } = verifyWebToken(token);
    const content = await findContent(db, contentId);
    const delivery = await deliveryOfContent(db, contentId, subscriberId);
    if (!content || !delivery || content.empty) throw notFound("That digest");
    const l = linksFor(contentId, subscriberId);
    // The same rule as the archive: what has since become hidden from this reader is cut out and the page says so.
    // A copy rendered before digests kept their items is the e-mail in the reader's inbox, and is served as it was.
    const hidden = content.itemRefs === null ? [] : await deps.visibility(content.itemRefs, { ...delivery, audience: content.audience });
    const kept = hidden.length === 0 ? content.html : withNotice(withholdItems(content.html, hidden), withheldNotice(hidden.length));
    // The copy outlives its e-mail's picture links: an investor's pictures are signed again for this reading.
    const html = media.refreshSignedUrls(kept, linkExpiry(now(), WEB_MEDIA_LINK_TTL_DAYS));
    return personalise(html, { webUrl: `${publicUrl}/api/digests/web/${token}`, preferencesUrl: l.preferencesUrl, unsubscribeUrl: l.unsubscribeUrl });
  }

  return { webToken, verifyWebToken, linksFor, webCopy };
}
export type DigestWebCopy = ReturnType<typeof createDigestWebCopy>;
