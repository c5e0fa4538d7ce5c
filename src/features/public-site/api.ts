import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { MediaPicture, PostDetail, PostRedirect, PostSummary } from "#shared/schemas/posts.ts";
import type { StoryDetail, StorySummary } from "#shared/schemas/stories.ts";
import { api, getPage, qs } from "../../lib/api-client.ts";
import { projectDetailQueryOptions, projectReadOptions } from "../../lib/projects.ts";

/** A capacity block or plant system of the facility, by id (as the address carries it). */
export interface FacilityFilter {
  block?: string;
  plant?: string;
}

export interface UpdateFilters extends FacilityFilter {
  page?: number;
  tag?: string;
  q?: string;
}

export interface GalleryFilters extends FacilityFilter {
  area?: string;
  system?: string;
  /** `YYYY-MM`. */
  month?: string;
}

/** One photo of the public gallery: the picture and where and when it was taken. */
export interface GalleryPhoto extends MediaPicture {
  areas: string[];
  systems: string[];
  /** `YYYY-MM` of the capture time (or of the upload when the photo carries none). */
  month: string | null;
}

/** GET /api/projects/:slug/gallery: the photos, and the choices its filters offer. */
export interface Gallery {
  items: GalleryPhoto[];
  areas: string[];
  systems: string[];
  months: string[];
}

/**
 * Keys: site → project(slug) → kind → params. The public pages keep their own cache
 * entries, since features never import each other.
 */
export const siteKeys = {
  all: ["site"] as const,
  project: (slug: string) => [...siteKeys.all, "project", slug] as const,
  detail: (slug: string) => [...siteKeys.project(slug), "detail"] as const,
  updates: (slug: string, f: UpdateFilters = {}) => [...siteKeys.project(slug), "updates", f] as const,
  update: (slug: string, postSlug: string) => [...siteKeys.project(slug), "update", postSlug] as const,
  stories: (slug: string) => [...siteKeys.project(slug), "stories"] as const,
  story: (slug: string, storySlug: string) => [...siteKeys.project(slug), "story", storySlug] as const,
  gallery: (slug: string, f: GalleryFilters = {}) => [...siteKeys.project(slug), "gallery", f] as const,
};

export const siteProjectQueryOptions = (slug: string) => projectDetailQueryOptions(siteKeys.detail(slug), slug);

/** Published updates the caller may see (investors' posts appear for investors and staff, marked). */
export const updatesQueryOptions = (slug: string, f: UpdateFilters = {}) =>
  queryOptions({
    queryKey: siteKeys.updates(slug, f),
    queryFn: () => getPage<PostSummary>(`/api/projects/${slug}/posts`, { page: f.page, tag: f.tag, block: f.block, plant: f.plant, q: f.q, status: "published" }),
    enabled: slug !== "",
  });

/** A post page, or where its old address now leads. */
export const updateQueryOptions = (slug: string, postSlug: string) =>
  queryOptions({
    queryKey: siteKeys.update(slug, postSlug),
    queryFn: () => api.get<PostDetail | PostRedirect>(`/api/projects/${slug}/posts/${postSlug}`),
    enabled: slug !== "" && postSlug !== "",
  });

export const storiesQueryOptions = (slug: string) => projectReadOptions<StorySummary[]>(siteKeys.stories(slug), slug, "stories");

export const storyQueryOptions = (slug: string, storySlug: string) =>
  queryOptions({
    queryKey: siteKeys.story(slug, storySlug),
    queryFn: () => api.get<StoryDetail | PostRedirect>(`/api/projects/${slug}/stories/${storySlug}`),
    enabled: slug !== "" && storySlug !== "",
  });

type GalleryAnswer = Partial<Gallery> | Array<MediaPicture & Partial<Pick<GalleryPhoto, "areas" | "systems" | "month">> & { tags?: { areas?: string[]; systems?: string[] } }>;

/**
 * The gallery in one shape whether the API sends `{ items, areas, systems, months }` or the
 * photos alone: each photo's month is its capture month where the API gives none, and the
 * filter choices are gathered from the photos where the API does not list them.
 */
export function normaliseGallery(answer: GalleryAnswer): Gallery {
  const raw = Array.isArray(answer) ? answer : (answer.items ?? []);
  const items: GalleryPhoto[] = raw.map((p) => {
    const tagged = p as { tags?: { areas?: string[]; systems?: string[] } };
    return {
      ...p,
      areas: p.areas ?? tagged.tags?.areas ?? [],
      systems: p.systems ?? tagged.tags?.systems ?? [],
      month: p.month ?? (p.takenAt && /^\d{4}-\d{2}/.test(p.takenAt) ? p.takenAt.slice(0, 7) : null),
    };
  });
  const listed = Array.isArray(answer) ? {} : answer;
  const uniq = (xs: string[]) => [...new Set(xs)].sort();
  return {
    items,
    areas: listed.areas ?? uniq(items.flatMap((i) => i.areas)),
    systems: listed.systems ?? uniq(items.flatMap((i) => i.systems)),
    months: listed.months ?? uniq(items.flatMap((i) => (i.month ? [i.month] : []))).reverse(),
  };
}

export const galleryQueryOptions = (slug: string, f: GalleryFilters = {}) =>
  queryOptions({
    queryKey: siteKeys.gallery(slug, f),
    queryFn: async () => normaliseGallery(await api.get<GalleryAnswer>(`/api/projects/${slug}/gallery${qs({ ...f })}`)),
    enabled: slug !== "",
  });

export const useUpdates = (slug: string, f: UpdateFilters = {}) => useQuery({ ...updatesQueryOptions(slug, f), placeholderData: keepPreviousData });
export const useStories = (slug: string) => useQuery(storiesQueryOptions(slug));

export const isRedirect = (v: unknown): v is PostRedirect => typeof v === "object" && v !== null && "redirectTo" in v;
