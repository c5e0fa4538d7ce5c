import type { Request, RequestHandler, Response } from "express";
import { Router } from "express";
import { ipKeyGenerator, type Store } from "express-rate-limit";
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
import type { CsrfGuard } from "../core/csrf.ts";
import { requestLimit } from "../core/request-limit.ts";
import { route } from "../core/route.ts";
import type { SignInDelays } from "../rate-limit/sign-in-delays.service.ts";
import type { AuthService } from "./auth.service.ts";

function logIn(req: Request, user: User): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    // passport regenerates the session id here (fixation). The CSRF token lives in its own cookie and carries over.
    req.login(user, (err) => (err ? reject(err) : resolve()));
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
  csrf: CsrfGuard;
  limits: { perIp: number; windowMs: number };
  /** Shared counters (in MariaDB), so every process counts the same requests. */
  stores: { ip: Store; resetRequests: Store };
  /** The growing wait per (account, client address) pair after failed sign-ins. */
  delays: SignInDelays;
}): Router {
  const { auth, passport } = deps;
  const r = Router();

  // Failures only (wrong password, spent or forged link, bad input) from one client address, as
  // the trusted proxies report it: colleagues behind one address sign in as often as they like.
  // An X-Forwarded-For from a peer that is not a trusted proxy is ignored by design (TRUST_PROXY), not a fault to log.
  const perIp = requestLimit(
    { windowMs: deps.limits.windowMs, limit: deps.limits.perIp, store: deps.stores.ip, message: "Too many failed attempts from this address. Wait a few minutes and try again." },
    { skipSuccessfulRequests: true, validate: { xForwardedForHeader: false } },
  );
  // Every reset request sends mail whether or not the address is known, so each one counts.
  const resetRequestsPerIp = requestLimit(
    { windowMs: deps.limits.windowMs, limit: deps.limits.perIp, store: deps.stores.resetRequests, message: "Too many password-reset requests from this address. Wait a few minutes and try again." },
    { validate: { xForwardedForHeader: false } },
  );
  /** The same client key as the limiters: an IPv6 client's /56, which one subscriber holds whole. */
  const clientKey = (req: Request) => ipKeyGenerator(req.ip ?? "unknown");

  r.get("/auth/csrf", (req, res) => {
    res.set("Cache-Control", "no-store").json({ token: deps.csrf.issue(req, res) });
  });

  r.post("/auth/login", perIp, async (req, res) => {
    const { email } = LoginInputSchema.parse(req.body);
    const address = clientKey(req);
    const wait = await deps.delays.begin(email, address);
    if (wait > 0) {
      res.set("Retry-After", String(wait));
      throw new AppError(
        "rate_limited",
        `Too many failed sign-ins at this account from this address. Try again in ${wait} seconds, or reset the password.`,
        429,
        undefined,
        { retryAfterSeconds: wait },
      );
    }
    const user = await authenticate(passport, req, res);
    await deps.delays.succeeded(email, address);
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
    deps.csrf.forget(res);
    res.status(204).end();
  });

  // Who is signed in, for the app: a visitor is an answer (`user: null`), not a failed load in the console.
  r.get("/auth/session", (req, res) => {
    res.set("Cache-Control", "no-store").json({ user: req.user ?? null });
  });

  r.get("/auth/me", (req, res) => {
    if (!req.user) throw new AppError("unauthenticated", "Not signed in.", 401);
    res.set("Cache-Control", "no-store").json({ user: req.user });
  });

  r.get("/auth/invitations/:token", route({ params: TokenParamSchema }, ({ params }) => auth.describeInvitation(params.token)));

  r.post("/auth/invitations/:token/accept", perIp, async (req, res) => {
    const { token } = TokenParamSchema.parse(req.params);
    const input = AcceptInvitationInputSchema.parse(req.body);
    const user = await auth.acceptInvitation(token, input, actorOf(req));
    await logIn(req, user);
    await auth.recordSignIn(user, actorOf(req));
    res.status(201).json({ user });
  });

  r.post(
    "/auth/password-reset",
    resetRequestsPerIp,
    route({ body: ResetRequestInputSchema, status: 202 }, async ({ body, actor }) => {
      await auth.requestPasswordReset(body.email, actor);
      return { ok: true, message: "If that address has an account, a reset link is on its way." };
    }),
  );

  // Asked by the reset page before it shows the form; the link stays unspent.
  r.get(
    "/auth/password-reset/:token",
    route({ params: TokenParamSchema }, async ({ params, res }) => {
      await auth.checkPasswordReset(params.token);
      res.set("Cache-Control", "no-store");
      return { ok: true };
    }),
  );

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
