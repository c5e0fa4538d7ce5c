import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import type { ReviewAnswerInput, ReviewCopy } from "#shared/schemas/review-links.ts";
import { api } from "../../lib/api-client.ts";

/** The reviewer's side of a review link: the revision to read and the answer. Staff's side is in src/lib/review-links.ts. */
export const reviewKeys = {
  all: ["review"] as const,
  copy: (token: string, latest: boolean) => [...reviewKeys.all, token, latest ? "latest" : "linked"] as const,
};

const query = (latest: boolean) => (latest ? "?revision=latest" : "");

/**
 * The revision a link shows. Every read is recorded as an opening, so it is read once per visit
 * and never again in the background.
 */
export function reviewCopyQueryOptions(token: string, latest: boolean) {
  return queryOptions({
    queryKey: reviewKeys.copy(token, latest),
    queryFn: () => api.get<ReviewCopy>(`/api/review/${encodeURIComponent(token)}${query(latest)}`),
    staleTime: Infinity,
    refetchOnWindowFocus: false,
    retry: false,
  });
}

/** Sends the reviewer's answer on the revision they are reading; the page's list of their answers follows. */
export function useAnswerReview(token: string, latest: boolean) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ReviewAnswerInput) => api.post<{ answers: ReviewCopy["answers"] }>(`/api/review/${encodeURIComponent(token)}/answer${query(latest)}`, input),
    onSuccess: ({ answers }) => qc.setQueryData<ReviewCopy>(reviewKeys.copy(token, latest), (copy) => (copy ? { ...copy, answers } : copy)),
  });
}
