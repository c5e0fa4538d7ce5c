import { useCallback, useEffect, useRef, useState } from "react";
import { useDropzone, type FileRejection } from "react-dropzone";
import type { MediaVocabulary } from "#shared/schemas/media.ts";
import { Button } from "../../../components/ui/button.tsx";
import { useMediaItem, useRefreshLibrary } from "../api.ts";
import { uploadPhoto, UploadRefused } from "../upload.ts";
import { formatBytes } from "../words.ts";

type Phase = "waiting" | "uploading" | "processing" | "ready" | "failed" | "refused" | "duplicate";

interface Entry {
  key: string;
  file: File;
  phase: Phase;
  /** Upload progress, 0..1. */
  progress: number;
  id?: number;
  message?: string;
}

const PHASE_WORD: Record<Phase, { glyph: string; word: string; tone: string }> = {
  waiting: { glyph: "·", word: "Waiting", tone: "text-ink-soft" },
  uploading: { glyph: "↑", word: "Uploading", tone: "text-ink" },
  processing: { glyph: "◌", word: "Processing", tone: "text-ink-soft" },
  ready: { glyph: "●", word: "Ready", tone: "text-good" },
  failed: { glyph: "✕", word: "Processing failed", tone: "text-bad" },
  refused: { glyph: "✕", word: "Refused", tone: "text-bad" },
  duplicate: { glyph: "=", word: "Already in the library", tone: "text-ink" },
};

const ACCEPT = {
  "image/jpeg": [".jpg", ".jpeg"],
  "image/png": [".png"],
  "image/webp": [".webp"],
  "image/heic": [".heic"],
  "image/heif": [".heif"],
};

/** Uploads at once; more wait their turn so every bar moves. */
const PARALLEL = 3;

let seq = 0;

/** Polls a photo the server is processing until it is ready (or failed), then reports it. */
function ProcessingWatch({ id, onDone }: { id: number; onDone: (status: "ready" | "failed", reason: string | null) => void }) {
  const item = useMediaItem(id);
  const status = item.data?.status;
  const reason = item.data?.failureReason ?? null;
  useEffect(() => {
    if (status === "ready" || status === "failed") onDone(status, reason);
  }, [status, reason, onDone]);
  return null;
}

