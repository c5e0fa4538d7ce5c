import { useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import { useSearchParams } from "react-router-dom";
import { AUDIT_ACTION_LABELS, AUDIT_PAGE_SIZE, type AuditEvent } from "#shared/schemas/users.ts";
import { DataTable } from "../../components/ui/data-table.tsx";
import { SelectField } from "../../components/ui/field.tsx";
import { pageFromParams, UrlPager } from "../../components/ui/pager.tsx";
import { PageHeader } from "../../components/ui/sheet.tsx";
import { formatInstant } from "../../lib/format.ts";
import { primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { auditQueryOptions } from "./api.ts";

const filterOf = (params: URLSearchParams) => ({ action: params.get("action") || undefined, page: pageFromParams(params) });

/** The audit log is for administrators (the route says so); only theirs is primed. */
export const auditLoader: RouteLoader = (qc) => ({ request }) => primeWhenAllowed(qc, ["admin"], () => qc.ensureQueryData(auditQueryOptions(filterOf(new URL(request.url).searchParams))));

const ACTIONS: Record<string, string> = AUDIT_ACTION_LABELS;

const col = createColumnHelper<AuditEvent>();
const columns = [
  col.accessor("at", { header: "When", meta: { key: true }, cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue())}</span> }),
  col.accessor("action", { header: "What", meta: { key: true }, cell: (c) => ACTIONS[c.getValue()] ?? c.getValue() }),
  col.accessor("actorEmail", { header: "Who", cell: (c) => <span className="break-all">{c.getValue() ?? "—"}</span> }),
  col.accessor("targetLabel", { header: "Concerning", cell: (c) => <span className="break-all">{c.getValue() ?? "—"}</span> }),
  col.accessor("ip", { header: "From", cell: (c) => <span className="font-mono text-xs">{c.getValue() ?? "—"}</span> }),
  col.accessor("detail", {
    header: "Detail",
    cell: (c) => {
      const d = c.getValue();
      return d ? <span className="text-xs text-ink-soft">{Object.entries(d).map(([k, v]) => `${k}: ${String(v)}`).join(" · ")}</span> : null;
    },
  }),
];

export function AuditPage() {
  const [params, setParams] = useSearchParams();
  const action = params.get("action") ?? "";
  const audit = useSuspenseQuery(auditQueryOptions(filterOf(params))).data;
  const table = useReactTable({ data: audit.items, columns, getCoreRowModel: getCoreRowModel() });
  return (
    <>
      <PageHeader sheet="Site office · Audit log" title="Audit log" description="Sign-ins, invitations, resets and account changes: who, when and from which address. Newest first." />
      <div className="mb-4 max-w-xs">
        <SelectField
          label="Show"
          value={action}
          onChange={(e) => setParams(e.target.value ? { action: e.target.value } : {})}
          options={[{ value: "", label: "Every kind of event" }, ...Object.entries(ACTIONS).map(([value, label]) => ({ value, label }))]}
        />
      </div>
      <DataTable table={table} caption="Audit events" empty="No events of this kind." />
      <UrlPager total={audit.total} pageSize={AUDIT_PAGE_SIZE} label="Pages of the audit log" previous="← Newer" next="Older →" />
    </>
  );
}
