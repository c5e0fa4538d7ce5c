import type { Config } from "./config.ts";
import type { Logger } from "./core/logger.ts";
import type { Db } from "./db/knex.ts";
import { createAuditService } from "./audit/audit.service.ts";
import { createAuthService } from "./auth/auth.service.ts";
import { createSessionStore } from "./auth/session.service.ts";
import type { Mailer } from "./mail/mail.service.ts";
import { createOutboxService } from "./mail/mail.service.ts";
import { createProjectsService } from "./projects/projects.service.ts";
import { createProjectHero } from "./projects/projects.hero.ts";
import { PostListQuerySchema } from "#shared/schemas/posts.ts";
import { createProgrammeService } from "./programme/programme.service.ts";
import { createFacilityService } from "./facility/facility.service.ts";
import { createRisksService } from "./risks/risks.service.ts";
import { createDecisionsService } from "./decisions/decisions.service.ts";
import { createBudgetService } from "./budget/budget.service.ts";
import { createMediaService } from "./media/media.service.ts";
import { createUploadArea } from "./media/media.storage.ts";
import { createMediaStorage } from "./media/media.storage-choice.ts";
import { createRateLimitStore } from "./rate-limit/rate-limit.service.ts";
import { createSignInDelays } from "./rate-limit/sign-in-delays.service.ts";
import { createAccountsService } from "./users/users.accounts.ts";
import { createUsersService } from "./users/users.service.ts";
import { createEnquiriesService } from "./enquiries/enquiries.service.ts";
import { createSubscribersService } from "./subscribers/subscribers.service.ts";
import { createPostsService } from "./posts/posts.service.ts";
import { createPublishingService } from "./publishing/publishing.service.ts";
import { createStoriesService } from "./stories/stories.service.ts";
import { createReviewLinksService } from "./review-links/review-links.service.ts";
import { createPressKitsService } from "./press-kits/press-kits.service.ts";
import { createProjectPressTerms } from "./projects/projects.press-terms.ts";
import { createFeedsService } from "./feeds/feeds.service.ts";
import { createPublicCache } from "./feeds/public-cache.ts";
import { createDigestsService } from "./digests/digests.service.ts";
import { createDocumentsService } from "./documents/documents.service.ts";
import { createCalendarsService } from "./calendars/calendars.service.ts";
import { createReportsService } from "./reports/reports.service.ts";
import { createSearchService } from "./search/search.service.ts";
import { createOfficeService } from "./office/office.service.ts";
import { createSitePlanService } from "./site-plan/site-plan.service.ts";
import { createWritingHelpService } from "./writing-help/writing-help.service.ts";

export interface ServiceDeps {
  db: Db;
  config: Config;
  logger: Logger;
  mailer: Mailer;
}

/**
 * Builds every module's service from the configuration, the database, the logger and the
 * mailer: the one place that knows how they depend on each other. Both roles start from it
 * (server/app.ts serves it over HTTP, server/workers.ts runs its background work), so it
 * starts no timer and opens no port.
 */
