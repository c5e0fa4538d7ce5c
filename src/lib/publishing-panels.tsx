import type { UseMutationResult, UseQueryResult } from "@tanstack/react-query";
import type { PublishingEvent, RevisionDiff } from "#shared/schemas/publishing.ts";
import { PublishingHistory } from "../components/ui/publishing-history.tsx";
import { RevisionDiffView, RevisionList, type RevisionEntry } from "../components/ui/revisions.tsx";
import { Notice, Sheet, Spinner } from "../components/ui/sheet.tsx";

/*
 * The revisions and history panels of an editor of published work, the same for updates and
 * photo stories: each feature passes the hooks `publishingApi` made for its kind.
 */

/** The hooks of one kind of published work that the panels read through. */
export interface RevisionHooks {
  useRevisions: (id: number) => UseQueryResult<RevisionEntry[]>;
  useDiff: (id: number, n: number, against?: number) => UseQueryResult<RevisionDiff>;
  useHistory: (id: number) => UseQueryResult<PublishingEvent[]>;
  useRestore: (id: number) => UseMutationResult<unknown, Error, number>;
}

function DiffView({ hooks, id, n, against }: { hooks: RevisionHooks; id: number; n: number; against?: number }) {
  const diff = hooks.useDiff(id, n, against);
  if (diff.isPending) return <Spinner label="Comparing" />;
  if (diff.isError) return <Notice tone="error">{diff.error.message}</Notice>;
  return <RevisionDiffView diff={diff.data} />;
}

interface RevisionSheetsProps {
  hooks: RevisionHooks;
  id: number;
  zone: string;
  /** What restoring brings back, said before it is done. */
  restoreWhat?: string;
  onRestored: () => void;
  onRestoreError: (e: Error, done: () => void) => void;
}

/**
 * The item's revisions, newest first: compare any with the one before or with the latest,
 * restore one. `onRestoreError` gets the failure and the call that closes the confirmation.
 */
function RevisionsPanel({ hooks, id, zone, restoreWhat, onRestored, onRestoreError }: RevisionSheetsProps) {
  const revisions = hooks.useRevisions(id);
  const restore = hooks.useRestore(id);
  if (revisions.isPending) return <Spinner label="Loading revisions" />;
  if (revisions.isError) return <Notice tone="error">{revisions.error.message}</Notice>;
  return (
    <RevisionList
      revisions={revisions.data}
      zone={zone}
      renderDiff={(c) => <DiffView hooks={hooks} id={id} n={c.n} against={c.against} />}
      restoring={restore.isPending}
      restoreWhat={restoreWhat}
      onRestore={(n, done) =>
        restore.mutate(n, {
          onSuccess: () => {
            done();
            onRestored();
          },
          onError: (e) => onRestoreError(e, done),
        })
      }
    />
  );
}

/** Who took which publishing step, and why the scheduler held the item back if it did. */
function HistoryPanel({ hooks, id, zone }: { hooks: RevisionHooks; id: number; zone: string }) {
  const history = hooks.useHistory(id);
  if (history.isPending) return <Spinner label="Loading the history" />;
  if (history.isError) return <Notice tone="error">{history.error.message}</Notice>;
  return <PublishingHistory steps={history.data} zone={zone} />;
}

/** The side sheets of a saved item's editor: its revisions, then its publishing history. */
export function RevisionSheets(p: RevisionSheetsProps) {
  return (
    <>
      <Sheet label="Revisions">
        <RevisionsPanel {...p} />
      </Sheet>
      <Sheet label="Publishing history">
        <HistoryPanel hooks={p.hooks} id={p.id} zone={p.zone} />
      </Sheet>
    </>
  );
}
