import { queryOptions, useMutation, useQuery } from "@tanstack/react-query";
import type { DigestPreview, DigestRunInput, DigestRunStarted, DigestRunSummary, DigestTestInput, DigestTestSent, DigestUpcoming } from "#shared/schemas/digests.ts";
import type { SubscriberList } from "#shared/schemas/subscribers.ts";
import { api, qs } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { projectListQueryOptions } from "../../lib/projects.ts";
import { featureKeys } from "../../lib/query-keys.ts";

export const digestKeys = {
  ...featureKeys("digests", ["runs", "upcoming", "recipients"]),
  preview: (subscriberId: number) => [...digestKeys.all, "preview", subscriberId] as const,
};

const sending = (runs: DigestRunSummary[] | undefined) => Boolean(runs?.some((r) => r.status === "running" || r.status === "queued"));

export const digestRunsQueryOptions = (project: string) =>
  queryOptions({
    queryKey: digestKeys.runs(project),
    queryFn: () => api.get<DigestRunSummary[]>(`/api/digests/runs${qs({ project })}`),
    // While a run sends, its counts move: ask again every second.
    refetchInterval: (q) => (sending(q.state.data) ? 1000 : false),
  });

export const digestProjectsQueryOptions = () => projectListQueryOptions(digestKeys.projects());
export const upcomingDigestsQueryOptions = (project: string) => queryOptions({ queryKey: digestKeys.upcoming(project), queryFn: () => api.get<DigestUpcoming[]>(`/api/digests/upcoming${qs({ project })}`) });
export const useDigestRecipients = (project: string) =>
  useQuery({ queryKey: digestKeys.recipients(project), queryFn: () => api.get<SubscriberList>(`/api/subscribers${qs({ projectSlug: project, status: "confirmed" })}`), enabled: project !== "" });
export const useDigestPreview = (subscriberId: number | null) =>
  useQuery({ queryKey: digestKeys.preview(subscriberId ?? 0), queryFn: () => api.get<DigestPreview>(`/api/digests/preview${qs({ subscriberId })}`), enabled: subscriberId !== null });

export const useRunDigest = () => useRefreshingMutation(digestKeys.all, { mutationFn: (input: DigestRunInput) => api.post<DigestRunStarted>("/api/digests/runs", input) });

export const usePauseResume = () =>
  useRefreshingMutation(digestKeys.all, { mutationFn: (p: { id: number; action: "pause" | "resume" }) => api.post<DigestRunSummary>(`/api/digests/runs/${p.id}/${p.action}`) });

export const useSendTest = () => useMutation({ mutationFn: (input: DigestTestInput) => api.post<DigestTestSent>("/api/digests/test", input) });