export function createServices(deps: ServiceDeps) {
  const { db, config, logger, mailer } = deps;
  // Visitors' answers for the public pages, kept a few seconds (production; tests see every write at once).
  const publicCache = createPublicCache({ ttlMs: 5_000, enabled: config.NODE_ENV === "production" });
  const sessions = createSessionStore(db, config.SESSION_IDLE_MINUTES * 60_000);
  const audit = createAuditService(db);
  // What other modules read of accounts (sign-in, resets, people's names): one, shared, as it keeps no state.
  const accounts = createAccountsService({ db });
  const auth = createAuthService({ db, audit, accounts, mailer, sessions, logger, publicUrl: config.PUBLIC_URL });
  const users = createUsersService({ db, audit, auth, mailer, publicUrl: config.PUBLIC_URL });
  const outbox = createOutboxService(db);
  const projects = createProjectsService(db);
  const programme = createProgrammeService({
    db,
    projects,
    accounts,
    audit,
    // Posts, media and the facility read the programme, so they are built below; this runs only when a milestone is to be deleted.
    references: async (milestoneId) => [
      ...(await posts.linkingMilestone(milestoneId)).map((p) => ({ kind: "update" as const, id: p.id, label: `“${p.title}”` })),
      ...(await media.taggedWithMilestone(milestoneId)).map((id) => ({ kind: "photo" as const, id, label: `#${id}` })),
      ...(await facility.milestoneLinks(milestoneId)).map((l) => ({ kind: l.kind, id: l.id, label: l.name })),
    ],
  });
  // Capacity blocks, plant and site features: readiness reads the programme's milestone dates.
  const facility = createFacilityService({ db, projects, programme, accounts, audit });
  // The site plan: its areas' statuses come from the programme's milestones in them.
  const sitePlan = createSitePlanService({ db, projects, programme, audit });
  // The investor record's risks and issues register, and decisions needed (which link risks).
  const risks = createRisksService({
    db,
    projects,
    programme,
    facility,
    accounts,
    audit,
    // The budget's remaining contingency beside the risks' expected exposure (the budget is built just below; asked only at request time).
    contingencyRemaining: (projectId) => budget.contingencyRemaining(projectId),
    // A risk a decision or a budget change links is on record: not deleted (both are built just below; asked only at request time).
    references: async (riskId) => [...(await decisions.linkingRisk(riskId)), ...(await budget.riskReferences(riskId))],
  });
  const decisions = createDecisionsService({
    db,
    projects,
    programme,
    risks,
    accounts,
    audit,
    // Documents attached to a decision (the library is built below; asked only at request time).
    documents: {
      documentIdsOf: (projectId, ids) => documents.documentIdsOf(projectId, ids),
      documentsNamed: (projectId, ids, actor) => documents.documentsNamed(projectId, ids, actor),
    },
  });
  // Budget changes and the cost position: the original budget, PV, EV and AC from the programme's health.
  const budget = createBudgetService({ db, projects, programme, accounts, risks, audit });
  // The local disk or an S3-compatible bucket (MEDIA_STORE); upload temporaries stay on the local disk either way.
  const mediaStorage = createMediaStorage(config);
  const mediaUploads = createUploadArea(config.MEDIA_DIR);
  const media = createMediaService({
    db,
    storage: mediaStorage,
    uploads: mediaUploads,
    projects,
    programme,
    accounts,
    limits: { maxFileBytes: Math.round(config.MEDIA_MAX_FILE_MB * 1024 * 1024), maxFiles: config.MEDIA_MAX_FILES, maxPixels: config.MEDIA_MAX_PIXELS },
    // Photos may be tagged with the facility's capacity blocks and plant systems.
    facility,
    // Signed derivative links (investor images in e-mail) use a key derived from it under their own label.
    tokenSecret: config.TOKEN_SECRET,
  });
  // The document library: files kept privately in the media storage, each investor's copy stamped for them.
  const documents = createDocumentsService({
    db,
    projects,
    accounts,
    audit,
    organisations: {
      ofUser: (userId) => users.organisationOf(userId),
      // Organisations are few: one read of them all names any of them.
      namesOf: async (ids) => new Map((await users.listOrganisations()).filter((o) => ids.includes(o.id)).map((o) => [o.id, o.name])),
    },
    storage: mediaStorage,
    uploads: mediaUploads,
    limits: { maxFileBytes: Math.round(config.DOCUMENT_MAX_FILE_MB * 1024 * 1024), maxPages: config.DOCUMENT_MAX_PAGES },
  });
  const rateLimits = {
    ip: createRateLimitStore(db, "login-ip"),
    resetRequests: createRateLimitStore(db, "reset-ip"),
    subscribeIp: createRateLimitStore(db, "subscribe-ip"),
    subscribeAddress: createRateLimitStore(db, "subscribe-address"),
    enquiryIp: createRateLimitStore(db, "enquiry-ip"),
    pressKitIp: createRateLimitStore(db, "press-kit-ip"),
  };
  const signInDelays = createSignInDelays({ db, freeFailures: config.LOGIN_LIMIT_PER_ACCOUNT, forgetAfterMs: config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000 });
  const enquiries = createEnquiriesService({ db, mailer, logger, projects, users, accounts, publicUrl: config.PUBLIC_URL });
  const subscribers = createSubscribersService({
    db,
    mailer,
    logger,
    projects,
    programme,
    enquiries,
    accounts,
    publicUrl: config.PUBLIC_URL,
    tokenSecret: config.TOKEN_SECRET,
    unsubscribeMailto: config.MAIL_UNSUBSCRIBE_MAILTO ?? null,
    webhookSecret: config.MAIL_WEBHOOK_SECRET ?? null,
  });
  const publishingWorkflow = createPublishingService({ db });
  const posts = createPostsService({ db, projects, programme, media, publishing: publishingWorkflow, facility, onChange: publicCache.clear });
  const stories = createStoriesService({ db, projects, media, publishing: publishingWorkflow, onChange: publicCache.clear });
  // Review links: an outside reviewer reads one revision of a post or story without an account (decision 060).
  const reviewLinks = createReviewLinksService({ db, logger, posts, stories, media, accounts, audit, mailer, publicUrl: config.PUBLIC_URL, tokenSecret: config.TOKEN_SECRET });
  // Press kits (decision 062): photos, a story or a gallery filter as one streamed zip, with the project's usage terms.
  const pressKits = createPressKitsService({ projects, pressTerms: createProjectPressTerms({ db, projects, audit }), media, stories, audit });
  // The hero photograph staff choose, and the home page's builds (decision 055): what everyone sees.
  const projectHero = createProjectHero({
    db,
    projects,
    audit,
    media,
    percentComplete: async (slug) => (await programme.health(slug, {}, "public")).percentComplete,
    publicBlocks: async (slug) => (await facility.facility(slug, {}, "public")).blocks,
    latestCover: async (slug) => (await posts.list(slug, PostListQuerySchema.parse({}), { user: null, ip: null })).items.find((p) => p.cover)?.cover ?? null,
    onChange: publicCache.clear,
  });
  const site = createFeedsService({ projects, posts, stories, facility, heroes: projectHero, publicUrl: config.PUBLIC_URL });
  const digests = createDigestsService({
    db,
    logger,
    mailer,
    projects,
    programme,
    media,
    posts,
    facility,
    // The investor record's moves in a window, for investor digests (decision 041); the currency names their money.
    record: {
      risks,
      decisions,
      budget,
      documents,
      currency: async (projectId) => (await projects.getById(projectId)).currency,
    },
    subscribers,
    publicUrl: config.PUBLIC_URL,
    tokenSecret: config.TOKEN_SECRET,
    unsubscribeMailto: config.MAIL_UNSUBSCRIBE_MAILTO ?? null,
  });

  // Search of a project's pages and facility, as each audience may see them (decision 048).
  const search = createSearchService({ projects, posts, stories, programme, facility });
  // The office overview's "Waiting for you": each module counts its own waiting work.
  const office = createOfficeService({ projects, posts, media, enquiries, digests, decisions, facility });
  // Monthly investor reports: figures as at a month end from every module above, the PDF kept in the document library.
  const reports = createReportsService({ db, logger, projects, programme, facility, budget, risks, decisions, media, mediaStorage, documents, users, mailer, outbox, audit, publicUrl: config.PUBLIC_URL });
  // Help for the people who write: the draft suggested from what happened since the last update (decision 061).
  const writingHelp = createWritingHelpService({ projects, programme, facility, risks, decisions, media, posts });
  // Milestone calendars: the public feed and personal feeds behind a revocable token.
  const calendars = createCalendarsService({ db, projects, programme, facility, decisions, reports, accounts, publicUrl: config.PUBLIC_URL });

  return {
    publicCache,
    /** The session store: express-session reads and writes it; auth ends sessions; a worker sweeps it. */
    sessions,
    audit,
    auth,
    users,
    outbox,
    projects,
    /** The project's hero photograph and the home page's builds. */
    projectHero,
    programme,
    /** The facility: blocks, plant systems and units, site features, their figures (digests read `figuresAt`). */
    facility,
    /** The site plan: the site's areas on a grid, each with its status. */
    sitePlan,
    /** The media library's service (other modules' services take it too). */
    media,
    mediaStorage,
    mediaUploads,
    /** Rate-limit counters, exposed so tests can start from zero. */
    rateLimits,
    signInDelays,
    enquiries,
    /** Tests run the unconfirmed-address sweep with a chosen `now`; digests use it. */
    subscribers,
    /** Updates; tests run scheduled publication with a chosen `now` (posts.publishDue). */
    posts,
    /** Photo stories; tests run their scheduled publication with a chosen `now` (stories.publishDue). */
    stories,
    /** Press kits: staff and public zips of photographs, and the project's usage terms. */
    pressKits,
    site,
    /** The document library: documents, versions, stamped copies, the view log; `movesIn` for digests. */
    documents,
    /** The risks and issues register; `movesIn` for digests, `riskIdsOf` / `risksNamed` / `exposure` for the budget. */
    risks,
    /** Decisions needed; `movesIn` for digests. */
    decisions,
    /** Budget changes and the cost position; `contingencyRemaining` for the risks register, `movesIn` for digests. */
    budget,
    /** Digests: runs, previews and web copies. */
    digests,
    /** Milestone calendars (RFC 5545): public and personal feeds. */
    calendars,
    /** Search of a project (GET /api/projects/:slug/search). */
    search,
    /** The work waiting for a staff member (GET /api/office/waiting). */
    office,
    /** Help for the people who write: draft suggestions (GET /api/projects/:slug/draft-suggestion). */
    writingHelp,
    /** Review links for outside reviewers: made, listed and revoked by staff, opened and answered by the reviewer. */
    reviewLinks,
    /** Monthly investor reports; the worker sends their notices (`sendNotices`). */
    reports,
    /** The process is stopping: work that requests set going (the subscription mail they queued) starts no more. */
    close(): void {
      subscribers.stop();
      mediaStorage.close();
    },
  };
}

export type Services = ReturnType<typeof createServices>;