function EntryRow({ entry, onDismiss, onDone }: { entry: Entry; onDismiss: () => void; onDone: (key: string, status: "ready" | "failed", reason: string | null) => void }) {
  const look = PHASE_WORD[entry.phase];
  const percent = entry.phase === "uploading" || entry.phase === "waiting" ? Math.round(entry.progress * 100) : 100;
  const settled = entry.phase === "ready" || entry.phase === "refused" || entry.phase === "failed" || entry.phase === "duplicate";
  const done = useCallback((status: "ready" | "failed", reason: string | null) => onDone(entry.key, status, reason), [entry.key, onDone]);
  const errorId = `upload-error-${entry.key}`;
  return (
    <li className="flex flex-col gap-1 border-b border-rule py-2 last:border-b-0" data-upload={entry.file.name} data-phase={entry.phase}>
      {entry.phase === "processing" && entry.id ? <ProcessingWatch id={entry.id} onDone={done} /> : null}
      <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <span className="min-w-0 break-all font-medium">{entry.file.name}</span>
        <span className="tabular text-xs text-ink-faint">{formatBytes(entry.file.size)}</span>
      </div>
      <div
        role="progressbar"
        aria-label={`${entry.file.name}: ${look.word}`}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-describedby={entry.message ? errorId : undefined}
        className="h-2 w-full overflow-hidden border border-rule-strong bg-paper"
      >
        <div
          className={`h-full transition-[width] duration-200 ${entry.phase === "refused" || entry.phase === "failed" ? "bg-bad" : entry.phase === "processing" ? "animate-pulse bg-ink-soft" : entry.phase === "ready" || entry.phase === "duplicate" ? "bg-good" : "bg-ink"}`}
          style={{ width: `${percent}%` }}
        />
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2">
        <span className={`inline-flex items-center gap-1 text-sm font-medium ${look.tone}`} data-testid="upload-state">
          <span aria-hidden>{look.glyph}</span>
          {look.word}
          {entry.phase === "uploading" ? <span className="tabular"> {percent} %</span> : null}
          {entry.phase === "duplicate" && entry.id ? <span className="font-normal text-ink-soft"> (photo #{entry.id}, not copied)</span> : null}
        </span>
        {settled ? (
          <button type="button" className="text-xs underline underline-offset-4" onClick={onDismiss}>
            Dismiss <span className="sr-only">{entry.file.name}</span>
          </button>
        ) : null}
      </div>
      {entry.message ? (
        <p id={errorId} role="alert" className="flex items-start gap-1 text-sm text-bad">
          <span aria-hidden>▲</span>
          {entry.message}
        </p>
      ) : null}
    </li>
  );
}

/** Drag photos in, or choose them: each goes up on its own, with its own bar and its own answer. */
export function UploadPanel({ slug, vocabulary }: { slug: string; vocabulary: MediaVocabulary }) {
  const [entries, setEntries] = useState<Entry[]>([]);
  const started = useRef(new Set<string>());
  const refresh = useRefreshLibrary(slug);
  const { maxFileMb, maxFiles } = vocabulary.limits;

  const update = useCallback((key: string, change: Partial<Entry>) => setEntries((list) => list.map((e) => (e.key === key ? { ...e, ...change } : e))), []);

  const onDrop = useCallback(
    (accepted: File[], rejected: FileRejection[]) => {
      const fresh: Entry[] = accepted.map((file) => ({ key: `u${(seq += 1)}`, file, phase: "waiting", progress: 0 }));
      const refused: Entry[] = rejected.map(({ file, errors }) => ({
        key: `u${(seq += 1)}`,
        file,
        phase: "refused",
        progress: 0,
        message: errors
          .map((e) =>
            e.code === "file-too-large"
              ? `Larger than ${maxFileMb} MB, the limit for one photo.`
              : e.code === "file-invalid-type"
                ? "Not a JPEG, PNG, WebP or HEIC photo."
                : e.code === "too-many-files"
                  ? `At most ${maxFiles} photos at a time.`
                  : e.message,
          )
          .join(" "),
      }));
      setEntries((list) => [...fresh, ...refused, ...list]);
    },
    [maxFileMb, maxFiles],
  );

  // Start waiting uploads while fewer than PARALLEL are on their way.
  useEffect(() => {
    const active = entries.filter((e) => e.phase === "uploading").length;
    const next = entries.filter((e) => e.phase === "waiting" && !started.current.has(e.key)).reverse().slice(0, Math.max(0, PARALLEL - active));
    for (const entry of next) {
      started.current.add(entry.key);
      update(entry.key, { phase: "uploading" });
      uploadPhoto(entry.file, slug, (progress) => update(entry.key, { progress }))
        .then((result) => {
          if (result.duplicateOf !== null) update(entry.key, { phase: "duplicate", id: result.id, progress: 1 });
          else if (result.status === "ready") update(entry.key, { phase: "ready", id: result.id, progress: 1 });
          else update(entry.key, { phase: "processing", id: result.id, progress: 1 });
          refresh();
        })
        .catch((err: unknown) => update(entry.key, { phase: "refused", message: err instanceof UploadRefused || err instanceof Error ? err.message : String(err) }));
    }
  }, [entries, slug, update, refresh]);

  const onDone = useCallback(
    (key: string, status: "ready" | "failed", reason: string | null) => {
      update(key, status === "ready" ? { phase: "ready" } : { phase: "failed", message: reason ?? "The server could not make the derivatives." });
      refresh();
    },
    [update, refresh],
  );

  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({ onDrop, accept: ACCEPT, maxSize: maxFileMb * 1024 * 1024, maxFiles, multiple: true, noClick: true, noKeyboard: true });
  const busy = entries.some((e) => e.phase === "waiting" || e.phase === "uploading" || e.phase === "processing");

  return (
    <div className="flex flex-col gap-3">
      <div
        {...getRootProps({
          className: `flex flex-col items-center justify-center gap-2 border-2 border-dashed px-4 py-8 text-center ${isDragActive ? "border-accent bg-accent-wash" : "border-rule-strong bg-paper"}`,
          "aria-label": "Drop photos here to upload them",
        })}
      >
        <input {...getInputProps({ "aria-label": "Photos to upload" })} data-testid="media-file-input" />
        <p className="font-medium">{isDragActive ? "Drop to upload" : "Drag site photos here"}</p>
        <p className="text-sm text-ink-soft">
          JPEG, PNG or WebP, up to {maxFileMb} MB each and {maxFiles} at a time. Location data is stripped from everything published.
        </p>
        <Button variant="primary" onClick={open}>
          Choose photos
        </Button>
      </div>
      {entries.length > 0 ? (
        <section aria-label="Uploads" aria-busy={busy || undefined}>
          <div className="flex items-center justify-between">
            <h3 className="label-caps">Uploads</h3>
            {!busy ? (
              <button type="button" className="text-xs underline underline-offset-4" onClick={() => setEntries([])}>
                Clear the list
              </button>
            ) : null}
          </div>
          <ul className="flex flex-col">
            {entries.map((e) => (
              <EntryRow key={e.key} entry={e} onDismiss={() => setEntries((list) => list.filter((x) => x.key !== e.key))} onDone={onDone} />
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}
