import { Link, NavLink } from "react-router-dom";
import type { Role } from "#shared/schemas/common.ts";
import { Logo } from "../../components/ui/logo.tsx";
import { useLogout } from "../../features/auth/api.ts";
import { RequireRole } from "../../features/auth/components/require-role.tsx";
import { ROLE_LABEL } from "../../lib/format.ts";
import { useMe } from "../../lib/session.ts";
import { PageOutlet, SkipLink } from "./page-frame.tsx";

export interface AreaLink {
  to: string;
  label: string;
  end?: boolean;
  roles?: Role[];
}

function AccountBar() {
  const me = useMe();
  const logout = useLogout();
  if (!me.data) return null;
  return (
    <div className="flex flex-wrap items-center gap-3 text-sm">
      <span>
        <span className="font-medium">{me.data.name}</span> <span className="text-ink-faint">· {ROLE_LABEL[me.data.role]}</span>
      </span>
      <button type="button" className="underline underline-offset-4" onClick={() => logout.mutate(undefined, { onSettled: () => window.location.assign("/sign-in") })}>
        Sign out
      </button>
    </div>
  );
}

/**
 * Every section the role may open. On a phone the sections wrap onto as many lines as they need
 * (a sideways-scrolling strip hid most of them); from `md` up they stand in a column. The current
 * section says so to assistive technology (`aria-current="page"`, set by NavLink) and to the eye by
 * weight and a bar in ink (a thick underline on a phone, a left rule beside the column), not by colour.
 */
function AreaNav({ links }: { links: AreaLink[] }) {
  const me = useMe();
  const role = me.data?.role;
  return (
    <nav aria-label="Sections">
      <ul className="flex flex-wrap gap-x-1 gap-y-1 md:flex-col md:flex-nowrap md:gap-0.5">
        {links
          .filter((l) => !l.roles || (role && l.roles.includes(role)))
          .map((l) => (
            <li key={l.to}>
              <NavLink
                to={l.to}
                end={l.end}
                className={({ isActive }) =>
                  `flex min-h-8 items-center whitespace-nowrap rounded-sm px-2.5 py-1 text-sm md:rounded-none md:border-l-4 md:px-3 md:py-2 ${
                    isActive
                      ? "border-b-4 border-ink bg-sheet font-semibold text-ink md:border-b-0"
                      : "border-b-4 border-transparent text-ink-soft underline-offset-4 hover:text-ink hover:underline md:border-b-0"
                  }`
                }
              >
                {l.label}
              </NavLink>
            </li>
          ))}
      </ul>
    </nav>
  );
}

/** The frame of the site office and the investor room: guarded by role, sections at the side. */
export function AreaLayout({ name, roles, links }: { name: string; roles: Role[]; links: AreaLink[] }) {
  return (
    <div className="flex min-h-screen flex-col">
      <SkipLink />
      <header className="border-b-2 border-ink bg-paper">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center justify-between gap-3 px-4 py-3">
          <div className="flex items-center gap-3">
            <Link to="/" aria-label="Plumbline: the public progress site">
              <Logo />
            </Link>
            <span aria-hidden className="h-5 w-px bg-rule-strong" />
            <span className="label-caps text-ink">{name}</span>
          </div>
          <AccountBar />
        </div>
      </header>
      <RequireRole roles={roles} area={name.toLowerCase()}>
        <div className="mx-auto grid w-full max-w-7xl flex-1 gap-6 px-4 py-6 md:grid-cols-[13rem_1fr]">
          <AreaNav links={links} />
          <main id="main" className="min-w-0">
            <PageOutlet />
          </main>
        </div>
      </RequireRole>
    </div>
  );
}
