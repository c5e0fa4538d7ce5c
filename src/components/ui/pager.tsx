import type { ReactNode } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { Button } from "./button.tsx";

/** Earlier and later pages of a list, with where the reader is; nothing when there is one page. */
export function Pager({
  page,
  pages,
  onPage,
  previous = "← Previous",
  next = "Next →",
  summary,
}: {
  page: number;
  pages: number;
  onPage: (page: number) => void;
  previous?: string;
  next?: string;
  /** Said after "Page 2 of 5", e.g. " · 48 updates". */
  summary?: ReactNode;
}) {
  if (pages <= 1) return null;
  return (
    <div className="mt-3 flex items-center justify-between text-sm">
      <Button size="sm" disabled={page <= 1} onClick={() => onPage(page - 1)}>
        {previous}
      </Button>
      <span className="tabular">
        Page {page} of {pages}
        {summary}
      </span>
      <Button size="sm" disabled={page >= pages} onClick={() => onPage(page + 1)}>
        {next}
      </Button>
    </div>
  );
}

/** The page an address asks for (`?page=`): a whole number from 1, anything else is page 1. */
export function pageFromParams(params: URLSearchParams): number {
  const page = Number(params.get("page"));
  return Number.isInteger(page) && page > 1 ? page : 1;
}

/** "41–60 of 312": the rows a page shows, counted from 1; "0 of 0" when nothing matches. */
export function pageRangeLabel(page: number, pageSize: number, total: number): string {
  if (total === 0) return "0 of 0";
  if ((page - 1) * pageSize >= total) return `None here: ${total.toLocaleString("en-GB")} in all`;
  const first = (page - 1) * pageSize + 1;
  const last = Math.min(page * pageSize, total);
  return `${first.toLocaleString("en-GB")}–${last.toLocaleString("en-GB")} of ${total.toLocaleString("en-GB")}`;
}

const pagerLink = "inline-flex min-h-8 min-w-8 items-center justify-center rounded-sm border border-rule-strong bg-sheet px-3 py-1 text-sm font-medium text-ink hover:border-ink";

/**
 * Earlier and later pages of a long office list, the page kept in the address (`?page=`) so
 * back and forward, reloads and shared links land on the same rows. Other query parameters
 * (the list's filters) are kept. Nothing when everything fits on one page.
 */
export function UrlPager({ total, pageSize, label = "Pages", previous = "← Previous", next = "Next →" }: { total: number; pageSize: number; label?: string; previous?: string; next?: string }) {
  const [params] = useSearchParams();
  const page = pageFromParams(params);
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (pages <= 1 && page === 1) return null;
  const to = (p: number) => {
    const q = new URLSearchParams(params);
    if (p <= 1) q.delete("page");
    else q.set("page", String(p));
    const s = q.toString();
    return s ? `?${s}` : "?";
  };
  const off = (text: string) => (
    <span aria-disabled="true" className={`${pagerLink} cursor-not-allowed opacity-50`}>
      {text}
    </span>
  );
  return (
    <nav aria-label={label} className="mt-4 flex flex-wrap items-center justify-between gap-2">
      {page > 1 ? (
        <Link to={to(Math.min(page - 1, pages))} className={pagerLink} rel="prev">
          {previous}
        </Link>
      ) : (
        off(previous)
      )}
      <span className="tabular text-sm" aria-live="polite" data-testid="pager-range">
        {pageRangeLabel(page, pageSize, total)}
        <span className="sr-only">, page {page} of {pages}</span>
      </span>
      {page < pages ? (
        <Link to={to(page + 1)} className={pagerLink} rel="next">
          {next}
        </Link>
      ) : (
        off(next)
      )}
    </nav>
  );
}
