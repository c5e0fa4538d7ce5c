/**
 * The words that name a digest's window: its subject line and heading must say exactly
 * which days it covers, so a reader (and whoever audits a run) can trust the date range.
 */
import { addDays, daysInMonth, isoWeekDate, isoWeekday, parseCalendarDate, type CalendarDate } from "./calendar.ts";
import { formatDayRange, formatMonthYear, formatShortDate } from "./locale-dates.ts";

/** A digest's window in the project's calendar: its first and last day (both inclusive). */
export interface DigestPeriod {
  frequency: "immediate" | "weekly" | "monthly";
  firstDay: CalendarDate;
  lastDay: CalendarDate;
  /**
   * True when the window stops at "now", inside a period that has not ended (a preview or a
   * test sent mid-week): the title then says "so far".
   */
  soFar: boolean;
}

/** "week 48" within one calendar year; "week 1 of 2009" where the week-numbering year is not the year of every day in it. */
function weekName(monday: CalendarDate): string {
  const { year, week } = isoWeekDate(monday);
  const sunday = addDays(monday, 6);
  const plain = parseCalendarDate(monday).year === year && parseCalendarDate(sunday).year === year;
  return plain ? `week ${week}` : `week ${week} of ${year}`;
}

/**
 * The title of a digest's window, naming exactly the days it covers:
 * - a whole ISO 8601 week: "week 48, 23 to 29 Nov 2026" (the week-numbering year is added
 *   where the week straddles a new year: "week 1 of 2009, 29 Dec 2008 to 4 Jan 2009");
 * - a whole calendar month: "November 2026";
 * - the period in progress, from its first day to today: "week 49 so far, 30 Nov to
 *   4 Dec 2026", "December 2026 so far, 1 to 4 Dec 2026";
 * - any other window (a reader's digest starting where their last one ended): its days,
 *   "23 Nov to 4 Dec 2026", with " so far" when it stops at now;
 * - an as-it-happens digest: its day.
 * A window that ends as it starts (nothing yet) counts as its first day.
 */
export function digestPeriodTitle(p: DigestPeriod): string {
  const first = p.firstDay;
  const last = p.lastDay < first ? first : p.lastDay;
  if (p.frequency === "immediate") return formatShortDate(last);
  const range = formatDayRange(first, last);
  if (p.frequency === "weekly" && isoWeekday(first) === 1) {
    const sunday = addDays(first, 6);
    if (!p.soFar && last === sunday) return `${weekName(first)}, ${range}`;
    if (p.soFar && last <= sunday) return `${weekName(first)} so far, ${range}`;
  }
  if (p.frequency === "monthly") {
    const { year, month, day } = parseCalendarDate(first);
    const monthEnd = `${first.slice(0, 8)}${String(daysInMonth(year, month)).padStart(2, "0")}`;
    const name = formatMonthYear(first);
    if (day === 1 && !p.soFar && last === monthEnd) return name;
    if (day === 1 && p.soFar && last <= monthEnd) return `${name} so far, ${range}`;
  }
  return p.soFar ? `${range} so far` : range;
}
