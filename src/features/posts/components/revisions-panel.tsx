import { useState } from "react";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { PublishStatusMark } from "../../../components/ui/publish-status.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { formatInstant } from "../../../lib/format.ts";
import { useDiff, useRestoreRevision, useRevisions } from "../api.ts";

function DiffView({ postId, n, against }: { postId: number; n: number; against?: number }) {
  const diff = useDiff(postId, n, against);
  if (diff.isPending) return <Spinner label="Comparing" />;
  if (diff.isError) return <Notice tone="error">{diff.error.message}</Notice>;
  const d = diff.data;
  return (
    <div>
      <p className="mb-3 text-sm text-ink-soft">
        Revision {d.from} → {d.to}: <span className="font-medium text-good">+{d.inserted} words</span>, <span className="font-medium text-bad">−{d.deleted} words</span>. Added text is underlined, removed text struck through.
      </p>
      <div className="whitespace-pre-wrap border border-rule bg-paper p-3 font-serif leading-relaxed" data-testid="revision-diff">
        {d.parts.map((p, i) =>
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

/** The post's revisions, newest first: compare any with the one before or with the latest, restore one. */
export function RevisionsPanel({ postId, zone, onRestored }: { postId: number; zone: string; onRestored: () => void }) {
  const revisions = useRevisions(postId);
  const restore = useRestoreRevision(postId);
  const [compare, setCompare] = useState<{ n: number; against?: number } | null>(null);
  const [confirm, setConfirm] = useState<number | null>(null);
  if (revisions.isPending) return <Spinner label="Loading revisions" />;
  if (revisions.isError) return <Notice tone="error">{revisions.error.message}</Notice>;
  const list = [...revisions.data].sort((a, b) => b.number - a.number);
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
                  <button type="button" className="font-medium text-accent underline underline-offset-2" onClick={() => setConfirm(r.number)}>
                    Restore
                  </button>
                </>
              ) : null}
            </p>
          </li>
        ))}
      </ol>
      <Dialog open={compare !== null} title="Compare revisions" onClose={() => setCompare(null)} wide>
        {compare ? <DiffView postId={postId} n={compare.n} against={compare.against} /> : null}
      </Dialog>
      <Dialog
        open={confirm !== null}
        title={`Restore revision ${confirm ?? ""}?`}
        onClose={() => setConfirm(null)}
        footer={
          <>
            <Button onClick={() => setConfirm(null)}>Keep the current text</Button>
            <Button
              variant="primary"
              busy={restore.isPending}
              onClick={() =>
                confirm !== null &&
                restore.mutate(confirm, {
                  onSuccess: () => {
                    setConfirm(null);
                    onRestored();
                  },
                })
              }
            >
              Restore it
            </Button>
          </>
        }
      >
        <p className="text-sm">The text and fields of that revision become a new revision; nothing is lost, and you can restore the current one again later.</p>
      </Dialog>
    </>
  );
}
