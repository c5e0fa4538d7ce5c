import { OUTSIDE_REVIEW_ACTIONS, type PublishingEvent } from "#shared/schemas/publishing.ts";
import { formatInstant } from "../../lib/format.ts";
import { PUBLISH_STATUS_WORD } from "./publish-status.tsx";

/** One step of the publishing workflow as the history lists it (a row of `GET /api/posts/:id/history` or `/api/stories/:id/history`). */
export type PublishingStep = PublishingEvent;

const ACTION_WORD: Record<string, string> = {
  submit: "Submitted for review",
  approve: "Approved",
  return: "Returned with comments",
  publish: "Published",
  schedule: "Scheduled",
  withdraw: "Withdrawn",
  edited: "Edited after approval",
  schedule_failed: "Held back at the scheduled time",
  [OUTSIDE_REVIEW_ACTIONS.looks_right]: "Outside review",
  [OUTSIDE_REVIEW_ACTIONS.needs_changes]: "Outside review",
};

/** Marks from the house's shapes (DEVELOPERS.md): a reviewer's yes, a request for changes, a hold-back. */
const ACTION_MARK: Record<string, { mark: string; tone: string }> = {
  schedule_failed: { mark: "▲", tone: "text-bad" },
  [OUTSIDE_REVIEW_ACTIONS.looks_right]: { mark: "✓", tone: "" },
  [OUTSIDE_REVIEW_ACTIONS.needs_changes]: { mark: "▲", tone: "text-bad" },
};

/**
 * The workflow steps of an update or a photo story, newest first: who took each and when,
 * with the reviewer's comments and the reason the scheduler held it back. A withdrawal of a
 * scheduled item reads as a cancelled schedule; an outside reviewer's answer, which changes no
 * state, names the state it met. Presentational: the caller fetches the steps.
 */
export function PublishingHistory({ steps, zone }: { steps: readonly PublishingStep[]; zone: string }) {
  if (steps.length === 0) return <p className="text-sm text-ink-soft">No step taken yet.</p>;
  return (
    <ol className="flex flex-col divide-y divide-rule text-sm" data-testid="publishing-history">
      {steps.map((s, i) => {
        const word = s.action === "withdraw" && s.from === "scheduled" ? "Schedule cancelled" : (ACTION_WORD[s.action] ?? s.action);
        const mark = ACTION_MARK[s.action];
        // The scheduler records the instant ("for 2030-07-01T08:00:00.000Z"); people read it on the project's clock.
        const at = s.action === "schedule" ? /^for (\d{4}-\d{2}-\d{2}T[\d:.]+Z)$/.exec(s.comment ?? "") : null;
        const comment = at ? `For ${formatInstant(at[1], zone)}` : s.comment;
        return (
          <li key={`${s.at}-${i}`} className="py-2" data-action={s.action}>
            <p className={`font-medium ${mark?.tone ?? ""}`}>
              {mark ? <span aria-hidden>{mark.mark} </span> : null}
              {word}
              <span className="font-normal text-ink-soft">
                {" "}
                · {s.from === s.to ? PUBLISH_STATUS_WORD[s.to] : `${PUBLISH_STATUS_WORD[s.from]} → ${PUBLISH_STATUS_WORD[s.to]}`}
              </span>
            </p>
            <p className="text-xs text-ink-soft">
              {formatInstant(s.at, zone)} · {s.by ?? "Plumbline"}
            </p>
            {comment ? <p className="mt-0.5 whitespace-pre-line text-xs">{comment}</p> : null}
          </li>
        );
      })}
    </ol>
  );
}
