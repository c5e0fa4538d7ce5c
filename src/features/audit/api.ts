import { queryOptions } from "@tanstack/react-query";
import type { AuditEvent } from "#shared/schemas/users.ts";
import { api, qs } from "../../lib/api-client.ts";

export const auditKeys = {
  all: ["audit"] as const,
  list: (f: { action?: string }) => [...auditKeys.all, "list", f] as const,
};

export const auditQueryOptions = (f: { action?: string } = {}) =>
  queryOptions({ queryKey: auditKeys.list(f), queryFn: () => api.get<AuditEvent[]>(`/api/audit${qs({ action: f.action, limit: 300 })}`) });

