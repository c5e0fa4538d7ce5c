import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { LoginInput, User } from "#shared/schemas/auth.ts";
import { api, ApiError, resetCsrf } from "../../lib/api-client.ts";

export const authKeys = {
  all: ["auth"] as const,
  me: () => [...authKeys.all, "me"] as const,
  invitation: (token: string) => [...authKeys.all, "invitation", token] as const,
};

/** The signed-in user, or null when signed out (a 401 is an answer, not an error). */
export const meQueryOptions = () =>
  queryOptions({
    queryKey: authKeys.me(),
    queryFn: async (): Promise<User | null> => {
      try {
        return (await api.get<{ user: User }>("/api/auth/me")).user;
      } catch (e) {
        if (e instanceof ApiError && e.status === 401) return null;
        throw e;
      }
    },
    staleTime: 60_000,
  });

export const useMe = () => useQuery(meQueryOptions());

export const invitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: authKeys.invitation(token),
    queryFn: () => api.get<{ email: string; role: User["role"] }>(`/api/auth/invitations/${token}`),
    retry: false,
  });

export function useLogin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post<{ user: User }>("/api/auth/login", input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

export function useLogout() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>("/api/auth/logout"),
    onSettled: () => {
      resetCsrf();
      qc.clear();
      qc.setQueryData(authKeys.me(), null);
    },
  });
}

export function useAcceptInvitation(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { name: string; password: string }) => api.post<{ user: User }>(`/api/auth/invitations/${token}/accept`, input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

export function useRequestReset() {
  return useMutation({
    mutationFn: (input: { email: string }) => api.post<{ ok: true; message: string }>("/api/auth/password-reset", input),
    meta: { quiet: true },
  });
}

export function useResetPassword(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { password: string }) => api.post<{ user: User }>(`/api/auth/password-reset/${token}`, input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

/** Where each role lands after signing in. */
export function homeFor(user: User): string {
  return user.role === "investor" ? "/investors" : "/office";
}
