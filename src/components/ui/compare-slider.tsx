import { useRef, useState, type ReactNode } from "react";
import { Picture, type PictureData } from "./picture.tsx";

/** Arrow keys move the divider this many percent; Page Up / Page Down four times as far. */
export const COMPARE_STEP = 5;

const clamp = (v: number) => Math.min(100, Math.max(0, v));

/**
 * Two photos of one place, the earlier over the later, with a divider to drag across.
 * The divider is an ARIA slider: arrows move it, Page Up/Down move it further, Home
 * shows only the later photo and End only the earlier. On touch screens a sideways drag
 * moves it while an up-and-down drag still scrolls the page.
 */
export function CompareSlider({
  before,
  after,
  beforeLabel,
  afterLabel,
  label,
  sizes,
  initial = 50,
  eager = false,
}: {
  before: PictureData;
  after: PictureData;
  /** Shown on the earlier photo, e.g. "Then · 3 March 2026". */
  beforeLabel: ReactNode;
  afterLabel: ReactNode;
  /** What the slider compares, read by screen readers. */
  label: string;
  sizes: string;
  initial?: number;
  /** Above the fold: load both photos at once. */
  eager?: boolean;
}) {
  const [pos, setPos] = useState(clamp(initial));
  const frame = useRef<HTMLDivElement>(null);
  const dragging = useRef(false);
  const aspect = before.width / before.height;

  const moveTo = (clientX: number) => {
    const box = frame.current?.getBoundingClientRect();
    if (!box || box.width === 0) return;
    setPos(clamp(((clientX - box.left) / box.width) * 100));
  };

  const onKeyDown = (e: React.KeyboardEvent) => {
    const delta: Record<string, number> = {
      ArrowLeft: -COMPARE_STEP,
      ArrowDown: -COMPARE_STEP,
      ArrowRight: COMPARE_STEP,
      ArrowUp: COMPARE_STEP,
      PageDown: -4 * COMPARE_STEP,
      PageUp: 4 * COMPARE_STEP,
    };
    if (e.key in delta) {
      e.preventDefault();
      setPos((p) => clamp(p + (delta[e.key] as number)));
    } else if (e.key === "Home") {
      e.preventDefault();
      setPos(0);
    } else if (e.key === "End") {
      e.preventDefault();
      setPos(100);
    }
  };

  const shown = Math.round(pos);
  return (
    <div
      ref={frame}
      className="relative select-none overflow-hidden bg-rule"
      style={{ aspectRatio: String(aspect), touchAction: "pan-y" }}
      data-testid="compare-slider"
      onPointerDown={(e) => {
        dragging.current = true;
        e.currentTarget.setPointerCapture?.(e.pointerId);
        moveTo(e.clientX);
      }}
      onPointerMove={(e) => {
        if (dragging.current) moveTo(e.clientX);
      }}
      onPointerUp={() => {
        dragging.current = false;
      }}
      onPointerCancel={() => {
        dragging.current = false;
      }}
    >
      <div className="absolute inset-0">
        <Picture picture={after} sizes={sizes} fit="cover" aspect={aspect} eager={eager} className="h-full" />
      </div>
      <div className="absolute inset-0" style={{ clipPath: `inset(0 ${100 - pos}% 0 0)` }} data-testid="compare-before">
        <Picture picture={before} sizes={sizes} fit="cover" aspect={aspect} eager={eager} className="h-full" />
      </div>
      <span className="pointer-events-none absolute left-2 top-2 bg-ink/80 px-2 py-1 text-xs font-medium text-white">{beforeLabel}</span>
      <span className="pointer-events-none absolute right-2 top-2 bg-ink/80 px-2 py-1 text-xs font-medium text-white">{afterLabel}</span>
      <div
        role="slider"
        tabIndex={0}
        aria-label={label}
        aria-orientation="horizontal"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={shown}
        aria-valuetext={`${shown}% earlier photo, ${100 - shown}% later photo`}
        onKeyDown={onKeyDown}
        className="absolute inset-y-0 z-10 -ml-5 flex w-10 cursor-ew-resize items-center justify-center focus-visible:outline-offset-0"
        style={{ left: `${pos}%` }}
      >
        <span aria-hidden className="absolute inset-y-0 left-1/2 w-0.5 -translate-x-1/2 bg-white shadow-[0_0_0_1px_rgba(29,31,36,0.6)]" />
        <span aria-hidden className="relative flex size-9 items-center justify-center rounded-full border-2 border-ink bg-sheet text-sm font-bold text-ink">
          ⇔
        </span>
      </div>
    </div>
  );
}
