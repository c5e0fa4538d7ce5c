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

/** A page of a lazily loaded module: its component, its loader when it has one, and an error element of its own. */
function page(qc: QueryClient, path: string | undefined, load: () => Promise<LazyPage>, where: Where = {}): RouteObject {
  return {
    ...(path === undefined ? { index: true } : { path }),
    // A route's static error element would win over the one its module brings.
    ...(where.ownErrors ? {} : { errorElement: <RouteErrorPage {...where} /> }),
    lazy: async () => {
      const { Component, loader, ErrorBoundary } = await load();
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
        page(qc, "projects/:slug", async () => {
          const m = await import("./pages/project-home-page.tsx");
          return { Component: m.ProjectHomePage, loader: m.projectHomeLoader };
        }, { what: "project" }),
        page(qc, "projects/:slug/updates", async () => ({ Component: (await site()).UpdatesPage, loader: (await site()).updatesLoader }), { what: "list of updates" }),
        page(qc, "projects/:slug/updates/:postSlug", async () => ({ Component: (await site()).PostPage, loader: (await site()).postLoader }), { what: "update" }),
        page(qc, "projects/:slug/gallery", async () => ({ Component: (await site()).GalleryPage, loader: (await site()).galleryLoader }), { what: "gallery" }),
        page(qc, "projects/:slug/search", async () => {
          const m = await import("../features/public-site/search-routes.tsx");
          return { Component: m.SearchPage, loader: m.searchLoader };
        }, { what: "project" }),
        page(qc, "projects/:slug/stories/:storySlug", async () => ({ Component: (await site()).StoryPage, loader: (await site()).storyLoader }), { what: "photo story" }),
        page(qc, "projects/:slug/timeline", async () => {
          const m = await import("./pages/timeline-page.tsx");
          return { Component: m.TimelinePage, loader: m.timelinePageLoader };
        }, { what: "project" }),
        page(qc, "projects/:slug/facility", async () => {
          const m = await import("../features/public-site/facility-routes.tsx");
          return { Component: m.FacilityPage, loader: m.facilityLoader };
        }, { what: "project" }),
        page(qc, "subscribe", async () => ({ Component: (await subscribers()).SubscribePage, loader: (await subscribers()).subscribeLoader })),
        page(qc, "projects/:slug/subscribe", async () => ({ Component: (await subscribers()).ProjectSubscribePage, loader: (await subscribers()).projectSubscribeLoader }), { what: "project" }),
        page(qc, "subscriptions/confirm/:token", async () => {
          const m = await subscribers();
          return { Component: m.ConfirmSubscriptionPage, loader: m.confirmationLoader, ErrorBoundary: m.ConfirmationLinkError };
        }, { what: "confirmation", ownErrors: true }),
        page(qc, "subscriptions/preferences/:token", async () => {
          const m = await subscribers();
          return { Component: m.PreferencesPage, loader: m.preferencesLoader, ErrorBoundary: m.PreferencesLinkError };
        }, { what: "subscription", ownErrors: true }),
        page(qc, "u/:token", async () => {
          const m = await subscribers();
          return { Component: m.OneClickUnsubscribePage, loader: m.unsubscribeLoader, ErrorBoundary: m.UnsubscribeLinkError };
        }, { what: "subscription", ownErrors: true }),
        page(qc, "projects/:slug/enquire", async () => {
          const m = await enquiries();
          return { Component: m.EnquirePage, loader: m.enquireLoader, ErrorBoundary: m.EnquireError };
        }, { what: "project", ownErrors: true }),
        // A review link's page: a draft for one outside reviewer, no account needed (decision 060).
        page(qc, "review/:token", async () => {
          const m = await import("../features/review-links/routes.tsx");
          return { Component: m.ReviewPage, loader: m.reviewLoader, ErrorBoundary: m.ReviewLinkError };
        }, { what: "review link", ownErrors: true }),
        page(qc, "sign-in", async () => ({ Component: (await auth()).SignInPage })),
        page(qc, "invitations/:token", async () => {
          const m = await auth();
          return { Component: m.AcceptInvitationPage, loader: m.invitationLoader, ErrorBoundary: m.InvitationError };
        }, { what: "invitation", ownErrors: true }),
        page(qc, "forgot-password", async () => ({ Component: (await auth()).ForgotPasswordPage })),
        page(qc, "reset-password/:token", async () => {
          const m = await auth();
          return { Component: m.ResetPasswordPage, loader: m.resetPasswordLoader, ErrorBoundary: m.ResetLinkError };
        }, { what: "reset link", ownErrors: true }),
        { path: "*", element: <NotFoundPage /> },
      ],
    },
    area(qc, OFFICE, async () => (await import("./layouts/office-layout.tsx")).OfficeLayout, [
      page(qc, undefined, async () => ({ Component: (await import("./pages/office-home.tsx")).OfficeHomePage }), OFFICE),
      page(qc, "programme", async () => ({ Component: (await programme()).ProgrammePage, loader: (await programme()).programmeLoader }), { ...OFFICE, what: "project" }),
      page(qc, "programme/walk", async () => ({ Component: (await programme()).SiteWalkPage, loader: (await programme()).siteWalkLoader }), { ...OFFICE, what: "project" }),
      page(qc, "facility", async () => ({ Component: (await facility()).FacilityPage, loader: (await facility()).facilityLoader }), { ...OFFICE, what: "project" }),
      page(qc, "facility/walk", async () => ({ Component: (await facility()).FacilityWalkPage, loader: (await facility()).facilityWalkLoader }), { ...OFFICE, what: "project" }),
      page(qc, "site-plan", async () => {
        const m = await import("../features/site-plan/routes.tsx");
        return { Component: m.SitePlanPage, loader: m.sitePlanLoader };
      }, { ...OFFICE, what: "project" }),
      // The investor record's office pages: each feature in its own chunk, loaded when visited.
      page(qc, "risks", async () => {
        const m = await import("../features/risks/routes.tsx");
        return { Component: m.RisksPage, loader: m.risksLoader };
      }, { ...OFFICE, what: "project" }),
      page(qc, "decisions", async () => {
        const m = await import("../features/decisions/routes.tsx");
        return { Component: m.DecisionsPage, loader: m.decisionsLoader };
      }, { ...OFFICE, what: "project" }),
      page(qc, "budget", async () => {
        const m = await import("../features/budget/routes.tsx");
        return { Component: m.BudgetPage, loader: m.budgetLoader };
      }, { ...OFFICE, what: "project" }),
      page(qc, "documents", async () => {
        const m = await import("../features/documents/routes.tsx");
        return { Component: m.DocumentsPage, loader: m.documentsLoader };
      }, { ...OFFICE, what: "project" }),
      // The monthly report: its pages bring the record's charts and the updates' editor (app/pages/report-pages.tsx).
      page(qc, "reports", async () => {
        const m = await import("./pages/report-pages.tsx");
        return { Component: m.OfficeReportsPage, loader: m.reportsLoader };
      }, { ...OFFICE, what: "project" }),
      page(qc, "reports/:id", async () => {
        const m = await import("./pages/report-pages.tsx");
        return { Component: m.OfficeReportPage, loader: m.reportLoader };
      }, { ...OFFICE, what: "report" }),
      page(qc, "media", async () => ({ Component: (await media()).MediaLibraryPage, loader: (await media()).mediaLibraryLoader }), OFFICE),
      page(qc, "media/review", async () => ({ Component: (await media()).MediaReviewPage, loader: (await media()).mediaReviewLoader }), OFFICE),
      // The project's hero photograph (decision 055): the media library's photos, the project's choice.
      page(qc, "media/hero", async () => {
        const m = await import("./pages/hero-page.tsx");
        return { Component: m.HeroPhotoPage, loader: m.heroPageLoader };
      }, OFFICE),
      page(qc, "updates", async () => {
        const m = await import("../features/posts/routes.tsx");
        return { Component: m.PostsPage, loader: m.postsLoader };
      }, OFFICE),
      // The editor (tiptap) is its own chunk: only someone opening an update loads it.
      page(qc, "updates/:id", async () => {
        const m = await import("../features/posts/editor-page.tsx");
        return { Component: m.PostEditorPage, loader: m.postEditorLoader };
      }, { ...OFFICE, what: "update" }),
      page(qc, "stories", async () => ({ Component: (await stories()).StoriesPage, loader: (await stories()).storiesLoader }), OFFICE),
      page(qc, "stories/:id", async () => ({ Component: (await stories()).StoryEditorPage, loader: (await stories()).storyEditorLoader }), { ...OFFICE, what: "photo story" }),
      page(qc, "outbox", async () => ({ Component: (await outbox()).OutboxPage, loader: (await outbox()).outboxLoader }), OFFICE),
      page(qc, "outbox/:id", async () => ({ Component: (await outbox()).OutboxMessagePage, loader: (await outbox()).outboxMessageLoader }), { ...OFFICE, what: "message" }),
      page(qc, "subscribers", async () => ({ Component: (await subscribers()).SubscribersPage, loader: (await subscribers()).subscribersLoader }), OFFICE),
      page(qc, "enquiries", async () => ({ Component: (await enquiries()).EnquiriesPage, loader: (await enquiries()).enquiriesLoader }), OFFICE),
      page(qc, "digests", async () => {
        const m = await import("../features/digests/routes.tsx");
        return { Component: m.DigestsPage, loader: m.digestsLoader };
      }, OFFICE),
      page(qc, "users", async () => ({ Component: (await admin()).AdminUsersPage, loader: (await admin()).adminUsersLoader }), OFFICE),
      page(qc, "audit", async () => ({ Component: (await admin()).AdminAuditPage, loader: (await admin()).adminAuditLoader }), OFFICE),
    ]),
    area(qc, INVESTORS, async () => (await import("./layouts/investor-layout.tsx")).InvestorLayout, [
      page(qc, undefined, async () => ({ Component: (await investors()).InvestorHomePage, loader: (await investors()).investorHomeLoader }), INVESTORS),
      page(qc, "digest", async () => ({ Component: (await subscribers()).InvestorDigestPage, loader: (await subscribers()).investorDigestLoader }), INVESTORS),
      page(qc, "projects/:slug", async () => ({ Component: (await investors()).InvestorProjectPage, loader: (await investors()).investorProjectLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/risks", async () => ({ Component: (await investors()).InvestorRisksPage, loader: (await investors()).investorRisksLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/decisions", async () => ({ Component: (await investors()).InvestorDecisionsPage, loader: (await investors()).investorDecisionsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/cost", async () => ({ Component: (await investors()).InvestorCostPage, loader: (await investors()).investorCostLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/documents", async () => ({ Component: (await investors()).InvestorDocumentsPage, loader: (await investors()).investorDocumentsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/documents/:id", async () => ({ Component: (await investors()).InvestorDocumentPage, loader: (await investors()).investorDocumentsLoader }), { ...INVESTORS, what: "document" }),
      page(qc, "projects/:slug/reports", async () => ({ Component: (await investors()).InvestorReportsPage, loader: (await investors()).investorReportsLoader }), { ...INVESTORS, what: "project" }),
      page(qc, "projects/:slug/reports/:id", async () => ({ Component: (await investors()).InvestorReportPage, loader: (await investors()).investorReportLoader }), { ...INVESTORS, what: "report" }),
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
