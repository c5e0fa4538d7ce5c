import { createColumnHelper, getCoreRowModel, useReactTable } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import type { DocumentAnswer, ViewLogRow } from "#shared/schemas/documents.ts";
import { DataTable } from "../../../components/ui/data-table.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { formatInstant } from "../../../lib/format.ts";
import { useDocumentViews, useReaderViews, viewLogCsvUrl } from "../api.ts";
import { VIEW_KIND_WORD } from "../words.ts";

const col = createColumnHelper<ViewLogRow>();

function columnsFor(timeZone: string, withDocument: boolean) {
  return [
    col.accessor("at", { header: "When", cell: (c) => <span className="whitespace-nowrap">{formatInstant(c.getValue(), timeZone)}</span> }),
    ...(withDocument ? [col.accessor("documentTitle", { header: "Document" })] : []),
    col.accessor("reader", {
      header: "Reader",
      cell: ({ row }) => (
        <div>
          <p className="font-medium">{row.original.reader}</p>
          <p className="text-xs text-ink-soft">
            {row.original.email}
            {row.original.organisation ? ` · ${row.original.organisation}` : ""}
          </p>
        </div>
      ),
    }),
    col.accessor("versionNumber", { header: "Version", cell: (c) => <span className="tabular">v{c.getValue()}</span> }),
    col.accessor("kind", { header: "How", cell: (c) => VIEW_KIND_WORD[c.getValue()] }),
    col.accessor("address", {
      header: "From",
      cell: ({ row }) => (
        <div className="max-w-64 text-xs">
          <p className="tabular">{row.original.address}</p>
          <p className="truncate text-ink-faint" title={row.original.agent}>
            {row.original.agent}
          </p>
        </div>
      ),
    }),
  ];
}

function LogTable({ rows, timeZone, withDocument, caption }: { rows: ViewLogRow[]; timeZone: string; withDocument: boolean; caption: string }) {
  const columns = useMemo(() => columnsFor(timeZone, withDocument), [timeZone, withDocument]);
  const table = useReactTable({ data: rows, columns: columns as ReturnType<typeof columnsFor>, getRowId: (r) => String(r.id), getCoreRowModel: getCoreRowModel() });
  return <DataTable table={table} caption={caption} empty="Nobody has opened it yet." dense />;
}

/** Who opened one document, which version, when, from where, and how. */
export function DocumentViewsDialog({ doc, timeZone, onClose }: { doc: DocumentAnswer; timeZone: string; onClose: () => void }) {
  const views = useDocumentViews(doc.id);
  return (
    <Dialog open title={`View log: ${doc.title}`} onClose={onClose} dismiss="Close" wide>
      {views.isPending ? <Spinner label="Loading the log" /> : views.isError ? <Notice tone="error">{views.error.message}</Notice> : <LogTable rows={views.data} timeZone={timeZone} withDocument={false} caption={`View log of ${doc.title}`} />}
    </Dialog>
  );
}

/** The project's log by reader: every investor who has opened something, one at a time, with the CSV of what is shown. */
export function ReaderLog({ slug, timeZone }: { slug: string; timeZone: string }) {
  const all = useReaderViews(slug, null);
  const [userId, setUserId] = useState<number | null>(null);
  const one = useReaderViews(slug, userId);
  const readers = useMemo(() => [...new Map((all.data ?? []).map((r) => [r.userId, `${r.reader} (${r.organisation ?? r.email})`])).entries()], [all.data]);
  const shown = userId === null ? all : one;
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="w-72">
          <SelectField label="Reader" value={userId === null ? "" : String(userId)} onChange={(e) => setUserId(e.target.value === "" ? null : Number(e.target.value))} options={[{ value: "", label: "Every reader" }, ...readers.map(([id, name]) => ({ value: String(id), label: name }))]} />
        </div>
        <a className="inline-flex items-center rounded-sm border border-ink px-3 py-1.5 text-sm font-medium hover:bg-paper" href={viewLogCsvUrl(slug, userId)} download data-testid="view-log-csv">
          Export as CSV
        </a>
      </div>
      {shown.isPending ? <Spinner label="Loading the log" /> : shown.isError ? <Notice tone="error">{shown.error.message}</Notice> : <LogTable rows={shown.data} timeZone={timeZone} withDocument caption="View log by reader" />}
    </div>
  );
}
