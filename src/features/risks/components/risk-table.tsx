import { createColumnHelper, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type ColumnFiltersState, type Row, type SortingState } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { RiskCategorySchema, RiskKindSchema, RiskStatusSchema, type RiskAnswer } from "#shared/schemas/risks.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { DataTable } from "../../../components/ui/data-table.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { formatDate, formatMoney } from "../../../lib/format.ts";
import { optionsOf } from "../../../lib/forms.ts";
import { useNarrow } from "../../../lib/use-narrow.ts";
import { BAND_ORDER, BAND_WORD, CATEGORY_WORD, KIND_WORD, STATUS_WORD, workingDays } from "../words.ts";
import { BandMark, TrendMark } from "./marks.tsx";

interface Meta {
  currency: string;
  onOpen: (r: RiskAnswer) => void;
}

const col = createColumnHelper<RiskAnswer>();
const equals = (row: Row<RiskAnswer>, id: string, value: unknown) => value === undefined || value === "" || String(row.getValue(id)) === value;
const metaOf = (t: { options: { meta?: unknown } }) => t.options.meta as Meta;

/** "Owner: …" and the exposure, the lines a card and a row both show. */
function exposureWords(r: RiskAnswer, currency: string): string {
  const parts = [];
  if (r.expectedCost !== null) parts.push(`${formatMoney(r.expectedCost, currency)} expected`);
  if (r.scheduleDays !== null) parts.push(workingDays(r.scheduleDays));
  return parts.length ? parts.join(" · ") : "—";
}

const columns = [
  col.accessor("reference", { header: "Ref", cell: (c) => <span className="tabular whitespace-nowrap font-semibold">{c.getValue()}</span> }),
  col.accessor("kind", { header: "Kind", filterFn: equals, cell: (c) => KIND_WORD[c.getValue()] }),
  col.accessor("title", {
    header: "Risk or issue",
    cell: ({ row, table }) => (
      <div className="min-w-48">
        <button type="button" className="text-left font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink" onClick={() => metaOf(table).onOpen(row.original)}>
          {row.original.title}
        </button>
        <p className="text-xs text-ink-faint">{CATEGORY_WORD[row.original.category]}</p>
      </div>
    ),
  }),
  col.accessor("category", { header: "Category", filterFn: equals }),
  col.accessor((r) => r.owner.id, { id: "owner", header: "Owner", filterFn: equals, cell: (c) => c.row.original.owner.name }),
  col.accessor("score", {
    header: "Score",
    cell: ({ row }) => (
      <div>
        <BandMark band={row.original.band} score={row.original.score} />
        <p className="tabular text-xs text-ink-faint">
          L{row.original.likelihood} × I{row.original.impact}
        </p>
      </div>
    ),
  }),
  col.accessor("band", { header: "Band", filterFn: equals, sortingFn: (a, b) => BAND_ORDER.indexOf(a.original.band) - BAND_ORDER.indexOf(b.original.band) }),
  col.accessor("trend", { header: "Trend", cell: (c) => <TrendMark trend={c.getValue()} /> }),
  col.display({ id: "exposure", header: "Exposure", cell: ({ row, table }) => <span className="tabular whitespace-nowrap">{exposureWords(row.original, metaOf(table).currency)}</span> }),
  col.accessor("status", {
    header: "Status",
    filterFn: equals,
    cell: ({ row }) => (
      <div className="whitespace-nowrap">
        {STATUS_WORD[row.original.status]}
        {row.original.kind === "issue" && row.original.dueDate ? <p className="text-xs text-ink-faint">action due {formatDate(row.original.dueDate)}</p> : null}
      </div>
    ),
  }),
  col.accessor("audience", { header: "Audience", cell: (c) => <AudienceMark audience={c.getValue()} /> }),
];

const ALL = { value: "", label: "All" };
// Stable: the table recomputes whenever its state objects change identity.
const HIDDEN = { category: false, band: false, kind: false };
const BY_SCORE: SortingState = [{ id: "score", desc: true }];

