import { createHash, createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import { AppError } from "../core/app-error.ts";

/**
 * What a signed link lets its holder do. Each purpose has its own token, so a link in
 * a digest footer (unsubscribe) cannot be used to confirm or to read preferences.
 */
export type TokenPurpose = "confirm" | "preferences" | "unsubscribe";
const CODE: Record<TokenPurpose, string> = { confirm: "c", preferences: "p", unsubscribe: "u" };

export const CONFIRM_TTL_MS = 7 * 24 * 60 * 60 * 1000;
/** Every e-mail carries fresh preference and unsubscribe links; a year covers an old one kept in an inbox. */
export const LINK_TTL_MS = 365 * 24 * 60 * 60 * 1000;

interface Payload {
  /** subscriber id */
  s: number;
  /** purpose code */
  p: string;
  /** expiry, Unix seconds */
  e: number;
  /** confirmation nonce (single use) */
  n?: string;
}

export interface VerifiedToken {
  subscriberId: number;
  expiresAt: Date;
  nonce: string | null;
}

const DOMAIN = "plumbline-subscriber-link:v1.";

function mac(secret: string, body: string): Buffer {
  return createHmac("sha256", secret).update(DOMAIN + body).digest();
}

/**
 * A link token: base64url(JSON payload) "." base64url(HMAC-SHA256). It names the
 * subscriber and the purpose and carries its own expiry, so it needs no table.
 */
export function signToken(secret: string, p: { subscriberId: number; purpose: TokenPurpose; expiresAt: Date; nonce?: string | null }): string {
  const payload: Payload = { s: p.subscriberId, p: CODE[p.purpose], e: Math.floor(p.expiresAt.getTime() / 1000) };
  if (p.nonce) payload.n = p.nonce;
  const body = Buffer.from(JSON.stringify(payload)).toString("base64url");
  return `${body}.${mac(secret, body).toString("base64url")}`;
}

const invalid = () => new AppError("token_invalid", "This link is not valid. Use the latest link we sent you.", 400);

/** Checks signature, purpose and expiry; an altered or forged token is refused with 400, an expired one with 410. */
export function verifyToken(secret: string, token: string, purpose: TokenPurpose, now: Date): VerifiedToken {
  const dot = token.indexOf(".");
  if (dot <= 0) throw invalid();
  const body = token.slice(0, dot);
  const sent = Buffer.from(token.slice(dot + 1), "base64url");
  const expected = mac(secret, body);
  if (sent.length !== expected.length || !timingSafeEqual(sent, expected)) throw invalid();
  let payload: Payload;
  try {
    payload = JSON.parse(Buffer.from(body, "base64url").toString("utf8")) as Payload;
  } catch {
    throw invalid();
  }
  if (payload.p !== CODE[purpose] || !Number.isInteger(payload.s) || !Number.isInteger(payload.e)) throw invalid();
  const expiresAt = new Date(payload.e * 1000);
  if (expiresAt <= now) throw new AppError("token_expired", "This link has expired. Subscribe again, or use a newer e-mail from us.", 410);
  return { subscriberId: payload.s, expiresAt, nonce: payload.n ?? null };
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
