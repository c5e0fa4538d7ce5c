import { queryOptions } from "@tanstack/react-query";
import type { InvitationRow, InvitationSent, InviteInput, UserRow, UserUpdateInput } from "#shared/schemas/users.ts";
import { api } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";

export const userKeys = {
  all: ["users"] as const,
  list: () => [...userKeys.all, "list"] as const,
  invitations: () => [...userKeys.all, "invitations"] as const,
};

export const usersQueryOptions = () => queryOptions({ queryKey: userKeys.list(), queryFn: () => api.get<UserRow[]>("/api/users") });
export const invitationsQueryOptions = () => queryOptions({ queryKey: userKeys.invitations(), queryFn: () => api.get<InvitationRow[]>("/api/users/invitations") });

export const useInvite = () => useRefreshingMutation(userKeys.all, { mutationFn: (input: InviteInput) => api.post<InvitationSent>("/api/users/invitations", input) });

export const useUpdateUser = () =>
  useRefreshingMutation(userKeys.all, { mutationFn: ({ id, ...patch }: UserUpdateInput & { id: number }) => api.patch<UserRow>(`/api/users/${id}`, patch) });
