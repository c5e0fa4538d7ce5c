import type { FacilityEvent } from "#shared/schemas/facility.ts";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { formatDate, formatInstant } from "../../../lib/format.ts";
import { useUnitEvents } from "../api.ts";

const FIELD_WORD: Record<string, string> = { stage: "Stage", label: "Label", tag: "Tag", train: "System number", created: "Added" };

function valueOf(v: string | null): string {
  return v === null || v === "" ? "none" : v;
}

/** One change: what moved, the day on site, who and why. */
function EventLine({ e, timeZone }: { e: FacilityEvent; timeZone: string }) {
  return (
    <li className="py-2">
      <p>
        <span className="font-medium">{FIELD_WORD[e.field] ?? e.field}</span>: {valueOf(e.from)} → <span className="font-semibold">{valueOf(e.to)}</span>
        <span className="ml-1 tabular text-ink-soft">on {formatDate(e.on)}</span>
      </p>
      <p className="text-xs text-ink-faint">
        recorded {formatInstant(e.at, timeZone)}
        {e.by ? ` · ${e.by}` : ""}
      </p>
      {e.note ? <p className="font-serif text-ink-soft">“{e.note}”</p> : null}
    </li>
  );
}

/** A unit's dated history, newest first, as the server keeps it. */
export function UnitHistory({ unitId, timeZone }: { unitId: number; timeZone: string }) {
  const events = useUnitEvents(unitId);
  return (
    <section aria-labelledby={`unit-history-${unitId}`} className="flex flex-col gap-1">
      <h3 id={`unit-history-${unitId}`} className="font-semibold">
        History of this unit
      </h3>
      {events.isPending ? (
        <Spinner label="Loading the history" />
      ) : events.isError ? (
        <Notice tone="error">{events.error.message}</Notice>
      ) : events.data.length === 0 ? (
        <p className="text-sm text-ink-soft">No change recorded yet.</p>
      ) : (
        <ol className="flex flex-col divide-y divide-rule text-sm" aria-label="Changes, newest first" data-testid="unit-history">
          {events.data.map((e) => (
            <EventLine key={e.id} e={e} timeZone={timeZone} />
          ))}
        </ol>
      )}
    </section>
  );
}
