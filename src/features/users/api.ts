import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import type { InvitationRow, InvitationSent, InviteInput, UserRow, UserUpdateInput } from "#shared/schemas/users.ts";
import { api } from "../../lib/api-client.ts";

export const userKeys = {
  all: ["users"] as const,
  list: () => [...userKeys.all, "list"] as const,
  invitations: () => [...userKeys.all, "invitations"] as const,
};

export const usersQueryOptions = () => queryOptions({ queryKey: userKeys.list(), queryFn: () => api.get<UserRow[]>("/api/users") });
export const invitationsQueryOptions = () => queryOptions({ queryKey: userKeys.invitations(), queryFn: () => api.get<InvitationRow[]>("/api/users/invitations") });

export function useInvite() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: InviteInput) => api.post<InvitationSent>("/api/users/invitations", input),
    onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.all }),
  });
}

export function useUpdateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...patch }: UserUpdateInput & { id: number }) => api.patch<UserRow>(`/api/users/${id}`, patch),
    onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.all }),
  });
}
