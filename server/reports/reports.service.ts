import { createReportsContext, type ReportsDeps } from "./reports.context.ts";
import { createReportNotices } from "./reports.notices.ts";
import { createReportWorkflow } from "./reports.workflow.ts";

export type { ReportsDeps };

/**
 * Monthly investor reports: one object for the router, the worker and the seed, made of its use
 * cases —
 * - workflow (reports.workflow.ts): list and read by audience, draft, commentary, issue into the
 *   document library, correct; the PDF (issued: the library's stamped copy; draft: a preview);
 * - figures (reports.figures.ts): the record as it stood at a month end, the one object the PDF
 *   and the web page are drawn from;
 * - notices (reports.notices.ts): one e-mail per reader of an issue, sent by the worker.
 */
export function createReportsService(deps: ReportsDeps) {
  const ctx = createReportsContext(deps);
  return {
    ...createReportWorkflow(ctx),
    ...createReportNotices(ctx),
  };
}

export type ReportsService = ReturnType<typeof createReportsService>;
