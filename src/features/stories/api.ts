import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type { MediaItem, MediaListResponse, MediaPicture } from "#shared/schemas/media.ts";
import type { PostStatus, PublishingProblem, ScheduleInput, WorkflowAction, WorkflowResult } from "#shared/schemas/posts.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PublishingEvent, StoryCreateInput, StoryDetail, StoryPatchInput, StoryRevisionDiff, StoryRevisionSummary, StorySummary } from "#shared/schemas/stories.ts";
import { api, ApiError, qs } from "../../lib/api-client.ts";

export interface StoryMediaFilters {
  q?: string;
  area?: string;
  page?: number;
}

/** Keys: stories → project(slug) → kind → params; stories → story(id) → revisions, diff, history. */
export const storyKeys = {
  all: ["stories"] as const,
  // Features never import each other, so this one asks who is signed in under its own key.
  me: () => [...storyKeys.all, "me"] as const,
  projects: () => [...storyKeys.all, "projects"] as const,
  project: (slug: string) => [...storyKeys.all, "project", slug] as const,
  projectDetail: (slug: string) => [...storyKeys.project(slug), "detail"] as const,
  list: (slug: string) => [...storyKeys.project(slug), "list"] as const,
  media: (slug: string, f: StoryMediaFilters = {}) => [...storyKeys.project(slug), "media", f] as const,
  detail: (id: number) => [...storyKeys.all, "story", id] as const,
  revisions: (id: number) => [...storyKeys.detail(id), "revisions"] as const,
  diff: (id: number, n: number, against?: number) => [...storyKeys.detail(id), "diff", n, against ?? null] as const,
  history: (id: number) => [...storyKeys.detail(id), "history"] as const,
};

export const storiesMeQueryOptions = () =>
  queryOptions({
    queryKey: storyKeys.me(),
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

export const storiesProjectsQueryOptions = () => queryOptions({ queryKey: storyKeys.projects(), queryFn: () => api.get<Project[]>("/api/projects") });
export const storiesProjectQueryOptions = (slug: string) =>
  queryOptions({ queryKey: storyKeys.projectDetail(slug), queryFn: () => api.get<Project>(`/api/projects/${slug}`), enabled: slug !== "" });
export const storyListQueryOptions = (slug: string) =>
  queryOptions({ queryKey: storyKeys.list(slug), queryFn: () => api.get<StorySummary[]>(`/api/projects/${slug}/stories`), enabled: slug !== "" });
export const storyQueryOptions = (id: number) => queryOptions({ queryKey: storyKeys.detail(id), queryFn: () => api.get<StoryDetail>(`/api/stories/${id}`), enabled: id > 0 });
export const storyRevisionsQueryOptions = (id: number) =>
  queryOptions({ queryKey: storyKeys.revisions(id), queryFn: () => api.get<StoryRevisionSummary[]>(`/api/stories/${id}/revisions`), enabled: id > 0 });
export const storyDiffQueryOptions = (id: number, n: number, against?: number) =>
  queryOptions({
    queryKey: storyKeys.diff(id, n, against),
    queryFn: () => api.get<StoryRevisionDiff>(`/api/stories/${id}/revisions/${n}/diff${qs({ against })}`),
    enabled: id > 0 && n > 0,
  });
export const storyHistoryQueryOptions = (id: number) =>
  queryOptions({ queryKey: storyKeys.history(id), queryFn: () => api.get<PublishingEvent[]>(`/api/stories/${id}/history`), enabled: id > 0 });
export const storyMediaQueryOptions = (slug: string, f: StoryMediaFilters = {}) =>
  queryOptions({
    queryKey: storyKeys.media(slug, f),
    queryFn: () => api.get<MediaListResponse>(`/api/media${qs({ project: slug, status: "ready", q: f.q, area: f.area, page: f.page, pageSize: 24 })}`),
    enabled: slug !== "",
  });

export const useStoriesMe = () => useQuery(storiesMeQueryOptions());
export const useStoriesProjects = () => useQuery(storiesProjectsQueryOptions());
export const useStoriesProject = (slug: string) => useQuery(storiesProjectQueryOptions(slug));
export const useStoryList = (slug: string) => useQuery(storyListQueryOptions(slug));
export const useStory = (id: number) => useQuery(storyQueryOptions(id));
export const useStoryRevisions = (id: number) => useQuery(storyRevisionsQueryOptions(id));
export const useStoryDiff = (id: number, n: number, against?: number) => useQuery(storyDiffQueryOptions(id, n, against));
export const useStoryHistory = (id: number) => useQuery(storyHistoryQueryOptions(id));
export const useStoryMedia = (slug: string, f: StoryMediaFilters = {}) => useQuery({ ...storyMediaQueryOptions(slug, f), placeholderData: keepPreviousData });

export function useCreateStory(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: StoryCreateInput) => api.post<{ id: number; slug: string; status: PostStatus }>(`/api/projects/${slug}/stories`, input),
    meta: { quiet: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: storyKeys.project(slug) }),
  });
}

