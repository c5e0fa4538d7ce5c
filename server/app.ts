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
import { createCsrf } from "./core/csrf.ts";
import { cachePolicy } from "./core/cache-policy.ts";
import { transportSecurity } from "./core/transport-security.ts";
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
import { createProgrammeService } from "./programme/programme.service.ts";
import { programmeRouter } from "./programme/programme.router.ts";
import { createMediaService, type MediaService } from "./media/media.service.ts";
import { createMediaJobs, type MediaJobs } from "./media/media.jobs.ts";
import { mediaFilesRouter, mediaRouter } from "./media/media.router.ts";
import { createLocalDiskStorage, createUploadArea, type MediaStorage, type UploadArea } from "./media/media.storage.ts";
import { RateLimitRepository } from "./rate-limit/rate-limit.repository.ts";
import { createSignInDelays } from "./rate-limit/sign-in-delays.service.ts";
import { createUsersService } from "./users/users.service.ts";
import { usersRouter } from "./users/users.router.ts";
import { createEnquiriesService } from "./enquiries/enquiries.service.ts";
import { enquiriesRouter } from "./enquiries/enquiries.router.ts";
import { createSubscribersService, type SubscribersService } from "./subscribers/subscribers.service.ts";
import { mailEventsRouter, oneClickRouter, subscribersRouter } from "./subscribers/subscribers.router.ts";
import { createPostsService, type PostsService } from "./posts/posts.service.ts";
import { postsRouter } from "./posts/posts.router.ts";
import { createPublishingService } from "./publishing/publishing.service.ts";
import { createPublishingTicker, type PublishingTicker } from "./publishing/publishing.scheduler.ts";
import { createStoriesService, type StoriesService } from "./stories/stories.service.ts";
import { storiesRouter, storyPagesRouter } from "./stories/stories.router.ts";
import { createSiteService, injectHead, type SiteService } from "./site/site.service.ts";
import { siteRouter } from "./site/site.router.ts";
import { createPublicCache } from "./site/public-cache.ts";
import { createDigestsService, type DigestsService } from "./digests/digests.service.ts";
import { createDigestJobs, type DigestJobs } from "./digests/digests.jobs.ts";
import { createDigestScheduler, type DigestScheduler } from "./digests/digests.schedule.ts";
import { digestsRouter } from "./digests/digests.router.ts";

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
  /** The media library's service (other modules' services take it too). */
  media: MediaService;
  /** The derivative worker: server/index.ts starts and stops it; tests drain it. */
  mediaJobs: MediaJobs;
  mediaStorage: MediaStorage;
  mediaUploads: UploadArea;
  close(): void;
  /** Rate-limit counters, exposed so tests can start from zero. */
  rateLimits: { ip: RateLimitRepository; resetRequests: RateLimitRepository };
  /** Exposed so tests can run the unconfirmed-address sweep with a chosen `now`, and digests can use it. */
  subscribers: SubscribersService;
  /** Updates; tests run scheduled publication with a chosen `now` (posts.publishDue). */
  posts: PostsService;
  /** Photo stories; tests run their scheduled publication with a chosen `now` (stories.publishDue). */
  stories: StoriesService;
  /** Scheduled publication of updates and photo stories: server/index.ts starts and stops it. */
  publishing: PublishingTicker;
  /** Digests: runs, previews and web copies. */
  digests: DigestsService;
  /** Digest sending: server/index.ts starts and stops it; tests drain it. */
  digestJobs: DigestJobs;
  /** Weekly, monthly and as-it-happens runs: server/index.ts starts and stops it. */
  digestSchedule: DigestScheduler;
}

