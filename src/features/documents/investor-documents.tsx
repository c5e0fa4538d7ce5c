import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { lazy, Suspense, useEffect, useState } from "react";
import { Link } from "react-router-dom";
import type { Project } from "#shared/schemas/projects.ts";
import type { DocumentAnswer, DocumentCategory, ViewLogRow } from "#shared/schemas/documents.ts";
import { Notice, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { formatDate, formatInstant } from "../../lib/format.ts";
import { useMe } from "../../lib/session.ts";
import { documentBytesQueryOptions, documentFileUrl, investorDocumentsQueryOptions, myDocumentViewsQueryOptions } from "./investor-api.ts";

// pdf.js is large: it loads only when a document is opened.
const PdfViewer = lazy(() => import("./investor-pdf-viewer.tsx").then((m) => ({ default: m.PdfViewer })));

export const CATEGORY_WORD: Record<DocumentCategory, string> = {
  monitoring_report: "Monitoring reports",
  lender_pack: "Lender packs",
  technical: "Technical",
  legal: "Legal",
  certificate: "Certificates",
  financial: "Financial",
  other: "Other papers",
};

const CATEGORY_ORDER = Object.keys(CATEGORY_WORD) as DocumentCategory[];

/** The documents by category, in the library's order; newest period first inside each. */
export function byCategory(documents: readonly DocumentAnswer[]): { category: DocumentCategory; documents: DocumentAnswer[] }[] {
  return CATEGORY_ORDER.map((category) => ({
    category,
    documents: documents
      .filter((d) => d.category === category)
      .sort((a, b) => (b.periodEnd ?? "").localeCompare(a.periodEnd ?? "") || b.latestVersion.uploadedAt.localeCompare(a.latestVersion.uploadedAt)),
  })).filter((g) => g.documents.length > 0);
}

const kb = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1 });
/** "2.4 MB · 18 pages" */
export function fileFacts(v: DocumentAnswer["latestVersion"]): string {
  const size = v.bytes >= 1024 * 1024 ? `${kb.format(v.bytes / 1024 / 1024)} MB` : `${kb.format(Math.max(1, v.bytes / 1024))} KB`;
  return [v.fileType.toUpperCase(), size, v.pages !== null ? `${v.pages} page${v.pages === 1 ? "" : "s"}` : ""].filter(Boolean).join(" · ");
}

/** "New since your last visit", by a star shape and the word. */
function NewMark() {
  return (
    <span className="inline-flex items-center gap-1 border border-ink px-1.5 py-0.5 text-xs font-semibold" data-testid="new-mark">
      <svg aria-hidden width="10" height="10" viewBox="0 0 12 12">
        <path d="M6 0.5l1.5 4 4 1.5-4 1.5-1.5 4-1.5-4-4-1.5 4-1.5z" fill="currentColor" />
      </svg>
      New since your last visit
    </span>
  );
}

function DocumentItem({ doc, slug }: { doc: DocumentAnswer; slug: string }) {
  const v = doc.latestVersion;
  const older = doc.versions.filter((x) => x.number !== v.number).sort((a, b) => b.number - a.number);
  return (
    <li className="flex flex-col gap-2 py-4" data-testid="document" data-document-id={doc.id}>
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h3 className="font-semibold">
          <Link to={`/investors/projects/${slug}/documents/${doc.id}`} className="underline decoration-rule-strong underline-offset-4 hover:decoration-ink">
            {doc.title}
          </Link>
        </h3>
        {doc.newSinceLastVisit ? <NewMark /> : null}
      </div>
      <p className="text-sm text-ink-soft">
        {doc.period ? `${doc.period} · ` : ""}version {v.number} of {formatDate(v.uploadedAt)} · {fileFacts(v)}
      </p>
      <p className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
        <Link to={`/investors/projects/${slug}/documents/${doc.id}`} className="font-medium underline underline-offset-4">
          Read here
        </Link>
        <a href={documentFileUrl(doc.id, v.number, "download")} className="font-medium underline underline-offset-4" download>
          Download
        </a>
      </p>
      {older.length > 0 ? (
        <details className="text-sm">
          <summary className="cursor-pointer text-ink-soft underline underline-offset-4">Earlier versions ({older.length})</summary>
          <ul className="mt-1 flex flex-col gap-1">
            {older.map((o) => (
              <li key={o.id}>
                Version {o.number} of {formatDate(o.uploadedAt)}
                {o.note ? ` — ${o.note}` : ""} ·{" "}
                <Link to={`/investors/projects/${slug}/documents/${doc.id}?version=${o.number}`} className="underline underline-offset-4">
                  read
                </Link>{" "}
                ·{" "}
                <a href={documentFileUrl(doc.id, o.number, "download")} className="underline underline-offset-4" download>
                  download
                </a>
              </li>
            ))}
          </ul>
        </details>
      ) : null}
    </li>
  );
}

