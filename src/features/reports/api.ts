import { queryOptions } from "@tanstack/react-query";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";
import type { ReportDetail, ReportListItem, ReportSection } from "#shared/schemas/reports.ts";
import { api, ApiError, qs } from "../../lib/api-client.ts";
import { useQuietWrite } from "../../lib/mutations.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys } from "../../lib/query-keys.ts";

/** Keys: reports → project(slug) → list, and reports → report(id). */
export const reportKeys = {
  ...featureKeys("reports", ["detail", "list"]),
  report: (id: number) => [...reportKeys.all, "report", id] as const,
};

export const reportProjectsQueryOptions = () => projectListQueryOptions(reportKeys.projects());
export const reportProjectQueryOptions = (slug: string) => projectDetailQueryOptions(reportKeys.detail(slug), slug);

/** GET /api/projects/:slug/reports: the reports the caller may see (investors: issued and superseded only). */
export const reportsQueryOptions = (slug: string) => projectReadOptions<ReportListItem[]>(reportKeys.list(slug), slug, "reports");

/** GET /api/reports/:id: the report with its figures and the commentary as sanitised HTML. */
export const reportQueryOptions = (id: number) => queryOptions({ queryKey: reportKeys.report(id), queryFn: () => api.get<ReportDetail>(`/api/reports/${id}`), enabled: id > 0 });

/** The PDF: a draft's preview for staff, an issued report stamped with an investor's name. */
export const reportPdfUrl = (id: number, as: "view" | "download") => `/api/reports/${id}/pdf${qs({ as })}`;

// A write refreshes the whole feature: the list's states and the report's figures move together.
const useReportWrite = <V, R>(mutationFn: (v: V) => Promise<R>) => useQuietWrite<R, V>(reportKeys.all, mutationFn);

export const useCreateReport = (slug: string) => useReportWrite((month: string) => api.post<ReportDetail>(`/api/projects/${slug}/reports`, { month }));
export const useSaveCommentary = () =>
  useReportWrite(({ id, commentary, version }: { id: number; commentary: Partial<Record<ReportSection, RichTextDoc | null>>; version: number }) => api.patch<ReportDetail>(`/api/reports/${id}`, { commentary, version }));
export const useIssueReport = () => useReportWrite(({ id, version }: { id: number; version: number }) => api.post<ReportDetail>(`/api/reports/${id}/issue`, { version }));
export const useCorrectReport = () => useReportWrite(({ id, note, version }: { id: number; note: string; version: number }) => api.post<ReportDetail>(`/api/reports/${id}/correct`, { note, version }));

/**
 * The stamped PDF's bytes for the reader in the page. Each fetch is a logged view of the
 * library's document, so it is never asked again while the page is open, and dropped soon after.
 */
export const reportPdfBytesQueryOptions = (id: number) =>
  queryOptions({
    queryKey: [...reportKeys.report(id), "pdf"] as const,
    queryFn: async () => {
      const res = await fetch(reportPdfUrl(id, "view"), { credentials: "same-origin" });
      if (!res.ok) throw new ApiError(res.status, "http_error", `The copy could not be prepared (the server answered ${res.status}).`);
      return res.arrayBuffer();
    },
    staleTime: Infinity,
    gcTime: 60_000,
    retry: false,
  });
