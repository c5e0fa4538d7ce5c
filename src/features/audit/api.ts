import { queryOptions } from "@tanstack/react-query";
import { AUDIT_PAGE_SIZE, type AuditEvent } from "#shared/schemas/users.ts";
import { getPage, qs } from "../../lib/api-client.ts";

export interface AuditFilter {
  action?: string;
  page?: number;
}

export const auditKeys = {
  all: ["audit"] as const,
  list: (f: AuditFilter) => [...auditKeys.all, "list", f] as const,
};

/** One page of the log (AUDIT_PAGE_SIZE events), newest first, with the total. */
export const auditQueryOptions = (f: AuditFilter = {}) =>
  queryOptions({
    queryKey: auditKeys.list(f),
    queryFn: () => getPage<AuditEvent>(`/api/audit${qs({ action: f.action, page: f.page && f.page > 1 ? f.page : undefined, pageSize: AUDIT_PAGE_SIZE })}`),
  });
