import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type {
  BulkTagInput,
  BulkTagResult,
  MediaItem,
  MediaListResponse,
  MediaPatchInput,
  MediaVocabulary,
  ReviewInput,
  Sensitivity,
} from "#shared/schemas/media.ts";
import type { System } from "#shared/schemas/programme.ts";
import { api, qs } from "../../lib/api-client.ts";
import { facilityTagChoicesQueryOptions } from "../../lib/facility-tags.ts";
import { projectListQueryOptions } from "../../lib/projects.ts";
import { thenAndNowQueryOptions, type PairFilters } from "../../lib/then-and-now.ts";

/** The library's filters as the page keeps them (and the query string carries them). */
export interface LibraryFilters {
  area?: string;
  system?: System;
  milestone?: number;
  takenFrom?: string;
  takenTo?: string;
  sensitivity?: Sensitivity;
  missingAlt?: boolean;
  flagged?: boolean;
  q?: string;
  page?: number;
}

export const LIBRARY_PAGE_SIZE = 24;

/**
 * Keys: media → project(slug) → kind → params, and media → item(id). Invalidating a
 * project's key refreshes its library pages, its review queue and its vocabulary.
 */
export const mediaKeys = {
  all: ["media"] as const,
  projects: () => [...mediaKeys.all, "projects"] as const,
  project: (slug: string) => [...mediaKeys.all, "project", slug] as const,
  vocabulary: (slug: string) => [...mediaKeys.project(slug), "vocabulary"] as const,
  facilityTags: (slug: string) => [...mediaKeys.project(slug), "facility-tags"] as const,
  lists: (slug: string) => [...mediaKeys.project(slug), "list"] as const,
  list: (slug: string, f: LibraryFilters) => [...mediaKeys.lists(slug), f] as const,
  review: (slug: string) => [...mediaKeys.project(slug), "review"] as const,
  pairs: (slug: string, f: PairFilters) => [...mediaKeys.project(slug), "then-and-now", f] as const,
  items: () => [...mediaKeys.all, "item"] as const,
  item: (id: number) => [...mediaKeys.items(), id] as const,
};

/** Then-and-now pairs of the library's photos for content of one audience (decision 063). */
export const useLibraryPairs = (slug: string, f: PairFilters, enabled: boolean) =>
  useQuery({ ...thenAndNowQueryOptions(mediaKeys.pairs(slug, f), slug, f), enabled: enabled && slug !== "", placeholderData: keepPreviousData });

export const mediaProjectsQueryOptions = () => queryOptions({ ...projectListQueryOptions(mediaKeys.projects()), staleTime: 5 * 60_000 });

export const vocabularyQueryOptions = (slug: string) =>
  queryOptions({ queryKey: mediaKeys.vocabulary(slug), queryFn: () => api.get<MediaVocabulary>(`/api/media/vocabulary${qs({ project: slug })}`), enabled: slug !== "", staleTime: 60_000 });

/** The capacity blocks and plant systems a photo may be tagged with. */
export const mediaFacilityTagsQueryOptions = (slug: string) => queryOptions({ ...facilityTagChoicesQueryOptions(mediaKeys.facilityTags(slug), slug), staleTime: 60_000 });

const anyProcessing = (items: MediaItem[] | undefined) => Boolean(items?.some((i) => i.status === "processing"));

export const mediaListQueryOptions = (slug: string, f: LibraryFilters) =>
  queryOptions({
    queryKey: mediaKeys.list(slug, f),
    queryFn: () =>
      api.get<MediaListResponse>(
        `/api/media${qs({
          project: slug,
          area: f.area,
          system: f.system,
          milestone: f.milestone,
          takenFrom: f.takenFrom,
          takenTo: f.takenTo,
          sensitivity: f.sensitivity,
          missingAlt: f.missingAlt ? "true" : undefined,
          flagged: f.flagged ? "true" : undefined,
          q: f.q,
          page: f.page ?? 1,
          pageSize: LIBRARY_PAGE_SIZE,
        })}`,
      ),
    enabled: slug !== "",
    placeholderData: keepPreviousData,
    staleTime: 10_000,
    // Photos still being processed appear as soon as they are ready.
    refetchInterval: (query) => (anyProcessing(query.state.data?.items) ? 2_000 : false),
  });

export const reviewQueueQueryOptions = (slug: string) =>
  queryOptions({ queryKey: mediaKeys.review(slug), queryFn: () => api.get<MediaItem[]>(`/api/media/review${qs({ project: slug })}`), enabled: slug !== "" });

/** One photo; polled every second while it is being processed. */
export const mediaItemQueryOptions = (id: number) =>
  queryOptions({
    queryKey: mediaKeys.item(id),
    queryFn: () => api.get<MediaItem>(`/api/media/${id}`),
    refetchInterval: (query) => (query.state.data?.status === "processing" ? 1_000 : false),
  });

export const useMediaItem = (id: number) => useQuery(mediaItemQueryOptions(id));

/** Leads and administrators decide sensitivity; the server checks it too. */
export const canReview = (me: User | null | undefined) => me?.role === "lead" || me?.role === "admin";

function useInvalidateProject(slug: string) {
  const qc = useQueryClient();
  return (ids: number[] = []) => {
    void qc.invalidateQueries({ queryKey: mediaKeys.project(slug) });
    for (const id of ids) void qc.invalidateQueries({ queryKey: mediaKeys.item(id) });
  };
}

export function useUpdateMedia(slug: string) {
  const invalidate = useInvalidateProject(slug);
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: MediaPatchInput }) => api.patch<MediaItem>(`/api/media/${id}`, patch),
    onSuccess: (item) => {
      qc.setQueryData(mediaKeys.item(item.id), item);
      invalidate();
    },
  });
}

export function useBulkTag(slug: string) {
  const invalidate = useInvalidateProject(slug);
  return useMutation({
    mutationFn: (input: BulkTagInput) => api.post<BulkTagResult>("/api/media/bulk-tags", input),
    onSuccess: (_r, input) => invalidate(input.ids),
  });
}

export function useReview(slug: string) {
  const invalidate = useInvalidateProject(slug);
  return useMutation({
    mutationFn: ({ id, ...input }: ReviewInput & { id: number }) => api.post<MediaItem>(`/api/media/${id}/review`, input),
    onSuccess: (item) => invalidate([item.id]),
  });
}

export function useRetry(slug: string) {
  const invalidate = useInvalidateProject(slug);
  return useMutation({
    mutationFn: (id: number) => api.post<MediaItem>(`/api/media/${id}/retry`),
    onSuccess: (item) => invalidate([item.id]),
  });
}

/** Tells the library that uploads have made new photos. */
export function useRefreshLibrary(slug: string) {
  return useInvalidateProject(slug);
}
