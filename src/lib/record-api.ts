import { useQuery, type QueryKey } from "@tanstack/react-query";
import { api } from "./api-client.ts";
import { useQuietWrite } from "./mutations.ts";
import { readOptions } from "./query-keys.ts";

/**
 * What the investor record's item features (risks, decisions) read and write alike: one item's
 * history at `/api/<kind>/:id/events`, and writes that refresh the whole feature (a list's order,
 * a summary and an item's history move together) and show their errors where they were made.
 */
export function recordApi<TAnswer, TEvent, TCreate, TPatch>(kind: "risks" | "decisions", keys: { all: QueryKey; events: (id: number) => QueryKey }) {
  const eventsQueryOptions = (id: number) => readOptions<TEvent[]>(keys.events(id), `/api/${kind}/${id}/events`);
  const useWrite = <V, R>(mutationFn: (v: V) => Promise<R>) => useQuietWrite<R, V>(keys.all, mutationFn);
  return {
    eventsQueryOptions,
    useEvents: (id: number) => useQuery(eventsQueryOptions(id)),
    useWrite,
    useCreate: (slug: string) => useWrite((input: TCreate) => api.post<TAnswer>(`/api/projects/${slug}/${kind}`, input)),
    usePatch: () => useWrite(({ id, patch }: { id: number; patch: TPatch }) => api.patch<TAnswer>(`/api/${kind}/${id}`, patch)),
  };
}
