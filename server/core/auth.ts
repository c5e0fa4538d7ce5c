import type { Request, RequestHandler } from "express";
import type { Role } from "#shared/schemas/common.ts";
import { AppError } from "./app-error.ts";
import type { Actor } from "./types.ts";

/** Route guard: signed in, and (when roles are given) one of them. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) return next(new AppError("unauthenticated", "Sign in first.", 401));
    if (roles.length > 0 && !roles.includes(req.user.role)) {
      return next(new AppError("forbidden", "Your role may not do this.", 403));
    }
    next();
  };
}

export const requireStaff = () => requireRole("admin", "lead", "marketing");

export function actorOf(req: Request): Actor {
  return { user: req.user ?? null, ip: req.ip ?? null };
}
