import { queryOptions } from "@tanstack/react-query";
import { OUTBOX_PAGE_SIZE, type OutboxMessage, type OutboxQuery } from "#shared/schemas/outbox.ts";
import { getPage } from "../../lib/api-client.ts";
import { readOptions } from "../../lib/query-keys.ts";

export type OutboxFilter = Partial<Pick<OutboxQuery, "to" | "page">>;

export const outboxKeys = {
  all: ["outbox"] as const,
  list: (f: OutboxFilter) => [...outboxKeys.all, "list", f] as const,
  detail: (id: number) => [...outboxKeys.all, "detail", id] as const,
};

/** One page of messages (OUTBOX_PAGE_SIZE), newest first, with the total. */
export const outboxListQueryOptions = (f: OutboxFilter = {}) =>
  queryOptions({
    queryKey: outboxKeys.list(f),
    queryFn: () => getPage<OutboxMessage>("/api/outbox", { to: f.to, page: f.page, pageSize: OUTBOX_PAGE_SIZE }),
    staleTime: 5_000,
  });

export const outboxMessageQueryOptions = (id: number) =>
  readOptions<OutboxMessage>(outboxKeys.detail(id), `/api/outbox/${id}`);
