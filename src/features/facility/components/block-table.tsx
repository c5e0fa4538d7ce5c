import { createColumnHelper } from "@tanstack/react-table";
import type { BlockAnswer } from "#shared/schemas/facility.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { DataTable, useSortedTable } from "../../../components/ui/data-table.tsx";
import { formatDate } from "../../../lib/format.ts";
import { CONTAINMENT_WORD, formatFigure, signedWorkingDays } from "../words.ts";
import { MissingList, ReadyMark } from "./stage-preview.tsx";
import { EditButton, editColumn } from "./table-parts.tsx";

interface Meta {
  onEdit?: (b: BlockAnswer) => void;
}

const col = createColumnHelper<BlockAnswer>();
const figure = (v: number) => <span className="tabular block text-right">{formatFigure(v)}</span>;

const columns = [
  col.accessor("name", {
    header: "Block",
    cell: ({ row }) => {
      const b = row.original;
      return (
        <div className="min-w-36">
          <span className="font-medium">{b.name}</span>
          {b.stage ? <span className="ml-1 text-xs text-ink-soft">· {b.stage}</span> : null}
          <p className="text-xs text-ink-faint">{[b.coolingApproach, b.containment !== "none" ? CONTAINMENT_WORD[b.containment] : ""].filter(Boolean).join(" · ")}</p>
          <div className="mt-1">
            <AudienceMark audience={b.audience} />
          </div>
        </div>
      );
    },
  }),
  col.accessor("racks", { header: "Racks", cell: (c) => figure(c.getValue()) }),
  col.accessor("itKw", { header: "IT kW", cell: (c) => figure(c.getValue()) }),
  col.accessor("maxKwPerRack", { header: "kW/rack max", cell: (c) => figure(c.getValue()) }),
  col.accessor("forecastReadyDate", {
    header: "Ready date",
    cell: ({ row }) => (
      <dl className="tabular whitespace-nowrap text-xs">
        <dt className="sr-only">Forecast</dt>
        <dd className="text-sm font-medium">{formatDate(row.original.forecastReadyDate)}</dd>
        <dt className="inline text-ink-soft">baseline </dt>
        <dd className="inline text-ink-soft">{formatDate(row.original.baselineReadyDate)}</dd>
      </dl>
    ),
  }),
  col.accessor("slipWorkingDays", {
    header: "Slip",
    sortingFn: (a, b) => (a.original.slipWorkingDays ?? 0) - (b.original.slipWorkingDays ?? 0),
    cell: (c) => (
      <span className="tabular whitespace-nowrap" title="working days on the project's calendar">
        {signedWorkingDays(c.getValue())}
      </span>
    ),
  }),
  col.accessor("readyForService", {
    header: "Ready for service",
    cell: ({ row }) => {
      const b = row.original;
      return (
        <div className="min-w-40">
          <ReadyMark ready={b.readyForService} />
          {b.missing.length > 0 ? <MissingList name={b.name} missing={b.missing} /> : null}
        </div>
      );
    },
  }),
  editColumn(col, (b, table) => {
    const onEdit = (table.options.meta as Meta).onEdit;
    return onEdit ? <EditButton name={b.name} onEdit={() => onEdit(b)} /> : null;
  }),
];

/** The capacity blocks: size, density, dates and whether each is ready for service (and if not, what is missing). */
export function BlockTable({ blocks, onEdit }: { blocks: BlockAnswer[]; onEdit?: (b: BlockAnswer) => void }) {
  const table = useSortedTable({
    data: blocks,
    columns,
    meta: { onEdit } satisfies Meta,
    getRowId: (b) => String(b.id),
    state: { columnVisibility: { edit: Boolean(onEdit) } },
  });
  return <DataTable table={table} caption="Capacity blocks" empty="No capacity block yet." dense rowProps={(row) => ({ "data-block-id": row.original.id })} />;
}
