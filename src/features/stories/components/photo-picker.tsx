import { useState } from "react";
import type { MediaItem, MediaPicture } from "#shared/schemas/media.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { TextField } from "../../../components/ui/field.tsx";
import { PhotoChoiceGrid, type PhotoChoice } from "../../../components/ui/photo-choice.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { pictureOfMediaItem, useStoryMedia } from "../api.ts";

function choiceOf(item: MediaItem): PhotoChoice {
  const notes: PhotoChoice["notes"] = [];
  notes.push(item.takenAt ? { text: `Taken ${item.takenAt.slice(0, 10)}` } : { text: "No capture date", warn: true });
  if (!item.altText?.trim()) notes.push({ text: "No alt text", warn: true });
  if (item.sensitivity !== "cleared") notes.push({ text: item.sensitivity === "restricted" ? "Restricted" : "Not yet reviewed", warn: true });
  for (const a of item.tags.areas.slice(0, 2)) notes.push({ text: a });
  return { picture: pictureOfMediaItem(item), title: item.altText?.trim() || item.caption?.trim() || item.name, notes };
}

/**
 * Chooses a photo for a story from the project's library; `area` narrows it to one area
 * (the two photos of a then-and-now pair show the same place).
 */
export function StoryPhotoPicker({ slug, title, area, onClose, onChoose }: { slug: string; title: string; area?: string; onClose: () => void; onChoose: (item: MediaItem, picture: MediaPicture) => void }) {
  const [q, setQ] = useState("");
  const [search, setSearch] = useState("");
  const [onlyArea, setOnlyArea] = useState(Boolean(area));
  const [page, setPage] = useState(1);
  const media = useStoryMedia(slug, { q: search || undefined, area: onlyArea && area ? area : undefined, page });
  const items = media.data?.items ?? [];
  const pages = media.data ? Math.max(1, Math.ceil(media.data.total / media.data.pageSize)) : 1;
  return (
    <Dialog open title={title} onClose={onClose} wide>
      <form
        className="mb-4 flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          setSearch(q.trim());
          setPage(1);
        }}
      >
        <div className="min-w-48 flex-1">
          <TextField label="Search the library" type="search" value={q} onChange={(e) => setQ(e.target.value)} />
        </div>
        <Button type="submit">Search</Button>
        {area ? (
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={onlyArea} onChange={(e) => setOnlyArea(e.target.checked)} /> Only photos of {area}
          </label>
        ) : null}
      </form>
      {media.isPending ? (
        <Spinner label="Loading the library" />
      ) : media.isError ? (
        <Notice tone="error">{media.error.message}</Notice>
      ) : (
        <>
          <PhotoChoiceGrid
            choices={items.map(choiceOf)}
            onChoose={(id) => {
              const item = items.find((i) => i.id === id);
              if (item && item.sensitivity !== "restricted") onChoose(item, pictureOfMediaItem(item));
            }}
          />
          {pages > 1 ? (
            <div className="mt-3 flex items-center justify-between text-sm">
              <Button size="sm" disabled={page <= 1} onClick={() => setPage(page - 1)}>
                ← Previous
              </Button>
              <span className="tabular">
                Page {page} of {pages}
              </span>
              <Button size="sm" disabled={page >= pages} onClick={() => setPage(page + 1)}>
                Next →
              </Button>
            </div>
          ) : null}
        </>
      )}
    </Dialog>
  );
}
