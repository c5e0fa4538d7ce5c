import { useEffect, useId, useRef, type ReactNode } from "react";
import { Button } from "./button.tsx";
import { keepTabInside } from "./focus-trap.ts";

/**
 * A modal panel over the page: focus moves into it and back to the opener when it
 * closes; Escape and the close button close it; Tab stays inside.
 */
export function Dialog({
  open,
  title,
  onClose,
  children,
  footer,
  dismiss,
  wide = false,
}: {
  open: boolean;
  title: string;
  onClose: () => void;
  children: ReactNode;
  footer?: ReactNode;
  /** The label of a button that closes the dialog, first in the footer ("Cancel", "Close"). */
  dismiss?: string;
  wide?: boolean;
}) {
  const titleId = useId();
  const panel = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!open) return;
    const opener = document.activeElement;
    const first = panel.current?.querySelector<HTMLElement>("input, select, textarea, button:not([data-close])");
    (first ?? panel.current)?.focus();
    return () => {
      if (opener instanceof HTMLElement) opener.focus();
    };
  }, [open]);
  if (!open) return null;
  const onKeyDown = (e: React.KeyboardEvent) => {
    if (e.key === "Escape") {
      e.stopPropagation();
      onClose();
    } else if (e.key === "Tab") {
      keepTabInside(e, panel.current, "button:not([disabled]), [href], input:not([disabled]), select, textarea, [tabindex]:not([tabindex='-1'])");
    }
  };
  return (
    <div className="fixed inset-0 z-40 flex items-end justify-center bg-ink/40 p-0 sm:items-center sm:p-4" onMouseDown={(e) => e.target === e.currentTarget && onClose()}>
      <div
        ref={panel}
        role="dialog"
        aria-modal="true"
        aria-labelledby={titleId}
        tabIndex={-1}
        onKeyDown={onKeyDown}
        className={`flex max-h-[92dvh] w-full flex-col border-2 border-ink bg-sheet shadow-xl ${wide ? "sm:max-w-4xl" : "sm:max-w-lg"}`}
      >
        <header className="flex items-center justify-between gap-3 border-b border-rule px-4 py-3">
          <h2 id={titleId} className="font-semibold">
            {title}
          </h2>
          <button type="button" data-close onClick={onClose} className="rounded-sm border border-transparent px-2 py-1 text-sm hover:border-rule">
            Close <span aria-hidden>✕</span>
          </button>
        </header>
        <div className="min-h-0 flex-1 overflow-y-auto p-4">{children}</div>
        {footer || dismiss ? (
          <footer className="flex flex-wrap justify-end gap-2 border-t border-rule px-4 py-3">
            {dismiss ? <Button onClick={onClose}>{dismiss}</Button> : null}
            {footer}
          </footer>
        ) : null}
      </div>
    </div>
  );
}