export function useSaveStory(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: StoryPatchInput) => api.patch<StoryDetail>(`/api/stories/${id}`, patch),
    meta: { quiet: true },
    onSuccess: (story) => {
      qc.setQueryData(storyKeys.detail(id), story);
      void qc.invalidateQueries({ queryKey: storyKeys.revisions(id) });
      void qc.invalidateQueries({ queryKey: storyKeys.history(id) });
      void qc.invalidateQueries({ queryKey: storyKeys.project(story.projectSlug) });
    },
  });
}

/** Brings back a revision as a new one; the editor takes in the story it answers. */
export function useRestoreStoryRevision(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (n: number) => api.post<StoryDetail>(`/api/stories/${id}/revisions/${n}/restore`),
    // A refusal (a published story whose restored photos fail the checks) is shown by the editor.
    meta: { quiet: true },
    onSuccess: (story) => {
      qc.setQueryData(storyKeys.detail(id), story);
      void qc.invalidateQueries({ queryKey: storyKeys.revisions(id) });
      void qc.invalidateQueries({ queryKey: storyKeys.history(id) });
      void qc.invalidateQueries({ queryKey: storyKeys.project(story.projectSlug) });
    },
  });
}

export type StoryWorkflowInput =
  | { action: Exclude<WorkflowAction, "return" | "schedule">; comment?: undefined }
  | { action: "return"; comment: string }
  | { action: "schedule"; at: ScheduleInput["at"]; comment?: undefined };

export function useStoryWorkflow(id: number, slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: StoryWorkflowInput) =>
      api.post<WorkflowResult>(`/api/stories/${id}/${input.action}`, input.action === "return" ? { comment: input.comment } : input.action === "schedule" ? { at: input.at } : {}),
    meta: { quiet: true },
    onSettled: () => {
      void qc.invalidateQueries({ queryKey: storyKeys.detail(id) });
      void qc.invalidateQueries({ queryKey: storyKeys.project(slug) });
    },
  });
}

/** The problems of a 422 refusal (`publishing_blocked`), or null for any other error. */
export function storyProblemsOf(e: unknown): PublishingProblem[] | null {
  if (!(e instanceof ApiError) || e.status !== 422) return null;
  const body = e.body as { error?: { problems?: PublishingProblem[] } } | null;
  return body?.error?.problems ?? null;
}

/** A library item as a picture (the list gives variants flat; pictures group them by format). */
export function pictureOfMediaItem(item: MediaItem): MediaPicture {
  const by = (f: "avif" | "webp" | "jpeg") =>
    item.variants
      .filter((v) => v.format === f)
      .sort((a, b) => a.width - b.width)
      .map((v) => ({ url: v.url, width: v.width, height: v.height, format: v.format }));
  return {
    id: item.id,
    width: item.width,
    height: item.height,
    altText: item.altText,
    caption: item.caption,
    credit: item.credit,
    placeholder: item.placeholder,
    dominantColor: item.dominantColor,
    takenAt: item.takenAt,
    focal: item.focal,
    isIllustration: item.isIllustration,
    sources: { avif: by("avif"), webp: by("webp"), jpeg: by("jpeg") },
  };
}
