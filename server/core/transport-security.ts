import type { RequestHandler } from "express";

/** One year, and every subdomain of the public host: what helmet sent before, now only over TLS. */
export const HSTS = "max-age=31536000; includeSubDomains";

/**
 * TLS as the public sees it. When PUBLIC_URL is https, a TLS-terminating proxy is in front,
 * trusted or not, so every request is treated as having arrived over HTTPS: the session
 * cookie is Secure (express-session reads `req.secure`) and HSTS is sent. Otherwise only a
 * request that really came over TLS (its own socket, or a trusted proxy's
 * X-Forwarded-Proto: https) gets them; HSTS over plain HTTP means nothing (RFC 6797 §7.2).
 */
export function transportSecurity(opts: { publicUrl: string }): RequestHandler {
  const publicIsHttps = new URL(opts.publicUrl).protocol === "https:";
  return (req, res, next) => {
    if (publicIsHttps) Object.defineProperty(req, "protocol", { value: "https", configurable: true, enumerable: true });
    if (req.secure) res.setHeader("Strict-Transport-Security", HSTS);
    next();
  };
}
