import { toast } from "sonner";
import { PublishingHistory } from "../../../components/ui/publishing-history.tsx";
import { RevisionDiffView, RevisionList } from "../../../components/ui/revisions.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { useDiff, usePostHistory, useRestoreRevision, useRevisions } from "../api.ts";

function DiffView({ postId, n, against }: { postId: number; n: number; against?: number }) {
  const diff = useDiff(postId, n, against);
  if (diff.isPending) return <Spinner label="Comparing" />;
  if (diff.isError) return <Notice tone="error">{diff.error.message}</Notice>;
  return <RevisionDiffView diff={diff.data} />;
}

/** The post's revisions, newest first: compare any with the one before or with the latest, restore one. */
export function RevisionsPanel({ postId, zone, onRestored }: { postId: number; zone: string; onRestored: () => void }) {
  const revisions = useRevisions(postId);
  const restore = useRestoreRevision(postId);
  if (revisions.isPending) return <Spinner label="Loading revisions" />;
  if (revisions.isError) return <Notice tone="error">{revisions.error.message}</Notice>;
  return (
    <RevisionList
      revisions={revisions.data}
      zone={zone}
      renderDiff={(c) => <DiffView postId={postId} n={c.n} against={c.against} />}
      restoring={restore.isPending}
      onRestore={(n, done) =>
        restore.mutate(n, {
          onSuccess: () => {
            done();
            onRestored();
          },
          onError: (e) => toast.error(e instanceof Error ? e.message : "Not restored."),
        })
      }
    />
  );
}

/** Who took which publishing step, and why the scheduler held the update back if it did. */
export function PostHistoryPanel({ postId, zone }: { postId: number; zone: string }) {
  const history = usePostHistory(postId);
  if (history.isPending) return <Spinner label="Loading the history" />;
  if (history.isError) return <Notice tone="error">{history.error.message}</Notice>;
  return <PublishingHistory steps={history.data} zone={zone} />;
}
