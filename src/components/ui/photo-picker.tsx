import { useState, type ReactNode } from "react";
import { Button } from "./button.tsx";
import { Dialog } from "./dialog.tsx";
import { TextField } from "./field.tsx";
import { Pager } from "./pager.tsx";
import { PhotoChoiceGrid, type PhotoChoice } from "./photo-choice.tsx";
import { Notice, Spinner } from "./sheet.tsx";
import { onSubmitted } from "../../lib/forms.ts";

/**
 * A dialog that chooses one photo of a library: a search, the grid of photos, and pages.
 * Presentational: the caller runs the query with what is searched for and passes in its
 * state and the page's photos.
 */
export function PhotoPickerDialog({
  open = true,
  title,
  onClose,
  onSearch,
  searchPlaceholder,
  filters,
  extra,
  pending,
  error,
  choices,
  onChoose,
  note,
  page,
  pages,
  onPage,
}: {
  open?: boolean;
  title: string;
  onClose: () => void;
  /** The search words, trimmed, when the search is sent. */
  onSearch: (q: string) => void;
  searchPlaceholder?: string;
  /** More controls of the search, before its button. */
  filters?: ReactNode;
  /** Controls after the search button. */
  extra?: ReactNode;
  pending: boolean;
  /** The query's error message, if it failed. */
  error?: string | null;
  choices: readonly PhotoChoice[];
  onChoose: (id: number) => void;
  /** A line under the grid: what a chosen photo still needs. */
  note?: string;
  page: number;
  pages: number;
  onPage: (page: number) => void;
}) {
  const [q, setQ] = useState("");
  return (
    <Dialog open={open} title={title} onClose={onClose} wide>
      <form
        className="mb-4 flex flex-wrap items-end gap-3"
        onSubmit={onSubmitted(() => onSearch(q.trim()))}
      >
        <div className="min-w-48 flex-1">
          <TextField label="Search the library" type="search" value={q} onChange={(e) => setQ(e.target.value)} placeholder={searchPlaceholder} />
        </div>
        {filters}
        <Button type="submit">Search</Button>
        {extra}
      </form>
      {pending ? (
        <Spinner label="Loading the library" />
      ) : error !== null && error !== undefined ? (
        <Notice tone="error">{error}</Notice>
      ) : (
        <>
          <PhotoChoiceGrid choices={choices} onChoose={onChoose} />
          {note ? <p className="mt-3 text-xs text-ink-soft">{note}</p> : null}
          <Pager page={page} pages={pages} onPage={onPage} />
        </>
      )}
    </Dialog>
  );
}
