import { DateTime } from "luxon";

/** The hour, local to the project, at which weekly and monthly digests go out. */
export const SEND_HOUR = 8;

export interface DigestWindow {
  /** Inclusive start (UTC instant). */
  start: Date;
  /** Exclusive end (UTC instant). */
  end: Date;
  /** `2026-W48` or `2026-11`: the period's name, unique per frequency. */
  label: string;
}

/** ISO 8601 week date of a calendar date (`YYYY-MM-DD`) → `YYYY-Www-D`. */
export function isoWeekDate(date: string): string {
  const d = DateTime.fromISO(date, { zone: "UTC" });
  if (!d.isValid) throw new RangeError(`not a calendar date: ${date}`);
  return `${d.weekYear}-W${String(d.weekNumber).padStart(2, "0")}-${d.weekday}`;
}

/**
 * The ISO week before the one holding `at`, in the zone: Monday 00:00 local to the next
 * Monday 00:00 local. Midnight-to-midnight in local time, so a week across a daylight-saving
 * change is 167 or 169 hours long.
 */
export function previousIsoWeek(at: Date, zone: string): DigestWindow {
  const end = DateTime.fromJSDate(at, { zone }).startOf("week"); // luxon weeks are ISO weeks (Monday first)
  const start = end.minus({ weeks: 1 });
  return { start: start.toJSDate(), end: end.toJSDate(), label: `${start.weekYear}-W${String(start.weekNumber).padStart(2, "0")}` };
}

/** The calendar month before the one holding `at`, in the zone. */
export function previousMonth(at: Date, zone: string): DigestWindow {
  const end = DateTime.fromJSDate(at, { zone }).startOf("month");
  const start = end.minus({ months: 1 });
  return { start: start.toJSDate(), end: end.toJSDate(), label: start.toFormat("yyyy-LL") };
}

/** The project's working calendar: weekend days as ISO weekdays (1 = Monday … 7 = Sunday) and holidays. */
export interface WorkingCalendar {
  weekendDays: readonly number[];
  holidays: readonly string[];
}

/** Monday to Friday with no holidays, for callers without a project calendar. */
export const WEEKDAYS_ONLY: WorkingCalendar = { weekendDays: [6, 7], holidays: [] };

const isWorkingDay = (d: DateTime, cal: WorkingCalendar) => !cal.weekendDays.includes(d.weekday) && !cal.holidays.includes(d.toISODate()!);

/** 08:00 local on the Monday of the ISO week holding `at`. */
export function weeklySendTime(at: Date, zone: string): Date {
  return DateTime.fromJSDate(at, { zone }).startOf("week").set({ hour: SEND_HOUR }).toJSDate();
}

/** 08:00 local on the first working day (the project's calendar) of the month holding `at`. */
export function monthlySendTime(at: Date, zone: string, cal: WorkingCalendar = WEEKDAYS_ONLY): Date {
  let d = DateTime.fromJSDate(at, { zone }).startOf("month");
  // A calendar with every day off would never end; a month always has a working day in practice.
  for (let i = 0; i < 31 && !isWorkingDay(d, cal); i++) d = d.plus({ days: 1 });
  return d.set({ hour: SEND_HOUR }).toJSDate();
}

/**
 * The scheduled send time due at or before `at` (this period's, or the previous period's when
 * this one's has not come yet), and the next one after `at`.
 */
export function sendTimes(frequency: "weekly" | "monthly", at: Date, zone: string, cal: WorkingCalendar = WEEKDAYS_ONLY): { due: Date; next: Date } {
  const local = DateTime.fromJSDate(at, { zone });
  const of = frequency === "weekly" ? weeklySendTime : (a: Date, z: string) => monthlySendTime(a, z, cal);
  const step = frequency === "weekly" ? { weeks: 1 } : { months: 1 };
  const here = of(at, zone);
  if (here.getTime() <= at.getTime()) return { due: here, next: of(local.startOf(frequency === "weekly" ? "week" : "month").plus(step).toJSDate(), zone) };
  return { due: of(local.startOf(frequency === "weekly" ? "week" : "month").minus(step).toJSDate(), zone), next: here };
}

/** The start of the ISO week or calendar month holding `at`, in the zone: where the period in progress began. */
export function currentPeriodStart(frequency: "weekly" | "monthly", at: Date, zone: string): Date {
  return DateTime.fromJSDate(at, { zone }).startOf(frequency === "weekly" ? "week" : "month").toJSDate();
}

/** The window a run at `at` covers. */
export function windowFor(frequency: "weekly" | "monthly", at: Date, zone: string): DigestWindow {
  return frequency === "weekly" ? previousIsoWeek(at, zone) : previousMonth(at, zone);
}

/** `YYYY-MM-DD` of an instant in the zone. */
export function localDate(at: Date, zone: string): string {
  return DateTime.fromJSDate(at, { zone }).toISODate()!;
}
