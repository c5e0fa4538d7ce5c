import type { KeyboardEvent, MouseEvent } from "react";
import type { Focal, MediaItem } from "#shared/schemas/media.ts";
import { MediaPicture } from "./media-picture.tsx";

const clamp = (n: number) => Math.min(1, Math.max(0, Math.round(n * 100) / 100));

/**
 * Click on the photo (or use the arrow keys) to set the point crops keep in view. The mark
 * shows where it is; the two previews show a square and a wide crop around it.
 */
export function FocalPicker({ item, focal, onChange }: { item: MediaItem; focal: Focal; onChange: (f: Focal) => void }) {
  const shown = { ...item, focal };
  const onClick = (e: MouseEvent<HTMLButtonElement>) => {
    const box = e.currentTarget.getBoundingClientRect();
    onChange({ x: clamp((e.clientX - box.left) / box.width), y: clamp((e.clientY - box.top) / box.height) });
  };
  const onKey = (e: KeyboardEvent<HTMLButtonElement>) => {
    const step = e.shiftKey ? 0.1 : 0.02;
    const moves: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
    const move = moves[e.key];
    if (!move) return;
    e.preventDefault();
    onChange({ x: clamp(focal.x + move[0]), y: clamp(focal.y + move[1]) });
  };
  return (
    <div className="flex flex-col gap-2">
      <button
        type="button"
        onClick={onClick}
        onKeyDown={onKey}
        className="relative block w-full cursor-crosshair"
        aria-label={`Focal point ${Math.round(focal.x * 100)} % across, ${Math.round(focal.y * 100)} % down. Click the photo or use the arrow keys to move it.`}
        data-testid="focal-picker"
      >
        <MediaPicture item={{ ...item, focal: { x: 0.5, y: 0.5 } }} sizes="(min-width: 1024px) 480px, 90vw" fit="contain" className="w-full" alt="" />
        <span
          aria-hidden
          data-testid="focal-mark"
          className="pointer-events-none absolute size-7 -translate-x-1/2 -translate-y-1/2 rounded-full border-[3px] border-white shadow-[0_0_0_2px_#1d1f24]"
          style={{ left: `${focal.x * 100}%`, top: `${focal.y * 100}%` }}
        >
          <span className="absolute left-1/2 top-1/2 size-1.5 -translate-x-1/2 -translate-y-1/2 rounded-full bg-accent-bright" />
        </span>
      </button>
      <div className="flex items-end gap-3" aria-label="Crops around the focal point">
        <figure className="w-20">
          <MediaPicture item={shown} sizes="80px" className="aspect-square w-full" alt="" />
          <figcaption className="text-[0.65rem] text-ink-faint">Square</figcaption>
        </figure>
        <figure className="w-40">
          <MediaPicture item={shown} sizes="160px" className="aspect-[21/9] w-full" alt="" />
          <figcaption className="text-[0.65rem] text-ink-faint">Wide banner</figcaption>
        </figure>
      </div>
    </div>
  );
}
