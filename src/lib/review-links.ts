import { useQuery } from "@tanstack/react-query";
import type { ReviewContentKind, ReviewLink, ReviewLinkCreated, ReviewLinkInput } from "#shared/schemas/review-links.ts";
import { api } from "./api-client.ts";
import { useRefreshingMutation } from "./mutations.ts";

/*
 * The site office's side of review links, the same for updates and photo stories: each editor
 * shows the panel (review-links-panel.tsx) for its own item. The reviewer's page is the
 * review-links feature's.
 */

const PATHS: Record<ReviewContentKind, string> = { post: "posts", story: "stories" };

export const reviewLinkKeys = {
  all: ["review-links"] as const,
  of: (kind: ReviewContentKind, id: number) => [...reviewLinkKeys.all, kind, id] as const,
};

export function useReviewLinks(kind: ReviewContentKind, id: number) {
  return useQuery({ queryKey: reviewLinkKeys.of(kind, id), queryFn: () => api.get<{ links: ReviewLink[] }>(`/api/${PATHS[kind]}/${id}/review-links`) });
}

/** Makes a link; its URL is in this answer only. */
export function useCreateReviewLink(kind: ReviewContentKind, id: number) {
  return useRefreshingMutation(reviewLinkKeys.of(kind, id), { mutationFn: (input: ReviewLinkInput) => api.post<ReviewLinkCreated>(`/api/${PATHS[kind]}/${id}/review-links`, input) });
}

export function useRevokeReviewLink(kind: ReviewContentKind, id: number) {
  return useRefreshingMutation(reviewLinkKeys.of(kind, id), { mutationFn: (linkId: number) => api.delete<void>(`/api/review-links/${linkId}`) });
}
