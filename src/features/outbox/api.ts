import { queryOptions } from "@tanstack/react-query";
import type { OutboxMessage } from "#shared/schemas/outbox.ts";
import { api, qs } from "../../lib/api-client.ts";

export const outboxKeys = {
  all: ["outbox"] as const,
  list: (f: { to?: string }) => [...outboxKeys.all, "list", f] as const,
  detail: (id: number) => [...outboxKeys.all, "detail", id] as const,
};

export const outboxListQueryOptions = (f: { to?: string } = {}) =>
  queryOptions({ queryKey: outboxKeys.list(f), queryFn: () => api.get<OutboxMessage[]>(`/api/outbox${qs({ to: f.to })}`), staleTime: 5_000 });

export const outboxMessageQueryOptions = (id: number) =>
  queryOptions({ queryKey: outboxKeys.detail(id), queryFn: () => api.get<OutboxMessage>(`/api/outbox/${id}`) });

