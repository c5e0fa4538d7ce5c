import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Suspense } from "react";
import { Link } from "react-router-dom";
import type { ReportFigures } from "#shared/domain/report-figures.ts";
import { Notice, Sheet, Spinner } from "../../../components/ui/sheet.tsx";
import { formatInstant } from "../../../lib/format.ts";
import { reportPdfBytesQueryOptions, reportPdfUrl, reportQueryOptions, reportsQueryOptions } from "../api.ts";
import { monthWords, orderReports } from "../words.ts";
import { useReportParts } from "./report-parts.ts";
import { ReportStateMark } from "./report-state.tsx";
import { ReportView } from "./report-view.tsx";

const roomHref = (slug: string, id?: number) => `/investors/projects/${slug}/reports${id ? `/${id}` : ""}`;

/** The investor room's Reports: the issued monthly reports, newest first; a superseded one marked and linked to its correction. */
export function InvestorReports({ slug, timeZone }: { slug: string; timeZone: string }) {
  // Drafts are the office's: the room lists only what was issued, whatever the server sends a staff reader.
  const reports = orderReports(useSuspenseQuery(reportsQueryOptions(slug)).data.filter((r) => r.state !== "draft"));
  if (reports.length === 0)
    return (
      <Sheet title="Monthly reports">
        <p className="text-sm text-ink-soft">No report has been issued yet.</p>
      </Sheet>
    );
  return (
    <Sheet label={`${reports.length} issued`} title="Monthly reports">
      <ul className="divide-y divide-rule border-y border-rule" data-testid="investor-reports">
        {reports.map((r) => (
          <li key={r.id} className="flex flex-col gap-1 py-3" data-testid="investor-report" data-report-id={r.id} data-state={r.state}>
            <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
              <h3 className="font-semibold">
                <Link to={roomHref(slug, r.id)} className="underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
                  {monthWords(r.month)}
                  {r.supersedes ? " (corrected)" : ""}
                </Link>
              </h3>
              <ReportStateMark state={r.state} />
            </div>
            <p className="text-sm text-ink-soft">Issued {formatInstant(r.issuedAt, timeZone)}</p>
            {r.correctionNote ? <p className="text-sm">What changed: {r.correctionNote}</p> : null}
            {r.supersededBy ? (
              <p className="text-sm">
                Replaced by a correction:{" "}
                <Link to={roomHref(slug, r.supersededBy.id)} className="font-medium underline underline-offset-4">
                  read the corrected report
                </Link>
              </p>
            ) : null}
            <p className="flex flex-wrap gap-x-4 text-sm">
              <Link to={`${roomHref(slug, r.id)}?as=pdf`} className="font-medium underline underline-offset-4">
                Read the PDF
              </Link>
              <a href={reportPdfUrl(r.id, "download")} download className="font-medium underline underline-offset-4">
                Download your copy
              </a>
            </p>
          </li>
        ))}
      </ul>
    </Sheet>
  );
}

function ReportPdf({ id, title }: { id: number; title: string }) {
  const { PdfViewer } = useReportParts();
  const file = useQuery(reportPdfBytesQueryOptions(id));
  if (file.isPending) return <Spinner label="Preparing your copy" />;
  if (file.isError) return <Notice tone="error">{file.error.message}</Notice>;
  if (!PdfViewer) return null;
  return (
    <Suspense fallback={<Spinner label="Loading the reader" />}>
      <PdfViewer bytes={file.data} title={title} />
    </Suspense>
  );
}

/** One report in the room: as a web page (summary first) or as the reader's stamped PDF; a download either way. */
export function InvestorReport({ slug, id, asPdf }: { slug: string; id: number; asPdf: boolean }) {
  const report = useSuspenseQuery(reportQueryOptions(id)).data;
  const figures = report.figures as unknown as ReportFigures;
  const title = `Monthly report, ${monthWords(report.month)}`;
  const tab = (on: boolean) => `-mb-px border-b-2 px-3 py-1.5 text-sm ${on ? "border-ink font-semibold" : "border-transparent text-ink-soft hover:text-ink"}`;
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-end justify-between gap-3 border-b border-rule">
        <div className="pb-2">
          <p className="label-caps">
            <ReportStateMark state={report.state} /> · {formatInstant(report.issuedAt, figures.project.timeZone)}
          </p>
          <h2 className="text-lg font-semibold">{title}</h2>
        </div>
        <nav aria-label="Read the report as" className="flex gap-1">
          <Link to={roomHref(slug, id)} className={tab(!asPdf)} aria-current={!asPdf ? "page" : undefined}>
            Web page
          </Link>
          <Link to={`${roomHref(slug, id)}?as=pdf`} className={tab(asPdf)} aria-current={asPdf ? "page" : undefined}>
            PDF
          </Link>
          <a href={reportPdfUrl(id, "download")} download className="px-3 py-1.5 text-sm underline underline-offset-4">
            Download your copy
          </a>
        </nav>
      </div>
      {report.correctionNote ? <Notice title="A corrected issue">What changed: {report.correctionNote}</Notice> : null}
      {report.supersededBy ? (
        <Notice tone="caution" title="Superseded">
          This report was corrected.{" "}
          <Link to={roomHref(slug, report.supersededBy.id)} className="underline underline-offset-4">
            Read the corrected report
          </Link>
          .
        </Notice>
      ) : null}
      {asPdf ? <ReportPdf id={id} title={title} /> : <ReportView figures={figures} commentaryHtml={report.commentaryHtml} />}
    </div>
  );
}
