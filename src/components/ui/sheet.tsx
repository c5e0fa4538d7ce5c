import type { ReactNode } from "react";
import { useTitle } from "../../lib/use-title.ts";

/** A bordered panel on the paper, like one sheet of a drawing set. */
export function Sheet({ title, label, actions, children, className = "" }: { title?: ReactNode; label?: string; actions?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <section className={`border border-rule bg-sheet ${className}`}>
      {title || label || actions ? (
        <header className="flex flex-wrap items-center justify-between gap-2 border-b border-rule px-4 py-3">
          <div>
            {label ? <p className="label-caps">{label}</p> : null}
            {title ? <h2 className="text-base font-semibold">{title}</h2> : null}
          </div>
          {actions ? <div className="flex flex-wrap gap-2">{actions}</div> : null}
        </header>
      ) : null}
      <div className="p-4">{children}</div>
    </section>
  );
}

/**
 * The head of a page: a sheet reference, the title, a line of explanation and actions. It names the document too, "<title> · <area>" ("Enquiries · Site office"),
 * unless the page gives its own `documentTitle` (an investor's page of one build names the build).
 */
export function PageHeader({ sheet, title, description, actions, documentTitle }: { sheet?: string; title: string; description?: ReactNode; actions?: ReactNode; documentTitle?: string }) {
  useTitle(documentTitle ?? title, documentTitle ? undefined : sheet?.split(" · ")[0]);
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b-2 border-ink pb-3">
      <div className="min-w-0">
        {sheet ? <p className="label-caps">{sheet}</p> : null}
        <h1 className="text-2xl font-semibold tracking-tight sm:text-3xl">{title}</h1>
        {description ? <p className="mt-1 max-w-2xl text-ink-soft">{description}</p> : null}
      </div>
      {actions ? <div className="flex flex-wrap gap-2">{actions}</div> : null}
    </div>
  );
}

export function Notice({ tone = "info", title, testId, children }: { tone?: "info" | "caution" | "error"; title?: string; testId?: string; children: ReactNode }) {
  const mark = tone === "error" ? "✕" : tone === "caution" ? "!" : "i";
  const border = tone === "error" ? "border-bad" : tone === "caution" ? "border-watch" : "border-ink-soft";
  return (
    <div role={tone === "error" ? "alert" : "note"} className={`flex gap-3 border-l-4 ${border} bg-sheet px-4 py-3`} data-testid={testId}>
      <span aria-hidden className={`mt-0.5 flex size-5 shrink-0 items-center justify-center border text-xs font-bold ${border}`}>
        {mark}
      </span>
      <div className="text-sm">
        {title ? <p className="font-semibold">{title}</p> : null}
        <div className="text-ink-soft">{children}</div>
      </div>
    </div>
  );
}

export function Spinner({ label = "Loading" }: { label?: string }) {
  return (
    <div role="status" className="flex items-center gap-2 py-6 text-ink-soft">
      <span aria-hidden className="inline-block size-4 animate-spin rounded-full border-2 border-ink border-r-transparent" />
      {label}…
    </div>
  );
}
