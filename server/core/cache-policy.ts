import type { OutgoingHttpHeader } from "node:http";
import type { RequestHandler, Response } from "express";

/**
 * The one place that decides how every answer may be cached (docs/decisions/021-cache-policy-and-tls.md).
 *
 * - Under /api, an answer to a signed-in caller, an error, or an answer to a URL carrying a
 *   secret is `private, no-store`, whatever the route asked for.
 * - Under /api, a visitor's answer that could differ for another caller (programme, posts,
 *   stories, gallery, events …) is `private, no-cache` with `Vary: Cookie`: their own browser
 *   revalidates it by ETag; no shared cache keeps it, so none can hand one caller's answer
 *   to another, even one that ignores Vary.
 * - Under /api, the few answers that are the same for every caller keep public caching and
 *   their ETag for visitors.
 * - Outside /api (feed, sitemap, media files, pages, assets) the route's own policy holds for
 *   visitors. A signed-in caller's copy is never `public` (it carries their session cookie):
 *   content-addressed immutable files become `private`, the rest `private, no-store`.
 * - Any answer that sets a cookie is never `public`.
 */

/** API reads that are the same for every caller (nothing in them depends on who asks). */
const SAME_FOR_EVERY_CALLER: readonly RegExp[] = [
  /^\/api\/projects\/?$/,
  /^\/api\/projects\/[^/]+\/?$/,
  /^\/api\/projects\/[^/]+\/subscription-options\/?$/,
];

