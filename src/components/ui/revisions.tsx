import { useState, type ReactNode } from "react";
import type { PostStatus, RevisionDiff } from "#shared/schemas/publishing.ts";
import { formatInstant } from "../../lib/format.ts";
import { Button } from "./button.tsx";
import { Dialog } from "./dialog.tsx";
import { PublishStatusMark } from "./publish-status.tsx";

/**
 * Revisions of an update or a photo story: the list, the comparison and the restore
 * confirmation. Presentational: the caller fetches the list and the diff and sends the restore.
 */

export interface RevisionEntry {
  number: number;
  createdAt: string;
  authorName: string;
  status: PostStatus;
  note: string | null;
}

/** A word diff of two revisions' text: added words underlined, removed ones struck through. */
export function RevisionDiffView({ diff }: { diff: RevisionDiff }) {
  return (
    <div>
      <p className="mb-3 text-sm text-ink-soft">
        Revision {diff.from} → {diff.to}: <span className="font-medium text-good">+{diff.inserted} words</span>, <span className="font-medium text-bad">−{diff.deleted} words</span>. Added text is underlined, removed text struck through.
      </p>
      <div className="whitespace-pre-wrap border border-rule bg-paper p-3 font-serif leading-relaxed" data-testid="revision-diff">
        {diff.parts.map((p, i) =>
          p.op === "equal" ? (
            <span key={i}>{p.text}</span>
          ) : p.op === "insert" ? (
            <ins key={i} className="bg-[#e3f1e4] underline decoration-good decoration-2">
              {p.text}
            </ins>
          ) : (
            <del key={i} className="bg-[#fbeaea] text-bad">
              {p.text}
            </del>
          ),
        )}
      </div>
    </div>
  );
}

export interface CompareRequest {
  n: number;
  against?: number;
}

/**
 * The revisions, newest first: compare any with the one before or with the latest, restore one
 * after a confirmation. `renderDiff` draws the comparison asked for; `onRestore(n, done)` sends
 * the restore and calls `done` once it went through.
 */
export function RevisionList({
  revisions,
  zone,
  renderDiff,
  restoring,
  onRestore,
  restoreWhat = "The text and fields of that revision become a new revision; nothing is lost, and you can restore the current one again later.",
}: {
  revisions: readonly RevisionEntry[];
  zone: string;
  renderDiff: (compare: CompareRequest) => ReactNode;
  restoring: boolean;
  onRestore: (n: number, done: () => void) => void;
  restoreWhat?: string;
}) {
  const [compare, setCompare] = useState<CompareRequest | null>(null);
  const [confirm, setConfirm] = useState<number | null>(null);
  const list = [...revisions].sort((a, b) => b.number - a.number);
  const latest = list[0]?.number;
  return (
    <>
      <ol className="flex flex-col divide-y divide-rule text-sm" data-testid="revisions">
        {list.map((r) => (
          <li key={r.number} className="py-2">
            <p className="flex flex-wrap items-center justify-between gap-2">
              <span className="font-medium tabular">Revision {r.number}</span>
              <PublishStatusMark status={r.status} className="text-xs" />
            </p>
            <p className="text-xs text-ink-soft">
              {formatInstant(r.createdAt, zone)} · {r.authorName}
            </p>
            {r.note ? <p className="text-xs italic text-ink-soft">{r.note}</p> : null}
            <p className="mt-1 flex flex-wrap gap-x-3 gap-y-1 text-xs">
              {r.number > 1 ? (
                <button type="button" className="underline underline-offset-2" onClick={() => setCompare({ n: r.number })}>
                  Compare with {r.number - 1}
                </button>
              ) : null}
              {latest !== undefined && r.number !== latest ? (
                <>
                  <button type="button" className="underline underline-offset-2" onClick={() => setCompare({ n: latest, against: r.number })}>
                    Compare with latest
                  </button>
                  <button type="button" className="font-medium text-ink underline underline-offset-2" onClick={() => setConfirm(r.number)}>
                    Restore
                  </button>
                </>
              ) : null}
            </p>
          </li>
        ))}
      </ol>
      <Dialog open={compare !== null} title="Compare revisions" onClose={() => setCompare(null)} wide>
        {compare ? renderDiff(compare) : null}
      </Dialog>
      <Dialog
        open={confirm !== null}
        title={`Restore revision ${confirm ?? ""}?`}
        onClose={() => setConfirm(null)}
        footer={
          <>
            <Button onClick={() => setConfirm(null)}>Keep the current text</Button>
            <Button variant="primary" busy={restoring} onClick={() => confirm !== null && onRestore(confirm, () => setConfirm(null))}>
              Restore it
            </Button>
          </>
        }
      >
        <p className="text-sm">{restoreWhat}</p>
      </Dialog>
    </>
  );
}
