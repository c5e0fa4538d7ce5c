import { useSuspenseQuery } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { Link, Navigate, useLocation } from "react-router-dom";
import type { Role } from "#shared/schemas/common.ts";
import { meQueryOptions } from "../../../lib/session.ts";
import { homeFor } from "../api.ts";

/**
 * Signed out → sign-in (then back here); signed in with the wrong role → a clear refusal.
 * Who is signed in is primed by the area's loader (`sessionLoader` in lib/session.ts), so this never waits on its own.
 */
export function RequireRole({ roles, area, children }: { roles: Role[]; area: string; children: ReactNode }) {
  const me = useSuspenseQuery(meQueryOptions());
  const location = useLocation();
  if (!me.data) {
    const next = encodeURIComponent(location.pathname + location.search);
    return <Navigate to={`/sign-in?next=${next}`} replace />;
  }
  if (!roles.includes(me.data.role)) return <Refusal area={area} home={homeFor(me.data)} />;
  return <>{children}</>;
}

export function Refusal({ area, home }: { area: string; home: string }) {
  return (
    <div className="mx-auto max-w-xl px-4 py-16" data-testid="refusal">
      <p className="label-caps">Access</p>
      <h1 className="mt-1 text-2xl font-semibold">Not open to your account</h1>
      <p className="mt-3 text-ink-soft">
        The {area} is not part of what your role can see. If you need it, ask an administrator of the operator to change your role.
      </p>
      <p className="mt-6">
        <Link to={home} className="font-medium text-ink underline underline-offset-4">
          Go to your own area
        </Link>
      </p>
    </div>
  );
}
