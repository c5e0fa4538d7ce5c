import { createHash, randomBytes } from "node:crypto";
import { AppError } from "../core/app-error.ts";
import { createTokenSigner, verifyLegacyToken, type TokenPurpose as SignedPurpose } from "../core/signed-token.ts";

/**
 * What a signed link lets its holder do. Each purpose has its own token, so a link in
 * a digest footer (unsubscribe) cannot be used to confirm or to read preferences.
 */
export type TokenPurpose = "confirm" | "preferences" | "unsubscribe";
/** The purpose codes inside the body of a link signed before decision 016. */
const LEGACY_CODE: Record<TokenPurpose, string> = { confirm: "c", preferences: "p", unsubscribe: "u" };

export const CONFIRM_TTL_MS = 7 * 24 * 60 * 60 * 1000;
/** Every e-mail carries fresh preference and unsubscribe links; a year covers an old one kept in an inbox. */
export const LINK_TTL_MS = 365 * 24 * 60 * 60 * 1000;

export interface VerifiedToken {
  subscriberId: number;
  expiresAt: Date;
  nonce: string | null;
}

const SIGNED_AS: Record<TokenPurpose, SignedPurpose> = { confirm: "subscriptionConfirm", preferences: "subscriptionPreferences", unsubscribe: "unsubscribe" };

/** Claims of a subscriber link: `s` the subscriber id, `n` the confirmation's single-use nonce. */
function subscriberClaims(c: Record<string, unknown>): { s: number; n?: string } | null {
  if (!Number.isSafeInteger(c.s) || (c.s as number) <= 0) return null;
  if (c.n !== undefined && (typeof c.n !== "string" || c.n.length === 0)) return null;
  return c.n === undefined ? { s: c.s as number } : { s: c.s as number, n: c.n as string };
}

/**
 * A link token for one subscriber and one purpose, with its own expiry, so it needs no
 * table (server/core/signed-token.ts: its own key per purpose, canonical spelling only).
 */
export function signToken(secret: string, p: { subscriberId: number; purpose: TokenPurpose; expiresAt: Date; nonce?: string | null }): string {
  return createTokenSigner(secret).sign(SIGNED_AS[p.purpose], p.nonce ? { s: p.subscriberId, n: p.nonce } : { s: p.subscriberId }, p.expiresAt);
}

const invalid = () => new AppError("token_invalid", "This link is not valid. Use the latest link we sent you.", 400);

/**
 * Checks signature, purpose and expiry; an altered, non-canonical, forged or other-purpose token
 * is refused with 400, an authentic expired one with 410. Links signed before decision 016 still
 * verify, with the meaning they were sent with, until their own expiry.
 */
export function verifyToken(secret: string, token: string, purpose: TokenPurpose, now: Date): VerifiedToken {
  let result = createTokenSigner(secret).verify(SIGNED_AS[purpose], token, now, subscriberClaims);
  if (!result.ok && result.reason === "forged") {
    result = verifyLegacyToken(secret, "subscriberLink", token, now, (c) => (c.p === LEGACY_CODE[purpose] ? subscriberClaims(c) : null));
  }
  if (!result.ok) {
    if (result.reason === "expired") throw new AppError("token_expired", "This link has expired. Subscribe again, or use a newer e-mail from us.", 410);
    throw invalid();
  }
  return { subscriberId: result.claims.s, expiresAt: result.expiresAt, nonce: result.claims.n ?? null };
}

export const newNonce = () => randomBytes(16).toString("base64url");

/** The address as compared everywhere: trimmed and lower-cased. */
export const normaliseAddress = (email: string) => email.trim().toLowerCase();

/**
 * SHA-256 of the normalised address: what the suppression list keeps of an erased,
 * bounced or complaining address. It recognises the address again without storing it.
 */
export function hashAddress(email: string): string {
  return createHash("sha256").update(`plumbline-address:${normaliseAddress(email)}`).digest("hex");
}
