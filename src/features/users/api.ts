import type { z } from "zod";
import type { DOCUMENTS_ANSWERS, OrganisationInputSchema } from "#shared/schemas/documents.ts";
import type { InvitationRow, InvitationSent, InviteInput, UserRow, UserUpdateInput } from "#shared/schemas/users.ts";
import { api } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { readOptions } from "../../lib/query-keys.ts";

export const userKeys = {
  all: ["users"] as const,
  list: () => [...userKeys.all, "list"] as const,
  invitations: () => [...userKeys.all, "invitations"] as const,
  organisations: () => [...userKeys.all, "organisations"] as const,
};

export const usersQueryOptions = () => readOptions<UserRow[]>(userKeys.list(), "/api/users");
export const invitationsQueryOptions = () => readOptions<InvitationRow[]>(userKeys.invitations(), "/api/users/invitations");

export const useInvite = () => useRefreshingMutation(userKeys.all, { mutationFn: (input: InviteInput) => api.post<InvitationSent>("/api/users/invitations", input) });

export const useUpdateUser = () =>
  useRefreshingMutation(userKeys.all, { mutationFn: ({ id, ...patch }: UserUpdateInput & { id: number }) => api.patch<UserRow>(`/api/users/${id}`, patch) });

/** Investor organisations (documents may be limited to some), each with its number of investors. */
export type Organisation = z.infer<typeof DOCUMENTS_ANSWERS.organisation>;
export const organisationsQueryOptions = () => readOptions<Organisation[]>(userKeys.organisations(), "/api/organisations");

export const useCreateOrganisation = () => useRefreshingMutation(userKeys.all, { mutationFn: (input: z.infer<typeof OrganisationInputSchema>) => api.post<Organisation>("/api/organisations", input) });

/** Sets an investor's organisation (or none); the counts of the organisations move with it. */
export const useSetOrganisation = () =>
  useRefreshingMutation(userKeys.all, { mutationFn: ({ id, organisationId }: { id: number; organisationId: number | null }) => api.patch<UserRow>(`/api/users/${id}/organisation`, { organisationId }) });
