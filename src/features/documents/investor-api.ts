import { queryOptions } from "@tanstack/react-query";
import type { ViewKind, ViewLogRow } from "#shared/schemas/documents.ts";
import { ApiError, qs } from "../../lib/api-client.ts";
import { documentKeys, documentsQueryOptions } from "./api.ts";
import { projectReadOptions } from "../../lib/projects.ts";

/** The investor room's own reads of the library, under the documents feature's keys (documents → …). */
export const investorDocumentKeys = {
  myViews: (slug: string) => [...documentKeys.project(slug), "my-views"] as const,
  file: (id: number, version: number) => [...documentKeys.document(id), "file", version] as const,
};

/**
 * GET /api/projects/:slug/documents. Reading the list is the investor's visit, so it is kept for
 * the whole visit: asking again would clear the "new since your last visit" marks under the reader.
 */
export const investorDocumentsQueryOptions = (slug: string) => queryOptions({ ...documentsQueryOptions(slug), staleTime: Infinity });

/** GET /api/projects/:slug/my-document-views: the reader's own views and downloads, newest first. */
export const myDocumentViewsQueryOptions = (slug: string) => projectReadOptions<ViewLogRow[]>(investorDocumentKeys.myViews(slug), slug, "my-document-views");

/** The address of a version's file: stamped for an investor, logged as a view or a download. */
export function documentFileUrl(id: number, version: number, as: ViewKind): string {
  return `/api/documents/${id}/file${qs({ as, version })}`;
}

/**
 * The bytes of a version, fetched once for the viewer (each fetch is a logged view, so it is
 * never asked again while the page is open, and dropped soon after it closes).
 */
export const documentBytesQueryOptions = (id: number, version: number) =>
  queryOptions({
    queryKey: investorDocumentKeys.file(id, version),
    queryFn: async () => {
      const res = await fetch(documentFileUrl(id, version, "view"), { credentials: "same-origin" });
      if (!res.ok) {
        const body = (await res.json().catch(() => null)) as { error?: { code?: string; message?: string } } | null;
        throw new ApiError(res.status, body?.error?.code ?? "http_error", body?.error?.message ?? `The server answered ${res.status}.`);
      }
      return { type: res.headers.get("content-type") ?? "", bytes: await res.arrayBuffer() };
    },
    staleTime: Infinity,
    gcTime: 60_000,
    retry: false,
  });
