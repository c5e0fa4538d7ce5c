import type { ComponentProps, ReactNode } from "react";
import { Link } from "react-router-dom";
import type { Audience } from "#shared/schemas/common.ts";
import type { PostStatus, PublishingProblem } from "#shared/schemas/publishing.ts";
import { AUDIENCE_WORD } from "../../lib/words.ts";
import { AudienceMark } from "./audience-mark.tsx";
import { Button } from "./button.tsx";
import { SelectField } from "./field.tsx";
import { PublishStatusMark } from "./publish-status.tsx";
import { Notice, PageHeader, Sheet } from "./sheet.tsx";
import { openActions, WorkflowActions } from "./workflow-actions.tsx";

/*
 * The frame the editors of updates and photo stories share: the head with the state and the
 * save, the notices above the fields and the bar of next steps. Presentational: the editor
 * keeps the item, the draft and the requests.
 */

/** What the head of an editor shows of the item: its title, state, audience and whereabouts. */
export interface EditorHeading {
  /** The sheet reference above the title ("Site office · Updates"). */
  sheet: string;
  title: string;
  status: PostStatus;
  audience: Audience;
  /** Who wrote it, after the marks. */
  byline?: ReactNode;
  /** The scheduled time, as people read it, while the item is scheduled. */
  goesOut?: string | null;
  /** The published page, while the item is published. */
  publishedHref?: string | null;
  /** Whether the item has been saved at all (a new one saves as a draft first). */
  saved: boolean;
}

/**
 * The head of an editor: the title, the item's state and audience, when it goes out or where
 * it is published, and the save button with whether everything is saved.
 */
export function EditorHeader({
  sheet,
  title,
  status,
  audience,
  byline,
  goesOut,
  publishedHref,
  saved,
  saving,
  dirty,
  onSave,
}: EditorHeading & { saving: boolean; dirty: boolean; onSave: () => void }) {
  return (
    <PageHeader
      sheet={sheet}
      title={title}
      description={
        <span className="flex flex-wrap items-center gap-x-3 gap-y-1">
          <PublishStatusMark status={status} />
          <AudienceMark audience={audience} />
          {byline ? <span className="text-sm">{byline}</span> : null}
          {goesOut ? (
            <span className="text-sm" data-testid="scheduled-for">
              goes out {goesOut}
            </span>
          ) : null}
          {publishedHref ? (
            <Link className="text-sm underline underline-offset-4" to={publishedHref}>
              Open the published page
            </Link>
          ) : null}
        </span>
      }
      actions={
        <div className="flex flex-wrap items-center gap-2">
          <span className="text-sm text-ink-soft" aria-live="polite">
            {saving ? "Saving…" : dirty ? "Unsaved changes" : saved ? "All changes saved" : ""}
          </span>
          <Button onClick={onSave} busy={saving} variant={dirty || !saved ? "primary" : "secondary"}>
            {saved ? "Save" : "Save draft"}
          </Button>
        </div>
      }
    />
  );
}

/** The reviewer's comments on an item returned to its writer. */
export function ReturnedNotice({ comment }: { comment: string }) {
  return (
    <div className="mb-4">
      <Notice tone="caution" title="Returned with comments">
        <span className="whitespace-pre-line">{comment}</span>
      </Notice>
    </div>
  );
}

/** Why a step was refused: the problems, each drawn by `renderProblem`, or the message when none is named. */
export function RefusalNotice({ message, problems, renderProblem }: { message: string; problems: readonly PublishingProblem[]; renderProblem: (p: PublishingProblem) => ReactNode }) {
  return (
    <div className="mb-4" data-testid="refusal-problems">
      <Notice tone="error" title="Not published yet: fix these first">
        {problems.length === 0 ? <p>{message}</p> : null}
        <ul className="mt-1 flex flex-col gap-1">{problems.map(renderProblem)}</ul>
      </Notice>
    </div>
  );
}

/** The refused step's problems that belong to one piece of the item (a photo, a block), each as an alert beside it. */
export function ProblemAlerts({ problems, className = "" }: { problems: readonly PublishingProblem[]; className?: string }) {
  return problems.map((p, i) => (
    <p key={`${p.code}-${i}`} role="alert" className={`text-sm font-medium text-bad ${className}`}>
      ▲ {p.message}
    </p>
  ));
}

/** The steps this person may take now, or what happens next when there is none. */
export function NextStepBar({ waiting, ...actions }: ComponentProps<typeof WorkflowActions> & { /** What happens next, said when this person has no step to take. */ waiting: string }) {
  return (
    <div className="mb-4 flex flex-wrap items-center gap-3 border border-rule bg-sheet px-4 py-3">
      <span className="label-caps">Next step</span>
      <WorkflowActions {...actions} />
      {openActions(actions.status, actions.role, actions.ownWork, actions.offered).length === 0 ? <span className="text-sm text-ink-soft">{waiting}</span> : null}
    </div>
  );
}

/** Who an update or a photo story is for, as its editor chooses it. */
export function AudienceSheet({ label, value, onChange, error }: { label: string; value: Audience; onChange: (a: Audience) => void; error?: string }) {
  return (
    <Sheet label="Audience">
      <SelectField
        label={label}
        value={value}
        onChange={(e) => onChange(e.target.value as Audience)}
        error={error}
        options={[
          { value: "public", label: "Public: anyone" },
          { value: "investor", label: "Investors (and staff)" },
          { value: "internal", label: AUDIENCE_WORD.internal },
        ]}
      />
    </Sheet>
  );
}
