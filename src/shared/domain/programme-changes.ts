/**
 * "What moved between two dates", from the milestone event history. Every change of
 * a forecast, actual, percent, baseline or audience is recorded as an event, so the
 * digest and the investor room's "since last month" are a query over events rather
 * than a comparison of two guesses.
 */
import { daysBetween, isCalendarDate, type CalendarDate } from "./calendar.ts";

export type MilestoneEventField =
  | "forecast_finish"
  | "actual_finish"
  | "percent_complete"
  | "baseline_finish"
  | "audience"
  | "planned_start"
  | "weight"
  | "removed";

/** One recorded change of one field of a milestone. Values are as stored (dates `YYYY-MM-DD`, numbers as text). */
export interface MilestoneEvent {
  milestoneId: number;
  field: MilestoneEventField;
  from: string | null;
  to: string | null;
  /** ISO 8601 instant of the change, with offset. */
  at: string;
  note?: string | null;
}

export type MoveKind = "removed" | "restored" | "completed" | "reopened" | "rebaselined" | "later" | "earlier" | "progress" | "audience_changed";

/** The net effect on one aspect of a milestone over the window. */
export interface MilestoneMove {
  kind: MoveKind;
  /** For `later` / `earlier` / `rebaselined`: calendar days the date moved (positive = later). */
  days?: number;
  /** Value before the window's first change of this field. */
  from: string | null;
  /** Value after the window's last change of this field. */
  to: string | null;
  /** Non-empty notes of the events behind this move, oldest first. */
  notes: string[];
}

export interface MilestoneChanges {
  milestoneId: number;
  moves: MilestoneMove[];
}

/** The calendar date of an instant as the default `dateOf`: its first ten characters (the date as written, in the instant's own offset). */
export function dateOfInstant(at: string): CalendarDate {
  return at.slice(0, 10);
}

const KIND_ORDER: Record<MoveKind, number> = {
  removed: 0,
  restored: 0,
  completed: 1,
  reopened: 2,
  rebaselined: 3,
  later: 4,
  earlier: 4,
  progress: 5,
  audience_changed: 6,
};

function notesOf(events: readonly MilestoneEvent[]): string[] {
  const notes: string[] = [];
  for (const e of events) if (typeof e.note === "string" && e.note.trim() !== "") notes.push(e.note);
  return notes;
}

function netMove(field: MilestoneEventField, events: readonly MilestoneEvent[]): MilestoneMove | null {
  const from = (events[0] as MilestoneEvent).from;
  const to = (events[events.length - 1] as MilestoneEvent).to;
  const notes = notesOf(events);
  switch (field) {
    case "actual_finish":
      if (from === null && to !== null) return { kind: "completed", from, to, notes };
      if (from !== null && to === null) return { kind: "reopened", from, to, notes };
      // A corrected completion date is not news about progress.
      return null;
    case "forecast_finish": {
      // A forecast set where there was none (or cleared) has no "from" date to measure
      // against here; the baseline comparison belongs to the slip, not to a move.
      if (!isCalendarDate(from) || !isCalendarDate(to)) return null;
      const days = daysBetween(from, to);
      if (days === 0) return null;
      return { kind: days > 0 ? "later" : "earlier", days, from, to, notes };
    }
    case "baseline_finish": {
      if (from === to) return null;
      const move: MilestoneMove = { kind: "rebaselined", from, to, notes };
      if (isCalendarDate(from) && isCalendarDate(to)) move.days = daysBetween(from, to);
      return move;
    }
    case "percent_complete":
      if (from === to || (from !== null && to !== null && Number(from) === Number(to))) return null;
      return { kind: "progress", from, to, notes };
    case "audience":
      return from === to ? null : { kind: "audience_changed", from, to, notes };
    case "removed":
      // Removed and restored within one window nets to nothing, like a forecast moved out and back.
      if (from !== "true" && to === "true") return { kind: "removed", from, to, notes };
      if (from === "true" && to !== "true") return { kind: "restored", from, to, notes };
      return null;
    default:
      // Planned start and weight reshape the plan, but readers are told of that through
      // the re-baseline; on their own they are not a move of the milestone.
      return null;
  }
}

/**
 * What moved between `from` and `to` (calendar dates, both inclusive). An event is in
 * the window when `dateOf(event.at)` is; pass a `dateOf` that converts the instant to
 * the project's time zone to cut the window there. For each milestone and field the
 * net change over the window is taken (the first event's `from` to the last event's
 * `to`), so a forecast moved out and back again reports nothing, and two slips of
 * 5 and 9 days report one move `later` by 14 days.
 *
 * Moves: `removed` / `restored` (taken out of the programme or put back; the note is the
 * reason), `completed` (actual set), `reopened` (actual cleared), `rebaselined`
 * (baseline finish changed), `later` / `earlier` (forecast moved, by `days`),
 * `progress` (percent complete changed), `audience_changed`. Milestones with no net
 * move are left out; the result is sorted by milestone id, moves in that order.
 */
export function summariseChanges(
  events: readonly MilestoneEvent[],
  from: CalendarDate,
  to: CalendarDate,
  dateOf: (at: string) => CalendarDate = dateOfInstant,
): MilestoneChanges[] {
  // Order by instant; instants with different offsets do not sort as strings. Ties
  // (and unparseable instants) keep the order they were given in.
  const inWindow = events
    .map((event, index) => ({ event, index, time: Date.parse(event.at) }))
    .filter(({ event }) => {
      const day = dateOf(event.at);
      return day >= from && day <= to;
    })
    .sort((a, b) => {
      if (Number.isFinite(a.time) && Number.isFinite(b.time) && a.time !== b.time) return a.time - b.time;
      return a.index - b.index;
    });

  const grouped = new Map<number, Map<MilestoneEventField, MilestoneEvent[]>>();
  for (const { event } of inWindow) {
    let fields = grouped.get(event.milestoneId);
    if (fields === undefined) {
      fields = new Map();
      grouped.set(event.milestoneId, fields);
    }
    const list = fields.get(event.field);
    if (list === undefined) fields.set(event.field, [event]);
    else list.push(event);
  }

  const result: MilestoneChanges[] = [];
  for (const [milestoneId, fields] of grouped) {
    const moves: MilestoneMove[] = [];
    for (const [field, list] of fields) {
      const move = netMove(field, list);
      if (move !== null) moves.push(move);
    }
    if (moves.length === 0) continue;
    moves.sort((a, b) => KIND_ORDER[a.kind] - KIND_ORDER[b.kind]);
    result.push({ milestoneId, moves });
  }
  return result.sort((a, b) => a.milestoneId - b.milestoneId);
}
