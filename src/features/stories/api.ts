import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { RevisionSummary as StoryRevisionSummary } from "#shared/schemas/publishing.ts";
import type { StoryCreateInput, StoryDetail, StoryPatchInput, StorySummary } from "#shared/schemas/stories.ts";
import { api } from "../../lib/api-client.ts";
import { pickerMediaQueryOptions } from "../../lib/media.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import type { RevisionHooks } from "../../lib/publishing-panels.tsx";
import { publishingApi } from "../../lib/publishing.ts";
import { thenAndNowQueryOptions, type PairFilters } from "../../lib/then-and-now.ts";
import { featureKeys } from "../../lib/query-keys.ts";

export interface StoryMediaFilters {
  q?: string;
  area?: string;
  page?: number;
}

/** Keys: stories → project(slug) → kind → params; stories → story(id) → revisions, diff, history. */
export const storyKeys = {
  ...featureKeys("stories", ["list"]),
  projectDetail: (slug: string) => [...storyKeys.project(slug), "detail"] as const,
  media: (slug: string, f: StoryMediaFilters = {}) => [...storyKeys.project(slug), "media", f] as const,
  pairs: (slug: string, f: PairFilters) => [...storyKeys.project(slug), "then-and-now", f] as const,
  detail: (id: number) => [...storyKeys.all, "story", id] as const,
  revisions: (id: number) => [...storyKeys.detail(id), "revisions"] as const,
  diff: (id: number, n: number, against?: number) => [...storyKeys.detail(id), "diff", n, against ?? null] as const,
  history: (id: number) => [...storyKeys.detail(id), "history"] as const,
};

const publishing = publishingApi<StoryDetail, StoryPatchInput, StoryRevisionSummary, StoryCreateInput>("stories", storyKeys);

export const storiesProjectsQueryOptions = () => projectListQueryOptions(storyKeys.projects());
export const storiesProjectQueryOptions = (slug: string) => projectDetailQueryOptions(storyKeys.projectDetail(slug), slug);
export const storyListQueryOptions = (slug: string) => projectReadOptions<StorySummary[]>(storyKeys.list(slug), slug, "stories");
export const storyQueryOptions = (id: number) => queryOptions({ queryKey: storyKeys.detail(id), queryFn: () => api.get<StoryDetail>(`/api/stories/${id}`), enabled: id > 0 });
const storyMediaQueryOptions = (slug: string, f: StoryMediaFilters = {}) => pickerMediaQueryOptions(storyKeys.media(slug, f), slug, f);

export const useStoryList = (slug: string) => useQuery(storyListQueryOptions(slug));
/** What the revisions and history panels of the editor read through. */
export const storyRevisionHooks: RevisionHooks = publishing;
/** Then-and-now pairs the story's audience may see (decision 063). */
export const useStoryPairs = (slug: string, f: PairFilters) => useQuery({ ...thenAndNowQueryOptions(storyKeys.pairs(slug, f), slug, f), placeholderData: keepPreviousData });
export const useStoryMedia = (slug: string, f: StoryMediaFilters = {}) => useQuery({ ...storyMediaQueryOptions(slug, f), placeholderData: keepPreviousData });

export const useCreateStory = publishing.useCreate;
export const useSaveStory = publishing.useSave;
export const useStoryWorkflow = publishing.useWorkflow;
