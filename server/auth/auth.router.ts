import type { Request, RequestHandler, Response } from "express";
import { Router } from "express";
import rateLimit from "express-rate-limit";
import type { createPassport } from "./passport.ts";

type Authenticator = ReturnType<typeof createPassport>;
import {
  AcceptInvitationInputSchema,
  LoginInputSchema,
  ResetPasswordInputSchema,
  ResetRequestInputSchema,
  TokenParamSchema,
  type User,
} from "#shared/schemas/auth.ts";
import { AppError } from "../core/app-error.ts";
import { actorOf } from "../core/auth.ts";
import { csrfTokenFor } from "../core/csrf.ts";
import type { RateLimitRepository } from "../rate-limit/rate-limit.repository.ts";
import type { AuthService } from "./auth.service.ts";

function logIn(req: Request, user: User): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    // passport regenerates the session id here (fixation); keep the CSRF token with it.
    req.login(user, { keepSessionInfo: true } as Parameters<Request["login"]>[1], (err) => (err ? reject(err) : resolve()));
  }).then(() => {
    req.session.signedInAt = Date.now();
  });
}

function authenticate(passport: Authenticator, req: Request, res: Response): Promise<User> {
  return new Promise((resolve, reject) => {
    const handler = passport.authenticate("local", { session: false }, (err: unknown, user: User | false) => {
      if (err) return reject(err);
      if (!user) return reject(new AppError("invalid_credentials", "That e-mail address and password do not match an active account.", 401));
      resolve(user);
    }) as RequestHandler;
    handler(req, res, (err?: unknown) => (err ? reject(err) : undefined));
  });
}

export function authRouter(deps: {
  auth: AuthService;
  passport: Authenticator;
  limits: { perIp: number; perAccount: number; windowMs: number };
  stores: { ip: RateLimitRepository; account: RateLimitRepository };
}): Router {
  const { auth, passport } = deps;
  const r = Router();

  const limited = (message: string) => (_req: Request, _res: Response, next: (e: unknown) => void) =>
    next(new AppError("rate_limited", message, 429));

  const perIp = rateLimit({
    windowMs: deps.limits.windowMs,
    limit: deps.limits.perIp,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    store: deps.stores.ip,
    handler: limited("Too many sign-in attempts from this address. Wait a few minutes and try again."),
  });
  const perAccount = rateLimit({
    windowMs: deps.limits.windowMs,
    limit: deps.limits.perAccount,
    standardHeaders: false,
    legacyHeaders: false,
    store: deps.stores.account,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => String((req.body as { email?: unknown } | undefined)?.email ?? "").trim().toLowerCase() || "(none)",
    handler: limited("Too many failed sign-ins for this account. Wait a few minutes or reset the password."),
  });

  r.get("/auth/csrf", (req, res) => {
    res.set("Cache-Control", "no-store").json({ token: csrfTokenFor(req) });
  });

  r.post("/auth/login", perIp, perAccount, async (req, res) => {
    LoginInputSchema.parse(req.body);
    const user = await authenticate(passport, req, res);
    await logIn(req, user);
    await auth.recordSignIn(user, actorOf(req));
    res.json({ user });
  });

  r.post("/auth/logout", async (req, res) => {
    const actor = actorOf(req);
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
    await auth.recordSignOut(actor);
    res.clearCookie("plumbline.sid");
    res.status(204).end();
  });

  r.get("/auth/me", (req, res) => {
    if (!req.user) throw new AppError("unauthenticated", "Not signed in.", 401);
    res.set("Cache-Control", "no-store").json({ user: req.user });
  });

  r.get("/auth/invitations/:token", async (req, res) => {
    const { token } = TokenParamSchema.parse(req.params);
    res.json(await auth.describeInvitation(token));
  });

  r.post("/auth/invitations/:token/accept", perIp, async (req, res) => {
    const { token } = TokenParamSchema.parse(req.params);
    const input = AcceptInvitationInputSchema.parse(req.body);
    const user = await auth.acceptInvitation(token, input, actorOf(req));
    await logIn(req, user);
    await auth.recordSignIn(user, actorOf(req));
    res.status(201).json({ user });
  });

  r.post("/auth/password-reset", perIp, async (req, res) => {
    const { email } = ResetRequestInputSchema.parse(req.body);
    await auth.requestPasswordReset(email, actorOf(req));
    res.status(202).json({ ok: true, message: "If that address has an account, a reset link is on its way." });
  });

  r.post("/auth/password-reset/:token", perIp, async (req, res) => {
    const { token } = TokenParamSchema.parse(req.params);
    const { password } = ResetPasswordInputSchema.parse(req.body);
    const user = await auth.resetPassword(token, password, actorOf(req));
    await logIn(req, user);
    await auth.recordSignIn(user, actorOf(req));
    res.json({ user });
  });

  return r;
}
