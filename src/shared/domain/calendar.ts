/**
 * Calendar dates for the programme.
 *
 * A calendar date is a `YYYY-MM-DD` string everywhere in Plumbline: a milestone's
 * finish is a day on site, not an instant, and a JavaScript `Date` would drag a time
 * zone into it (a DATE read in one zone and printed in another moves by a day). All
 * arithmetic here is on whole day numbers (days since 1970-01-01 in the proleptic
 * Gregorian calendar), so no time zone can enter.
 */

/** A calendar date in ISO 8601 extended form, `YYYY-MM-DD` (years 0000–9999). */
export type CalendarDate = string;

/** The parts of a calendar date; `month` 1–12, `day` 1–31. */
export interface DateParts {
  year: number;
  month: number;
  day: number;
}

/** An ISO 8601 week date: week-numbering year, week 1–53, ISO weekday 1 (Monday) – 7 (Sunday). */
export interface IsoWeekDate {
  year: number;
  week: number;
  day: number;
}

/**
 * A project's working-day calendar. `weekendDays` are ISO weekdays (1 = Monday … 7 =
 * Sunday) that are never worked; `holidays` are further non-working dates. Treat a
 * calendar as an immutable value: prepared look-ups are cached per object.
 */
export interface WorkingCalendar {
  weekendDays: readonly number[];
  holidays: readonly string[];
}

const DATE_PATTERN = /^(\d{4})-(\d{2})-(\d{2})$/;
const MIN_DAY_NUMBER = -719528; // 0000-01-01
const MAX_DAY_NUMBER = 2932896; // 9999-12-31

/** Whether `year` is a leap year in the Gregorian calendar. */
export function isLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

/** Number of days (28–31) in `month` (1–12) of `year`. */
export function daysInMonth(year: number, month: number): number {
  if (month === 2) return isLeapYear(year) ? 29 : 28;
  return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
}

/**
 * Parses a `YYYY-MM-DD` date, rejecting anything that is not a real day (2026-02-30,
 * 2026-13-01, a time, an offset, surrounding spaces).
 * @throws RangeError when `value` is not a valid calendar date.
 */
export function parseCalendarDate(value: string): DateParts {
  const match = typeof value === "string" ? DATE_PATTERN.exec(value) : null;
  if (match === null) throw new RangeError(`Not a calendar date (YYYY-MM-DD): ${String(value)}`);
  const year = Number(match[1]);
  const month = Number(match[2]);
  const day = Number(match[3]);
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) {
    throw new RangeError(`Not a calendar date (no such day): ${value}`);
  }
  return { year, month, day };
}

/** Whether `value` is a valid `YYYY-MM-DD` calendar date. */
export function isCalendarDate(value: unknown): value is CalendarDate {
  if (typeof value !== "string") return false;
  const match = DATE_PATTERN.exec(value);
  if (match === null) return false;
  const year = Number(match[1]);
  const month = Number(match[2]);
  const day = Number(match[3]);
  return month >= 1 && month <= 12 && day >= 1 && day <= daysInMonth(year, month);
}

/**
 * Day number of a date from its parts: days since 1970-01-01 (negative before).
 * The era-based method (H. Hinnant, "chrono-compatible low-level date algorithms")
 * is exact for every proleptic Gregorian date using integer arithmetic only.
 */
function dayNumberOfParts(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yearOfEra = y - era * 400;
  const dayOfYear = Math.floor((153 * (month + (month > 2 ? -3 : 9)) + 2) / 5) + day - 1;
  const dayOfEra = yearOfEra * 365 + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100) + dayOfYear;
  return era * 146097 + dayOfEra - 719468;
}

function partsOfDayNumber(dayNumber: number): DateParts {
  const z = dayNumber + 719468;
  const era = Math.floor(z / 146097);
  const dayOfEra = z - era * 146097;
  const yearOfEra = Math.floor(
    (dayOfEra - Math.floor(dayOfEra / 1460) + Math.floor(dayOfEra / 36524) - Math.floor(dayOfEra / 146096)) / 365,
  );
  const dayOfYear = dayOfEra - (365 * yearOfEra + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100));
  const mp = Math.floor((5 * dayOfYear + 2) / 153);
  const day = dayOfYear - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  return { year: yearOfEra + era * 400 + (month <= 2 ? 1 : 0), month, day };
}

/**
 * Day number of a calendar date: whole days since 1970-01-01 (negative before it).
 * @throws RangeError when `date` is not a valid calendar date.
 */
export function toDayNumber(date: CalendarDate): number {
  const { year, month, day } = parseCalendarDate(date);
  return dayNumberOfParts(year, month, day);
}

/**
 * The calendar date of a day number (days since 1970-01-01).
 * @throws RangeError when `dayNumber` is not an integer or falls outside 0000-01-01 … 9999-12-31.
 */
