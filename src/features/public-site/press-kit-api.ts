import { queryOptions } from "@tanstack/react-query";
import type { PressUsageTerms } from "#shared/schemas/press-kits.ts";
import { api, qs } from "../../lib/api-client.ts";
import { siteKeys } from "./api.ts";

/** Keys: site → project(slug) → press-kit-terms. */
export const pressKitKeys = {
  terms: (slug: string) => [...siteKeys.project(slug), "press-kit-terms"] as const,
};

/** GET /api/projects/:slug/press-kit/terms: the line of usage terms printed beside the download. */
export const pressTermsQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: pressKitKeys.terms(slug),
    queryFn: () => api.get<PressUsageTerms>(`/api/projects/${slug}/press-kit/terms`),
    enabled: slug !== "",
  });

/** The public download (a plain link, outside /api): the gallery or one of its areas, or a published public story. */
export const publicPressKitUrl = (slug: string, of: { area?: string; story?: string }) => `/projects/${slug}/press-kit.zip${qs({ area: of.area, story: of.story })}`;
