import { PublishingHistory } from "../../../components/ui/publishing-history.tsx";
import { RevisionDiffView, RevisionList } from "../../../components/ui/revisions.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { useRestoreStoryRevision, useStoryDiff, useStoryHistory, useStoryRevisions } from "../api.ts";

function StoryDiffView({ storyId, n, against }: { storyId: number; n: number; against?: number }) {
  const diff = useStoryDiff(storyId, n, against);
  if (diff.isPending) return <Spinner label="Comparing" />;
  if (diff.isError) return <Notice tone="error">{diff.error.message}</Notice>;
  return <RevisionDiffView diff={diff.data} />;
}

/** The story's revisions, newest first: compare its text (title, introduction, captions in order) and restore one. */
export function StoryRevisionsPanel({ storyId, zone, onRestored, onError }: { storyId: number; zone: string; onRestored: () => void; onError: (e: unknown) => void }) {
  const revisions = useStoryRevisions(storyId);
  const restore = useRestoreStoryRevision(storyId);
  if (revisions.isPending) return <Spinner label="Loading revisions" />;
  if (revisions.isError) return <Notice tone="error">{revisions.error.message}</Notice>;
  return (
    <RevisionList
      revisions={revisions.data}
      zone={zone}
      renderDiff={(c) => <StoryDiffView storyId={storyId} n={c.n} against={c.against} />}
      restoring={restore.isPending}
      restoreWhat="The title, introduction and items of that revision become a new revision (the address and audience stay); nothing is lost, and you can restore the current one again later."
      onRestore={(n, done) =>
        restore.mutate(n, {
          onSuccess: () => {
            done();
            onRestored();
          },
          onError: (e) => {
            done();
            onError(e);
          },
        })
      }
    />
  );
}

/** Who took which publishing step, and why the scheduler held the story back if it did. */
export function StoryHistoryPanel({ storyId, zone }: { storyId: number; zone: string }) {
  const history = useStoryHistory(storyId);
  if (history.isPending) return <Spinner label="Loading the history" />;
  if (history.isError) return <Notice tone="error">{history.error.message}</Notice>;
  return <PublishingHistory steps={history.data} zone={zone} />;
}
