import { queryOptions } from "@tanstack/react-query";
import { OUTBOX_PAGE_SIZE, type OutboxMessage } from "#shared/schemas/outbox.ts";
import { api, getPage, qs } from "../../lib/api-client.ts";

export interface OutboxFilter {
  to?: string;
  page?: number;
}

export const outboxKeys = {
  all: ["outbox"] as const,
  list: (f: OutboxFilter) => [...outboxKeys.all, "list", f] as const,
  detail: (id: number) => [...outboxKeys.all, "detail", id] as const,
};

/** One page of messages (OUTBOX_PAGE_SIZE), newest first, with the total. */
export const outboxListQueryOptions = (f: OutboxFilter = {}) =>
  queryOptions({
    queryKey: outboxKeys.list(f),
    queryFn: () => getPage<OutboxMessage>(`/api/outbox${qs({ to: f.to, page: f.page && f.page > 1 ? f.page : undefined, pageSize: OUTBOX_PAGE_SIZE })}`),
    staleTime: 5_000,
  });

export const outboxMessageQueryOptions = (id: number) =>
  queryOptions({ queryKey: outboxKeys.detail(id), queryFn: () => api.get<OutboxMessage>(`/api/outbox/${id}`) });