/** Builds the Express app. No listening and no side effects at import. */
export function createApp(deps: AppDeps): PlumblineApp {
  const { db, config, logger, mailer } = deps;
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", config.TRUST_PROXY);
  app.set("etag", "strong");
  // Visitors' answers for the public pages, kept a few seconds (production; tests see every write at once).
  const publicCache = createPublicCache({ ttlMs: 5_000, enabled: config.NODE_ENV === "production" });
  // First of all, so that every answer (the public cache's copies and errors too) leaves under one cache policy.
  app.use(cachePolicy());
  app.use(transportSecurity({ publicUrl: config.PUBLIC_URL }));
  app.use(publicCache.middleware);

  const idleMs = config.SESSION_IDLE_MINUTES * 60_000;
  const absoluteMs = config.SESSION_ABSOLUTE_HOURS * 3_600_000;
  const sessions = new SessionRepository(db, idleMs);
  sessions.startSweeping();
  const audit = createAuditService(db);
  const auth = createAuthService({ db, audit, mailer, sessions, logger, publicUrl: config.PUBLIC_URL });
  const users = createUsersService({ db, audit, auth, mailer, publicUrl: config.PUBLIC_URL });
  const outbox = createOutboxService(db);
  const projects = createProjectsService(db);
  const programme = createProgrammeService({
    db,
    projects,
    audit,
    // Posts and media read the programme, so they are built below; this runs only when a milestone is to be deleted.
    references: async (milestoneId) => [
      ...(await posts.linkingMilestone(milestoneId)).map((p) => ({ kind: "update" as const, id: p.id, label: `“${p.title}”` })),
      ...(await media.taggedWithMilestone(milestoneId)).map((id) => ({ kind: "photo" as const, id, label: `#${id}` })),
    ],
  });
  const mediaStorage = createLocalDiskStorage(config.MEDIA_DIR);
  const mediaUploads = createUploadArea(config.MEDIA_DIR);
  const media = createMediaService({
    db,
    storage: mediaStorage,
    uploads: mediaUploads,
    projects,
    limits: { maxFileBytes: Math.round(config.MEDIA_MAX_FILE_MB * 1024 * 1024), maxFiles: config.MEDIA_MAX_FILES, maxPixels: config.MEDIA_MAX_PIXELS },
    // Signed derivative links (investor images in e-mail) use a key derived from it under their own label.
    tokenSecret: config.TOKEN_SECRET,
  });
  // Building the app runs no jobs: server/index.ts starts the worker (tests drain it).
  const mediaJobs = createMediaJobs({ media, storage: mediaStorage, uploads: mediaUploads, logger, workers: config.MEDIA_WORKERS, maxPixels: config.MEDIA_MAX_PIXELS });
  const passport = createPassport(auth);
  const rateLimits = { ip: new RateLimitRepository(db, "login-ip"), resetRequests: new RateLimitRepository(db, "reset-ip") };
  const signInDelays = createSignInDelays({ db, freeFailures: config.LOGIN_LIMIT_PER_ACCOUNT, forgetAfterMs: config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000 });
  const enquiries = createEnquiriesService({ db, mailer, logger, projects, users, publicUrl: config.PUBLIC_URL });
  const subscribers = createSubscribersService({
    db,
    mailer,
    logger,
    projects,
    programme,
    enquiries,
    publicUrl: config.PUBLIC_URL,
    tokenSecret: config.TOKEN_SECRET,
    unsubscribeMailto: config.MAIL_UNSUBSCRIBE_MAILTO ?? null,
    webhookSecret: config.MAIL_WEBHOOK_SECRET ?? null,
  });
  subscribers.startWorkers();
  const publishingWorkflow = createPublishingService({ db });
  const posts = createPostsService({ db, projects, programme, media, publishing: publishingWorkflow, onChange: publicCache.clear });
  const stories = createStoriesService({ db, projects, media, publishing: publishingWorkflow, onChange: publicCache.clear });
  const site = createSiteService({ projects, posts, stories, publicUrl: config.PUBLIC_URL });
  // Building the app publishes nothing: server/index.ts starts the ticker.
  const publishing = createPublishingTicker({ posts, stories }, logger);
  const digests = createDigestsService({
    db,
    logger,
    mailer,
    projects,
    programme,
    media,
    posts,
    subscribers,
    publicUrl: config.PUBLIC_URL,
    tokenSecret: config.TOKEN_SECRET,
    unsubscribeMailto: config.MAIL_UNSUBSCRIBE_MAILTO ?? null,
  });
  // Building the app sends no digests: server/index.ts (or digest-worker.ts) starts the workers.
  const digestJobs = createDigestJobs({ db, mailer, logger, digests, subscribers }, { ratePerSecond: config.DIGEST_SEND_RATE_PER_SECOND, leaseMs: config.DIGEST_LEASE_SECONDS * 1000 });
  const digestSchedule = createDigestScheduler({ projects, digests, logger });

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
          // PUBLIC_URL's origin too: e-mail previews (digests, outbox) carry absolute image URLs.
          "img-src": ["'self'", "data:", "blob:", new URL(config.PUBLIC_URL).origin],
          "font-src": ["'self'", "data:"],
          "connect-src": ["'self'"],
          "object-src": ["'none'"],
          "frame-ancestors": ["'none'"],
          "form-action": ["'self'"],
          "upgrade-insecure-requests": config.PUBLIC_URL.startsWith("https:") ? [] : null,
        },
      },
      // Sent by transportSecurity, per request: only over TLS.
      strictTransportSecurity: false,
    }),
  );
  // The mail-events webhook is signed over its exact bytes: keep them raw (JSON parsing skips a parsed body).
  app.use("/api/webhooks/mail-events", express.raw({ type: () => true, limit: config.BODY_LIMIT }));
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
  const csrf = createCsrf({ secret: config.SESSION_SECRET });
  api.use(csrf.protect([/^\/webhooks\/mail-events$/]));
  api.use(healthRouter(db));
  api.use(
    authRouter({
      auth,
      passport,
      csrf,
      limits: {
        perIp: config.LOGIN_LIMIT_PER_IP,
        windowMs: config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000,
      },
      stores: rateLimits,
      delays: signInDelays,
    }),
  );
  api.use(usersRouter(users));
  api.use(auditRouter(audit));
  api.use(outboxRouter(outbox, config.mailMode));
  api.use(projectsRouter(projects));
  api.use(
    subscribersRouter({
      subscribers,
      limits: { perIp: config.SUBSCRIBE_LIMIT_PER_IP, perAddress: config.SUBSCRIBE_LIMIT_PER_ADDRESS, windowMs: config.SUBSCRIBE_LIMIT_WINDOW_MINUTES * 60_000 },
      stores: { ip: new RateLimitRepository(db, "subscribe-ip"), address: new RateLimitRepository(db, "subscribe-address") },
    }),
  );
  api.use(mailEventsRouter(subscribers));
  api.use(
    enquiriesRouter({
      enquiries,
      limit: { perIp: config.ENQUIRY_LIMIT_PER_IP, windowMs: config.ENQUIRY_LIMIT_WINDOW_MINUTES * 60_000 },
      store: new RateLimitRepository(db, "enquiry-ip"),
    }),
  );
  api.use(programmeRouter(programme));
  api.use(mediaRouter(media, mediaUploads));
  api.use(postsRouter(posts));
  api.use(storiesRouter(stories));
  api.use(digestsRouter(digests));
  api.use(apiNotFound);
  app.use("/api", api);
  // RFC 8058 one-click unsubscribe (POST); a GET of the same path is the client's page.
  app.use(oneClickRouter(subscribers));
  // Derivatives, with the audience check on every request (or a signed, expiring link's).
  app.use(mediaFilesRouter(media));
  // The Atom feeds, sitemap.xml and robots.txt (before the client's static files).
  app.use(siteRouter(site));
  // An old address of a photo story answers 301 to its current page (before the HTML shell).
  app.use(storyPagesRouter(stories));

  if (config.SERVE_CLIENT) mountClient(app, deps.clientDir ?? path.join(ROOT, "dist"), site);
  app.use(errorHandler);

  return {
    app,
    media,
    mediaJobs,
    mediaStorage,
    mediaUploads,
    rateLimits,
    subscribers,
    posts,
    stories,
    publishing,
    digests,
    digestJobs,
    digestSchedule,
    close: () => {
      sessions.stopSweeping();
      subscribers.stopWorkers();
      digestSchedule.stop();
    },
  };
}

const FALLBACK_SHELL = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Plumbline</title></head><body><div id="root">The client has not been built yet: run npm start or npx vite build.</div></body></html>`;

/** Static assets with long caching, and the HTML shell (200) for every page path. */
function mountClient(app: Express, dir: string, site: SiteService): void {
  const indexPath = path.join(dir, "index.html");
  app.use("/assets", express.static(path.join(dir, "assets"), { immutable: true, maxAge: "365d", index: false, fallthrough: false }));
  app.use(express.static(dir, { index: false, maxAge: "1h" }));
  let shell: string | null = null;
  app.get("/{*splat}", async (req, res) => {
    if (shell === null) shell = existsSync(indexPath) ? readFileSync(indexPath, "utf8") : FALLBACK_SHELL;
    // Link previews read the HTML without running the app: public pages carry their Open Graph tags.
    const page = await site.pageFor(req.path);
    if (page && "redirect" in page) return res.redirect(301, page.redirect);
    res.set("Cache-Control", "no-cache").type("html").send(page ? injectHead(shell, page.head) : shell);
  });
}
