import { createHmac, timingSafeEqual } from "node:crypto";

/**
 * Every signed link the product issues, by purpose. Each purpose signs with its own key,
 * HMAC-SHA256(TOKEN_SECRET, label), so a token made for one purpose never verifies for
 * another, whatever its payload says. Labels never change once links carrying them have been
 * sent: changing one ends every such link (decision 016). The media label is the one its
 * links have carried since they were introduced (decision 012).
 */
export const TOKEN_PURPOSES = {
  subscriptionConfirm: "plumbline subscription confirm v2",
  subscriptionPreferences: "plumbline subscription preferences v2",
  unsubscribe: "plumbline one-click unsubscribe v2",
  digestWebCopy: "plumbline digest web copy v2",
  mediaLink: "plumbline signed media link v1",
  reviewLink: "plumbline review link v1",
} as const;
export type TokenPurpose = keyof typeof TOKEN_PURPOSES;

/**
 * Why a token was refused. `malformed`: not even the shape of a token (or a non-canonical
 * spelling of one); `forged`: the shape is right but no key of ours made it for this purpose;
 * `expired`: authentic, but past its expiry (only ever said of an authentic token).
 */
export type TokenRefusal = "malformed" | "forged" | "expired";

export type Verified<T> = { ok: true; claims: T; expiresAt: Date } | { ok: false; reason: TokenRefusal };

type Claims = Record<string, string | number>;

/** A SHA-256 MAC in base64url without padding: exactly 43 characters. */
const SIG = /^[A-Za-z0-9_-]{43}$/;
const BODY = /^[A-Za-z0-9_-]{4,600}$/;
/** Unix seconds: what an `exp` is written as. */
const SECONDS = /^\d{1,12}$/;

/**
 * Decodes base64url only when it is the one canonical spelling of its bytes. Node's decoder
 * ignores stray characters and the unused low bits of the last character, so the same MAC
 * has several spellings; accepting them all would let one link exist under several names.
 */
export function decodeCanonicalBase64url(text: string): Buffer | null {
  if (!/^[A-Za-z0-9_-]*$/.test(text)) return null;
  const bytes = Buffer.from(text, "base64url");
  return bytes.toString("base64url") === text ? bytes : null;
}

function equalMacs(sent: Buffer, expected: Buffer): boolean {
  return sent.length === expected.length && timingSafeEqual(sent, expected);
}

export interface TokenSigner {
  /**
   * A self-contained token: base64url(JSON of the claims and `e`, the expiry in Unix seconds)
   * "." base64url(HMAC-SHA256 of that text under the purpose's key).
   */
  sign(purpose: TokenPurpose, claims: Claims, expiresAt: Date): string;
  /** Checks shape, canonical spelling, signature (constant-time) and then expiry. */
  verify<T extends Claims>(purpose: TokenPurpose, token: string, now: Date, parse: (claims: Record<string, unknown>) => T | null): Verified<T>;
  /**
   * A signature over parts that travel beside it (a URL's own path and query), with the
   * expiry in Unix seconds signed as the last part. Parts never contain a line feed.
   */
  signParts(purpose: TokenPurpose, parts: readonly string[], exp: number): string;
  /** The detached counterpart of `verify`: `sig` must be the canonical spelling of the MAC. */
  verifyParts(purpose: TokenPurpose, parts: readonly string[], exp: number, sig: string | undefined, now: Date): { ok: true } | { ok: false; reason: TokenRefusal };
}

/**
 * The one way the product signs and checks the links it sends (subscription confirmation,
 * preferences, one-click unsubscribe, digest web copies, signed media, review links). Invitations and
 * password resets are random secrets stored hashed, not signed tokens, and do not use it.
 */
