import type { DocumentCategory, DocumentFileType, ViewKind } from "#shared/schemas/documents.ts";

export const CATEGORY_WORD: Record<DocumentCategory, string> = {
  monitoring_report: "Monitoring report",
  lender_pack: "Lender pack",
  technical: "Technical",
  legal: "Legal",
  certificate: "Certificate",
  financial: "Financial",
  other: "Other",
};

export const FILE_TYPE_WORD: Record<DocumentFileType, string> = { pdf: "PDF", jpeg: "JPEG image", png: "PNG image", webp: "WebP image" };

export const VIEW_KIND_WORD: Record<ViewKind, string> = { view: "Viewed", download: "Downloaded" };

/** What the library takes: PDFs and the usual images (the server checks the bytes, whatever the name says). */
export const DOCUMENT_ACCEPT = { "application/pdf": [".pdf"], "image/jpeg": [".jpg", ".jpeg"], "image/png": [".png"], "image/webp": [".webp"] };

/** A file's name without its extension, as a first title. */
export function titleFromFileName(name: string): string {
  return name.replace(/\.[a-z0-9]+$/i, "").replace(/[_-]+/g, " ").trim();
}
