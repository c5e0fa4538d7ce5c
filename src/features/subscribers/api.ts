import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import {
  SUBSCRIBER_PAGE_SIZE,
  type ConfirmationDone,
  type ConfirmationView,
  type ErasureResult,
  type InvestorDigestInput,
  type InvestorDigestSetting,
  type PreferencesInput,
  type PreferencesView,
  type SubscriberImportInput,
  type SubscriberImportResult,
  type SubscriberList,
  type SubscriberFilterQuery,
  type SubscriptionAccepted,
  type SubscriptionInput,
  type SubscriptionOptions,
  type SubscriptionStatusResult,
  type UnsubscribeView,
} from "#shared/schemas/subscribers.ts";
import type { DigestArchiveCopy, DigestArchivePage } from "#shared/schemas/digests.ts";
import { api, qs } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys, readOptions } from "../../lib/query-keys.ts";

/** Visitors' side: the form's options and the pages opened from signed links. */
export const subscriptionKeys = {
  ...featureKeys("subscriptions", ["options"]),
  /** A page opened from a signed link, by the link's kind and token. */
  link: (kind: LinkKind, token: string) => [...subscriptionKeys.all, kind, token] as const,
};

type LinkKind = "confirm" | "preferences" | "unsubscribe";

/** The read behind a page opened from a signed link: once only, as a refused link stays refused. */
const linkReadOptions = <T>(kind: LinkKind, token: string) =>
  queryOptions({ queryKey: subscriptionKeys.link(kind, token), queryFn: () => api.get<T>(`/api/subscriptions/${kind}/${token}`), retry: false });

/** The site office's list: its filters and the page (from the address). */
export type SubscriberOfficeQuery = SubscriberFilterQuery & { page?: number };

/** The site office's list. */
export const subscriberKeys = {
  all: ["subscribers"] as const,
  list: (f: SubscriberOfficeQuery) => [...subscriberKeys.all, "list", f] as const,
};

export const investorDigestKeys = {
  all: ["investor-digest"] as const,
  mine: () => [...investorDigestKeys.all, "mine"] as const,
};

export const subscriptionProjectsQueryOptions = () => projectListQueryOptions(subscriptionKeys.projects());
export const subscriptionOptionsQueryOptions = (slug: string) => projectReadOptions<SubscriptionOptions>(subscriptionKeys.options(slug), slug, "subscription-options");
export const confirmationQueryOptions = (token: string) => linkReadOptions<ConfirmationView>("confirm", token);
export const preferencesQueryOptions = (token: string) => linkReadOptions<PreferencesView>("preferences", token);
export const unsubscribeQueryOptions = (token: string) => linkReadOptions<UnsubscribeView>("unsubscribe", token);
/** One page (SUBSCRIBER_PAGE_SIZE rows) of the office list, newest first, with the total. */
export const subscribersQueryOptions = (f: SubscriberOfficeQuery) =>
  queryOptions({
    queryKey: subscriberKeys.list(f),
    queryFn: () => api.get<SubscriberList>(`/api/subscribers${qs({ ...f, page: f.page && f.page > 1 ? f.page : undefined, pageSize: SUBSCRIBER_PAGE_SIZE })}`),
  });
export const investorDigestQueryOptions = () => readOptions<InvestorDigestSetting[]>(investorDigestKeys.mine(), "/api/investors/digest");

/** The export link of the current filters (a download, not a query). */
export const subscribersCsvUrl = (f: SubscriberFilterQuery) => `/api/subscribers/export.csv${qs(f)}`;
export const personDataUrl = (id: number) => `/api/subscribers/${id}/export`;

export function useSubscribe() {
  return useMutation({ mutationFn: (input: SubscriptionInput) => api.post<SubscriptionAccepted>("/api/subscriptions", input), meta: { quiet: true } });
}

export const useConfirm = (token: string) =>
  useRefreshingMutation(subscriptionKeys.link("confirm", token), { mutationFn: () => api.post<ConfirmationDone>(`/api/subscriptions/confirm/${token}`, {}), meta: { quiet: true } });

export function useUpdatePreferences(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: PreferencesInput) => api.patch<PreferencesView>(`/api/subscriptions/preferences/${token}`, patch),
    meta: { quiet: true },
    onSuccess: (view) => qc.setQueryData(subscriptionKeys.link("preferences", token), view),
  });
}

export const useLeaveFromPreferences = (token: string) =>
  useRefreshingMutation(subscriptionKeys.link("preferences", token), { mutationFn: () => api.post<SubscriptionStatusResult>(`/api/subscriptions/preferences/${token}/unsubscribe`, {}) });

export const useUnsubscribe = (token: string) =>
  useRefreshingMutation(subscriptionKeys.link("unsubscribe", token), { mutationFn: () => api.post<SubscriptionStatusResult>(`/api/subscriptions/unsubscribe/${token}`, {}) });

export const useSetInvestorDigest = () =>
  useRefreshingMutation(investorDigestKeys.all, {
    mutationFn: ({ slug, ...input }: InvestorDigestInput & { slug: string }) => api.patch<InvestorDigestSetting>(`/api/investors/digest/${slug}`, input),
    meta: { quiet: true },
  });

export const useImportSubscribers = () =>
  useRefreshingMutation(subscriberKeys.all, { mutationFn: (input: SubscriberImportInput) => api.post<SubscriberImportResult>("/api/subscribers/import", input), meta: { quiet: true } });

export const useEraseSubscriber = () => useRefreshingMutation(subscriberKeys.all, { mutationFn: (id: number) => api.delete<ErasureResult>(`/api/subscribers/${id}`) });

/** A subscriber's archive of sent digests (decision 045): by the signed preferences link, or an investor's own. */
export const digestArchiveKeys = {
  all: ["digest-archive"] as const,
  byLink: (token: string, page: number) => [...digestArchiveKeys.all, "link", token, page] as const,
  copyByLink: (token: string, id: number) => [...digestArchiveKeys.all, "link", token, "copy", id] as const,
  mine: (page: number) => [...digestArchiveKeys.all, "mine", page] as const,
  myCopy: (id: number) => [...digestArchiveKeys.all, "mine", "copy", id] as const,
};

export const pastDigestsQueryOptions = (token: string, page: number) =>
  queryOptions({ queryKey: digestArchiveKeys.byLink(token, page), queryFn: () => api.get<DigestArchivePage>(`/api/subscriptions/preferences/${token}/digests${qs({ page })}`), retry: false });
export const pastDigestQueryOptions = (token: string, id: number) =>
  queryOptions({ queryKey: digestArchiveKeys.copyByLink(token, id), queryFn: () => api.get<DigestArchiveCopy>(`/api/subscriptions/preferences/${token}/digests/${id}`), retry: false });
export const myDigestsQueryOptions = (page: number) => queryOptions({ queryKey: digestArchiveKeys.mine(page), queryFn: () => api.get<DigestArchivePage>(`/api/me/digests${qs({ page })}`) });
export const myDigestQueryOptions = (id: number) => readOptions<DigestArchiveCopy>(digestArchiveKeys.myCopy(id), `/api/me/digests/${id}`);
