import { queryOptions, type QueryKey } from "@tanstack/react-query";
import type { Audience } from "#shared/schemas/common.ts";
import type { ThenAndNowAnswer } from "#shared/schemas/writing-help.ts";
import { api, qs } from "./api-client.ts";

/** What the then-and-now pairs are narrowed by (GET /api/projects/:slug/then-and-now). */
export interface PairFilters {
  audience: Audience;
  area?: string;
  limit?: number;
}

/**
 * Then-and-now pairs found among a project's photos for content of one audience (decision 063),
 * under the caller's key: the story editor and the media library each keep their own.
 */
export const thenAndNowQueryOptions = (queryKey: QueryKey, slug: string, f: PairFilters) =>
  queryOptions({
    queryKey,
    queryFn: () => api.get<ThenAndNowAnswer>(`/api/projects/${slug}/then-and-now${qs({ audience: f.audience, area: f.area, limit: f.limit })}`),
    enabled: slug !== "",
    staleTime: 60_000,
  });