export function createTokenSigner(secret: string): TokenSigner {
  if (secret.length === 0) throw new RangeError("a token secret is required");
  const keys = new Map<TokenPurpose, Buffer>();
  const keyOf = (purpose: TokenPurpose): Buffer => {
    let key = keys.get(purpose);
    if (!key) {
      key = createHmac("sha256", secret).update(TOKEN_PURPOSES[purpose]).digest();
      keys.set(purpose, key);
    }
    return key;
  };
  const mac = (purpose: TokenPurpose, message: string) => createHmac("sha256", keyOf(purpose)).update(message).digest();
  const partsMessage = (parts: readonly string[], exp: number) => {
    if (parts.some((p) => p.includes("\n"))) throw new RangeError("a signed part cannot contain a line feed");
    if (!Number.isSafeInteger(exp) || exp < 0) throw new RangeError("exp must be whole Unix seconds");
    return [...parts, String(exp)].join("\n");
  };

  return {
    sign(purpose, claims, expiresAt) {
      if ("e" in claims) throw new RangeError("`e` is the expiry's claim");
      const body = Buffer.from(JSON.stringify({ ...claims, e: Math.floor(expiresAt.getTime() / 1000) })).toString("base64url");
      return `${body}.${mac(purpose, body).toString("base64url")}`;
    },

    verify(purpose, token, now, parse) {
      return verifyCompact(token, (body) => mac(purpose, body), now, parse);
    },

    signParts(purpose, parts, exp) {
      return mac(purpose, partsMessage(parts, exp)).toString("base64url");
    },

    verifyParts(purpose, parts, exp, sig, now) {
      if (sig === undefined || !SIG.test(sig) || !Number.isSafeInteger(exp) || exp < 0 || !SECONDS.test(String(exp))) return { ok: false, reason: "malformed" };
      const sent = decodeCanonicalBase64url(sig);
      if (!sent) return { ok: false, reason: "malformed" };
      if (parts.some((p) => p.includes("\n"))) return { ok: false, reason: "malformed" };
      if (!equalMacs(sent, mac(purpose, partsMessage(parts, exp)))) return { ok: false, reason: "forged" };
      if (exp * 1000 <= now.getTime()) return { ok: false, reason: "expired" };
      return { ok: true };
    },
  };
}

/**
 * Links sent before decision 016 were signed without a per-purpose key: HMAC-SHA256(secret,
 * domain + body), the purpose (where there were several) inside the body. They still mean
 * what they meant until their own expiry (a year at most), and only in their canonical
 * spelling; nothing new is signed this way.
 */
export const LEGACY_DOMAINS = {
  subscriberLink: "plumbline-subscriber-link:v1.",
  digestWebCopy: "plumbline-digest-web:v1.",
} as const;

/** Checks a pre-016 token of `domain`, under the same rules as `verify` (canonical only, constant-time, expiry last). */
export function verifyLegacyToken<T extends Claims>(secret: string, domain: keyof typeof LEGACY_DOMAINS, token: string, now: Date, parse: (claims: Record<string, unknown>) => T | null): Verified<T> {
  return verifyCompact(token, (body) => createHmac("sha256", secret).update(LEGACY_DOMAINS[domain] + body).digest(), now, parse);
}

/** `body "." sig`: shape, canonical spelling, MAC (constant-time), then the claims and expiry of an authentic body. */
function verifyCompact<T extends Claims>(token: string, macOf: (body: string) => Buffer, now: Date, parse: (claims: Record<string, unknown>) => T | null): Verified<T> {
  const dot = token.indexOf(".");
  const body = token.slice(0, dot);
  const sig = token.slice(dot + 1);
  if (dot < 0 || !BODY.test(body) || !SIG.test(sig)) return { ok: false, reason: "malformed" };
  const sent = decodeCanonicalBase64url(sig);
  if (!sent) return { ok: false, reason: "malformed" };
  if (!equalMacs(sent, macOf(body))) return { ok: false, reason: "forged" };
  // Authentic from here on: the body is exactly what this server wrote.
  let raw: unknown;
  try {
    raw = JSON.parse(Buffer.from(body, "base64url").toString("utf8"));
  } catch {
    return { ok: false, reason: "malformed" };
  }
  if (typeof raw !== "object" || raw === null || Array.isArray(raw)) return { ok: false, reason: "malformed" };
  const { e, ...rest } = raw as Record<string, unknown>;
  if (!Number.isSafeInteger(e)) return { ok: false, reason: "malformed" };
  const claims = parse(rest);
  if (!claims) return { ok: false, reason: "malformed" };
  const expiresAt = new Date((e as number) * 1000);
  if (expiresAt.getTime() <= now.getTime()) return { ok: false, reason: "expired" };
  return { ok: true, claims, expiresAt };
}