/** One risk as a card, for phone width: the same facts as a row, stacked. */
function RiskCard({ r, currency, onOpen }: { r: RiskAnswer; currency: string; onOpen: (r: RiskAnswer) => void }) {
  return (
    <li className="border border-rule bg-sheet p-3" data-risk-id={r.id} data-testid="risk-card">
      <div className="flex items-start justify-between gap-2">
        <p className="tabular text-sm font-semibold">
          {r.reference} · {KIND_WORD[r.kind]}
        </p>
        <AudienceMark audience={r.audience} />
      </div>
      <h3 className="mt-1 font-medium">{r.title}</h3>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-ink-soft">Score</dt>
        <dd>
          <BandMark band={r.band} score={r.score} />
        </dd>
        <dt className="text-ink-soft">Trend</dt>
        <dd>
          <TrendMark trend={r.trend} />
        </dd>
        <dt className="text-ink-soft">Owner</dt>
        <dd>{r.owner.name}</dd>
        <dt className="text-ink-soft">Status</dt>
        <dd>{STATUS_WORD[r.status]}</dd>
        <dt className="text-ink-soft">Exposure</dt>
        <dd className="tabular">{exposureWords(r, currency)}</dd>
      </dl>
      <Button size="sm" className="mt-2 min-h-11 w-full" onClick={() => onOpen(r)} aria-label={`Open ${r.reference} ${r.title}`}>
        Open
      </Button>
    </li>
  );
}

/**
 * The register: risks and issues filtered by kind, status, owner, category and band, highest
 * score first. At phone width the rows become cards, filtered the same way.
 */
export function RiskRegister({ risks, currency, onOpen }: { risks: RiskAnswer[]; currency: string; onOpen: (r: RiskAnswer) => void }) {
  const [filters, setFilters] = useState<ColumnFiltersState>([{ id: "status", value: "open" }]);
  const [sorting, setSorting] = useState<SortingState>(BY_SCORE);
  const narrow = useNarrow();
  const table = useReactTable({
    data: risks,
    columns,
    meta: { currency, onOpen } satisfies Meta,
    getRowId: (r) => String(r.id),
    state: { columnFilters: filters, sorting, columnVisibility: HIDDEN },
    onColumnFiltersChange: setFilters,
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  const owners = useMemo(() => [...new Map(risks.map((r) => [r.owner.id, r.owner.name])).entries()].sort((a, b) => a[1].localeCompare(b[1])), [risks]);
  const filterValue = (id: string) => (filters.find((f) => f.id === id)?.value as string | undefined) ?? "";
  const setFilter = (id: string, value: string) => setFilters((fs) => [...fs.filter((f) => f.id !== id), ...(value ? [{ id, value }] : [])]);
  const rows = table.getRowModel().rows;

  return (
    <div className="flex flex-col gap-3">
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-5" role="group" aria-label="Filter the register">
        <SelectField label="Kind" value={filterValue("kind")} onChange={(e) => setFilter("kind", e.target.value)} options={[ALL, ...optionsOf(KIND_WORD, RiskKindSchema.options)]} />
        <SelectField label="Status" value={filterValue("status")} onChange={(e) => setFilter("status", e.target.value)} options={[ALL, ...optionsOf(STATUS_WORD, RiskStatusSchema.options)]} />
        <SelectField label="Owner" value={filterValue("owner")} onChange={(e) => setFilter("owner", e.target.value)} options={[ALL, ...owners.map(([id, name]) => ({ value: String(id), label: name }))]} />
        <SelectField label="Category" value={filterValue("category")} onChange={(e) => setFilter("category", e.target.value)} options={[ALL, ...optionsOf(CATEGORY_WORD, RiskCategorySchema.options)]} />
        <SelectField label="Band" value={filterValue("band")} onChange={(e) => setFilter("band", e.target.value)} options={[ALL, ...optionsOf(BAND_WORD, BAND_ORDER)]} />
      </div>
      <p aria-live="polite" className="text-sm text-ink-soft">
        {rows.length} of {risks.length} shown
      </p>
      {narrow ? (
        rows.length === 0 ? (
          <p className="border border-rule bg-sheet px-3 py-6 text-center text-ink-soft">Nothing matches these filters.</p>
        ) : (
          <ul className="flex flex-col gap-3" aria-label="Risks and issues">
            {rows.map((row) => (
              <RiskCard key={row.id} r={row.original} currency={currency} onOpen={onOpen} />
            ))}
          </ul>
        )
      ) : (
        <DataTable table={table} caption="Risks and issues" empty="Nothing matches these filters." dense rowProps={(row) => ({ "data-risk-id": row.original.id })} />
      )}
    </div>
  );
}
