import { useState } from "react";
import type { SubscriberImportErrorBody, SubscriberImportResult } from "#shared/schemas/subscribers.ts";
import { SUBSCRIBER_IMPORT_COLUMNS } from "#shared/schemas/subscribers.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { useImportSubscribers } from "../api.ts";

/** The rows of the file that an import names, by line; nothing when there are none. */
function LineList({ label, rows }: { label: string; rows: readonly { line: number; reason: string }[] }) {
  if (rows.length === 0) return null;
  return (
    <ul className="mt-2 list-disc pl-5" aria-label={label}>
      {rows.map((r) => (
        <li key={`${r.line}-${r.reason}`}>
          Line {r.line}: {r.reason}
        </li>
      ))}
    </ul>
  );
}

/** CSV import: every row is checked first; one bad row and nothing is imported. */
export function ImportPanel({ projectSlug, projectName }: { projectSlug: string; projectName: string }) {
  const importer = useImportSubscribers();
  const [file, setFile] = useState<File | null>(null);
  const [result, setResult] = useState<SubscriberImportResult | null>(null);
  const [problems, setProblems] = useState<SubscriberImportErrorBody["error"] | null>(null);
  const run = async () => {
    if (!file) return;
    setResult(null);
    setProblems(null);
    try {
      setResult(await importer.mutateAsync({ projectSlug, csv: await file.text() }));
    } catch (e) {
      if (e instanceof ApiError && e.code === "csv_invalid") setProblems((e.body as SubscriberImportErrorBody).error);
      else if (e instanceof ApiError) setProblems({ code: "csv_invalid", message: e.message, rows: [] });
    }
  };
  return (
    <div className="flex flex-col gap-3 text-sm">
      <p className="text-ink-soft">
        Into <span className="font-medium text-ink">{projectName}</span>. Columns: <code className="break-all">{SUBSCRIBER_IMPORT_COLUMNS.join(", ")}</code>. Topics are <code>all</code> or
        entries like <code>area:Hall 2A;system:cooling</code>. Rows with both <code>consent_at</code> and <code>consent_source</code> are subscribed on that evidence; the others are sent a
        confirmation e-mail and receive nothing else until they confirm.
      </p>
      <div className="flex flex-wrap items-end gap-2">
        <label className="flex flex-col gap-1">
          <span className="font-medium">CSV file</span>
          <input type="file" accept=".csv,text/csv" className="text-sm" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
        </label>
        <Button variant="primary" size="sm" disabled={!file} busy={importer.isPending} onClick={() => void run()}>
          Check and import
        </Button>
      </div>
      {problems ? (
        <Notice tone="error" title="Nothing was imported">
          <p>{problems.message}</p>
          <LineList label="Rows with problems" rows={problems.rows} />
        </Notice>
      ) : null}
      {result ? (
        <Notice title="Imported">
          <p>
            {result.imported} imported: {result.confirmedOnEvidence} on consent evidence, {result.confirmationsSent} sent a confirmation e-mail.
          </p>
          <LineList label="Rows left out" rows={result.skipped} />
        </Notice>
      ) : null}
    </div>
  );
}
