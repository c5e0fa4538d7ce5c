import type { QueryClient } from "@tanstack/react-query";
import type { ComponentType } from "react";
import { createBrowserRouter, matchRoutes, type HydrationState, type LoaderFunction, type RouteObject } from "react-router-dom";
import { homeLoader, HomePage } from "../features/projects/routes.tsx";
import type { RouteLoader } from "../lib/loaders.ts";
import { sessionLoader } from "../lib/session.ts";
import { PublicLayout } from "./layouts/public-layout.tsx";
import { FirstLoad, NotFoundPage, RouteErrorPage } from "./pages/misc-pages.tsx";

// The site office and investor room load only when visited: public pages never carry their code.
// The sign-in forms (zod, react-hook-form) load on their own too, so a visitor's first page stays light.
// The public programme pieces load on their own, without the office's table or the charts;
// the public project pages (updates, gallery, stories) never carry the editor.
// A page's loader comes in its own chunk with it, and primes the cache before the page renders.

interface Where {
  /** What the page shows, for its error element ("No such update"). */
  what?: string;
  home?: string;
  homeLabel?: string;
  /** The page's module brings its own error element (`ErrorBoundary`), in the page's own words (a used-up link). */
  ownErrors?: boolean;
}

const OFFICE: Where = { home: "/office", homeLabel: "Site office" };
const INVESTORS: Where = { home: "/investors", homeLabel: "Investor room" };

interface LazyPage {
  Component: ComponentType;
  loader?: RouteLoader;
  ErrorBoundary?: ComponentType;
}

/**
 * A page of a lazily loaded module (`load`): the component, loader and error element `pick` takes
 * from it, and an error element of its own.
 */
function page<M>(qc: QueryClient, path: string | undefined, load: () => Promise<M>, pick: (m: M) => LazyPage, where: Where = {}): RouteObject {
  return {
    ...(path === undefined ? { index: true } : { path }),
    // A route's static error element would win over the one its module brings.
    ...(where.ownErrors ? {} : { errorElement: <RouteErrorPage {...where} /> }),
    lazy: async () => {
      const { Component, loader, ErrorBoundary } = pick(await load());
      return { Component, ...(loader ? { loader: loader(qc) as LoaderFunction } : {}), ...(where.ownErrors && ErrorBoundary ? { ErrorBoundary } : {}) };
    },
  };
}

/**
 * A signed-in area at `where.home` (the site office, the investor room): the session is read
 * first, the layout loads on the first visit, and an unknown address inside it is not found there.
 */
function area(qc: QueryClient, where: Where, layout: () => Promise<ComponentType>, children: RouteObject[]): RouteObject {
  return {
    path: where.home,
    errorElement: <RouteErrorPage {...where} />,
    HydrateFallback: FirstLoad,
    loader: sessionLoader(qc),
    lazy: async () => ({ Component: await layout() }),
    children: [...children, { path: "*", element: <NotFoundPage /> }],
  };
}

