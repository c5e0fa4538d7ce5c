/**
 * Calendar dates as people read and type them, in the project's locale (decision 057).
 *
 * Stored and sent dates stay `YYYY-MM-DD`; this module is the only place that turns one into
 * words or reads one back from what a person typed. Projects carry no locale of their own: every
 * project speaks en-GB (the demo's and the product's language), so `PROJECT_LOCALE` is the one
 * default, and every function takes the locale so a project setting can replace it later.
 * Formats come from `Intl.DateTimeFormat` (CLDR), never from hand-written patterns, so the
 * field shows exactly what the pages print.
 */
import { daysInMonth, isCalendarDate, parseCalendarDate, type CalendarDate } from "./calendar.ts";

/** The locale every project's dates are written in (no project carries another today). */
export const PROJECT_LOCALE = "en-GB";

/** The example every date error names, in long form so it cannot be misread as a month first. */
export const DATE_EXAMPLE_ISO = "2027-01-15";

const cache = new Map<string, Intl.DateTimeFormat>();

function fmt(locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(options)}`;
  let f = cache.get(key);
  if (!f) {
    // Calendar dates are not instants: formatted at UTC midnight in UTC so they never shift a day.
    f = new Intl.DateTimeFormat(locale, { ...options, timeZone: "UTC" });
    cache.set(key, f);
  }
  return f;
}

function utc(date: CalendarDate): Date {
  const { year, month, day } = parseCalendarDate(date);
  const d = new Date(Date.UTC(2000, month - 1, day));
  d.setUTCFullYear(year);
  return d;
}

/** "Enter a date, for example 15 January 2027": the one sentence for a date that cannot be read. */
export const DATE_ERROR = `Enter a date, for example ${formatLongDate(DATE_EXAMPLE_ISO)}`;

/** "15 Jan 2027": tables, lists and lines of text. */
export function formatShortDate(date: CalendarDate, locale = PROJECT_LOCALE): string {
  return fmt(locale, { day: "numeric", month: "short", year: "numeric" }).format(utc(date));
}

/** "15 January 2027": headlines, public pages, sentences. */
export function formatLongDate(date: CalendarDate, locale = PROJECT_LOCALE): string {
  return fmt(locale, { day: "numeric", month: "long", year: "numeric" }).format(utc(date));
}

/** "15/01/2027": what a date field shows, and the first form it accepts. */
export function formatTypedDate(date: CalendarDate, locale = PROJECT_LOCALE): string {
  return fmt(locale, { day: "2-digit", month: "2-digit", year: "numeric" }).format(utc(date));
}

/** "November 2026", for a month (`YYYY-MM`) or any day in it (`YYYY-MM-DD`). */
export function formatMonthYear(monthOrDate: string, locale = PROJECT_LOCALE): string {
  return fmt(locale, { month: "long", year: "numeric" }).format(utc(monthOrDate.length === 7 ? `${monthOrDate}-01` : monthOrDate.slice(0, 10)));
}

/** "Nov 26": a chart's month label, for a date or a day number (days since 1970-01-01). */
export function formatAxisMonth(at: CalendarDate | number, locale = PROJECT_LOCALE): string {
  return fmt(locale, { month: "short", year: "2-digit" }).format(typeof at === "number" ? new Date(at * 86_400_000) : utc(at));
}

/**
 * "23 to 29 Nov 2026", "30 Nov to 6 Dec 2026", "29 Dec 2008 to 4 Jan 2009", or one day
 * "4 Dec 2026": each part written once, the year always (the words of a digest's window).
 */
export function formatDayRange(firstDay: CalendarDate, lastDay: CalendarDate, locale = PROJECT_LOCALE): string {
  if (firstDay === lastDay) return formatShortDate(firstDay, locale);
  const a = parseCalendarDate(firstDay);
  const b = parseCalendarDate(lastDay);
  if (a.year !== b.year) return `${formatShortDate(firstDay, locale)} to ${formatShortDate(lastDay, locale)}`;
  if (a.month !== b.month) return `${fmt(locale, { day: "numeric", month: "short" }).format(utc(firstDay))} to ${formatShortDate(lastDay, locale)}`;
  return `${fmt(locale, { day: "numeric" }).format(utc(firstDay))} to ${formatShortDate(lastDay, locale)}`;
}

/**
 * A camera's local time (`YYYY-MM-DDTHH:mm…`) as "14 Mar 2026, 10:20": read as it stands, never
 * shifted by a zone (the camera's clock is the site's). Null when it does not start that way.
 */
export function formatLocalDateTime(value: string, locale = PROJECT_LOCALE): string | null {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}):(\d{2})/.exec(value);
  if (!m || !isCalendarDate(m[1])) return null;
  const at = utc(m[1]);
  at.setUTCHours(Number(m[2]), Number(m[3]));
  return fmt(locale, { day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(at);
}

const zoned = new Map<string, Intl.DateTimeFormat>();

/** A formatter on a named zone's clock (instants, not calendar dates); no zone is the runtime's own. */
function fmtIn(timeZone: string | undefined, locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${timeZone}|${locale}|${JSON.stringify(options)}`;
  let f = zoned.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, { ...options, timeZone });
    zoned.set(key, f);
  }
  return f;
}

