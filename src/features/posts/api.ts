import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaItem, MediaListResponse, MediaPatchInput, MediaPicture } from "#shared/schemas/media.ts";
import type {
  PostCreateInput,
  PostDetail,
  PostPatchInput,
  PostRevisionSummary,
  PostStatus,
  PostSummary,
  PublishingProblem,
  RevisionDiff,
  ScheduleInput,
  WorkflowAction,
  WorkflowResult,
} from "#shared/schemas/posts.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { api, ApiError, qs } from "../../lib/api-client.ts";

export interface PostListFilters {
  page?: number;
  status?: PostStatus;
  audience?: Audience;
  tag?: string;
  q?: string;
}

export interface MediaPickerFilters {
  q?: string;
  area?: string;
  system?: string;
  page?: number;
}

export interface Page<T> {
  items: T[];
  total: number;
}

/** GET a list whose total comes in `X-Total-Count` (the posts contract); the shared client returns bodies only. */
async function getPage<T>(path: string): Promise<Page<T>> {
  const res = await fetch(path, { headers: { Accept: "application/json" }, credentials: "same-origin" });
  const body: unknown = (res.headers.get("content-type") ?? "").includes("json") ? await res.json() : null;
  if (!res.ok) {
    const err = (body as { error?: { code?: string; message?: string; fields?: Record<string, string> } } | null)?.error;
    throw new ApiError(res.status, err?.code ?? "http_error", err?.message ?? `The server answered ${res.status}.`, err?.fields ?? {}, body);
  }
  const items = Array.isArray(body) ? (body as T[]) : ((body as { items?: T[] } | null)?.items ?? []);
  const header = res.headers.get("x-total-count");
  const total = header !== null && Number.isFinite(Number(header)) ? Number(header) : ((body as { total?: number } | null)?.total ?? items.length);
  return { items, total };
}

/**
 * Keys: posts → project(slug) → kind → params for lists, posts → post(id) → kind for one
 * post. Invalidating a post's key refreshes its revisions and diffs with it.
 */
export const postKeys = {
  all: ["posts"] as const,
  // Features never import each other, so this one asks who is signed in under its own key.
  me: () => [...postKeys.all, "me"] as const,
  projects: () => [...postKeys.all, "projects"] as const,
  project: (slug: string) => [...postKeys.all, "project", slug] as const,
  projectDetail: (slug: string) => [...postKeys.project(slug), "detail"] as const,
  list: (slug: string, f: PostListFilters = {}) => [...postKeys.project(slug), "list", f] as const,
  milestones: (slug: string) => [...postKeys.project(slug), "milestones"] as const,
  media: (slug: string, f: MediaPickerFilters = {}) => [...postKeys.project(slug), "media", f] as const,
  detail: (id: number) => [...postKeys.all, "post", id] as const,
  revisions: (id: number) => [...postKeys.detail(id), "revisions"] as const,
  diff: (id: number, n: number, against?: number) => [...postKeys.detail(id), "diff", n, against ?? "previous"] as const,
};

export const postsMeQueryOptions = () =>
  queryOptions({
    queryKey: postKeys.me(),
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

export const postsProjectsQueryOptions = () => queryOptions({ queryKey: postKeys.projects(), queryFn: () => api.get<Project[]>("/api/projects") });
export const postsProjectQueryOptions = (slug: string) =>
  queryOptions({ queryKey: postKeys.projectDetail(slug), queryFn: () => api.get<Project>(`/api/projects/${slug}`), enabled: slug !== "" });

export const postListQueryOptions = (slug: string, f: PostListFilters = {}) =>
  queryOptions({
    queryKey: postKeys.list(slug, f),
    queryFn: () => getPage<PostSummary>(`/api/projects/${slug}/posts${qs({ page: f.page && f.page > 1 ? f.page : undefined, status: f.status, audience: f.audience, tag: f.tag, q: f.q })}`),
    enabled: slug !== "",
  });

export const postQueryOptions = (id: number) => queryOptions({ queryKey: postKeys.detail(id), queryFn: () => api.get<PostDetail>(`/api/posts/${id}`), enabled: id > 0 });

export const revisionsQueryOptions = (id: number) =>
  queryOptions({ queryKey: postKeys.revisions(id), queryFn: () => api.get<PostRevisionSummary[]>(`/api/posts/${id}/revisions`), enabled: id > 0 });

export const diffQueryOptions = (id: number, n: number, against?: number) =>
  queryOptions({
    queryKey: postKeys.diff(id, n, against),
    queryFn: () => api.get<RevisionDiff>(`/api/posts/${id}/revisions/${n}/diff${qs({ against })}`),
    enabled: id > 0 && n > 0,
  });

export const postMilestonesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: postKeys.milestones(slug), queryFn: () => api.get<Milestone[]>(`/api/projects/${slug}/milestones`), enabled: slug !== "" });

