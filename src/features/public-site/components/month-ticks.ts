import { formatAxisMonth } from "#shared/domain/locale-dates.ts";

// Kept apart from the recharts ramp chart so that pages drawing plain bars (the readiness
// glance) can tick their months without loading the charting library.

/** "Apr 27" for a day number (days since 1970-01-01). */
export const tickWord = (day: number) => formatAxisMonth(day);

/**
 * Ticks on the first of each month inside the range, every second, third or sixth month when
 * the range is long, so no more than `most` labels share the axis.
 */
export function firstOfMonthTicks(fromDay: number, toDay: number, most = 6): number[] {
  const firsts: number[] = [];
  const d = new Date(fromDay * 86_400_000);
  for (let y = d.getUTCFullYear(), m = d.getUTCMonth() + 1; ; m += 1) {
    const day = Date.UTC(y, m, 1) / 86_400_000;
    if (day > toDay) break;
    firsts.push(day);
  }
  const every = [1, 2, 3, 6, 12].find((n) => Math.ceil(firsts.length / n) <= most) ?? 12;
  return firsts.filter((_, i) => i % every === 0);
}
