import { useState } from "react";
import type { MediaItem, MediaPicture } from "#shared/schemas/media.ts";
import type { PhotoChoice } from "../../../components/ui/photo-choice.tsx";
import { PhotoPickerDialog } from "../../../components/ui/photo-picker.tsx";
import { formatDate } from "../../../lib/format.ts";
import { mediaItemTitle, pickerPage, pictureOfMediaItem } from "../../../lib/media.ts";
import { useStoryMedia } from "../api.ts";

function choiceOf(item: MediaItem): PhotoChoice {
  const notes: PhotoChoice["notes"] = [];
  notes.push(item.takenAt ? { text: `Taken ${formatDate(item.takenAt)}` } : { text: "No capture date", warn: true });
  if (!item.altText?.trim()) notes.push({ text: "No alt text", warn: true });
  if (item.sensitivity !== "cleared") notes.push({ text: item.sensitivity === "restricted" ? "Restricted" : "Not yet reviewed", warn: true });
  for (const a of item.tags.areas.slice(0, 2)) notes.push({ text: a });
  return { picture: pictureOfMediaItem(item), title: mediaItemTitle(item), notes };
}

/**
 * Chooses a photo for a story from the project's library; `area` narrows it to one area
 * (the two photos of a then-and-now pair show the same place).
 */
export function StoryPhotoPicker({ slug, title, area, onClose, onChoose }: { slug: string; title: string; area?: string; onClose: () => void; onChoose: (item: MediaItem, picture: MediaPicture) => void }) {
  const [search, setSearch] = useState("");
  const [onlyArea, setOnlyArea] = useState(Boolean(area));
  const [page, setPage] = useState(1);
  const media = useStoryMedia(slug, { q: search || undefined, area: onlyArea && area ? area : undefined, page });
  const { items, pages, choose } = pickerPage(media.data, onChoose);
  return (
    <PhotoPickerDialog
      title={title}
      onClose={onClose}
      onSearch={(q) => {
        setSearch(q);
        setPage(1);
      }}
      extra={
        area ? (
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={onlyArea} onChange={(e) => setOnlyArea(e.target.checked)} /> Only photos of {area}
          </label>
        ) : null
      }
      pending={media.isPending}
      error={media.isError ? media.error.message : null}
      choices={items.map(choiceOf)}
      onChoose={choose}
      page={page}
      pages={pages}
      onPage={setPage}
    />
  );
}
