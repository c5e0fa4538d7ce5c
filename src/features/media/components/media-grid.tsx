import type { MediaItem } from "#shared/schemas/media.ts";
import { formatTakenAt } from "../words.ts";
import { MediaPicture } from "./media-picture.tsx";
import { MissingAlt, SecurityFlag, SensitivityWord, StatusWord } from "./marks.tsx";

const SIZES = "(min-width: 1280px) 240px, (min-width: 1024px) 22vw, (min-width: 640px) 30vw, 46vw";

/** The library as a grid: select several with the boxes, open one to edit it. */
export function MediaGrid({ items, selected, onToggle, onOpen }: { items: MediaItem[]; selected: ReadonlySet<number>; onToggle: (id: number) => void; onOpen: (id: number) => void }) {
  return (
    <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4" aria-label="Photos">
      {items.map((item) => {
        const isSelected = selected.has(item.id);
        return (
          <li key={item.id} className={`flex min-w-0 flex-col border bg-sheet ${isSelected ? "border-accent ring-2 ring-accent" : "border-rule"}`} data-media-id={item.id} data-media-name={item.name}>
            <div className="relative">
              <button type="button" className="block w-full" onClick={() => onOpen(item.id)} aria-label={`Edit ${item.name}`}>
                <MediaPicture item={item} sizes={SIZES} className="aspect-[4/3] w-full" />
              </button>
              <label className="absolute left-1.5 top-1.5 flex items-center gap-1 rounded-sm bg-sheet/90 px-1.5 py-1 text-xs">
                <input type="checkbox" checked={isSelected} onChange={() => onToggle(item.id)} />
                <span className="sr-only">Select {item.name}</span>
                <span aria-hidden>{isSelected ? "Selected" : "Select"}</span>
              </label>
              {item.isIllustration ? <span className="pointer-events-none absolute bottom-1.5 right-1.5 rounded-sm bg-ink/80 px-1.5 py-0.5 text-[0.65rem] font-semibold uppercase tracking-wide text-white">Illustration</span> : null}
            </div>
            <div className="flex min-w-0 flex-1 flex-col gap-1 p-2">
              <p className="truncate text-sm font-medium" title={item.name}>
                {item.caption ?? item.name}
              </p>
              <p className="text-xs text-ink-faint">{formatTakenAt(item.takenAt)}</p>
              <div className="mt-auto flex flex-wrap gap-x-2 gap-y-1">
                {item.status !== "ready" ? <StatusWord status={item.status} /> : null}
                <SensitivityWord sensitivity={item.sensitivity} />
                {item.flaggedForReview ? <SecurityFlag /> : null}
                {!item.altText ? <MissingAlt /> : null}
              </div>
            </div>
          </li>
        );
      })}
    </ul>
  );
}
