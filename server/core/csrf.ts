import { randomBytes, timingSafeEqual } from "node:crypto";
import type { Request, RequestHandler } from "express";
import { AppError } from "./app-error.ts";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/** Returns the session's CSRF token, creating one the first time. */
export function csrfTokenFor(req: Request): string {
  if (!req.session.csrfToken) req.session.csrfToken = randomBytes(32).toString("base64url");
  return req.session.csrfToken;
}

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/**
 * Synchronizer-token check for every state-changing /api request. `exempt` lists paths
 * that carry their own signed token instead (RFC 8058 one-click unsubscribe).
 */
export function csrfProtection(exempt: RegExp[] = []): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    if (exempt.some((re) => re.test(req.path))) return next();
    const sent = req.get("x-csrf-token");
    const expected = req.session?.csrfToken;
    if (!sent || !expected || !same(sent, expected)) {
      return next(new AppError("csrf", "The form has expired or the request lacks its CSRF token. Reload and try again.", 403));
    }
    next();
  };
}
