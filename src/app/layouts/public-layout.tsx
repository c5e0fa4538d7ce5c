import { Link, NavLink } from "react-router-dom";
import { Logo } from "../../components/ui/logo.tsx";
import { homeFor } from "../../features/auth/api.ts";
import { useMe } from "../../lib/session.ts";
import { PageOutlet, SkipLink } from "./page-frame.tsx";

export function PublicLayout() {
  const me = useMe();
  return (
    <div className="flex min-h-screen flex-col">
      <SkipLink />
      <header className="border-b border-rule bg-paper">
        <div className="mx-auto flex max-w-5xl items-center justify-between gap-4 px-4 py-3">
          <Link to="/" aria-label="Plumbline home">
            <Logo className="text-lg" />
          </Link>
          <nav aria-label="Account" className="text-sm">
            {me.data ? (
              <NavLink to={homeFor(me.data)} className="font-medium underline underline-offset-4">
                {me.data.role === "investor" ? "Investor room" : "Site office"}
              </NavLink>
            ) : (
              <NavLink to="/sign-in" className="font-medium underline underline-offset-4">
                Sign in
              </NavLink>
            )}
          </nav>
        </div>
      </header>
      {/* At least a screen tall: the footer starts below the fold, so a page that fills in as its
          data and photos arrive never pushes it down in view (no layout shift). */}
      <main id="main" className="min-h-svh flex-1">
        <PageOutlet />
      </main>
      <footer className="border-t border-rule">
        <div className="mx-auto max-w-5xl px-4 py-6 text-xs text-ink-faint">Published with Plumbline. Engineering figures on these pages are indicative; design and operation are for qualified engineers under local codes.</div>
      </footer>
    </div>
  );
}