/**
 * "14 Mar 2026, 10:20 GMT": an instant on a named zone's clock (the project's), the zone shown,
 * never assumed; `month: "long"` writes "14 March 2026, 10:20 GMT".
 */
export function formatInstant(at: Date | string, timeZone: string | undefined, month: "short" | "long" = "short", locale = PROJECT_LOCALE): string {
  // Day and time apart: with a long month CLDR joins them with " at ", and a record reads better with one comma.
  const when = new Date(at);
  const day = fmtIn(timeZone, locale, { day: "numeric", month, year: "numeric" }).format(when);
  return `${day}, ${fmtIn(timeZone, locale, { hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZoneName: "short" }).format(when)}`;
}

/** "14 March 2026" ("14 Mar 2026" with `month: "short"`): the day an instant fell on in a named zone (the site's day). */
export function formatDayOfInstant(at: Date | string, timeZone: string | undefined, month: "short" | "long" = "long", locale = PROJECT_LOCALE): string {
  return fmtIn(timeZone, locale, { day: "numeric", month, year: "numeric" }).format(new Date(at));
}

/** The order of day, month and year in the locale's numeric dates ("dmy" for en-GB). */
function numericOrder(locale: string): ("day" | "month" | "year")[] {
  return fmt(locale, { day: "2-digit", month: "2-digit", year: "numeric" })
    .formatToParts(new Date(Date.UTC(2027, 0, 15)))
    .map((p) => p.type)
    .filter((t): t is "day" | "month" | "year" => t === "day" || t === "month" || t === "year");
}

/** "dd/mm/yyyy": the field's placeholder, in the locale's order and separator. */
export function typedDatePattern(locale = PROJECT_LOCALE): string {
  const words = { day: "dd", month: "mm", year: "yyyy" } as const;
  return fmt(locale, { day: "2-digit", month: "2-digit", year: "numeric" })
    .formatToParts(new Date(Date.UTC(2027, 0, 15)))
    .map((p) => (p.type === "day" || p.type === "month" || p.type === "year" ? words[p.type] : p.value))
    .join("");
}

/** Month names the locale writes (long and short, plus the common shorter "Sep"), lower case → month number. */
function monthNames(locale: string): Map<string, number> {
  const names = new Map<string, number>();
  for (let m = 1; m <= 12; m += 1) {
    const at = new Date(Date.UTC(2027, m - 1, 15));
    for (const month of ["long", "short"] as const) {
      const name = fmt(locale, { month }).format(at).toLowerCase().replace(/\.$/, "");
      names.set(name, m);
      names.set(name.slice(0, 3), m);
    }
  }
  return names;
}

function iso(year: number, month: number, day: number): CalendarDate | null {
  if (year < 1 || year > 9999 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return null;
  return `${String(year).padStart(4, "0")}-${String(month).padStart(2, "0")}-${String(day).padStart(2, "0")}`;
}

/** A typed year: four digits as written; two digits are this century's ("27" → 2027). */
function yearOf(text: string): number {
  return text.length <= 2 ? 2000 + Number(text) : Number(text);
}

/**
 * What a person typed → `YYYY-MM-DD`, or null when it is not a real day. Accepts the locale's
 * numeric form ("15/01/2027", also with "." or "-" and one-digit day or month), day and month
 * name ("15 Jan 2027", "15 January 2027", "Jan 15, 2027"), and ISO ("2027-01-15").
 */
export function parseTypedDate(text: string, locale = PROJECT_LOCALE): CalendarDate | null {
  const t = text.trim().replace(/\s+/g, " ");
  if (t === "") return null;
  if (/^\d{4}-\d{2}-\d{2}$/.test(t)) return isCalendarDate(t) ? t : null;

  const numeric = /^(\d{1,4})[/.-](\d{1,2})[/.-](\d{2}|\d{4})$/.exec(t);
  if (numeric) {
    const parts = [numeric[1]!, numeric[2]!, numeric[3]!];
    const order = numericOrder(locale);
    const at = (k: "day" | "month" | "year") => parts[order.indexOf(k)]!;
    if (order.indexOf("year") !== 2 && at("year").length !== 4) return null;
    return iso(yearOf(at("year")), Number(at("month")), Number(at("day")));
  }

  const names = monthNames(locale);
  const dayFirst = /^(\d{1,2})(?:st|nd|rd|th)? ([\p{L}]+)\.?,? (\d{2}|\d{4})$/u.exec(t);
  if (dayFirst) {
    const month = names.get(dayFirst[2]!.toLowerCase());
    return month ? iso(yearOf(dayFirst[3]!), month, Number(dayFirst[1])) : null;
  }
  const monthFirst = /^([\p{L}]+)\.? (\d{1,2})(?:st|nd|rd|th)?,? (\d{2}|\d{4})$/u.exec(t);
  if (monthFirst) {
    const month = names.get(monthFirst[1]!.toLowerCase());
    return month ? iso(yearOf(monthFirst[3]!), month, Number(monthFirst[2])) : null;
  }
  return null;
}

/** "09:30" (also "9:30", "0930", "9.30") → "09:30" on the 24-hour clock, or null. */
export function parseTypedTime(text: string): string | null {
  const m = /^([01]?\d|2[0-3])[:.]?([0-5]\d)$/.exec(text.trim());
  return m ? `${m[1]!.padStart(2, "0")}:${m[2]}` : null;
}
