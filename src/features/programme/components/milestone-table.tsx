import {
  createColumnHelper,
  getCoreRowModel,
  getExpandedRowModel,
  getFilteredRowModel,
  getGroupedRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type Row,
  type RowSelectionState,
  type SortingState,
} from "@tanstack/react-table";
import { useMemo, useState, type ReactNode } from "react";
import { AudienceSchema } from "#shared/schemas/common.ts";
import { SystemSchema, type Milestone } from "#shared/schemas/programme.ts";
import type { MilestoneStatus } from "#shared/domain/programme-health.ts";
import { DataTable } from "../../../components/ui/data-table.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { STATUS_LOOK, STATUS_ORDER, StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate, SYSTEM_WORD } from "../../../lib/format.ts";
import type { Drafts, MilestoneDraft } from "../preview.ts";
import { AUDIENCE_WORD, signedDays } from "../words.ts";

export interface MilestoneTableProps {
  milestones: Milestone[];
  caption: string;
  /** Inputs in the cells (lead, admin); otherwise the table only reads. */
  editable?: boolean;
  drafts?: Drafts;
  onDraft?: (id: number, change: MilestoneDraft) => void;
  /** Field errors of pending changes, by milestone id then field. */
  errors?: Record<number, Record<string, string>>;
  /** Status and slip each drafted milestone would have. */
  previewed?: Record<number, { status: MilestoneStatus; slipDays: number }>;
  rowSelection?: RowSelectionState;
  onRowSelectionChange?: (s: RowSelectionState) => void;
  onOpen?: (m: Milestone) => void;
  showAudience?: boolean;
  toolbar?: ReactNode;
}

interface Meta {
  editable: boolean;
  drafts: Drafts;
  errors: Record<number, Record<string, string>>;
  previewed: Record<number, { status: MilestoneStatus; slipDays: number }>;
  onDraft: (id: number, change: MilestoneDraft) => void;
  onOpen?: (m: Milestone) => void;
}

const col = createColumnHelper<Milestone>();
const cellInput = "rounded-sm border border-rule-strong bg-sheet px-1 py-0.5 text-sm aria-[invalid=true]:border-bad aria-[invalid=true]:bg-[#fbeaea]";

function metaOf(table: { options: { meta?: unknown } }): Meta {
  return table.options.meta as Meta;
}

function draftValue<K extends keyof MilestoneDraft>(meta: Meta, m: Milestone, key: K): MilestoneDraft[K] | Milestone[K & keyof Milestone] {
  const d = meta.drafts[m.id];
  return d && d[key] !== undefined ? d[key] : (m[key as keyof Milestone] as Milestone[K & keyof Milestone]);
}

function CellError({ meta, m, field }: { meta: Meta; m: Milestone; field: string }) {
  const e = meta.errors[m.id]?.[field];
  return e ? (
    <p id={`err-${m.id}-${field}`} className="mt-0.5 max-w-40 text-xs text-bad">
      ▲ {e}
    </p>
  ) : null;
}

function DateCell({ meta, m, field, label }: { meta: Meta; m: Milestone; field: "forecastFinish" | "actualFinish"; label: string }) {
  const value = draftValue(meta, m, field) as string | null;
  if (!meta.editable) return <span className="whitespace-nowrap">{formatDate(value)}</span>;
  const err = meta.errors[m.id]?.[field];
  return (
    <>
      <DateField
        label={`${label} of ${m.name}`}
        labelHidden
        className={`${cellInput} w-[8.6rem]`}
        error={err}
        value={value ?? ""}
        onChange={(e) => meta.onDraft(m.id, { [field]: e.target.value === "" ? null : e.target.value })}
      />
    </>
  );
}

function NumberCell({ meta, m, field, label, step, max }: { meta: Meta; m: Milestone; field: "percentComplete" | "weight"; label: string; step: number; max?: number }) {
  const value = draftValue(meta, m, field) as number;
  if (!meta.editable) return <span className="tabular">{field === "percentComplete" ? `${value}%` : value}</span>;
  const err = meta.errors[m.id]?.[field];
  return (
    <>
      <input
        type="number"
        inputMode="decimal"
        min={field === "weight" ? 0.1 : 0}
        max={max}
        step={step}
        className={`${cellInput} w-[3.9rem] text-right`}
        aria-label={`${label} of ${m.name}`}
        aria-invalid={err ? true : undefined}
        aria-describedby={err ? `err-${m.id}-${field}` : undefined}
        value={Number.isNaN(value) ? "" : value}
        onChange={(e) => meta.onDraft(m.id, { [field]: e.target.valueAsNumber })}
      />
      <CellError meta={meta} m={m} field={field} />
    </>
  );
}

