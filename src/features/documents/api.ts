import { queryOptions, useQuery } from "@tanstack/react-query";
import type { z } from "zod";
import type { DocumentAnswer, DocumentCreateFields, DocumentPatchInput, DOCUMENTS_ANSWERS, ViewLogRow } from "#shared/schemas/documents.ts";
import { api, qs } from "../../lib/api-client.ts";
import { useQuietWrite } from "../../lib/mutations.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys, readOptions } from "../../lib/query-keys.ts";

/** An investor organisation, with how many investor accounts belong to it. */
export type OrganisationRow = z.infer<typeof DOCUMENTS_ANSWERS.organisation>;

/** Keys: documents → project(slug) → kind; documents → document(id) → views; the organisations. */
export const documentKeys = {
  ...featureKeys("documents", ["detail", "list"]),
  readerViews: (slug: string, userId: number | null) => [...documentKeys.project(slug), "views", userId] as const,
  document: (id: number) => [...documentKeys.all, "document", id] as const,
  views: (id: number) => [...documentKeys.document(id), "views"] as const,
  organisations: () => [...documentKeys.all, "organisations"] as const,
};

export const documentProjectsQueryOptions = () => projectListQueryOptions(documentKeys.projects());
export const documentProjectQueryOptions = (slug: string) => projectDetailQueryOptions(documentKeys.detail(slug), slug);

export const documentsQueryOptions = (slug: string) => projectReadOptions<DocumentAnswer[]>(documentKeys.list(slug), slug, "documents");

export const organisationsQueryOptions = () => readOptions<OrganisationRow[]>(documentKeys.organisations(), "/api/organisations");

/** The view log of one document, every reader. */
export const documentViewsQueryOptions = (id: number) => readOptions<ViewLogRow[]>(documentKeys.views(id), `/api/documents/${id}/views`);
export const useDocumentViews = (id: number) => useQuery(documentViewsQueryOptions(id));

/** The view log of the project, of one reader or of all. */
export const readerViewsQueryOptions = (slug: string, userId: number | null) =>
  queryOptions({ queryKey: documentKeys.readerViews(slug, userId), queryFn: () => api.get<ViewLogRow[]>(`/api/projects/${slug}/document-views${qs({ userId })}`) });
export const useReaderViews = (slug: string, userId: number | null) => useQuery(readerViewsQueryOptions(slug, userId));

/** The same log as a CSV file (a plain link: the browser downloads it with the session). */
export const viewLogCsvUrl = (slug: string, userId: number | null) => `/api/projects/${slug}/document-views${qs({ userId, format: "csv" })}`;

/** A document's file: staff get the clean original. */
export const cleanFileUrl = (id: number, opts: { version?: number; as?: "view" | "download" } = {}) => `/api/documents/${id}/file${qs({ version: opts.version, as: opts.as, clean: "1" })}`;

/** The multipart body of an upload: the file, and the fields as text (lists as JSON). */
function formOf(file: File, fields: Record<string, unknown>): FormData {
  const body = new FormData();
  for (const [k, v] of Object.entries(fields)) {
    if (v === null || v === undefined) continue;
    body.append(k, typeof v === "string" ? v : JSON.stringify(v));
  }
  body.append("file", file);
  return body;
}

const useDocumentWrite = <V, R>(mutationFn: (v: V) => Promise<R>) => useQuietWrite<R, V>(documentKeys.all, mutationFn);

export const useUploadDocument = (slug: string) =>
  useDocumentWrite(({ file, fields }: { file: File; fields: DocumentCreateFields }) => api.post<DocumentAnswer>(`/api/projects/${slug}/documents`, formOf(file, fields)));
export const useUploadVersion = () => useDocumentWrite(({ id, file, note }: { id: number; file: File; note: string }) => api.post<DocumentAnswer>(`/api/documents/${id}/versions`, formOf(file, { note })));
export const usePatchDocument = () => useDocumentWrite(({ id, patch }: { id: number; patch: DocumentPatchInput }) => api.patch<DocumentAnswer>(`/api/documents/${id}`, patch));
export const useDeleteDocument = () => useDocumentWrite(({ id }: { id: number }) => api.delete<void>(`/api/documents/${id}`));
