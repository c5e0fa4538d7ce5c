import { useState } from "react";
import type { ScheduleInput } from "#shared/schemas/publishing.ts";
import { Button } from "./button.tsx";
import { DateField } from "./date-field.tsx";
import { parseTypedTime } from "#shared/domain/locale-dates.ts";
import { todayIn } from "../../lib/format.ts";
import { Dialog } from "./dialog.tsx";
import { TextAreaField, TextField } from "./field.tsx";
import { onSubmitted } from "../../lib/forms.ts";

/**
 * The dialogs of the publishing workflow shared by updates and photo stories: scheduling on the
 * project's clock, and returning work to its writer with comments. Presentational: the caller
 * sends the request and passes back any error.
 */

/** "GMT" / "BST": the zone's short name on a given day, so the writer knows which clock they are setting. */
export function zoneAbbreviation(timeZone: string, date: string): string {
  const at = /^\d{4}-\d{2}-\d{2}$/.test(date) ? new Date(`${date}T12:00:00Z`) : new Date();
  const part = new Intl.DateTimeFormat("en-GB", { timeZone, timeZoneName: "short" }).formatToParts(at).find((p) => p.type === "timeZoneName");
  return part?.value ?? timeZone;
}

/** Date and time on the project's clock (the server converts; the zone is shown, never assumed). */
export function ScheduleDialog({ timeZone, busy, error, onClose, onSchedule }: { timeZone: string; busy: boolean; error?: string; onClose: () => void; onSchedule: (at: ScheduleInput["at"]) => void }) {
  const [date, setDate] = useState(todayIn(timeZone));
  const [time, setTime] = useState("09:00");
  const zone = `${timeZone.replace("_", " ")} (${zoneAbbreviation(timeZone, date)})`;
  return (
    <Dialog
      open
      title="Schedule publication"
      onClose={onClose}
      dismiss="Cancel"
      footer={
        <Button variant="primary" busy={busy} disabled={!date || !time} onClick={() => onSchedule({ date, time })}>
          Schedule
        </Button>
      }
    >
      <form
        className="flex flex-col gap-3"
        onSubmit={onSubmitted(() => onSchedule({ date, time }))}
      >
        <p className="text-sm">
          Times are on the project's clock: <strong data-testid="schedule-zone">{zone}</strong>.
        </p>
        <div className="grid grid-cols-2 gap-3">
          <DateField label="Date" value={date} min={todayIn(timeZone)} onChange={(e) => setDate(e.target.value)} />
          {/* Typed on the 24-hour clock ("09:30"): a time input would show the browser's 12-hour clock. */}
          <TextField label={`Time (${zoneAbbreviation(timeZone, date)})`} inputMode="numeric" placeholder="hh:mm" hint="24-hour clock, e.g. 09:30" value={time} onChange={(e) => setTime(e.target.value)} onBlur={() => setTime((t) => parseTypedTime(t) ?? t)} />
        </div>
        {error ? (
          <p role="alert" className="text-sm text-bad">
            ▲ {error}
          </p>
        ) : null}
        <p className="text-xs text-ink-soft">It goes out by itself at that time. Withdrawing it before then cancels the schedule.</p>
      </form>
    </Dialog>
  );
}

/** The reviewer's comments, sent with the work back to its writer. */
export function ReturnDialog({
  busy,
  error,
  hint = "The writer sees this at the top of the page when they open it.",
  onClose,
  onReturn,
}: {
  busy: boolean;
  error?: string;
  hint?: string;
  onClose: () => void;
  onReturn: (comment: string) => void;
}) {
  const [comment, setComment] = useState("");
  return (
    <Dialog
      open
      title="Return with comments"
      onClose={onClose}
      dismiss="Cancel"
      footer={
        <Button variant="primary" busy={busy} disabled={!comment.trim()} onClick={() => onReturn(comment.trim())}>
          Return to the writer
        </Button>
      }
    >
      <TextAreaField label="What should change?" rows={5} value={comment} onChange={(e) => setComment(e.target.value)} error={error} hint={hint} />
    </Dialog>
  );
}