export function fromDayNumber(dayNumber: number): CalendarDate {
  if (!Number.isInteger(dayNumber) || dayNumber < MIN_DAY_NUMBER || dayNumber > MAX_DAY_NUMBER) {
    throw new RangeError(`Day number out of range for a YYYY-MM-DD date: ${dayNumber}`);
  }
  const { year, month, day } = partsOfDayNumber(dayNumber);
  return `${String(year).padStart(4, "0")}-${String(month).padStart(2, "0")}-${String(day).padStart(2, "0")}`;
}

/**
 * `date` moved by `days` calendar days (negative moves earlier).
 * @throws RangeError when `days` is not an integer or the result leaves years 0000–9999.
 */
export function addDays(date: CalendarDate, days: number): CalendarDate {
  if (!Number.isInteger(days)) throw new RangeError(`Days must be a whole number: ${days}`);
  return fromDayNumber(toDayNumber(date) + days);
}

/** Calendar days from `from` to `to`: positive when `to` is later, 0 on the same day. */
export function daysBetween(from: CalendarDate, to: CalendarDate): number {
  return toDayNumber(to) - toDayNumber(from);
}

/** The earlier of two dates (either, when equal). Both must be valid `YYYY-MM-DD` strings. */
export function minDate(a: CalendarDate, b: CalendarDate): CalendarDate {
  // Fixed-width YYYY-MM-DD strings sort in date order, so string comparison is exact.
  return a <= b ? a : b;
}

/** The later of two dates (either, when equal). Both must be valid `YYYY-MM-DD` strings. */
export function maxDate(a: CalendarDate, b: CalendarDate): CalendarDate {
  return a >= b ? a : b;
}

/** ISO weekday (1 = Monday … 7 = Sunday) of a day number. 1970-01-01 was a Thursday (4). */
function isoWeekdayOfDayNumber(dayNumber: number): number {
  return (((dayNumber + 3) % 7) + 7) % 7 + 1;
}

/** ISO 8601 weekday of a date: 1 = Monday … 7 = Sunday. */
export function isoWeekday(date: CalendarDate): number {
  return isoWeekdayOfDayNumber(toDayNumber(date));
}

/**
 * ISO 8601 week date of a calendar date. Week 1 is the week (Monday to Sunday) that
 * holds the year's first Thursday, so the week-numbering year can differ from the
 * calendar year for a few days around 1 January.
 */
export function isoWeekDate(date: CalendarDate): IsoWeekDate {
  const dayNumber = toDayNumber(date);
  const day = isoWeekdayOfDayNumber(dayNumber);
  // A week belongs to the year of its Thursday.
  const thursday = dayNumber - day + 4;
  const year = partsOfDayNumber(thursday).year;
  const week = Math.floor((thursday - dayNumberOfParts(year, 1, 1)) / 7) + 1;
  return { year, week, day };
}

/** Formats an ISO week date in the extended form, e.g. `2008-W52-7`. */
export function formatIsoWeekDate(weekDate: IsoWeekDate): string {
  const year = weekDate.year < 0 ? `-${String(-weekDate.year).padStart(4, "0")}` : String(weekDate.year).padStart(4, "0");
  return `${year}-W${String(weekDate.week).padStart(2, "0")}-${weekDate.day}`;
}

/** The Monday that starts the ISO 8601 week holding `date`. */
export function startOfIsoWeek(date: CalendarDate): CalendarDate {
  const dayNumber = toDayNumber(date);
  return fromDayNumber(dayNumber - (isoWeekdayOfDayNumber(dayNumber) - 1));
}

interface PreparedCalendar {
  weekendDays: readonly number[];
  holidays: readonly string[];
  weekendLength: number;
  holidaysLength: number;
  /** Index 1..7: whether that ISO weekday is a weekend day. */
  weekend: boolean[];
  workingDaysPerWeek: number;
  /** Sorted, unique day numbers of holidays that fall on otherwise working weekdays. */
  holidayDays: number[];
}

const preparedCalendars = new WeakMap<WorkingCalendar, PreparedCalendar>();

function prepareCalendar(calendar: WorkingCalendar): PreparedCalendar {
  const cached = preparedCalendars.get(calendar);
  if (
    cached !== undefined &&
    cached.weekendDays === calendar.weekendDays &&
    cached.holidays === calendar.holidays &&
    cached.weekendLength === calendar.weekendDays.length &&
    cached.holidaysLength === calendar.holidays.length
  ) {
    return cached;
  }
  const weekend = [false, false, false, false, false, false, false, false];
  for (const d of calendar.weekendDays) {
    if (!Number.isInteger(d) || d < 1 || d > 7) throw new RangeError(`Weekend day must be an ISO weekday 1–7: ${d}`);
    weekend[d] = true;
  }
  let workingDaysPerWeek = 0;
  for (let d = 1; d <= 7; d += 1) if (!weekend[d]) workingDaysPerWeek += 1;
  // A holiday on a weekend day removes nothing, so it is dropped here; otherwise the
  // counting below would subtract that day twice.
  const unique = new Set<number>();
  for (const h of calendar.holidays) {
    const n = toDayNumber(h);
    if (!weekend[isoWeekdayOfDayNumber(n)]) unique.add(n);
  }
  const holidayDays = [...unique].sort((a, b) => a - b);
  const prepared: PreparedCalendar = {
    weekendDays: calendar.weekendDays,
    holidays: calendar.holidays,
    weekendLength: calendar.weekendDays.length,
    holidaysLength: calendar.holidays.length,
    weekend,
    workingDaysPerWeek,
    holidayDays,
  };
  preparedCalendars.set(calendar, prepared);
  return prepared;
}