/** The app's routes, their loaders priming `qc`: the browser's router and the server's renderer (src/entry-server.tsx) share them. */
export function routes(qc: QueryClient): RouteObject[] {
  const site = () => import("../features/public-site/routes.tsx");
  const subscribers = () => import("../features/subscribers/routes.tsx");
  const auth = () => import("../features/auth/routes.tsx");
  const programme = () => import("../features/programme/routes.tsx");
  const facility = () => import("../features/facility/routes.tsx");
  const media = () => import("../features/media/routes.tsx");
  const stories = () => import("../features/stories/routes.tsx");
  const outbox = () => import("../features/outbox/routes.tsx");
  const enquiries = () => import("../features/enquiries/routes.tsx");
  const admin = () => import("./pages/admin-pages.tsx");
  const investors = () => import("./pages/investor-pages.tsx");
  return [
    {
      path: "/",
      element: <PublicLayout />,
      errorElement: <RouteErrorPage />,
      HydrateFallback: FirstLoad,
      children: [
        { index: true, element: <HomePage />, loader: homeLoader(qc), errorElement: <RouteErrorPage /> },
        page(qc, "projects/:slug", () => import("./pages/project-home-page.tsx"), (m) => ({ Component: m.ProjectHomePage, loader: m.projectHomeLoader }), { what: "project" }),
        page(qc, "projects/:slug/updates", site, (m) => ({ Component: m.UpdatesPage, loader: m.updatesLoader }), { what: "list of updates" }),
        page(qc, "projects/:slug/updates/:postSlug", site, (m) => ({ Component: m.PostPage, loader: m.postLoader }), { what: "update" }),
        page(qc, "projects/:slug/gallery", site, (m) => ({ Component: m.GalleryPage, loader: m.galleryLoader }), { what: "gallery" }),
        page(qc, "projects/:slug/search", () => import("../features/public-site/search-routes.tsx"), (m) => ({ Component: m.SearchPage, loader: m.searchLoader }), { what: "project" }),
        page(qc, "projects/:slug/stories/:storySlug", site, (m) => ({ Component: m.StoryPage, loader: m.storyLoader }), { what: "photo story" }),
        page(qc, "projects/:slug/timeline", () => import("./pages/timeline-page.tsx"), (m) => ({ Component: m.TimelinePage, loader: m.timelinePageLoader }), { what: "project" }),
        page(qc, "projects/:slug/facility", () => import("../features/public-site/facility-routes.tsx"), (m) => ({ Component: m.FacilityPage, loader: m.facilityLoader }), { what: "project" }),
        page(qc, "subscribe", subscribers, (m) => ({ Component: m.SubscribePage, loader: m.subscribeLoader })),
        page(qc, "projects/:slug/subscribe", subscribers, (m) => ({ Component: m.ProjectSubscribePage, loader: m.projectSubscribeLoader }), { what: "project" }),
        page(qc, "subscriptions/confirm/:token", subscribers, (m) => ({ Component: m.ConfirmSubscriptionPage, loader: m.confirmationLoader, ErrorBoundary: m.ConfirmationLinkError }), { what: "confirmation", ownErrors: true }),
        page(qc, "subscriptions/preferences/:token", subscribers, (m) => ({ Component: m.PreferencesPage, loader: m.preferencesLoader, ErrorBoundary: m.PreferencesLinkError }), { what: "subscription", ownErrors: true }),
        page(qc, "u/:token", subscribers, (m) => ({ Component: m.OneClickUnsubscribePage, loader: m.unsubscribeLoader, ErrorBoundary: m.UnsubscribeLinkError }), { what: "subscription", ownErrors: true }),
        page(qc, "projects/:slug/enquire", enquiries, (m) => ({ Component: m.EnquirePage, loader: m.enquireLoader, ErrorBoundary: m.EnquireError }), { what: "project", ownErrors: true }),
        // A review link's page: a draft for one outside reviewer, no account needed (decision 060).
        page(qc, "review/:token", () => import("../features/review-links/routes.tsx"), (m) => ({ Component: m.ReviewPage, loader: m.reviewLoader, ErrorBoundary: m.ReviewLinkError }), { what: "review link", ownErrors: true }),
        page(qc, "sign-in", auth, (m) => ({ Component: m.SignInPage })),
        page(qc, "invitations/:token", auth, (m) => ({ Component: m.AcceptInvitationPage, loader: m.invitationLoader, ErrorBoundary: m.InvitationError }), { what: "invitation", ownErrors: true }),
        page(qc, "forgot-password", auth, (m) => ({ Component: m.ForgotPasswordPage })),
        page(qc, "reset-password/:token", auth, (m) => ({ Component: m.ResetPasswordPage, loader: m.resetPasswordLoader, ErrorBoundary: m.ResetLinkError }), { what: "reset link", ownErrors: true }),
        { path: "*", element: <NotFoundPage /> },
      ],
    },
    area(qc, OFFICE, async () => (await import("./layouts/office-layout.tsx")).OfficeLayout, [
      page(qc, undefined, () => import("./pages/office-home.tsx"), (m) => ({ Component: m.OfficeHomePage }), OFFICE),
      page(qc, "programme", programme, (m) => ({ Component: m.ProgrammePage, loader: m.programmeLoader }), { ...OFFICE, what: "project" }),
      page(qc, "programme/walk", programme, (m) => ({ Component: m.SiteWalkPage, loader: m.siteWalkLoader }), { ...OFFICE, what: "project" }),
      page(qc, "facility", facility, (m) => ({ Component: m.FacilityPage, loader: m.facilityLoader }), { ...OFFICE, what: "project" }),
      page(qc, "facility/walk", facility, (m) => ({ Component: m.FacilityWalkPage, loader: m.facilityWalkLoader }), { ...OFFICE, what: "project" }),
      page(qc, "site-plan", () => import("../features/site-plan/routes.tsx"), (m) => ({ Component: m.SitePlanPage, loader: m.sitePlanLoader }), { ...OFFICE, what: "project" }),
      // The investor record's office pages: each feature in its own chunk, loaded when visited.
      page(qc, "risks", () => import("../features/risks/routes.tsx"), (m) => ({ Component: m.RisksPage, loader: m.risksLoader }), { ...OFFICE, what: "project" }),
      page(qc, "decisions", () => import("../features/decisions/routes.tsx"), (m) => ({ Component: m.DecisionsPage, loader: m.decisionsLoader }), { ...OFFICE, what: "project" }),
      page(qc, "budget", () => import("../features/budget/routes.tsx"), (m) => ({ Component: m.BudgetPage, loader: m.budgetLoader }), { ...OFFICE, what: "project" }),
      page(qc, "documents", () => import("../features/documents/routes.tsx"), (m) => ({ Component: m.DocumentsPage, loader: m.documentsLoader }), { ...OFFICE, what: "project" }),
      // The monthly report: its pages bring the record's charts and the updates' editor (app/pages/report-pages.tsx).
      page(qc, "reports", () => import("./pages/report-pages.tsx"), (m) => ({ Component: m.OfficeReportsPage, loader: m.reportsLoader }), { ...OFFICE, what: "project" }),
      page(qc, "reports/:id", () => import("./pages/report-pages.tsx"), (m) => ({ Component: m.OfficeReportPage, loader: m.reportLoader }), { ...OFFICE, what: "report" }),
      page(qc, "media", media, (m) => ({ Component: m.MediaLibraryPage, loader: m.mediaLibraryLoader }), OFFICE),
      page(qc, "media/review", media, (m) => ({ Component: m.MediaReviewPage, loader: m.mediaReviewLoader }), OFFICE),
      // The project's hero photograph (decision 055): the media library's photos, the project's choice.
      page(qc, "media/hero", () => import("./pages/hero-page.tsx"), (m) => ({ Component: m.HeroPhotoPage, loader: m.heroPageLoader }), OFFICE),
      page(qc, "updates", () => import("../features/posts/routes.tsx"), (m) => ({ Component: m.PostsPage, loader: m.postsLoader }), OFFICE),
      // The editor (tiptap) is its own chunk: only someone opening an update loads it.
      page(qc, "updates/:id", () => import("../features/posts/editor-page.tsx"), (m) => ({ Component: m.PostEditorPage, loader: m.postEditorLoader }), { ...OFFICE, what: "update" }),
      page(qc, "stories", stories, (m) => ({ Component: m.StoriesPage, loader: m.storiesLoader }), OFFICE),
      page(qc, "stories/:id", stories, (m) => ({ Component: m.StoryEditorPage, loader: m.storyEditorLoader }), { ...OFFICE, what: "photo story" }),
      page(qc, "outbox", outbox, (m) => ({ Component: m.OutboxPage, loader: m.outboxLoader }), OFFICE),
      page(qc, "outbox/:id", outbox, (m) => ({ Component: m.OutboxMessagePage, loader: m.outboxMessageLoader }), { ...OFFICE, what: "message" }),
      page(qc, "subscribers", subscribers, (m) => ({ Component: m.SubscribersPage, loader: m.subscribersLoader }), OFFICE),
      page(qc, "enquiries", enquiries, (m) => ({ Component: m.EnquiriesPage, loader: m.enquiriesLoader }), OFFICE),
      page(qc, "digests", () => import("../features/digests/routes.tsx"), (m) => ({ Component: m.DigestsPage, loader: m.digestsLoader }), OFFICE),
      page(qc, "users", admin, (m) => ({ Component: m.AdminUsersPage, loader: m.adminUsersLoader }), OFFICE),
      page(qc, "audit", admin, (m) => ({ Component: m.AdminAuditPage, loader: m.adminAuditLoader }), OFFICE),
    ]),
    area(qc, INVESTORS, async () => (await import("./layouts/investor-layout.tsx")).InvestorLayout, [
      page(qc, undefined, investors, (m) => ({ Component: m.InvestorHomePage, loader: m.investorHomeLoader }), INVESTORS),
      page(qc, "digest", subscribers, (m) => ({ Component: m.InvestorDigestPage, loader: m.investorDigestLoader }), INVESTORS),
      page(qc, "projects/:slug", investors, (m) => ({ Component: m.InvestorProjectPage, loader: m.investorProjectLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/risks", investors, (m) => ({ Component: m.InvestorRisksPage, loader: m.investorRisksLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/decisions", investors, (m) => ({ Component: m.InvestorDecisionsPage, loader: m.investorDecisionsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/cost", investors, (m) => ({ Component: m.InvestorCostPage, loader: m.investorCostLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/documents", investors, (m) => ({ Component: m.InvestorDocumentsPage, loader: m.investorDocumentsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/documents/:id", investors, (m) => ({ Component: m.InvestorDocumentPage, loader: m.investorDocumentsLoader }), { ...INVESTORS, what: "document" }),
      page(qc, "projects/:slug/reports", investors, (m) => ({ Component: m.InvestorReportsPage, loader: m.investorReportsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/reports/:id", investors, (m) => ({ Component: m.InvestorReportPage, loader: m.investorReportLoader }), { ...INVESTORS, what: "report" }),
    ]),
  ];
}

/** The app's routes on the browser's history; loaders prime `queryClient`, the cache the pages read. */
export const createRouter = (queryClient: QueryClient) => createBrowserRouter(routes(queryClient));

/**
 * The router over a page the server rendered: the matched routes' modules are loaded first and
 * their loaders are not run again (the server's answers are already in `queryClient`), so the
 * first render is the server's HTML and hydration finds nothing to change.
 */
export async function createHydratingRouter(queryClient: QueryClient, hydrationData: HydrationState) {
  const tree = routes(queryClient);
  for (const { route } of matchRoutes(tree, window.location) ?? []) {
    if (typeof route.lazy !== "function") continue;
    Object.assign(route, await route.lazy());
    route.lazy = undefined;
  }
  return createBrowserRouter(tree, { hydrationData });
}
