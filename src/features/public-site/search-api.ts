import { queryOptions } from "@tanstack/react-query";
import type { SearchAnswer } from "#shared/schemas/search.ts";
import { api, qs } from "../../lib/api-client.ts";
import { siteKeys } from "./api.ts";

/** Keys: site → project(slug) → search → words. */
export const searchKeys = {
  search: (slug: string, q: string) => [...siteKeys.project(slug), "search", q] as const,
};

/** GET /api/projects/:slug/search?q=: what the caller may see that matches every word, best first. */
export const searchQueryOptions = (slug: string, q: string) =>
  queryOptions({
    queryKey: searchKeys.search(slug, q),
    queryFn: () => api.get<SearchAnswer>(`/api/projects/${slug}/search${qs({ q })}`),
    enabled: slug !== "" && q.trim() !== "",
  });
