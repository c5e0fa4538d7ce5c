import { queryOptions, useMutation } from "@tanstack/react-query";
import type { EnquiryAccepted, EnquiryInput, EnquiryListQuery, EnquiryOwner, EnquiryPatch, EnquiryRow } from "#shared/schemas/enquiries.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { api, qs } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { readOptions } from "../../lib/query-keys.ts";

export const enquiryKeys = {
  all: ["enquiries"] as const,
  project: (slug: string) => [...enquiryKeys.all, "project", slug] as const,
  list: (f: EnquiryListQuery) => [...enquiryKeys.all, "list", f] as const,
  detail: (id: number) => [...enquiryKeys.all, "detail", id] as const,
  owners: () => [...enquiryKeys.all, "owners"] as const,
  facility: (slug: string) => [...enquiryKeys.project(slug), "facility"] as const,
};

/** The project an enquiry is about: its name, and whether visits are offered. */
export const enquiryProjectQueryOptions = (slug: string) => queryOptions({ queryKey: enquiryKeys.project(slug), queryFn: () => api.get<Project>(`/api/projects/${slug}`), retry: false });
/** The project's capacity blocks the caller may see: an enquiry "about this block" is pre-filled from one. */
export const enquiryFacilityQueryOptions = (slug: string) => readOptions<FacilityAnswer>(enquiryKeys.facility(slug), `/api/projects/${slug}/facility`);
export const enquiriesQueryOptions = (f: EnquiryListQuery) => queryOptions({ queryKey: enquiryKeys.list(f), queryFn: () => api.get<EnquiryRow[]>(`/api/enquiries${qs(f)}`) });
export const enquiryQueryOptions = (id: number) => readOptions<EnquiryRow>(enquiryKeys.detail(id), `/api/enquiries/${id}`);
export const enquiryOwnersQueryOptions = () => queryOptions({ queryKey: enquiryKeys.owners(), queryFn: () => api.get<EnquiryOwner[]>("/api/enquiries/owners"), staleTime: 5 * 60_000 });

export function useSendEnquiry(slug: string) {
  return useMutation({ mutationFn: (input: EnquiryInput) => api.post<EnquiryAccepted>(`/api/projects/${slug}/enquiries`, input), meta: { quiet: true } });
}

export const useUpdateEnquiry = () =>
  useRefreshingMutation(enquiryKeys.all, { mutationFn: ({ id, ...patch }: EnquiryPatch & { id: number }) => api.patch<EnquiryRow>(`/api/enquiries/${id}`, patch) });
