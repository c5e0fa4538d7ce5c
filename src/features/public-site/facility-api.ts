import { queryOptions, useQuery } from "@tanstack/react-query";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { GalleryPhoto } from "#shared/schemas/media.ts";
import { api } from "../../lib/api-client.ts";
import { siteKeys } from "./api.ts";
import { projectReadOptions } from "../../lib/projects.ts";

/**
 * Keys under the public site's project key (site → project(slug) → facility …): the readers'
 * pages (public and investor) keep their own entries, apart from the site office's.
 */
export const facilityReadKeys = {
  facility: (slug: string) => [...siteKeys.project(slug), "facility"] as const,
  photos: (slug: string) => [...siteKeys.project(slug), "facility-photos"] as const,
};

/** What a set of photos is about: a capacity block or a plant system (by id). */
export type PhotoSubject = { kind: "block" | "plant"; id: number };

/** GET /api/projects/:slug/facility: what the caller's audience may see, with the figures computed. */
export const facilityReadQueryOptions = (slug: string) => projectReadOptions<FacilityAnswer>(facilityReadKeys.facility(slug), slug, "facility");

/**
 * The public gallery once, for every card: each photo names the blocks and plant systems it is
 * tagged with (`facilityTags`), so the cards pick their own without a request each.
 */
export const facilityPhotosQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: facilityReadKeys.photos(slug),
    queryFn: async () => {
      const answer = await api.get<{ items?: GalleryPhoto[] } | GalleryPhoto[]>(`/api/projects/${slug}/gallery`);
      return Array.isArray(answer) ? answer : (answer.items ?? []);
    },
    enabled: slug !== "",
  });

/** The newest cleared photos tagged with a block or a plant system (newest first, as the gallery gives them). */
export function usePhotosOf(slug: string, about: PhotoSubject, count = 3): GalleryPhoto[] {
  const photos = useQuery(facilityPhotosQueryOptions(slug));
  return (photos.data ?? []).filter((p) => (p.facilityTags ?? []).some((t) => t.kind === about.kind && t.id === about.id)).slice(0, count);
}

export const useFacilityRead = (slug: string) => useQuery(facilityReadQueryOptions(slug));
