import { useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { Link, useNavigate, useParams, useSearchParams } from "react-router-dom";
import type { ReportFigures } from "#shared/domain/report-figures.ts";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";
import type { ReportDetail, ReportSection } from "#shared/schemas/reports.ts";
import { Button } from "../../components/ui/button.tsx";
import { Notice, PageHeader, Sheet } from "../../components/ui/sheet.tsx";
import { todayIn } from "../../lib/format.ts";
import { ApiError } from "../../lib/api-client.ts";
import { formatInstant } from "../../lib/format.ts";
import { idParam, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { officePageLoader } from "../../lib/office-page.tsx";
import { canKeepRecord, RecordPage } from "../../lib/record.tsx";
import { meQueryOptions } from "../../lib/session.ts";
import { reportPdfUrl, reportProjectQueryOptions, reportProjectsQueryOptions, reportQueryOptions, reportsQueryOptions, useSaveCommentary } from "./api.ts";
import { CorrectDialog, IssueDialog, NewDraftDialog } from "./components/report-dialogs.tsx";
import { useReportParts } from "./components/report-parts.ts";
import { ReportStateMark } from "./components/report-state.tsx";
import { ReportView } from "./components/report-view.tsx";
import { endedMonths, monthWords, orderReports, SECTION_TITLE } from "./words.ts";

/** Reports carry the budget: the lead and administrators keep and read them (decision 046). */
export const REPORT_ROLES = ["lead", "admin"] as const;

/** `/office/reports`: the project's reports by month. */
export const reportsLoader = officePageLoader(
  reportProjectsQueryOptions,
  (qc, slug) => Promise.all([qc.ensureQueryData(reportProjectQueryOptions(slug)), qc.ensureQueryData(reportsQueryOptions(slug))]),
  REPORT_ROLES,
);

function ReportsBody({ slug }: { slug: string }) {
  const project = useSuspenseQuery(reportProjectQueryOptions(slug)).data;
  const reports = orderReports(useSuspenseQuery(reportsQueryOptions(slug)).data);
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();
  const open = (id: number) => navigate(`/office/reports/${id}?project=${slug}`);
  return (
    <Sheet
      label={`${reports.length} report${reports.length === 1 ? "" : "s"} · months end in ${project.timeZone.replace("_", " ")}`}
      title="Monthly reports"
      actions={
        <Button size="sm" variant="primary" onClick={() => setCreating(true)}>
          New draft
        </Button>
      }
    >
      {reports.length === 0 ? (
        <p className="text-sm text-ink-soft">No report yet. Start a draft for a month that has ended.</p>
      ) : (
        <ul className="divide-y divide-rule border-y border-rule" data-testid="office-reports">
          {reports.map((r) => (
            <li key={r.id} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 py-3" data-testid="office-report" data-report-id={r.id} data-state={r.state}>
              <Link to={`/office/reports/${r.id}?project=${slug}`} className="font-semibold underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
                {monthWords(r.month)}
                {r.supersedes ? " (correction)" : ""}
              </Link>
              <span className="flex flex-wrap items-baseline gap-3 text-sm text-ink-soft">
                <ReportStateMark state={r.state} />
                {r.issuedAt ? <span>issued {formatInstant(r.issuedAt, project.timeZone)}</span> : null}
                {r.audience === "internal" ? <span>staff only</span> : null}
              </span>
              {r.correctionNote ? <p className="w-full text-sm">What changed: {r.correctionNote}</p> : null}
            </li>
          ))}
        </ul>
      )}
      {creating ? <NewDraftDialog slug={slug} months={endedMonths(todayIn(project.timeZone))} onClose={() => setCreating(false)} onCreated={open} /> : null}
    </Sheet>
  );
}

/** Site office › Reports: the monthly investor report, drafted from the record, issued, corrected. */
export function ReportsPage() {
  return <RecordPage projects={reportProjectsQueryOptions} sheet="Site office · Reports" title="Monthly reports" description="The investors' monthly report, drawn from the record as it stood at each month's end. Draft it, add your commentary, preview the PDF, issue it." body={ReportsBody} />;
}

export const reportLoader: RouteLoader = (qc) => ({ params }) => primeWhenAllowed(qc, REPORT_ROLES, () => qc.ensureQueryData(reportQueryOptions(idParam(params.id))));

const EMPTY_DOC: RichTextDoc = { type: "doc", content: [{ type: "paragraph" }] } as RichTextDoc;

/** Each section's commentary editor on a draft; the edits wait in the page until saved together. */
function useCommentaryDrafts(report: ReportDetail) {
  const [changed, setChanged] = useState<Partial<Record<ReportSection, RichTextDoc>>>({});
  const save = useSaveCommentary();
  const dirty = Object.keys(changed).length > 0;
  const submit = () => save.mutate({ id: report.id, commentary: changed, version: report.version }, { onSuccess: () => setChanged({}) });
  return { changed, setSection: (s: ReportSection, doc: RichTextDoc) => setChanged((c) => ({ ...c, [s]: doc })), save, submit, dirty };
}

function ReportBody({ report }: { report: ReportDetail }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const { Editor } = useReportParts();
  const navigate = useNavigate();
  const [search] = useSearchParams();
  const [dialog, setDialog] = useState<"issue" | "correct" | null>(null);
  const drafts = useCommentaryDrafts(report);
  const figures = report.figures as unknown as ReportFigures;
  const editable = canKeepRecord(me) && report.state === "draft";
  const slug = figures.project.slug;
  const commentary = editable && Editor
    ? (section: ReportSection) => (
        <div className="flex flex-col gap-1" data-testid={`commentary-${section}`}>
          <p className="label-caps">Your commentary on {SECTION_TITLE[section].toLowerCase()}</p>
          <Editor slug={slug} label={`Commentary on ${SECTION_TITLE[section].toLowerCase()}`} initial={(report.commentary[section] as RichTextDoc | null | undefined) ?? EMPTY_DOC} onChange={(doc) => drafts.setSection(section, doc)} />
        </div>
      )
    : undefined;
  const saveError = drafts.save.error instanceof ApiError ? drafts.save.error.message : drafts.save.error?.message;
  return (
    <div className="flex flex-col gap-4">
      <div className="sticky top-0 z-20 flex flex-wrap items-center gap-3 border border-rule bg-sheet px-4 py-3" data-testid="report-actions">
        <ReportStateMark state={report.state} />
        <span className="text-sm text-ink-soft">
          {report.state === "draft" ? `Figures as at the end of ${monthWords(report.month)}, computed ${formatInstant(figures.computedAt, figures.project.timeZone)}` : `Issued ${formatInstant(report.issuedAt, figures.project.timeZone)}`}
        </span>
        <span className="ml-auto flex flex-wrap gap-2">
          {editable ? (
            <Button size="sm" onClick={drafts.submit} busy={drafts.save.isPending} disabled={!drafts.dirty}>
              {drafts.dirty ? "Save commentary" : "Commentary saved"}
            </Button>
          ) : null}
          <a href={reportPdfUrl(report.id, "view")} target="_blank" rel="noopener" className="inline-flex items-center border border-ink bg-sheet px-3 py-1 text-sm font-medium hover:bg-paper">
            {report.state === "draft" ? "Preview PDF" : "Open the PDF"}
          </a>
          {editable ? (
            <Button size="sm" variant="primary" disabled={drafts.dirty} title={drafts.dirty ? "Save the commentary first" : undefined} onClick={() => setDialog("issue")}>
              Issue
            </Button>
          ) : null}
          {canKeepRecord(me) && report.state === "issued" ? (
            <Button size="sm" onClick={() => setDialog("correct")}>
              Correct
            </Button>
          ) : null}
        </span>
      </div>
      {saveError ? <Notice tone="error" title="The commentary was not saved">{saveError}</Notice> : null}
      {report.supersedes ? <Notice title={`A correction of the report issued for ${monthWords(report.supersedes.month)}`}>What changed: {report.correctionNote}</Notice> : null}
      {report.supersededBy ? (
        <Notice tone="caution" title="Superseded">
          This report was corrected.{" "}
          <Link to={`/office/reports/${report.supersededBy.id}?${search.toString()}`} className="underline underline-offset-4">
            Read the correction
          </Link>
          .
        </Notice>
      ) : null}
      <ReportView figures={figures} commentaryHtml={report.commentaryHtml} commentary={commentary} />
      {dialog === "issue" ? <IssueDialog report={report} onClose={() => setDialog(null)} /> : null}
      {dialog === "correct" ? <CorrectDialog report={report} onClose={() => setDialog(null)} onCreated={(id) => navigate(`/office/reports/${id}?project=${slug}`)} /> : null}
    </div>
  );
}

/** Site office › Reports › one month: the report as readers will see it, with the lead's commentary editors on a draft. */
export function ReportPage() {
  const { id } = useParams();
  const report = useSuspenseQuery(reportQueryOptions(idParam(id))).data;
  const [search] = useSearchParams();
  return (
    <>
      <PageHeader
        sheet="Site office · Reports"
        title={`Report for ${monthWords(report.month)}`}
        description={report.state === "draft" ? "A draft: only staff see it. Add your commentary to any section, preview the PDF, and issue it when it reads right." : "Issued: its figures and PDF are frozen."}
        actions={
          <Link to={`/office/reports?${search.toString()}`} className="text-sm underline underline-offset-4">
            All reports
          </Link>
        }
      />
      <ReportBody key={report.id} report={report} />
    </>
  );
}

