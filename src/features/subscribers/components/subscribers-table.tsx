import { createColumnHelper } from "@tanstack/react-table";
import { useMemo } from "react";
import { toast } from "sonner";
import type { SubscriberRow } from "#shared/schemas/subscribers.ts";
import { Button, buttonClass } from "../../../components/ui/button.tsx";
import { actionsColumn, DataTable, useSortedTable } from "../../../components/ui/data-table.tsx";
import { formatInstant } from "../../../lib/format.ts";
import { personDataUrl, useEraseSubscriber } from "../api.ts";
import { FREQUENCY_SHORT, INTEREST_SHORT, STATUS_LOOK, topicsWords } from "../words.ts";

const col = createColumnHelper<SubscriberRow>();

export function SubscribersTable({ rows }: { rows: SubscriberRow[] }) {
  const erase = useEraseSubscriber();
  const columns = useMemo(
    () => [
      col.accessor("name", {
        header: "Subscriber",
        cell: (c) => (
          <div className="min-w-40">
            {/* Long words wrap anywhere, so a long name never widens the table past its frame. */}
            <p className="font-medium [overflow-wrap:anywhere]">{c.getValue()}</p>
            <p className="break-all text-ink-soft">{c.row.original.email}</p>
            {c.row.original.organisation ? <p className="text-ink-faint [overflow-wrap:anywhere]">{c.row.original.organisation}</p> : null}
          </div>
        ),
      }),
      col.accessor("interest", { header: "Interest", cell: (c) => INTEREST_SHORT[c.getValue()] + (c.row.original.account ? " · account" : "") }),
      col.accessor("status", {
        header: "Status",
        cell: (c) => {
          const look = STATUS_LOOK[c.getValue()];
          return (
            <span className={`inline-flex items-center gap-1 whitespace-nowrap ${look.className}`}>
              <span aria-hidden>{look.glyph}</span> {look.word}
            </span>
          );
        },
      }),
      col.accessor("frequency", { header: "How often", cell: (c) => FREQUENCY_SHORT[c.getValue()] }),
      col.accessor((r) => topicsWords(r.topics), { id: "topics", header: "Topics" }),
      col.accessor("consentAt", {
        header: "Consent",
        cell: (c) => (
          <div className="min-w-36">
            <p className="whitespace-nowrap">{formatInstant(c.getValue())}</p>
            <p className="text-ink-faint">{c.row.original.consentSource ?? "—"}</p>
          </div>
        ),
      }),
      actionsColumn(col, (s) => (
        <div className="flex flex-wrap gap-2">
          <a className={buttonClass("secondary", "sm")} href={personDataUrl(s.id)} download aria-label={`Data of ${s.email} as JSON`}>
            Data
          </a>
          <Button
            size="sm"
            variant="danger"
            aria-label={`Erase ${s.email}`}
            onClick={() => {
              if (!window.confirm(`Erase ${s.email}? Every subscription and enquiry of this address goes; only a hash stays, so it is not added again.`)) return;
              erase.mutate(s.id, { onSuccess: (r) => toast.success(`Erased: ${r.erased.subscriptions} subscriptions, ${r.erased.enquiries} enquiries`) });
            }}
          >
            Erase
          </Button>
        </div>
      )),
    ],
    [erase],
  );
  const table = useSortedTable({ data: rows, columns });
  return <DataTable table={table} caption="Subscribers" empty="No subscribers match these filters." />;
}