/** API paths whose URL carries a single-use or personal secret (invitation, reset, subscriber, digest and review links). */
const SECRET_IN_URL: readonly RegExp[] = [/^\/api\/review\//, /^\/api\/auth\/invitations\//, /^\/api\/auth\/password-reset\//, /^\/api\/subscriptions\//, /^\/api\/digests\/web\//];

export const NEVER_STORED = "private, no-store";
/** A visitor's copy of a caller-dependent answer: their browser only, revalidated every time. */
export const VISITOR_REVALIDATE = "private, no-cache";
/** Same-for-everyone API answers when the route names no policy of its own. */
export const SHARED_DEFAULT = "public, max-age=60";

export interface CacheInputs {
  /** The request's path (no query). */
  path: string;
  status: number;
  signedIn: boolean;
  /** The answer sets a cookie (a session's rolling cookie, a CSRF cookie). */
  setsCookie: boolean;
  /** What the route itself set, if anything. */
  routePolicy: string | undefined;
}

export interface CacheDecision {
  cacheControl: string | undefined;
  varyCookie: boolean;
}

/** `public, max-age=300` → `private, max-age=300`; anything not yet private is made so. */
function privately(policy: string): string {
  const swapped = policy.replace(/\bpublic\b/i, "private").replace(/,?\s*s-maxage=\d+/i, "");
  return /\bprivate\b/i.test(swapped) ? swapped : `private, ${swapped}`;
}

export function isApiPath(path: string): boolean {
  return path === "/api" || path.startsWith("/api/");
}

export function isSameForEveryCaller(path: string): boolean {
  return SAME_FOR_EVERY_CALLER.some((re) => re.test(path));
}

/** Pure: the Cache-Control an answer leaves with, and whether it varies by Cookie. */
export function decideCachePolicy(a: CacheInputs): CacheDecision {
  const route = a.routePolicy;
  const noStore = route !== undefined && /\bno-store\b/i.test(route);
  if (isApiPath(a.path)) {
    const shared = isSameForEveryCaller(a.path);
    const varyCookie = !shared;
    if (a.signedIn || a.status >= 400 || SECRET_IN_URL.some((re) => re.test(a.path)) || noStore) return { cacheControl: NEVER_STORED, varyCookie };
    if (shared) {
      const policy = route ?? SHARED_DEFAULT;
      return { cacheControl: a.setsCookie ? privately(policy) : policy, varyCookie };
    }
    return { cacheControl: VISITOR_REVALIDATE, varyCookie };
  }
  if (noStore) return { cacheControl: route, varyCookie: false };
  if (a.status >= 400) return { cacheControl: NEVER_STORED, varyCookie: false };
  if (a.signedIn) {
    if (route && /\bimmutable\b/i.test(route)) return { cacheControl: privately(route), varyCookie: false };
    if (route && /^\s*private\b/i.test(route)) return { cacheControl: route, varyCookie: false };
    return { cacheControl: NEVER_STORED, varyCookie: false };
  }
  if (a.setsCookie && route) return { cacheControl: privately(route), varyCookie: false };
  return { cacheControl: route, varyCookie: false };
}

function headerText(value: number | string | string[] | undefined): string | undefined {
  if (value === undefined) return undefined;
  return Array.isArray(value) ? value.join(", ") : String(value);
}

function isFlatList(value: unknown): value is string[] {
  return Array.isArray(value) && (value.length === 0 || typeof value[0] === "string");
}

/** Headers handed to writeHead itself (an object, a flat name/value list or a list of pairs), applied as Node would. */
function applyWriteHeadHeaders(res: Response, headers: unknown): void {
  if (Array.isArray(headers)) {
    if (headers.length > 0 && Array.isArray(headers[0])) {
      for (const [name, value] of headers as Array<[string, OutgoingHttpHeader]>) res.appendHeader(name, value as string | string[]);
      return;
    }
    const flat = headers as Array<string>;
    for (let i = 0; i < flat.length; i += 2) res.removeHeader(flat[i]!);
    for (let i = 0; i < flat.length; i += 2) res.appendHeader(flat[i]!, flat[i + 1]!);
    return;
  }
  for (const [name, value] of Object.entries(headers as Record<string, OutgoingHttpHeader | undefined>)) {
    if (value !== undefined) res.setHeader(name, value);
  }
}

/**
 * Applies the policy as the headers leave, so it sees the final status, the caller and any
 * cookie set on the way out. Mounted first: it covers every answer, the public cache's
 * replays, static files and errors included.
 */
export function cachePolicy(): RequestHandler {
  return (req, res, next) => {
    // Taken now: inside a mounted router req.path is relative to the mount point.
    const path = req.path;
    const writeHead = res.writeHead;
    let applied = false;
    res.writeHead = function (this: Response, statusCode: number, ...rest: unknown[]) {
      if (!applied) {
        applied = true;
        const last = rest[rest.length - 1];
        // The public cache's replays hand a flat name/value list: decide on it in place and keep
        // Node's fast path (applying it header by header costs about a tenth of the throughput).
        if (isFlatList(last) && res.getHeader("cache-control") === undefined && res.getHeader("vary") === undefined && res.getHeader("set-cookie") === undefined) {
          const flat = [...last];
          const at = (name: string) => flat.findIndex((v, i) => i % 2 === 0 && v.toLowerCase() === name);
          const cc = at("cache-control");
          const decision = decideCachePolicy({ path, status: statusCode, signedIn: Boolean(req.user), setsCookie: at("set-cookie") >= 0, routePolicy: cc >= 0 ? flat[cc + 1] : undefined });
          if (decision.cacheControl === undefined) {
            if (cc >= 0) flat.splice(cc, 2);
          } else if (cc >= 0) flat[cc + 1] = decision.cacheControl;
          else flat.push("cache-control", decision.cacheControl);
          if (decision.varyCookie) {
            const vi = at("vary");
            if (vi < 0) flat.push("vary", "Cookie");
            else if (!/(^|,)\s*(cookie|\*)\s*(,|$)/i.test(flat[vi + 1]!)) flat[vi + 1] = `${flat[vi + 1]}, Cookie`;
          }
          return (writeHead as (...a: unknown[]) => Response).call(this, statusCode, ...rest.slice(0, -1), flat);
        }
        if (last !== null && typeof last === "object") {
          applyWriteHeadHeaders(res, last);
          rest = rest.slice(0, -1);
        }
        const decision = decideCachePolicy({
          path,
          status: statusCode,
          signedIn: Boolean(req.user),
          setsCookie: res.getHeader("set-cookie") !== undefined,
          routePolicy: headerText(res.getHeader("cache-control")),
        });
        if (decision.cacheControl === undefined) res.removeHeader("cache-control");
        else res.setHeader("Cache-Control", decision.cacheControl);
        if (decision.varyCookie) {
          const vary = headerText(res.getHeader("vary"));
          if (!vary) res.setHeader("Vary", "Cookie");
          else if (!/(^|,)\s*(cookie|\*)\s*(,|$)/i.test(vary)) res.setHeader("Vary", `${vary}, Cookie`);
        }
      }
      return (writeHead as (...a: unknown[]) => Response).call(this, statusCode, ...rest);
    } as typeof res.writeHead;
    next();
  };
}
