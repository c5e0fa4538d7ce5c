import { addDays, daysInMonth, parseCalendarDate, toDayNumber, type CalendarDate } from "#shared/domain/calendar.ts";

/** The same day `months` calendar months earlier or later, clamped to the month's last day (31 Mar − 1 month = 28/29 Feb). */
export function addMonths(date: CalendarDate, months: number): CalendarDate {
  const { year, month, day } = parseCalendarDate(date);
  const index = year * 12 + (month - 1) + months;
  const y = Math.floor(index / 12);
  const m = index - y * 12 + 1;
  const d = Math.min(day, daysInMonth(y, m));
  return `${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}

/**
 * Ticks on the first of a month, every `step` months, chosen so that no more than
 * `maxTicks` fit between `fromDay` and `toDay` (day numbers).
 */
export function monthTicks(fromDay: number, toDay: number, maxTicks = 6): number[] {
  if (!(toDay > fromDay)) return [fromDay];
  const from = new Date(fromDay * 86_400_000);
  let y = from.getUTCFullYear();
  let m = from.getUTCMonth() + 1;
  const spanMonths = (toDay - fromDay) / 30.44;
  const steps = [1, 2, 3, 6, 12, 24];
  const step = steps.find((s) => spanMonths / s <= maxTicks) ?? 24;
  // Start on a month that is a multiple of the step, so ticks fall on quarter or half-year starts.
  m += 1;
  if (m > 12) {
    m = 1;
    y += 1;
  }
  while ((m - 1) % step !== 0) {
    m += 1;
    if (m > 12) {
      m = 1;
      y += 1;
    }
  }
  const ticks: number[] = [];
  for (;;) {
    const day = toDayNumber(`${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-01`);
    if (day > toDay) break;
    ticks.push(day);
    m += step;
    while (m > 12) {
      m -= 12;
      y += 1;
    }
  }
  return ticks;
}

/** Seven calendar days on from `date` (negative: back). */
export const addWeeks = (date: CalendarDate, weeks: number): CalendarDate => addDays(date, weeks * 7);
