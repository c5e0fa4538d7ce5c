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
import { compressAnswers } from "./core/compression.ts";
import { precompressedAssets } from "./core/precompressed-assets.ts";
import { transportSecurity } from "./core/transport-security.ts";
import type { Db } from "./db/knex.ts";
import { auditRouter } from "./audit/audit.router.ts";
import { authRouter } from "./auth/auth.router.ts";
import { createPassport } from "./auth/passport.ts";
import { healthRouter } from "./health/health.router.ts";
import { outboxRouter } from "./mail/mail.router.ts";
import { projectsRouter } from "./projects/projects.router.ts";
import { programmeRouter } from "./programme/programme.router.ts";
import { facilityRouter } from "./facility/facility.router.ts";
import { mediaFilesRouter, mediaRouter } from "./media/media.router.ts";
import { usersRouter } from "./users/users.router.ts";
import { enquiriesRouter } from "./enquiries/enquiries.router.ts";
import { mailEventsRouter, oneClickRouter, subscribersRouter } from "./subscribers/subscribers.router.ts";
import { postsRouter } from "./posts/posts.router.ts";
import { storiesRouter, storyPagesRouter } from "./stories/stories.router.ts";
import { pressKitFilesRouter, pressKitsRouter } from "./press-kits/press-kits.router.ts";
import { injectHead, type FeedsService } from "./feeds/feeds.service.ts";
import { feedsRouter } from "./feeds/feeds.router.ts";
import { injectHints, moduleHintsFor, readManifest } from "./feeds/preload-hints.ts";
import { digestsRouter } from "./digests/digests.router.ts";
import { risksRouter } from "./risks/risks.router.ts";
import { decisionsRouter } from "./decisions/decisions.router.ts";
import { budgetRouter } from "./budget/budget.router.ts";
import { documentsRouter } from "./documents/documents.router.ts";
import { calendarFeedsRouter, calendarFilesRouter } from "./calendars/calendars.router.ts";
import { reportsRouter } from "./reports/reports.router.ts";
import { searchRouter } from "./search/search.router.ts";
import { fillShell, pageRenderer } from "./ssr/ssr.render.ts";
import { officeRouter } from "./office/office.router.ts";
import { sitePlanRouter } from "./site-plan/site-plan.router.ts";
import { writingHelpRouter } from "./writing-help/writing-help.router.ts";
import { reviewLinksRouter, withoutReviewTokens } from "./review-links/review-links.router.ts";
import type { Services } from "./services.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

export interface HttpAppDeps {
  db: Db;
  config: Config;
  logger: Logger;
  /** Where the built client lives (vite build output). */
  clientDir?: string;
}

/**
 * The web role: middleware and routers over the services (server/services.ts). It starts no
 * background work and does not listen: server/index.ts (or a test) does.
 */
