import { useState } from "react";
import type { MediaItem, MediaPicture } from "#shared/schemas/media.ts";
import { SystemSchema } from "#shared/schemas/programme.ts";
import { SelectField } from "../../../components/ui/field.tsx";
import type { PhotoChoice } from "../../../components/ui/photo-choice.tsx";
import { PhotoPickerDialog } from "../../../components/ui/photo-picker.tsx";
import { SYSTEM_WORD } from "../../../lib/format.ts";
import { mediaItemTitle, pickerPage, pictureOfMediaItem } from "../../../lib/media.ts";
import { useMediaPicker } from "../api.ts";

const SENSITIVITY_WORD = { unreviewed: "Not yet reviewed", cleared: "Cleared", restricted: "Restricted" } as const;

/** The facts a writer needs before choosing a photo for published content. */
function choiceOf(item: MediaItem): PhotoChoice {
  const notes: PhotoChoice["notes"] = [];
  if (!item.altText?.trim()) notes.push({ text: "No alt text", warn: true });
  notes.push({ text: SENSITIVITY_WORD[item.sensitivity], warn: item.sensitivity !== "cleared" });
  if (item.isIllustration) notes.push({ text: "Illustration" });
  for (const a of item.tags.areas.slice(0, 2)) notes.push({ text: a });
  return { picture: pictureOfMediaItem(item), title: mediaItemTitle(item), notes };
}

/**
 * Chooses a photo from the project's library (GET /api/media). Restricted photos are
 * listed but cannot be chosen: they never appear in public or investor content.
 */
export function MediaPickerDialog({ slug, open, title, onClose, onChoose }: { slug: string; open: boolean; title: string; onClose: () => void; onChoose: (item: MediaItem, picture: MediaPicture) => void }) {
  const [search, setSearch] = useState("");
  const [system, setSystem] = useState("");
  const [page, setPage] = useState(1);
  const media = useMediaPicker(open ? slug : "", { q: search || undefined, system: system || undefined, page });
  const { items, pages, choose } = pickerPage(media.data, onChoose);
  return (
    <PhotoPickerDialog
      open={open}
      title={title}
      onClose={onClose}
      onSearch={(q) => {
        setSearch(q);
        setPage(1);
      }}
      searchPlaceholder="Caption, alt text, area"
      filters={
        <div className="w-44">
          <SelectField
            label="System"
            value={system}
            onChange={(e) => {
              setSystem(e.target.value);
              setPage(1);
            }}
            options={[{ value: "", label: "Any system" }, ...SystemSchema.options.map((s) => ({ value: s, label: SYSTEM_WORD[s] }))]}
          />
        </div>
      }
      pending={media.isPending}
      error={media.isError ? media.error.message : null}
      choices={items.map(choiceOf)}
      onChoose={choose}
      note="Photos need alt text and a lead's clearance before the update can be published. Restricted photos cannot be used."
      page={page}
      pages={pages}
      onPage={setPage}
    />
  );
}
