import { useState, type ReactNode } from "react";
import type { ReportDetail } from "#shared/schemas/reports.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { SelectField, TextAreaField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { useCorrectReport, useCreateReport, useIssueReport } from "../api.ts";
import { monthWords } from "../words.ts";

const failure = (e: unknown) => (e instanceof ApiError ? e.message : e instanceof Error ? e.message : undefined);

/** A report's dialog: what it does in words, one button that does it, and the server's refusal beneath. */
function ActionDialog({ title, onClose, label, busy, disabled, onConfirm, error, children }: { title: string; onClose: () => void; label: string; busy: boolean; disabled?: boolean; onConfirm: () => void; error?: string; children: ReactNode }) {
  return (
    <Dialog
      open
      title={title}
      onClose={onClose}
      dismiss="Cancel"
      footer={
        <Button variant="primary" busy={busy} disabled={disabled} onClick={onConfirm}>
          {label}
        </Button>
      }
    >
      <div className="flex flex-col gap-3">
        {children}
        {error ? <Notice tone="error">{error}</Notice> : null}
      </div>
    </Dialog>
  );
}

/** A new draft for a month that has ended; the months still running are never offered. */
export function NewDraftDialog({ slug, months, onClose, onCreated }: { slug: string; months: readonly string[]; onClose: () => void; onCreated: (id: number) => void }) {
  const [month, setMonth] = useState(months[0] ?? "");
  const create = useCreateReport(slug);
  return (
    <ActionDialog title="New draft report" onClose={onClose} label="Create the draft" busy={create.isPending} disabled={!month} onConfirm={() => create.mutate(month, { onSuccess: (r) => onCreated(r.id) })} error={failure(create.error)}>
      <SelectField label="Month" value={month} onChange={(e) => setMonth(e.target.value)} options={months.map((m) => ({ value: m, label: monthWords(m) }))} hint="Only months that have ended: the figures are the record as it stood at the month's end." />
    </ActionDialog>
  );
}

/** Issuing: the figures and the PDF are frozen and every reader is told once; it cannot be undone. */
export function IssueDialog({ report, onClose }: { report: ReportDetail; onClose: () => void }) {
  const issue = useIssueReport();
  return (
    <ActionDialog title={`Issue the report for ${monthWords(report.month)}`} onClose={onClose} label="Issue and notify" busy={issue.isPending} onConfirm={() => issue.mutate({ id: report.id, version: report.version }, { onSuccess: onClose })} error={failure(issue.error)}>
      <div className="flex flex-col gap-3 text-sm">
        <p>
          Issuing freezes this report: its figures, its commentary and its PDF stay as they are now, and the PDF joins the document library. Every {report.audience === "internal" ? "member of staff" : "investor"} of the project is sent one e-mail
          with a link to it in the investor room — once each, however often this is pressed.
        </p>
        <p className="font-semibold">It cannot be undone. A mistake is put right with a correction, which says what changed.</p>
      </div>
    </ActionDialog>
  );
}

/** A correction: a new draft of the same month that will supersede the issued one and says what changed. */
export function CorrectDialog({ report, onClose, onCreated }: { report: ReportDetail; onClose: () => void; onCreated: (id: number) => void }) {
  const [note, setNote] = useState("");
  const correct = useCorrectReport();
  const fieldError = correct.error instanceof ApiError ? correct.error.fields.note : undefined;
  return (
    <ActionDialog
      title={`Correct the report for ${monthWords(report.month)}`}
      onClose={onClose}
      label="Start the correction"
      busy={correct.isPending}
      disabled={!note.trim()}
      onConfirm={() => correct.mutate({ id: report.id, note: note.trim(), version: report.version }, { onSuccess: (r) => onCreated(r.id) })}
      error={fieldError ? undefined : failure(correct.error)}
    >
      <TextAreaField label="What changed" value={note} onChange={(e) => setNote(e.target.value)} rows={4} error={fieldError} hint="Readers see this beside the corrected report. The issued one stays readable, marked as superseded." />
    </ActionDialog>
  );
}