function ViewingHistory({ slug, timeZone }: { slug: string; timeZone: string }) {
  const investor = useMe().data?.role === "investor";
  const views = useQuery({ ...myDocumentViewsQueryOptions(slug), enabled: investor });
  // Staff read every reader's log in the site office; this page shows an investor their own.
  if (!investor) return <p className="text-sm text-ink-soft">Each investor sees their own history here. The full view log is in the site office, under Documents.</p>;
  if (views.isPending) return <Spinner label="Reading your history" />;
  if (views.isError) return <Notice tone="error">{views.error.message}</Notice>;
  const rows: ViewLogRow[] = views.data.slice(0, 20);
  if (rows.length === 0) return <p className="text-sm text-ink-soft">You have not opened any document yet.</p>;
  return (
    <ul className="flex flex-col gap-1 text-sm" data-testid="my-views">
      {rows.map((r) => (
        <li key={r.id}>
          <span className="tabular text-ink-soft">{formatInstant(r.at, timeZone)}</span> · {r.kind === "download" ? "downloaded" : "read"} {r.documentTitle}, version {r.versionNumber}
        </li>
      ))}
    </ul>
  );
}

/**
 * The investor room's Documents: the library by category with what is new since the reader's last
 * visit, every version, a reader in the page and a download — each copy stamped with the reader's
 * name by the server — and the reader's own viewing history.
 */
export function InvestorDocuments({ slug, project: { timeZone } }: { slug: string; project: Pick<Project, "timeZone"> }) {
  const documents = useSuspenseQuery(investorDocumentsQueryOptions(slug)).data;
  const groups = byCategory(documents);
  const fresh = documents.filter((d) => d.newSinceLastVisit).length;
  return (
    <div className="flex flex-col gap-6">
      <Notice title="Each copy is yours">Every page you read or download here carries your name, your organisation and the time. Please do not pass copies on.</Notice>
      {groups.length === 0 ? (
        <Sheet title="Documents">
          <p className="text-sm text-ink-soft">No documents are shared with you yet.</p>
        </Sheet>
      ) : (
        groups.map((g) => (
          <Sheet key={g.category} label={`${g.documents.length} document${g.documents.length === 1 ? "" : "s"}${g.documents.some((d) => d.newSinceLastVisit) ? " · new since your last visit" : ""}`} title={CATEGORY_WORD[g.category]}>
            <ul className="divide-y divide-rule border-y border-rule">
              {g.documents.map((d) => (
                <DocumentItem key={d.id} doc={d} slug={slug} />
              ))}
            </ul>
          </Sheet>
        ))
      )}
      <Sheet label={fresh ? `${fresh} new since your last visit` : "Your record"} title="Your viewing history">
        <ViewingHistory slug={slug} timeZone={timeZone} />
      </Sheet>
    </div>
  );
}

/** An image document, shown from the bytes already fetched (its address is freed when the page closes). */
function ImageCopy({ bytes, type, title }: { bytes: ArrayBuffer; type: string; title: string }) {
  const [url, setUrl] = useState<string | null>(null);
  useEffect(() => {
    const u = URL.createObjectURL(new Blob([bytes], { type }));
    setUrl(u);
    return () => URL.revokeObjectURL(u);
  }, [bytes, type]);
  return url ? <img src={url} alt={title} className="max-w-full border border-rule" data-testid="image-copy" /> : null;
}

function DocumentFile({ id, version, fileType, title }: { id: number; version: number; fileType: string; title: string }) {
  const file = useQuery(documentBytesQueryOptions(id, version));
  if (file.isPending) return <Spinner label="Preparing your copy" />;
  if (file.isError) return <Notice tone="error">{file.error.message}</Notice>;
  if (fileType !== "pdf") return <ImageCopy bytes={file.data.bytes} type={file.data.type} title={title} />;
  return (
    <Suspense fallback={<Spinner label="Loading the reader" />}>
      <PdfViewer bytes={file.data.bytes} title={title} />
    </Suspense>
  );
}

/** One document in the page: its stamped copy drawn page by page, a download, and its versions. */
export function InvestorDocument({ slug, id, version }: { slug: string; id: number; version?: number }) {
  const documents = useSuspenseQuery(investorDocumentsQueryOptions(slug)).data;
  const doc = documents.find((d) => d.id === id);
  if (!doc) return <Notice tone="error" title="No such document">It is not in the library, or it is not shared with you.</Notice>;
  const v = doc.versions.find((x) => x.number === version) ?? doc.latestVersion;
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center justify-between gap-3 border-b border-rule pb-3">
        <div>
          <p className="label-caps">
            {CATEGORY_WORD[doc.category]}
            {doc.period ? ` · ${doc.period}` : ""}
          </p>
          <h2 className="text-lg font-semibold">{doc.title}</h2>
          <p className="text-sm text-ink-soft">
            Version {v.number} of {doc.versions.length} · {formatDate(v.uploadedAt)} · {fileFacts(v)}
          </p>
        </div>
        <div className="flex flex-wrap gap-3 text-sm">
          <a href={documentFileUrl(doc.id, v.number, "download")} download className="inline-flex items-center border border-ink bg-sheet px-4 py-2 font-medium hover:bg-paper">
            Download your copy
          </a>
          <Link to={`/investors/projects/${slug}/documents`} className="inline-flex items-center px-2 py-2 underline underline-offset-4">
            All documents
          </Link>
        </div>
      </div>
      <DocumentFile id={doc.id} version={v.number} fileType={v.fileType} title={doc.title} />
    </div>
  );
}
