import { createBrowserRouter, type RouteObject } from "react-router-dom";
import { HomePage } from "../features/projects/routes.tsx";
import { PublicLayout } from "./layouts/public-layout.tsx";
import { NotFoundPage, RouteErrorPage } from "./pages/misc-pages.tsx";

// The site office and investor room load only when visited: public pages never carry their code.
// The sign-in forms (zod, react-hook-form) load on their own too, so a visitor's first page stays light.
// The public programme pieces load on their own, without the office's table or the charts;
// the public project pages (updates, gallery, stories) never carry the editor.

const routes: RouteObject[] = [
  {
    path: "/",
    element: <PublicLayout />,
    errorElement: <RouteErrorPage />,
    children: [
      { index: true, element: <HomePage /> },
      { path: "projects/:slug", lazy: async () => ({ Component: (await import("./pages/project-home-page.tsx")).ProjectHomePage }) },
      { path: "projects/:slug/updates", lazy: async () => ({ Component: (await import("../features/site/routes.tsx")).UpdatesPage }) },
      { path: "projects/:slug/updates/:postSlug", lazy: async () => ({ Component: (await import("../features/site/routes.tsx")).PostPage }) },
      { path: "projects/:slug/gallery", lazy: async () => ({ Component: (await import("../features/site/routes.tsx")).GalleryPage }) },
      { path: "projects/:slug/search", lazy: async () => ({ Component: (await import("../features/site/routes.tsx")).SearchPage }) },
      { path: "projects/:slug/stories/:storySlug", lazy: async () => ({ Component: (await import("../features/site/routes.tsx")).StoryPage }) },
      { path: "projects/:slug/timeline", lazy: async () => ({ Component: (await import("../features/programme/public-routes.tsx")).PublicTimelinePage }) },
      { path: "subscribe", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).SubscribePage }) },
      { path: "projects/:slug/subscribe", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).ProjectSubscribePage }) },
      { path: "subscriptions/confirm/:token", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).ConfirmSubscriptionPage }) },
      { path: "subscriptions/preferences/:token", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).PreferencesPage }) },
      { path: "u/:token", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).OneClickUnsubscribePage }) },
      { path: "projects/:slug/enquire", lazy: async () => ({ Component: (await import("../features/enquiries/routes.tsx")).EnquirePage }) },
      { path: "sign-in", lazy: async () => ({ Component: (await import("../features/auth/routes.tsx")).SignInPage }) },
      { path: "invitations/:token", lazy: async () => ({ Component: (await import("../features/auth/routes.tsx")).AcceptInvitationPage }) },
      { path: "forgot-password", lazy: async () => ({ Component: (await import("../features/auth/routes.tsx")).ForgotPasswordPage }) },
      { path: "reset-password/:token", lazy: async () => ({ Component: (await import("../features/auth/routes.tsx")).ResetPasswordPage }) },
      { path: "*", element: <NotFoundPage /> },
    ],
  },
  {
    path: "/office",
    errorElement: <RouteErrorPage />,
    lazy: async () => ({ Component: (await import("./layouts/office-layout.tsx")).OfficeLayout }),
    children: [
      { index: true, lazy: async () => ({ Component: (await import("./pages/office-home.tsx")).OfficeHomePage }) },
      { path: "programme", lazy: async () => ({ Component: (await import("../features/programme/routes.tsx")).ProgrammePage }) },
      { path: "programme/walk", lazy: async () => ({ Component: (await import("../features/programme/routes.tsx")).SiteWalkPage }) },
      { path: "media", lazy: async () => ({ Component: (await import("../features/media/routes.tsx")).MediaLibraryPage }) },
      { path: "media/review", lazy: async () => ({ Component: (await import("../features/media/routes.tsx")).MediaReviewPage }) },
      { path: "updates", lazy: async () => ({ Component: (await import("../features/posts/routes.tsx")).PostsPage }) },
      // The editor (tiptap) is its own chunk: only someone opening an update loads it.
      { path: "updates/:id", lazy: async () => ({ Component: (await import("../features/posts/editor-page.tsx")).PostEditorPage }) },
      { path: "stories", lazy: async () => ({ Component: (await import("../features/stories/routes.tsx")).StoriesPage }) },
      { path: "stories/:id", lazy: async () => ({ Component: (await import("../features/stories/routes.tsx")).StoryEditorPage }) },
      { path: "outbox", lazy: async () => ({ Component: (await import("../features/outbox/routes.tsx")).OutboxPage }) },
      { path: "outbox/:id", lazy: async () => ({ Component: (await import("../features/outbox/routes.tsx")).OutboxMessagePage }) },
      { path: "subscribers", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).SubscribersPage }) },
      { path: "enquiries", lazy: async () => ({ Component: (await import("../features/enquiries/routes.tsx")).EnquiriesPage }) },
      { path: "digests", lazy: async () => ({ Component: (await import("../features/digests/routes.tsx")).DigestsPage }) },
      { path: "users", lazy: async () => ({ Component: (await import("./pages/admin-pages.tsx")).AdminUsersPage }) },
      { path: "audit", lazy: async () => ({ Component: (await import("./pages/admin-pages.tsx")).AdminAuditPage }) },
      { path: "*", element: <NotFoundPage /> },
    ],
  },
  {
    path: "/investors",
    errorElement: <RouteErrorPage />,
    lazy: async () => ({ Component: (await import("./layouts/investor-layout.tsx")).InvestorLayout }),
    children: [
      { index: true, lazy: async () => ({ Component: (await import("./pages/investor-pages.tsx")).InvestorHomePage }) },
      { path: "digest", lazy: async () => ({ Component: (await import("../features/subscribers/routes.tsx")).InvestorDigestPage }) },
      { path: "projects/:slug", lazy: async () => ({ Component: (await import("./pages/investor-pages.tsx")).InvestorProjectPage }) },
      { path: "*", element: <NotFoundPage /> },
    ],
  },
];

export const createRouter = () => createBrowserRouter(routes);
