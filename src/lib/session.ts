import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Session, User } from "#shared/schemas/auth.ts";
import { api } from "./api-client.ts";
import type { RouteLoader } from "./loaders.ts";

/**
 * Who is signed in, asked once and cached under one key for the whole app. Every feature
 * reads it from here (features never import each other); the auth feature's sign-in and
 * sign-out write this same key, so no page can keep showing the previous user.
 */
export const sessionKeys = {
  all: ["session"] as const,
  me: () => [...sessionKeys.all, "me"] as const,
};

/** The signed-in user, or null when signed out (asked where a visitor answers 200, so no failed load is logged). */
export const meQueryOptions = () =>
  queryOptions({
    queryKey: sessionKeys.me(),
    queryFn: async (): Promise<User | null> => (await api.get<Session>("/api/auth/session")).user,
    staleTime: 60_000,
  });

export const useMe = () => useQuery(meQueryOptions());

/**
 * Primes who is signed in, for an area's guard (`RequireRole`) to read without waiting. It lives
 * here, not in loaders.ts, because the router imports it on the first page, and loaders.ts brings zod.
 */
export const sessionLoader: RouteLoader = (qc) => async () => {
  await qc.ensureQueryData(meQueryOptions());
  return null;
};
