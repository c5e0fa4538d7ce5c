import { useMutation, useQueryClient, type MutationMeta, type QueryKey } from "@tanstack/react-query";

/**
 * A mutation that, once it succeeds, marks the reads under `queryKey` stale so they are fetched
 * again. The invalidation is returned, so the mutation settles only when they have been: a page
 * that waits on it shows the new state, not the old.
 */
export function useRefreshingMutation<TData, TVars = void>(queryKey: QueryKey, options: { mutationFn: (vars: TVars) => Promise<TData>; meta?: MutationMeta }) {
  const qc = useQueryClient();
  return useMutation({ ...options, onSuccess: () => qc.invalidateQueries({ queryKey }) });
}

/**
 * A write of a record feature: it refreshes every read under `queryKey` (the feature's whole key,
 * so a list's order, a record and its history move together) and shows its own error where it was
 * made, not as a toast (quiet).
 */
export function useQuietWrite<TData, TVars>(queryKey: QueryKey, mutationFn: (vars: TVars) => Promise<TData>) {
  return useRefreshingMutation<TData, TVars>(queryKey, { mutationFn, meta: { quiet: true } });
}