/** Ready photos of the project's library for the pickers (the library's own page has every filter). */
export const mediaPickerQueryOptions = (slug: string, f: MediaPickerFilters = {}) =>
  queryOptions({
    queryKey: postKeys.media(slug, f),
    queryFn: () => api.get<MediaListResponse>(`/api/media${qs({ project: slug, status: "ready", q: f.q, area: f.area, system: f.system, page: f.page, pageSize: 24 })}`),
    enabled: slug !== "",
  });

export const usePostsMe = () => useQuery(postsMeQueryOptions());
export const usePostsProjects = () => useQuery(postsProjectsQueryOptions());
export const usePostsProject = (slug: string) => useQuery(postsProjectQueryOptions(slug));
export const usePostList = (slug: string, f: PostListFilters = {}) => useQuery({ ...postListQueryOptions(slug, f), placeholderData: keepPreviousData });
export const usePost = (id: number) => useQuery(postQueryOptions(id));
export const useRevisions = (id: number) => useQuery(revisionsQueryOptions(id));
export const useDiff = (id: number, n: number, against?: number) => useQuery(diffQueryOptions(id, n, against));
export const usePostMilestones = (slug: string) => useQuery(postMilestonesQueryOptions(slug));
export const useMediaPicker = (slug: string, f: MediaPickerFilters = {}) => useQuery({ ...mediaPickerQueryOptions(slug, f), placeholderData: keepPreviousData });

export function useCreatePost(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: PostCreateInput) => api.post<{ id: number; slug: string; status: PostStatus }>(`/api/projects/${slug}/posts`, input),
    meta: { quiet: true },
    onSuccess: () => qc.invalidateQueries({ queryKey: postKeys.project(slug) }),
  });
}

export function useSavePost(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: PostPatchInput) => api.patch<PostDetail>(`/api/posts/${id}`, patch),
    // The editor shows conflicts and field errors beside the fields themselves.
    meta: { quiet: true },
    onSuccess: (post) => {
      qc.setQueryData(postKeys.detail(id), post);
      void qc.invalidateQueries({ queryKey: postKeys.revisions(id) });
      void qc.invalidateQueries({ queryKey: postKeys.project(post.projectSlug) });
    },
  });
}

export function useRestoreRevision(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (n: number) => api.post<PostDetail>(`/api/posts/${id}/revisions/${n}/restore`),
    onSuccess: () => qc.invalidateQueries({ queryKey: postKeys.detail(id) }),
  });
}

export type WorkflowInput = { action: Exclude<WorkflowAction, "return" | "schedule"> } | { action: "return"; comment: string } | { action: "schedule"; at: ScheduleInput["at"] };

export function useWorkflow(id: number, slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: WorkflowInput) => {
      const body = input.action === "return" ? { comment: input.comment } : input.action === "schedule" ? { at: input.at } : {};
      return api.post<WorkflowResult>(`/api/posts/${id}/${input.action}`, body);
    },
    // Refusals are shown on what they name (the photo, the cover, the milestone).
    meta: { quiet: true },
    onSettled: () => {
      void qc.invalidateQueries({ queryKey: postKeys.detail(id) });
      void qc.invalidateQueries({ queryKey: postKeys.project(slug) });
    },
  });
}

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

/** The problems of a 422 refusal (`publishing_blocked`), or null for any other error. */
export function problemsOf(e: unknown): PublishingProblem[] | null {
  if (!(e instanceof ApiError) || e.status !== 422) return null;
  const body = e.body as { error?: { problems?: PublishingProblem[] } } | null;
  return body?.error?.problems ?? null;
}

/** The post as it is now, from a 409 answer to a stale save. */
export function conflictOf(e: unknown): PostDetail | null {
  if (!(e instanceof ApiError) || e.status !== 409) return null;
  const body = e.body as { error?: { current?: PostDetail } } | null;
  return body?.error?.current ?? null;
}

/** A library item as the picture <Picture> draws (the list gives variants flat; pictures group them by format). */
export function pictureOfItem(item: MediaItem): MediaPicture {
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
