import type { ReactNode } from "react";
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
