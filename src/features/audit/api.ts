import { queryOptions } from "@tanstack/react-query";
import { AUDIT_PAGE_SIZE, type AuditEvent, type AuditQuery } from "#shared/schemas/users.ts";
import { getPage } from "../../lib/api-client.ts";

export type AuditFilter = Partial<Pick<AuditQuery, "action" | "page">>;

export const auditKeys = {
  all: ["audit"] as const,
  list: (f: AuditFilter) => [...auditKeys.all, "list", f] as const,
};

/** One page of the log (AUDIT_PAGE_SIZE events), newest first, with the total. */
export const auditQueryOptions = (f: AuditFilter = {}) =>
  queryOptions({
    queryKey: auditKeys.list(f),
    queryFn: () => getPage<AuditEvent>("/api/audit", { action: f.action, page: f.page, pageSize: AUDIT_PAGE_SIZE }),
  });
