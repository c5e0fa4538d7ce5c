import type { Request, RequestHandler } from "express";
import rateLimit, { type Options, type Store } from "express-rate-limit";
import { AppError } from "./app-error.ts";

/**
 * A request limit as every router sets one up: counted in a shared store (so every process counts
 * the same requests), the standard RateLimit headers, and past the limit a 429 `rate_limited`
 * AppError with the route's own message, answered by the one error handler. `options` carries
 * what a limit does its own way (which requests count, the key, the headers, validation).
 */
export function requestLimit(
  limit: { windowMs: number; limit: number; store: Store; message: string },
  options: Partial<Pick<Options, "standardHeaders" | "skipSuccessfulRequests" | "skip" | "keyGenerator" | "validate">> = {},
): RequestHandler {
  return rateLimit({
    windowMs: limit.windowMs,
    limit: limit.limit,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    store: limit.store,
    ...options,
    handler: (_req: Request, _res, next) => next(new AppError("rate_limited", limit.message, 429)),
  });
}