const equals = (row: Row<Milestone>, id: string, value: unknown) => value === undefined || value === "" || row.getValue(id) === value;

const columns = [
  col.accessor("phase", { header: "Phase", enableHiding: true }),
  col.accessor("area", { header: "Area", filterFn: equals }),
  col.accessor("system", { header: "System", filterFn: equals }),
  col.display({
    id: "select",
    header: () => <span className="sr-only">Select</span>,
    cell: ({ row }) =>
      row.getCanSelect() ? (
        <input
          type="checkbox"
          className="size-4"
          aria-label={`Select ${row.original.name}`}
          checked={row.getIsSelected()}
          onChange={row.getToggleSelectedHandler()}
        />
      ) : null,
  }),
  col.accessor("name", {
    header: "Milestone",
    meta: { key: true },
    cell: ({ row, table }) => {
      const m = row.original;
      const meta = metaOf(table);
      return (
        <div className="min-w-40">
          {meta.onOpen ? (
            <button type="button" className="text-left font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink" onClick={() => meta.onOpen?.(m)}>
              {m.name}
            </button>
          ) : (
            <span className="font-medium">{m.name}</span>
          )}
          <p className="text-xs text-ink-faint">
            {[m.area, SYSTEM_WORD[m.system]].filter(Boolean).join(" · ")}
          </p>
        </div>
      );
    },
  }),
  col.accessor("status", {
    header: "Status",
    filterFn: equals,
    sortingFn: (a, b) => STATUS_ORDER.indexOf(a.original.status) - STATUS_ORDER.indexOf(b.original.status),
    cell: ({ row, table }) => {
      const m = row.original;
      const after = metaOf(table).previewed[m.id];
      return (
        <div className="flex flex-col gap-0.5">
          <StatusMark status={m.status} />
          {after && after.status !== m.status ? (
            <span className="inline-flex items-center gap-1 text-xs">
              <span aria-hidden>→</span>
              <span className="sr-only">would become</span>
              <StatusMark status={after.status} />
            </span>
          ) : null}
        </div>
      );
    },
  }),
  col.accessor("percentComplete", {
    header: "Done",
    cell: ({ row, table }) => <NumberCell meta={metaOf(table)} m={row.original} field="percentComplete" label="Percent complete" step={1} max={100} />,
  }),
  col.accessor("baselineFinish", { header: "Baseline", cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
  col.accessor("forecastFinish", {
    header: "Forecast",
    sortingFn: (a, b) => (a.original.forecastFinish ?? a.original.baselineFinish).localeCompare(b.original.forecastFinish ?? b.original.baselineFinish),
    cell: ({ row, table }) => <DateCell meta={metaOf(table)} m={row.original} field="forecastFinish" label="Forecast finish" />,
  }),
  col.accessor("actualFinish", {
    header: "Actual",
    sortingFn: (a, b) => (a.original.actualFinish ?? "").localeCompare(b.original.actualFinish ?? ""),
    cell: ({ row, table }) => <DateCell meta={metaOf(table)} m={row.original} field="actualFinish" label="Actual finish" />,
  }),
  col.accessor("slipDays", {
    header: "Slip",
    cell: ({ row, table }) => {
      const m = row.original;
      const after = metaOf(table).previewed[m.id];
      return (
        <div className="tabular whitespace-nowrap">
          <span title={`${m.slipWorkingDays} working days`}>{signedDays(m.slipDays)}</span>
          {after && after.slipDays !== m.slipDays ? <span className="ml-1 text-xs font-semibold">→ {signedDays(after.slipDays)}</span> : null}
          <p className="text-xs text-ink-faint">{m.slipWorkingDays} working d</p>
        </div>
      );
    },
  }),
  col.accessor("audience", {
    header: "Audience",
    filterFn: equals,
    cell: ({ row, table }) => {
      const meta = metaOf(table);
      const m = row.original;
      const value = draftValue(meta, m, "audience") as Milestone["audience"];
      if (!meta.editable) return AUDIENCE_WORD[value];
      return (
        <select className={cellInput} aria-label={`Audience of ${m.name}`} value={value} onChange={(e) => meta.onDraft(m.id, { audience: e.target.value as Milestone["audience"] })}>
          {AudienceSchema.options.map((a) => (
            <option key={a} value={a}>
              {AUDIENCE_WORD[a]}
            </option>
          ))}
        </select>
      );
    },
  }),
];

const ALL = { value: "", label: "All" };
// Stable references: TanStack Table recomputes (and resets expansion) whenever state objects change identity.
const GROUPING = ["phase"];
const NO_SELECTION: RowSelectionState = {};

/**
 * The programme as a table grouped by phase, filtered by area, system, status and
 * audience. Editable cells write pending changes (drafts), never the server: saving
 * happens after the preview has been seen.
 */
export function MilestoneTable(props: MilestoneTableProps) {
  const { milestones, caption, editable = false, showAudience = true } = props;
  const [filters, setFilters] = useState<ColumnFiltersState>([]);
  const [sorting, setSorting] = useState<SortingState>([]);
  const meta: Meta = {
    editable,
    drafts: props.drafts ?? {},
    errors: props.errors ?? {},
    previewed: props.previewed ?? {},
    onDraft: props.onDraft ?? (() => undefined),
    onOpen: props.onOpen,
  };
  const selectable = editable && Boolean(props.onRowSelectionChange);
  const columnVisibility = useMemo(() => ({ phase: false, area: false, system: false, select: selectable, audience: showAudience }), [selectable, showAudience]);
  const table = useReactTable({
    data: milestones,
    columns,
    meta,
    getRowId: (m) => String(m.id),
    state: {
      columnFilters: filters,
      sorting,
      grouping: GROUPING,
      expanded: true,
      rowSelection: props.rowSelection ?? NO_SELECTION,
      columnVisibility,
    },
    autoResetExpanded: false,
    onColumnFiltersChange: setFilters,
    onSortingChange: setSorting,
    onRowSelectionChange: (updater) => {
      const next = typeof updater === "function" ? updater(props.rowSelection ?? NO_SELECTION) : updater;
      props.onRowSelectionChange?.(next);
    },
    enableRowSelection: (row) => !row.getIsGrouped() && row.original.actualFinish === null,
    groupedColumnMode: false,
    getCoreRowModel: getCoreRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getGroupedRowModel: getGroupedRowModel(),
    getExpandedRowModel: getExpandedRowModel(),
  });

  const areas = useMemo(() => [...new Set(milestones.map((m) => m.area).filter(Boolean))].sort(), [milestones]);
  const filterValue = (id: string) => (filters.find((f) => f.id === id)?.value as string | undefined) ?? "";
  const setFilter = (id: string, value: string) => setFilters((fs) => [...fs.filter((f) => f.id !== id), ...(value ? [{ id, value }] : [])]);
  const shown = table.getFilteredRowModel().rows.length;

  return (
    <div className="flex flex-col gap-3">
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-4" role="group" aria-label="Filter milestones">
        <SelectField label="Area" value={filterValue("area")} onChange={(e) => setFilter("area", e.target.value)} options={[ALL, ...areas.map((a) => ({ value: a, label: a }))]} />
        <SelectField label="System" value={filterValue("system")} onChange={(e) => setFilter("system", e.target.value)} options={[ALL, ...SystemSchema.options.map((s) => ({ value: s, label: SYSTEM_WORD[s] }))]} />
        <SelectField label="Status" value={filterValue("status")} onChange={(e) => setFilter("status", e.target.value)} options={[ALL, ...STATUS_ORDER.map((s) => ({ value: s, label: `${STATUS_LOOK[s].glyph} ${STATUS_LOOK[s].word}` }))]} />
        {showAudience ? (
          <SelectField label="Audience" value={filterValue("audience")} onChange={(e) => setFilter("audience", e.target.value)} options={[ALL, ...AudienceSchema.options.map((a) => ({ value: a, label: AUDIENCE_WORD[a] }))]} />
        ) : null}
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-sm text-ink-soft">
        <p aria-live="polite">
          {shown} of {milestones.length} milestones shown
        </p>
        {props.toolbar}
      </div>
      <DataTable
        table={table}
        caption={caption}
        empty="No milestone matches these filters."
        dense
        rowProps={(row) => ({
          "data-milestone-id": row.original.id,
          className: `border-b border-rule last:border-b-0 ${props.drafts?.[row.original.id] ? "bg-[#fef6f0] shadow-[inset_4px_0_0_#c2410c]" : "hover:bg-paper"}`,
        })}
        renderGroupRow={(row, colSpan) => (
          <tr key={row.id} className="border-b border-rule bg-paper">
            <th scope="rowgroup" colSpan={colSpan} className="px-2 pb-1 pt-3 text-left">
              <span className="font-semibold">{String(row.groupingValue)}</span>{" "}
              <span className="text-xs font-normal text-ink-faint">
                {row.subRows.length} milestone{row.subRows.length === 1 ? "" : "s"}
              </span>
            </th>
          </tr>
        )}
      />
    </div>
  );
}
