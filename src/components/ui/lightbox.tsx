import { useEffect, useRef, type ReactNode } from "react";
import { keepTabInside } from "./focus-trap.ts";
import { Picture, type PictureData } from "./picture.tsx";

export interface LightboxItem {
  picture: PictureData;
  caption?: ReactNode;
  /** A line under the caption: area, capture date, credit. */
  meta?: ReactNode;
}

/**
 * A photo at full size over the page. Arrow keys and the buttons step through the set,
 * a sideways swipe does the same on touch screens, Escape or the close button returns
 * focus to whatever opened it.
 */
export function Lightbox({ items, index, onIndexChange, label = "Photo" }: { items: readonly LightboxItem[]; index: number | null; onIndexChange: (i: number | null) => void; label?: string }) {
  const closeRef = useRef<HTMLButtonElement>(null);
  const dialogRef = useRef<HTMLDivElement>(null);
  const openerRef = useRef<Element | null>(null);
  const swipeRef = useRef<{ x: number; y: number } | null>(null);
  const open = index !== null && index >= 0 && index < items.length;

  useEffect(() => {
    if (!open) return;
    openerRef.current = document.activeElement;
    closeRef.current?.focus();
    const { overflow } = document.body.style;
    document.body.style.overflow = "hidden";
    return () => {
      document.body.style.overflow = overflow;
      if (openerRef.current instanceof HTMLElement) openerRef.current.focus();
    };
  }, [open]);

  if (!open) return null;
  const item = items[index] as LightboxItem;
  const step = (d: number) => onIndexChange((index + d + items.length) % items.length);
  const many = items.length > 1;

  const onKeyDown = (e: React.KeyboardEvent) => {
    if (e.key === "Escape") {
      e.preventDefault();
      onIndexChange(null);
    } else if (e.key === "ArrowRight" && many) {
      e.preventDefault();
      step(1);
    } else if (e.key === "ArrowLeft" && many) {
      e.preventDefault();
      step(-1);
    } else if (e.key === "Tab") {
      keepTabInside(e, dialogRef.current, "button, [href], [tabindex]:not([tabindex='-1'])");
    }
  };

  return (
    <div
      ref={dialogRef}
      role="dialog"
      aria-modal="true"
      aria-label={`${label} ${index + 1} of ${items.length}`}
      className="fixed inset-0 z-50 flex flex-col bg-[#111214]/95 text-white"
      onKeyDown={onKeyDown}
      onPointerDown={(e) => {
        if (e.pointerType !== "mouse") swipeRef.current = { x: e.clientX, y: e.clientY };
      }}
      onPointerUp={(e) => {
        const start = swipeRef.current;
        swipeRef.current = null;
        if (!start || !many) return;
        const dx = e.clientX - start.x;
        if (Math.abs(dx) > 50 && Math.abs(dx) > Math.abs(e.clientY - start.y)) step(dx < 0 ? 1 : -1);
      }}
    >
      <div className="flex items-center justify-between gap-2 px-3 py-2 text-sm">
        <span className="tabular" aria-live="polite">
          {index + 1} / {items.length}
        </span>
        <button ref={closeRef} type="button" onClick={() => onIndexChange(null)} className="rounded-sm border border-white/50 px-3 py-1.5 font-medium hover:bg-white/10">
          Close <span aria-hidden>✕</span>
        </button>
      </div>
      <div
        className="relative flex min-h-0 flex-1 items-center justify-center px-2"
        onClick={(e) => {
          if (e.target === e.currentTarget) onIndexChange(null);
        }}
      >
        <Picture key={item.picture.id} picture={item.picture} sizes="100vw" eager fit="contain" className="max-h-full" imgClassName="max-h-[calc(100dvh-10rem)]" />
        {many ? (
          <>
            <button type="button" onClick={() => step(-1)} aria-label="Previous photo" className="absolute left-2 top-1/2 -translate-y-1/2 rounded-sm border border-white/50 bg-black/40 px-3 py-3 text-lg hover:bg-black/70">
              <span aria-hidden>←</span>
            </button>
            <button type="button" onClick={() => step(1)} aria-label="Next photo" className="absolute right-2 top-1/2 -translate-y-1/2 rounded-sm border border-white/50 bg-black/40 px-3 py-3 text-lg hover:bg-black/70">
              <span aria-hidden>→</span>
            </button>
          </>
        ) : null}
      </div>
      <div className="mx-auto w-full max-w-3xl px-4 py-3 text-sm">
        {item.caption ? <p className="font-serif text-base">{item.caption}</p> : null}
        {item.meta ? <p className="mt-1 text-white/75">{item.meta}</p> : null}
      </div>
    </div>
  );
}
