import { createColumnHelper } from "@tanstack/react-table";
import type { BudgetChangeAnswer } from "#shared/schemas/budget.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { actionsColumn, DataTable, useSortedTable } from "../../../components/ui/data-table.tsx";
import { formatDate } from "../../../lib/format.ts";
import { signedMoney, STATUS_GLYPH, STATUS_WORD } from "../words.ts";

interface Meta {
  currency: string;
  onEdit?: (c: BudgetChangeAnswer) => void;
}

const col = createColumnHelper<BudgetChangeAnswer>();
const metaOf = (t: { options: { meta?: unknown } }) => t.options.meta as Meta;

const columns = [
  col.accessor("reference", { header: "Ref", meta: { key: true }, cell: (c) => <span className="tabular whitespace-nowrap font-semibold">{c.getValue()}</span> }),
  col.accessor("description", {
    header: "Change",
    meta: { key: true },
    cell: ({ row }) => (
      <div className="min-w-40">
        <p className="font-medium">{row.original.description}</p>
        {row.original.linkedMilestones.length || row.original.linkedRisks.length ? (
          <p className="text-xs text-ink-faint">{[...row.original.linkedMilestones.map((m) => m.name), ...row.original.linkedRisks.map((r) => r.reference)].join(" · ")}</p>
        ) : null}
      </div>
    ),
  }),
  col.accessor("amount", { header: "Amount", cell: ({ row, table }) => <span className="tabular block whitespace-nowrap text-right font-medium">{signedMoney(row.original.amount, metaOf(table).currency)}</span> }),
  col.accessor("status", {
    header: "Status",
    cell: (c) => (
      <span className="inline-flex items-center gap-1 whitespace-nowrap" data-status={c.getValue()}>
        <span aria-hidden>{STATUS_GLYPH[c.getValue()]}</span>
        {STATUS_WORD[c.getValue()]}
      </span>
    ),
  }),
  col.accessor("approvedBy", {
    header: "Approved",
    cell: ({ row }) =>
      row.original.approvedBy ? (
        <div className="min-w-28">
          {row.original.approvedBy}
          <p className="tabular whitespace-nowrap text-xs text-ink-soft">{formatDate(row.original.approvedOn)}</p>
        </div>
      ) : (
        "—"
      ),
  }),
  col.accessor("drawsOnContingency", { header: "Contingency", cell: (c) => (c.getValue() ? <span className="whitespace-nowrap">Draws on it</span> : "—") }),
  col.accessor("audience", { header: "Audience", cell: (c) => <AudienceMark audience={c.getValue()} /> }),
  actionsColumn(
    col,
    (c, table) => {
      const onEdit = metaOf(table).onEdit;
      return onEdit ? (
        <Button size="sm" onClick={() => onEdit(c)} aria-label={`Edit ${c.reference}`}>
          Edit
        </Button>
      ) : null;
    },
    { id: "edit", header: () => <span className="sr-only">Edit</span> },
  ),
];

/** The register of budget changes: signed amounts, who approved each and when, and which draw on the contingency. */
export function ChangeTable({ changes, currency, onEdit }: { changes: BudgetChangeAnswer[]; currency: string; onEdit?: (c: BudgetChangeAnswer) => void }) {
  const table = useSortedTable({
    data: changes,
    columns,
    meta: { currency, onEdit } satisfies Meta,
    getRowId: (c) => String(c.id),
    state: { columnVisibility: { edit: Boolean(onEdit) } },
  });
  return <DataTable table={table} caption="Budget changes" empty="No budget change recorded yet." dense rowProps={(row) => ({ "data-change-id": row.original.id })} />;
}
