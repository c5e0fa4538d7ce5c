import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import type { Request, RequestHandler, Response } from "express";
import { AppError } from "./app-error.ts";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);
export const CSRF_COOKIE = "plumbline.csrf";
const COOKIE_VALUE = /^[A-Za-z0-9_-]{43}$/;

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

function cookieOf(req: Request): string | null {
  for (const part of (req.headers.cookie ?? "").split(";")) {
    const i = part.indexOf("=");
    if (i > 0 && part.slice(0, i).trim() === CSRF_COOKIE) {
      const value = part.slice(i + 1).trim();
      return COOKIE_VALUE.test(value) ? value : null;
    }
  }
  return null;
}

export interface CsrfGuard {
  /** The caller's token, setting the browser's random CSRF cookie the first time. Stores nothing. */
  issue(req: Request, res: Response): string;
  /** Ends the browser's token (sign-out): the next state-changing request needs a fresh one. */
  forget(res: Response): void;
  /** Checks X-CSRF-Token on every state-changing request, except on `exempt` paths (signed links of their own). */
  protect(exempt?: RegExp[]): RequestHandler;
}

/**
 * Signed double-submit tokens: the browser holds a random value in an httpOnly cookie and
 * the token is an HMAC of it under a server key. Fetching a token stores nothing on the
 * server (an anonymous visitor costs no session row), a token works only beside the cookie
 * it was made for, and another site can neither read the cookie nor send the header.
 * The token survives sign-in (a client fetches it once); sign-out drops the cookie.
 */
export function createCsrf(opts: { secret: string }): CsrfGuard {
  const key = createHmac("sha256", opts.secret).update("plumbline csrf tokens v1").digest();
  const tokenFor = (value: string) => createHmac("sha256", key).update(value).digest("base64url");
  const cookieOptions = (req: Request) => ({
    httpOnly: true,
    sameSite: "lax" as const,
    path: "/",
    // Secure exactly when the session cookie is (its own rule covers TLS and trusted proxies).
    secure: req.session?.cookie?.secure === true || (req.session === undefined && req.secure),
  });
  return {
    issue(req, res) {
      let value = cookieOf(req);
      if (!value) {
        value = randomBytes(32).toString("base64url");
        res.cookie(CSRF_COOKIE, value, cookieOptions(req));
      }
      return tokenFor(value);
    },
    forget(res) {
      res.clearCookie(CSRF_COOKIE, { path: "/" });
    },
    protect(exempt = []) {
      return (req, _res, next) => {
        if (SAFE.has(req.method)) return next();
        if (exempt.some((re) => re.test(req.path))) return next();
        const sent = req.get("x-csrf-token");
        const value = cookieOf(req);
        if (!sent || !value || !same(sent, tokenFor(value))) {
          return next(new AppError("csrf", "The form has expired or the request lacks its CSRF token. Reload and try again.", 403));
        }
        next();
      };
    },
  };
}
