import type { QueryClient } from "@tanstack/react-query";
import type { LoaderFunctionArgs } from "react-router-dom";
import { STAFF_ROLES, type Role } from "#shared/schemas/common.ts";
import { meQueryOptions } from "./session.ts";

/**
 * A route loader: primes the query cache with the page's `queryOptions` before the page
 * renders, so the page reads with `useSuspenseQuery` and never draws a spinner of its own.
 * Made with the app's query client, which the router is built with.
 */
export type RouteLoader = (qc: QueryClient) => (args: LoaderFunctionArgs) => Promise<null>;

/** Who may open the site office, and the investor room. */
export const OFFICE_ROLES: readonly Role[] = STAFF_ROLES;
export const INVESTOR_ROLES: readonly Role[] = ["investor", ...STAFF_ROLES];

/**
 * Primes a signed-in area's page only when the signed-in user may see it. Otherwise it primes
 * nothing: the area's guard (`RequireRole`) then sends a signed-out visitor to sign in, or
 * refuses a role that may not enter, as it always has, instead of the page failing on a 401.
 */
export async function primeWhenAllowed(qc: QueryClient, roles: readonly Role[], prime: () => Promise<unknown>): Promise<null> {
  const me = await qc.ensureQueryData(meQueryOptions());
  if (me && roles.includes(me.role)) await prime();
  return null;
}

/** A route parameter as a number (an id), 0 when it is "new" or missing. */
export function idParam(value: string | undefined): number {
  return value === undefined || value === "new" ? 0 : Number(value);
}
