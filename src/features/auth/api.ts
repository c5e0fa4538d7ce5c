import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import type { InvitationView, LoginInput, ResetRequested, SignedIn, User } from "#shared/schemas/auth.ts";
import { api, resetCsrf } from "../../lib/api-client.ts";
import { sessionKeys } from "../../lib/session.ts";

export const authKeys = {
  all: ["auth"] as const,
  invitation: (token: string) => [...authKeys.all, "invitation", token] as const,
  resetLink: (token: string) => [...authKeys.all, "reset-link", token] as const,
};

/** Whether a reset link is still usable (asking does not spend it). */
export const resetLinkQueryOptions = (token: string) =>
  queryOptions({
    queryKey: authKeys.resetLink(token),
    queryFn: () => api.get<{ ok: true }>(`/api/auth/password-reset/${token}`),
    retry: false,
    staleTime: 0,
  });

export const invitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: authKeys.invitation(token),
    queryFn: () => api.get<InvitationView>(`/api/auth/invitations/${token}`),
    retry: false,
  });

export function useLogin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post<SignedIn>("/api/auth/login", input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(sessionKeys.me(), user);
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
      qc.setQueryData(sessionKeys.me(), null);
    },
  });
}

export function useAcceptInvitation(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { name: string; password: string }) => api.post<SignedIn>(`/api/auth/invitations/${token}/accept`, input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(sessionKeys.me(), user);
    },
  });
}

export function useRequestReset() {
  return useMutation({
    mutationFn: (input: { email: string }) => api.post<ResetRequested>("/api/auth/password-reset", input),
    meta: { quiet: true },
  });
}

export function useResetPassword(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { password: string }) => api.post<SignedIn>(`/api/auth/password-reset/${token}`, input),
    meta: { quiet: true },
    onSuccess: ({ user }) => {
      qc.clear();
      qc.setQueryData(sessionKeys.me(), user);
    },
  });
}

/** Where each role lands after signing in. */
export function homeFor(user: User): string {
  return user.role === "investor" ? "/investors" : "/office";
}
