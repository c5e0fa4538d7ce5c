import { createColumnHelper } from "@tanstack/react-table";
import type { DocumentAnswer } from "#shared/schemas/documents.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button, buttonClass } from "../../../components/ui/button.tsx";
import { actionsColumn, DataTable, useSortedTable } from "../../../components/ui/data-table.tsx";
import { formatBytes, formatDate } from "../../../lib/format.ts";
import { cleanFileUrl } from "../api.ts";
import { CATEGORY_WORD, FILE_TYPE_WORD } from "../words.ts";

export interface DocumentActions {
  onEdit?: (d: DocumentAnswer) => void;
  onVersion?: (d: DocumentAnswer) => void;
  onViews: (d: DocumentAnswer) => void;
}

const col = createColumnHelper<DocumentAnswer>();
const actionsOf = (t: { options: { meta?: unknown } }) => t.options.meta as DocumentActions;

/** "Removed: JavaScript, an embedded file" — what intake took out of the latest version. */
export function removedWords(d: DocumentAnswer): string | null {
  const removed = d.latestVersion.removed;
  return removed.length ? `Removed before storing: ${removed.join(", ")}` : null;
}

const columns = [
  col.accessor("title", {
    header: "Document",
    cell: ({ row }) => {
      const d = row.original;
      return (
        <div className="min-w-48">
          <a className="font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink" href={cleanFileUrl(d.id, { as: "view" })} target="_blank" rel="noreferrer">
            {d.title}
          </a>
          <p className="text-xs text-ink-faint">{[CATEGORY_WORD[d.category], d.period].filter(Boolean).join(" · ")}</p>
          {removedWords(d) ? (
            <p className="mt-0.5 text-xs" data-testid="removed-note">
              <span aria-hidden>✂ </span>
              {removedWords(d)}
            </p>
          ) : null}
        </div>
      );
    },
  }),
  col.accessor("periodEnd", { header: "Period end", cell: (c) => <span className="whitespace-nowrap">{formatDate(c.getValue())}</span> }),
  col.accessor("audience", {
    header: "Who may read it",
    cell: ({ row }) => (
      <div className="flex flex-col items-start gap-1">
        <AudienceMark audience={row.original.audience} />
        {row.original.organisations.length ? <span className="text-xs">only {row.original.organisations.map((o) => o.name).join(", ")}</span> : null}
      </div>
    ),
  }),
  col.accessor((d) => d.latestVersion.number, {
    id: "version",
    header: "Latest",
    cell: ({ row }) => {
      const v = row.original.latestVersion;
      return (
        <div className="tabular whitespace-nowrap text-sm">
          v{v.number} · {FILE_TYPE_WORD[v.fileType]}
          <p className="text-xs text-ink-soft">
            {v.pages === null ? "" : `${v.pages} page${v.pages === 1 ? "" : "s"} · `}
            {formatBytes(v.bytes)}
          </p>
          <p className="text-xs text-ink-faint">{formatDate(v.uploadedAt)}</p>
        </div>
      );
    },
  }),
  actionsColumn(
    col,
    (d, table) => {
      const a = actionsOf(table);
      return (
        <div className="flex flex-wrap gap-1">
          <a className={buttonClass("secondary", "sm")} href={cleanFileUrl(d.id, { as: "download" })} aria-label={`Download the clean original of ${d.title}`}>
            Original
          </a>
          <Button size="sm" onClick={() => a.onViews(d)} aria-label={`View log of ${d.title}`}>
            View log
          </Button>
          {a.onVersion ? (
            <Button size="sm" onClick={() => a.onVersion?.(d)} aria-label={`New version of ${d.title}`}>
              New version
            </Button>
          ) : null}
          {a.onEdit ? (
            <Button size="sm" variant="ghost" onClick={() => a.onEdit?.(d)} aria-label={`Edit ${d.title}`}>
              Edit
            </Button>
          ) : null}
        </div>
      );
    },
    { header: "Actions" },
  ),
];

/** The library: what each document is, who may read it, its latest version, and what intake removed from it. */
export function DocumentTable({ documents, actions }: { documents: DocumentAnswer[]; actions: DocumentActions }) {
  const table = useSortedTable({ data: documents, columns, meta: actions, getRowId: (d) => String(d.id) });
  return <DataTable table={table} caption="Document library" empty="No document in the library yet." dense rowProps={(row) => ({ "data-document-id": row.original.id })} />;
}
