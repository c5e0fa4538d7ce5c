import type { UseQueryResult } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { formatInstant } from "../../lib/format.ts";
import { Notice, Spinner } from "./sheet.tsx";

/** One recorded change of a record (a risk, a decision): what moved, from what to what, who, when and why. */
export interface RecordedChange {
  id: number;
  field: string;
  from: string | null;
  to: string | null;
  at: string;
  by: string | null;
  note: string | null;
}

const asRecorded = (_: RecordedChange, v: string | null) => v ?? "none";

/**
 * A record's history as the server keeps it, newest first, read through `events` (its query):
 * each change named in the feature's words (`fieldWord`), its values as `value` words them, with
 * the instant on the project's clock; `aside` adds a note after a change's values.
 */
export function ChangeHistory<E extends RecordedChange>({
  events,
  fieldWord,
  timeZone,
  testId,
  value = asRecorded,
  aside,
  empty = "No change recorded yet.",
}: {
  events: UseQueryResult<E[]>;
  fieldWord: Readonly<Record<string, string>>;
  timeZone: string;
  testId?: string;
  value?: (e: E, v: string | null) => string;
  aside?: (e: E) => ReactNode;
  empty?: string;
}) {
  if (events.isPending) return <Spinner label="Loading the history" />;
  if (events.isError) return <Notice tone="error">{events.error.message}</Notice>;
  if (events.data.length === 0) return <p className="text-sm text-ink-soft">{empty}</p>;
  return (
    <ol className="flex flex-col divide-y divide-rule text-sm" aria-label="Changes, newest first" data-testid={testId}>
      {[...events.data].sort((a, b) => b.at.localeCompare(a.at) || b.id - a.id).map((e) => (
        <li key={e.id} className="py-1.5">
          <span className="font-medium">{fieldWord[e.field] ?? e.field}</span>
          {e.from !== null || e.to !== null ? (
            <>
              : {value(e, e.from)} → <span className="font-semibold">{value(e, e.to)}</span>
            </>
          ) : null}
          {aside?.(e)}
          <span className="block text-xs text-ink-faint">
            {formatInstant(e.at, timeZone)}
            {e.by ? ` · ${e.by}` : ""}
          </span>
          {e.note ? <span className="block font-serif text-ink-soft">“{e.note}”</span> : null}
        </li>
      ))}
    </ol>
  );
}
