import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaItem, MediaPatchInput } from "#shared/schemas/media.ts";
import type { PostCreateInput, PostDetail, PostPatchInput, PostSummary } from "#shared/schemas/posts.ts";
import type { PostStatus, RevisionSummary as PostRevisionSummary } from "#shared/schemas/publishing.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { DraftSuggestionAnswer } from "#shared/schemas/writing-help.ts";
import { facilityTagChoicesQueryOptions } from "../../lib/facility-tags.ts";
import { api, getPage, qs } from "../../lib/api-client.ts";
import { pickerMediaQueryOptions, type PickerFilters } from "../../lib/media.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import type { RevisionHooks } from "../../lib/publishing-panels.tsx";
import { publishingApi } from "../../lib/publishing.ts";

export interface PostListFilters {
  page?: number;
  status?: PostStatus;
  audience?: Audience;
  tag?: string;
  q?: string;
}

export type MediaPickerFilters = PickerFilters;

/**
 * Keys: posts → project(slug) → kind → params for lists, posts → post(id) → kind for one
 * post. Invalidating a post's key refreshes its revisions, diffs and history with it.
 */
export const postKeys = {
  all: ["posts"] as const,
  projects: () => [...postKeys.all, "projects"] as const,
  project: (slug: string) => [...postKeys.all, "project", slug] as const,
  projectDetail: (slug: string) => [...postKeys.project(slug), "detail"] as const,
  list: (slug: string, f: PostListFilters = {}) => [...postKeys.project(slug), "list", f] as const,
  milestones: (slug: string) => [...postKeys.project(slug), "milestones"] as const,
  facilityTags: (slug: string) => [...postKeys.project(slug), "facility-tags"] as const,
  suggestion: (slug: string, audience: Audience) => [...postKeys.project(slug), "suggestion", audience] as const,
  media: (slug: string, f: MediaPickerFilters = {}) => [...postKeys.project(slug), "media", f] as const,
  detail: (id: number) => [...postKeys.all, "post", id] as const,
  revisions: (id: number) => [...postKeys.detail(id), "revisions"] as const,
  diff: (id: number, n: number, against?: number) => [...postKeys.detail(id), "diff", n, against ?? "previous"] as const,
  history: (id: number) => [...postKeys.detail(id), "history"] as const,
};

const publishing = publishingApi<PostDetail, PostPatchInput, PostRevisionSummary, PostCreateInput>("posts", postKeys);

export const postsProjectsQueryOptions = () => projectListQueryOptions(postKeys.projects());
export const postsProjectQueryOptions = (slug: string) => projectDetailQueryOptions(postKeys.projectDetail(slug), slug);

export const postListQueryOptions = (slug: string, f: PostListFilters = {}) =>
  queryOptions({
    queryKey: postKeys.list(slug, f),
    queryFn: () => getPage<PostSummary>(`/api/projects/${slug}/posts`, { page: f.page, status: f.status, audience: f.audience, tag: f.tag, q: f.q }),
    enabled: slug !== "",
  });

export const postQueryOptions = (id: number) => queryOptions({ queryKey: postKeys.detail(id), queryFn: () => api.get<PostDetail>(`/api/posts/${id}`), enabled: id > 0 });


/** The capacity blocks and plant systems an update may be tagged with. */
export const postFacilityTagsQueryOptions = (slug: string) => queryOptions({ ...facilityTagChoicesQueryOptions(postKeys.facilityTags(slug), slug), staleTime: 60_000 });

export const postMilestonesQueryOptions = (slug: string) => projectReadOptions<Milestone[]>(postKeys.milestones(slug), slug, "milestones");

const mediaPickerQueryOptions = (slug: string, f: MediaPickerFilters = {}) => pickerMediaQueryOptions(postKeys.media(slug, f), slug, f);

export const usePostList = (slug: string, f: PostListFilters = {}) => useQuery({ ...postListQueryOptions(slug, f), placeholderData: keepPreviousData });
/** What the revisions and history panels of the editor read through. */
export const postRevisionHooks: RevisionHooks = publishing;
export const usePostMilestones = (slug: string) => useQuery(postMilestonesQueryOptions(slug));
export const useMediaPicker = (slug: string, f: MediaPickerFilters = {}) => useQuery({ ...mediaPickerQueryOptions(slug, f), placeholderData: keepPreviousData });

export const useCreatePost = publishing.useCreate;

/** What Plumbline suggests writing about for an audience: what happened since its last published update (decision 061). */
export const draftSuggestionQueryOptions = (slug: string, audience: Audience) =>
  queryOptions({ queryKey: postKeys.suggestion(slug, audience), queryFn: () => api.get<DraftSuggestionAnswer>(`/api/projects/${slug}/draft-suggestion${qs({ audience })}`) });

/** Makes a draft from the suggestion as it stands now; answers the new update's id. */
export function useDraftFromSuggestion(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (audience: Audience) => api.post<{ id: number }>(`/api/projects/${slug}/draft-suggestion/draft`, { audience }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: postKeys.project(slug) }),
  });
}
export const useSavePost = publishing.useSave;
export const useWorkflow = publishing.useWorkflow;

/** Alt text, caption or (for leads) clearance of a library photo, from where the editor found it missing. */
export function usePatchMedia(slug: string, postId?: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: MediaPatchInput }) => api.patch<MediaItem>(`/api/media/${id}`, patch),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: postKeys.project(slug) });
      if (postId) void qc.invalidateQueries({ queryKey: postKeys.detail(postId) });
    },
  });
}