export function createHttpApp(services: Services, deps: HttpAppDeps): Express {
  const { db, config, logger } = deps;
  const { publicCache, sessions, auth, users, audit, outbox, projects, projectHero, programme, facility, media, mediaUploads, rateLimits, signInDelays, enquiries, subscribers, posts, stories, site, digests } = services;
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", config.TRUST_PROXY);
  app.set("etag", "strong");
  // Mounted before the cache policy and the public cache: they see (and the public cache keeps)
  // the plain bytes, and every answer leaves compressed, their replays included.
  app.use(compressAnswers());
  // Then the cache policy, so that every answer (the public cache's copies and errors too) leaves under one cache policy.
  app.use(cachePolicy());
  app.use(transportSecurity({ publicUrl: config.PUBLIC_URL }));
  app.use(publicCache.middleware);

  const idleMs = config.SESSION_IDLE_MINUTES * 60_000;
  const absoluteMs = config.SESSION_ABSOLUTE_HOURS * 3_600_000;
  const passport = createPassport(auth);

  app.use(
    pinoHttp({
      logger,
      genReqId: (req, res) => {
        const id = (req.headers["x-request-id"] as string | undefined)?.slice(0, 64) || randomUUID();
        res.setHeader("X-Request-Id", id);
        return id;
      },
      autoLogging: { ignore: (req) => !req.url?.startsWith("/api") },
      // A review link's token is its reader's key: request lines never carry it (decision 060).
      serializers: { req: withoutReviewTokens },
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
      stores: { ip: rateLimits.ip, resetRequests: rateLimits.resetRequests },
      delays: signInDelays,
    }),
  );
  api.use(usersRouter(users));
  api.use(auditRouter(audit));
  api.use(outboxRouter(outbox, config.mailMode));
  api.use(projectsRouter(projects, projectHero));
  api.use(
    subscribersRouter({
      subscribers,
      limits: { perIp: config.SUBSCRIBE_LIMIT_PER_IP, perAddress: config.SUBSCRIBE_LIMIT_PER_ADDRESS, windowMs: config.SUBSCRIBE_LIMIT_WINDOW_MINUTES * 60_000 },
      stores: { ip: rateLimits.subscribeIp, address: rateLimits.subscribeAddress },
    }),
  );
  api.use(mailEventsRouter(subscribers));
  api.use(
    enquiriesRouter({
      enquiries,
      limit: { perIp: config.ENQUIRY_LIMIT_PER_IP, windowMs: config.ENQUIRY_LIMIT_WINDOW_MINUTES * 60_000 },
      store: rateLimits.enquiryIp,
    }),
  );
  api.use(programmeRouter(programme));
  api.use(facilityRouter(facility));
  api.use(sitePlanRouter(services.sitePlan));
  api.use(mediaRouter(media, mediaUploads));
  api.use(postsRouter(posts));
  api.use(storiesRouter(stories));
  api.use(pressKitsRouter(services.pressKits));
  api.use(digestsRouter(digests));
  api.use(risksRouter(services.risks));
  api.use(decisionsRouter(services.decisions));
  api.use(budgetRouter(services.budget));
  api.use(documentsRouter(services.documents, mediaUploads));
  api.use(calendarFeedsRouter(services.calendars));
  api.use(reportsRouter(services.reports));
  api.use(searchRouter(services.search));
  api.use(officeRouter(services.office));
  api.use(writingHelpRouter(services.writingHelp));
  api.use(reviewLinksRouter(services.reviewLinks));
  api.use(apiNotFound);
  app.use("/api", api);
  // RFC 8058 one-click unsubscribe (POST); a GET of the same path is the client's page.
  app.use(oneClickRouter(subscribers));
  // Derivatives, with the audience check on every request (or a signed, expiring link's).
  app.use(mediaFilesRouter(media));
  // The Atom feeds, sitemap.xml and robots.txt (before the client's static files).
  app.use(feedsRouter(site));
  // The milestone calendars (.ics), public and personal (before the client's pages).
  app.use(calendarFilesRouter(services.calendars));
  // The public press kit download (a zip; before the client's pages), limited per network address.
  app.use(pressKitFilesRouter({ pressKits: services.pressKits, limit: { perIp: config.PRESS_KIT_LIMIT_PER_IP, windowMs: config.PRESS_KIT_LIMIT_WINDOW_MINUTES * 60_000 }, store: rateLimits.pressKitIp }));
  // An old address of a photo story answers 301 to its current page (before the HTML shell).
  app.use(storyPagesRouter(stories));

  if (config.SERVE_CLIENT) mountClient(app, deps.clientDir ?? path.join(ROOT, "dist"), site, config.SERVER_RENDER ? logger : null);
  app.use(errorHandler);

  return app;
}

const FALLBACK_SHELL = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Plumbline</title></head><body><div id="root">The client has not been built yet: run npm start or npx vite build.</div></body></html>`;

/**
 * Static assets with long caching, and the HTML shell (200) for every page path; a visitor's
 * public page comes rendered in it when `renderWith` (the logger for its failures) is given.
 */
function mountClient(app: Express, dir: string, site: FeedsService, renderWith: Logger | null): void {
  const indexPath = path.join(dir, "index.html");
  const renderer = renderWith ? pageRenderer(dir, renderWith) : null;
  app.use("/assets", precompressedAssets(path.join(dir, "assets")), express.static(path.join(dir, "assets"), { immutable: true, maxAge: "365d", index: false, fallthrough: false }));
  app.use(express.static(dir, { index: false, maxAge: "1h" }));
  let shell: string | null = null;
  // Read once with the shell: the build that wrote one wrote the other.
  let manifest: ReturnType<typeof readManifest> = null;
  app.get("/{*splat}", async (req, res) => {
    if (shell === null) {
      shell = existsSync(indexPath) ? readFileSync(indexPath, "utf8") : FALLBACK_SHELL;
      manifest = readManifest(dir);
    }
    // Link previews read the HTML without running the app: public pages carry their Open Graph tags.
    const page = await site.pageFor(req.path);
    if (page && "redirect" in page) return res.redirect(301, page.redirect);
    // The page's own chunks start with the HTML instead of after the entry script.
    const html = injectHints(page ? injectHead(shell, page.head) : shell, moduleHintsFor(manifest, req.path));
    // A reviewer's page shows a draft: no search engine keeps it, whatever a crawler makes of the page.
    if (req.path.startsWith("/review/")) res.set("X-Robots-Tag", "noindex");
    const rendered = await renderer?.render(req);
    res.set("Cache-Control", "no-cache").type("html").send(rendered ? fillShell(html, rendered) : html);
  });
}
