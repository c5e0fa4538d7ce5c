import { useState } from "react";
import type { MediaItem, MediaPicture } from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { SelectField, TextField } from "../../../components/ui/field.tsx";
import { PhotoChoiceGrid, type PhotoChoice } from "../../../components/ui/photo-choice.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { pictureOfItem, useMediaPicker } from "../api.ts";

const SENSITIVITY_WORD = { unreviewed: "Not yet reviewed", cleared: "Cleared", restricted: "Restricted" } as const;

/** The facts a writer needs before choosing a photo for published content. */
function choiceOf(item: MediaItem): PhotoChoice {
  const notes: PhotoChoice["notes"] = [];
  if (!item.altText?.trim()) notes.push({ text: "No alt text", warn: true });
  notes.push({ text: SENSITIVITY_WORD[item.sensitivity], warn: item.sensitivity !== "cleared" });
  if (item.isIllustration) notes.push({ text: "Illustration" });
  for (const a of item.tags.areas.slice(0, 2)) notes.push({ text: a });
  return { picture: pictureOfItem(item), title: item.altText?.trim() || item.caption?.trim() || item.name, notes };
}

/**
 * Chooses a photo from the project's library (GET /api/media). Restricted photos are
 * listed but cannot be chosen: they never appear in public or investor content.
 */
export function MediaPickerDialog({ slug, open, title, onClose, onChoose }: { slug: string; open: boolean; title: string; onClose: () => void; onChoose: (item: MediaItem, picture: MediaPicture) => void }) {
  const [q, setQ] = useState("");
  const [search, setSearch] = useState("");
  const [system, setSystem] = useState("");
  const [page, setPage] = useState(1);
  const media = useMediaPicker(open ? slug : "", { q: search || undefined, system: system || undefined, page });
  const items = media.data?.items ?? [];
  const pages = media.data ? Math.max(1, Math.ceil(media.data.total / media.data.pageSize)) : 1;
  return (
    <Dialog open={open} title={title} onClose={onClose} wide>
      <form
        className="mb-4 flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          setSearch(q.trim());
          setPage(1);
        }}
      >
        <div className="min-w-48 flex-1">
          <TextField label="Search the library" type="search" value={q} onChange={(e) => setQ(e.target.value)} placeholder="Caption, alt text, area" />
        </div>
        <div className="w-44">
          <SelectField
            label="System"
            value={system}
            onChange={(e) => {
              setSystem(e.target.value);
              setPage(1);
            }}
            options={[{ value: "", label: "Any system" }, ...SystemSchema.options.map((s) => ({ value: s, label: s[0]!.toUpperCase() + s.slice(1) }))]}
          />
        </div>
        <Button type="submit">Search</Button>
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
              if (!item || item.sensitivity === "restricted") return;
              onChoose(item, pictureOfItem(item));
            }}
          />
          <p className="mt-3 text-xs text-ink-soft">Photos need alt text and a lead's clearance before the update can be published. Restricted photos cannot be used.</p>
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
