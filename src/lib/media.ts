import { queryOptions, type QueryKey } from "@tanstack/react-query";
import type { MediaItem, MediaListResponse, MediaPicture } from "#shared/schemas/media.ts";
import { api, pageCount, qs } from "./api-client.ts";

/** What the photo pickers of the editors narrow the library by. */
export interface PickerFilters {
  q?: string;
  area?: string;
  system?: string;
  page?: number;
}

/**
 * Ready photos of a project's library for a picker (the library's own page has every filter),
 * under the caller's key.
 */
export const pickerMediaQueryOptions = (queryKey: QueryKey, slug: string, f: PickerFilters = {}) =>
  queryOptions({
    queryKey,
    queryFn: () => api.get<MediaListResponse>(`/api/media${qs({ project: slug, status: "ready", q: f.q, area: f.area, system: f.system, page: f.page, pageSize: 24 })}`),
    enabled: slug !== "",
  });

/** A library item as the picture <Picture> draws (the list gives variants flat; pictures group them by format). */
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

/** What a library photo shows, in words: its alt text, else its caption, else its file name. */
export function mediaItemTitle(item: MediaItem): string {
  return item.altText?.trim() || item.caption?.trim() || item.name;
}

/**
 * What a photo picker shows of one page of the library: its items, how many pages there are,
 * and choosing one by id. A restricted photo is listed but cannot be chosen: it never appears
 * in public or investor content.
 */
export function pickerPage(data: MediaListResponse | undefined, onChoose: (item: MediaItem, picture: MediaPicture) => void): { items: MediaItem[]; pages: number; choose: (id: number) => void } {
  const items = data?.items ?? [];
  return {
    items,
    pages: data ? pageCount(data.total, data.pageSize) : 1,
    choose: (id) => {
      const item = items.find((i) => i.id === id);
      if (item && item.sensitivity !== "restricted") onChoose(item, pictureOfMediaItem(item));
    },
  };
}
