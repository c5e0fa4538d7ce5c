import { createBrowserRouter, type RouteObject } from "react-router-dom";
import { AcceptInvitationPage, ForgotPasswordPage, ResetPasswordPage, SignInPage } from "../features/auth/routes.tsx";
import { HomePage, ProjectHomePage } from "../features/projects/routes.tsx";
import { PublicLayout } from "./layouts/public-layout.tsx";
import { NotFoundPage, RouteErrorPage } from "./pages/misc-pages.tsx";

// The site office and investor room load only when visited: public pages never carry their code.
const routes: RouteObject[] = [
  {
    path: "/",
    element: <PublicLayout />,
    errorElement: <RouteErrorPage />,
    children: [
      { index: true, element: <HomePage /> },
      { path: "projects/:slug", element: <ProjectHomePage /> },
      { path: "sign-in", element: <SignInPage /> },
      { path: "invitations/:token", element: <AcceptInvitationPage /> },
      { path: "forgot-password", element: <ForgotPasswordPage /> },
      { path: "reset-password/:token", element: <ResetPasswordPage /> },
      { path: "*", element: <NotFoundPage /> },
    ],
  },
  {
    path: "/office",
    errorElement: <RouteErrorPage />,
    lazy: async () => ({ Component: (await import("./layouts/office-layout.tsx")).OfficeLayout }),
    children: [
      { index: true, lazy: async () => ({ Component: (await import("./pages/office-home.tsx")).OfficeHomePage }) },
      { path: "outbox", lazy: async () => ({ Component: (await import("../features/outbox/routes.tsx")).OutboxPage }) },
      { path: "outbox/:id", lazy: async () => ({ Component: (await import("../features/outbox/routes.tsx")).OutboxMessagePage }) },
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
      { path: "projects/:slug", lazy: async () => ({ Component: (await import("./pages/investor-pages.tsx")).InvestorProjectPage }) },
      { path: "*", element: <NotFoundPage /> },
    ],
  },
];

export const createRouter = () => createBrowserRouter(routes);
