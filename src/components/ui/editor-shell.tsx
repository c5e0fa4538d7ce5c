import type { ReactNode } from "react";
import type { Role } from "#shared/schemas/common.ts";
import type { PostStatus, PublishingProblem, ScheduleInput, WorkflowAction } from "#shared/schemas/publishing.ts";
import { EditorHeader, NextStepBar, RefusalNotice, ReturnedNotice, type EditorHeading } from "./publishing-editor.tsx";
import { Notice } from "./sheet.tsx";
import { ReturnDialog, ScheduleDialog } from "./workflow-dialogs.tsx";

/**
 * The state of an editor of published work that its draft hook (`src/lib/use-publishing-draft.ts`)
 * keeps: whether it is saving, what the server refused, a newer version someone else saved, which
 * workflow dialog is open. The shell only draws it; the hook owns the requests.
 */
export interface EditorFrame {
  saving: boolean;
  dirty: boolean;
  onSave: () => void;
  /** Set when a save met a newer version: taking it in drops the local changes. */
  conflict: boolean;
  onLoadTheirs: () => void;
  refusal: { message: string; problems: PublishingProblem[] } | null;
  /** The workflow step being sent, for its button's spinner. */
  busyAction: WorkflowAction | null;
  onAction: (a: WorkflowAction) => void;
  dialog: "schedule" | "return" | null;
  onCloseDialog: () => void;
  onSchedule: (at: ScheduleInput["at"]) => void;
  onReturn: (comment: string) => void;
  /** Field errors by field name, from the shared schema in the browser or from the server. */
  errors: Record<string, string | undefined>;
}

export interface EditorShellProps extends EditorFrame, EditorHeading {
  /** What the work is called in sentences ("update", "photo story"). */
  noun: string;
  reviewComment?: string | null;
  role: Role;
  ownWork: boolean;
  offered?: readonly WorkflowAction[];
  waiting: Record<PostStatus, string>;
  /** Said in place of the next steps while the item is not saved yet. */
  unsavedNote?: string;
  renderProblem: (p: PublishingProblem) => ReactNode;
  returnHint?: string;
  timeZone: string;
  /** The width of the side column. */
  asideWidth?: "18rem" | "20rem";
  aside: ReactNode;
  /** The item's own fields. */
  children: ReactNode;
}

const GRID = { "18rem": "lg:grid-cols-[minmax(0,1fr)_18rem]", "20rem": "lg:grid-cols-[minmax(0,1fr)_20rem]" } as const;

/**
 * The frame every editor of published work shares (updates, photo stories): the head with the
 * state and the save, the conflict, returned and refused notices, the next steps, the two
 * columns and the schedule and return dialogs. The editor passes in only its own fields.
 */
export function EditorShell(p: EditorShellProps) {
  return (
    <>
      <EditorHeader
        sheet={p.sheet}
        title={p.title}
        status={p.status}
        audience={p.audience}
        byline={p.byline}
        goesOut={p.goesOut}
        publishedHref={p.publishedHref}
        saved={p.saved}
        saving={p.saving}
        dirty={p.dirty}
        onSave={p.onSave}
      />
      {p.conflict ? (
        <div className="mb-4">
          <Notice tone="caution" title={`Someone else saved this ${p.noun} since you opened it`}>
            Your changes are still here and not saved.{" "}
            <button type="button" className="font-medium underline underline-offset-2" onClick={p.onLoadTheirs}>
              Load their version (drops yours)
            </button>
          </Notice>
        </div>
      ) : null}
      {p.reviewComment && p.status === "draft" ? <ReturnedNotice comment={p.reviewComment} /> : null}
      {p.refusal ? <RefusalNotice message={p.refusal.message} problems={p.refusal.problems} renderProblem={p.renderProblem} /> : null}
      {p.saved ? (
        <NextStepBar status={p.status} role={p.role} ownWork={p.ownWork} offered={p.offered} busy={p.busyAction} onAction={p.onAction} waiting={p.waiting[p.status]} />
      ) : p.unsavedNote ? (
        <p className="mb-4 text-sm text-ink-soft">{p.unsavedNote}</p>
      ) : null}
      <div className={`grid gap-6 ${GRID[p.asideWidth ?? "20rem"]}`}>
        <div className="flex min-w-0 flex-col gap-4">{p.children}</div>
        <aside className="flex flex-col gap-4">{p.aside}</aside>
      </div>
      {p.dialog === "schedule" ? <ScheduleDialog timeZone={p.timeZone} busy={p.busyAction !== null} error={p.errors.at} onClose={p.onCloseDialog} onSchedule={p.onSchedule} /> : null}
      {p.dialog === "return" ? <ReturnDialog busy={p.busyAction !== null} error={p.errors.comment} hint={p.returnHint} onClose={p.onCloseDialog} onReturn={p.onReturn} /> : null}
    </>
  );
}