/** Number of entries of the sorted array `values` that are ≤ `x`. */
function countAtOrBelow(values: readonly number[], x: number): number {
  let lo = 0;
  let hi = values.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((values[mid] as number) <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Working days in the half-open day-number range (a, b], for a ≤ b. O(log holidays). */
function countWorkingDays(cal: PreparedCalendar, a: number, b: number): number {
  const total = b - a;
  const fullWeeks = Math.floor(total / 7);
  let count = fullWeeks * cal.workingDaysPerWeek;
  for (let n = a + fullWeeks * 7 + 1; n <= b; n += 1) {
    if (!cal.weekend[isoWeekdayOfDayNumber(n)]) count += 1;
  }
  return count - (countAtOrBelow(cal.holidayDays, b) - countAtOrBelow(cal.holidayDays, a));
}

/** Whether `date` is a working day: not a weekend day of the calendar and not a holiday. */
export function isWorkingDay(date: CalendarDate, calendar: WorkingCalendar): boolean {
  const cal = prepareCalendar(calendar);
  const n = toDayNumber(date);
  return !cal.weekend[isoWeekdayOfDayNumber(n)] && countAtOrBelow(cal.holidayDays, n) - countAtOrBelow(cal.holidayDays, n - 1) === 0;
}

/**
 * Signed working-day difference from `from` to `to`, in working days.
 *
 * When `to` is later: the number of working days after `from` up to and including
 * `to` (Friday → next Monday is 1 on a Saturday–Sunday weekend; Saturday → Sunday is 0).
 * When `to` is earlier: minus the same count taken the other way, so the difference is
 * antisymmetric: `workingDaysBetween(a, b) === -workingDaysBetween(b, a)`. Same day: 0.
 */
export function workingDaysBetween(from: CalendarDate, to: CalendarDate, calendar: WorkingCalendar): number {
  const cal = prepareCalendar(calendar);
  const a = toDayNumber(from);
  const b = toDayNumber(to);
  if (a === b) return 0;
  return a < b ? countWorkingDays(cal, a, b) : -countWorkingDays(cal, b, a);
}

/**
 * `date` moved by `workingDays` working days.
 *
 * N > 0: the N-th working day after `date`; N < 0: the |N|-th working day before
 * `date`; N = 0: `date` itself, even when it is not a working day. The result of a
 * non-zero move is always a working day. For N > 0, or when `date` is a working day,
 * `workingDaysBetween(date, addWorkingDays(date, N)) === N`. (From a Saturday, −1 is
 * the Friday, which `workingDaysBetween` counts as 0 days before: the Friday is not
 * "after" the Saturday-to-Friday span.)
 * @throws RangeError when `workingDays` is not an integer or the calendar has no working day.
 */
export function addWorkingDays(date: CalendarDate, workingDays: number, calendar: WorkingCalendar): CalendarDate {
  if (!Number.isInteger(workingDays)) throw new RangeError(`Working days must be a whole number: ${workingDays}`);
  const d = toDayNumber(date);
  if (workingDays === 0) return date;
  const cal = prepareCalendar(calendar);
  if (cal.workingDaysPerWeek === 0) throw new RangeError("The calendar has no working days");
  const wanted = Math.abs(workingDays);
  // Every 7 consecutive days hold `workingDaysPerWeek` weekdays, and each holiday takes
  // at most one away, so the answer lies within this many days.
  const span = (Math.ceil((wanted + cal.holidayDays.length) / cal.workingDaysPerWeek) + 1) * 7;
  if (workingDays > 0) {
    // Smallest r > d with countWorkingDays(d, r) ≥ wanted; the count is non-decreasing in r.
    let lo = d + 1;
    let hi = d + span;
    while (lo < hi) {
      const mid = Math.floor((lo + hi) / 2);
      if (countWorkingDays(cal, d, mid) >= wanted) hi = mid;
      else lo = mid + 1;
    }
    return fromDayNumber(lo);
  }
  // Largest r < d with at least `wanted` working days in [r, d), i.e. in (r − 1, d − 1].
  let lo = d - span;
  let hi = d - 1;
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (countWorkingDays(cal, mid - 1, d - 1) >= wanted) lo = mid;
    else hi = mid - 1;
  }
  return fromDayNumber(lo);
}
