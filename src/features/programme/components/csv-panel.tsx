import { useId, useState } from "react";
import { toast } from "sonner";
import { MILESTONE_CSV_COLUMNS, type CsvImportErrorBody } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { milestonesCsvUrl, useImportMilestones } from "../api.ts";

/** Export the programme as CSV, and import one: every bad row is listed by line, and nothing is written unless all rows are good. */
export function CsvPanel({ slug, editable }: { slug: string; editable: boolean }) {
  const imp = useImportMilestones(slug);
  const inputId = useId();
  const [file, setFile] = useState<File | null>(null);
  const [rows, setRows] = useState<CsvImportErrorBody["error"]["rows"]>([]);
  const [message, setMessage] = useState<string | null>(null);
  const onImport = async () => {
    if (!file) return;
    setRows([]);
    setMessage(null);
    try {
      const r = await imp.mutateAsync(await file.text());
      toast.success(`Imported: ${r.created} new, ${r.updated} updated`);
      setFile(null);
    } catch (e) {
      if (e instanceof ApiError) {
        const body = e.body as Partial<CsvImportErrorBody> | null;
        setRows(body?.error?.rows ?? []);
        setMessage(e.message);
      } else setMessage("The file could not be sent.");
    }
  };
  return (
    <div className="grid gap-6 md:grid-cols-2">
      <div className="flex flex-col gap-2 text-sm">
        <p className="font-semibold">Export</p>
        <p className="text-ink-soft">Every milestone this site office can see, one per row, with the columns {MILESTONE_CSV_COLUMNS.join(", ")}.</p>
        <p>
          <a href={milestonesCsvUrl(slug)} download className="font-medium text-ink underline underline-offset-4">
            Download milestones.csv
          </a>
        </p>
      </div>
      {editable ? (
        <div className="flex flex-col gap-2 text-sm">
          <p className="font-semibold">Import</p>
          <p className="text-ink-soft">Rows with an id update that milestone; rows without one are matched by name or added. Nothing is written unless every row is good.</p>
          <label htmlFor={inputId} className="font-medium">
            CSV file to import
          </label>
          <input
            id={inputId}
            type="file"
            accept=".csv,text/csv"
            className="text-sm file:mr-3 file:rounded-sm file:border file:border-ink file:bg-sheet file:px-3 file:py-1.5"
            onChange={(e) => {
              setFile(e.target.files?.[0] ?? null);
              setRows([]);
              setMessage(null);
            }}
          />
          <div>
            <Button disabled={!file} busy={imp.isPending} onClick={() => void onImport()}>
              Import
            </Button>
          </div>
          {message ? (
            <div data-testid="csv-errors">
              <Notice tone="error" title="Nothing was imported">
                <p>{message}</p>
                {rows.length > 0 ? (
                  <ul className="mt-1">
                    {rows.map((r) => (
                      <li key={`${r.line}-${r.reason}`}>
                        <span className="tabular font-semibold text-ink">Line {r.line}:</span> {r.reason}
                      </li>
                    ))}
                  </ul>
                ) : null}
              </Notice>
            </div>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
