import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { fileURLToPath } from "node:url";
import express, { type Express } from "express";
import session from "express-session";
import helmet from "helmet";
import { pinoHttp } from "pino-http";
import type { Config } from "./config.ts";
import type { Logger } from "./core/logger.ts";
import { apiNotFound, errorHandler } from "./core/error-handler.ts";
import { csrfProtection } from "./core/csrf.ts";
import type { Db } from "./db/knex.ts";
import { createAuditService } from "./audit/audit.service.ts";
import { auditRouter } from "./audit/audit.router.ts";
import { createAuthService } from "./auth/auth.service.ts";
import { authRouter } from "./auth/auth.router.ts";
import { createPassport } from "./auth/passport.ts";
import { SessionRepository } from "./auth/session.repository.ts";
import { healthRouter } from "./health/health.router.ts";
import type { Mailer } from "./mail/mail.service.ts";
import { createOutboxService } from "./mail/mail.service.ts";
import { outboxRouter } from "./mail/mail.router.ts";
import { createProjectsService } from "./projects/projects.service.ts";
import { projectsRouter } from "./projects/projects.router.ts";
import { RateLimitRepository } from "./rate-limit/rate-limit.repository.ts";
import { createUsersService } from "./users/users.service.ts";
import { usersRouter } from "./users/users.router.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

export interface AppDeps {
  db: Db;
  config: Config;
  logger: Logger;
  mailer: Mailer;
  /** Where the built client lives (vite build output). */
  clientDir?: string;
}

export interface PlumblineApp {
  app: Express;
  close(): void;
  /** Rate-limit counters, exposed so tests can start from zero. */
  rateLimits: { ip: RateLimitRepository; account: RateLimitRepository };
}

/** Builds the Express app. No listening and no side effects at import. */
export function createApp(deps: AppDeps): PlumblineApp {
  const { db, config, logger, mailer } = deps;
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", config.TRUST_PROXY);
  app.set("etag", "strong");

  const idleMs = config.SESSION_IDLE_MINUTES * 60_000;
  const absoluteMs = config.SESSION_ABSOLUTE_HOURS * 3_600_000;
  const sessions = new SessionRepository(db, idleMs);
  sessions.startSweeping();
  const audit = createAuditService(db);
  const auth = createAuthService({ db, audit, mailer, sessions, publicUrl: config.PUBLIC_URL });
  const users = createUsersService({ db, audit, auth, mailer, publicUrl: config.PUBLIC_URL });
  const outbox = createOutboxService(db);
  const projects = createProjectsService(db);
  const passport = createPassport(auth);
  const rateLimits = { ip: new RateLimitRepository(db, "login-ip"), account: new RateLimitRepository(db, "login-account") };

  app.use(
    pinoHttp({
      logger,
      genReqId: (req, res) => {
        const id = (req.headers["x-request-id"] as string | undefined)?.slice(0, 64) || randomUUID();
        res.setHeader("X-Request-Id", id);
        return id;
      },
      autoLogging: { ignore: (req) => !req.url?.startsWith("/api") },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? "error" : res.statusCode >= 400 ? "info" : "debug"),
    }),
  );
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          "default-src": ["'self'"],
          "script-src": ["'self'"],
          "style-src": ["'self'", "'unsafe-inline'"],
          "img-src": ["'self'", "data:", "blob:"],
          "font-src": ["'self'", "data:"],
          "connect-src": ["'self'"],
          "object-src": ["'none'"],
          "frame-ancestors": ["'none'"],
          "form-action": ["'self'"],
          "upgrade-insecure-requests": config.PUBLIC_URL.startsWith("https:") ? [] : null,
        },
      },
      strictTransportSecurity: config.PUBLIC_URL.startsWith("https:"),
    }),
  );
  app.use(express.json({ limit: config.BODY_LIMIT }));
  app.use(express.urlencoded({ extended: false, limit: config.BODY_LIMIT }));
  app.use(
    session({
      name: "plumbline.sid",
      secret: config.SESSION_SECRET,
      store: sessions,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: "lax",
        secure: config.COOKIE_SECURE === "auto" ? "auto" : config.COOKIE_SECURE === "true",
        maxAge: idleMs,
      },
    }),
  );
  app.use(passport.initialize());
  app.use(passport.session());
  // The absolute lifetime: however active, a sign-in ends this long after it began.
  app.use((req, _res, next) => {
    const started = req.session?.signedInAt;
    if (req.user && started && Date.now() - started > absoluteMs) {
      req.user = undefined;
      return req.session.destroy(() => next());
    }
    next();
  });

  const api = express.Router();
  api.use(csrfProtection());
  api.use(healthRouter(db));
  api.use(
    authRouter({
      auth,
      passport,
      limits: {
        perIp: config.LOGIN_LIMIT_PER_IP,
        perAccount: config.LOGIN_LIMIT_PER_ACCOUNT,
        windowMs: config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000,
      },
      stores: rateLimits,
    }),
  );
  api.use(usersRouter(users));
  api.use(auditRouter(audit));
  api.use(outboxRouter(outbox, config.mailMode));
  api.use(projectsRouter(projects));
  api.use(apiNotFound);
  app.use("/api", api);

  if (config.SERVE_CLIENT) mountClient(app, deps.clientDir ?? path.join(ROOT, "dist"));
  app.use(errorHandler);

  return {
    app,
    rateLimits,
    close: () => sessions.stopSweeping(),
  };
}

const FALLBACK_SHELL = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Plumbline</title></head><body><div id="root">The client has not been built yet: run npm start or npx vite build.</div></body></html>`;

/** Static assets with long caching, and the HTML shell (200) for every page path. */
function mountClient(app: Express, dir: string): void {
  const indexPath = path.join(dir, "index.html");
  app.use("/assets", express.static(path.join(dir, "assets"), { immutable: true, maxAge: "365d", index: false, fallthrough: false }));
  app.use(express.static(dir, { index: false, maxAge: "1h" }));
  let shell: string | null = null;
  app.get("/{*splat}", (_req, res) => {
    if (shell === null) shell = existsSync(indexPath) ? readFileSync(indexPath, "utf8") : FALLBACK_SHELL;
    res.set("Cache-Control", "no-cache").type("html").send(shell);
  });
}
