import fc from "fast-check";
import { DateTime } from "luxon";
import { describe, expect, it } from "vitest";
import {
  addDays,
  addWorkingDays,
  daysBetween,
  daysInMonth,
  formatIsoWeekDate,
  fromDayNumber,
  isCalendarDate,
  isLeapYear,
  isoWeekDate,
  isoWeekday,
  isWorkingDay,
  maxDate,
  minDate,
  parseCalendarDate,
  startOfIsoWeek,
  toDayNumber,
  workingDaysBetween,
  type WorkingCalendar,
} from "../../src/shared/domain/calendar.ts";

const MS_PER_DAY = 86_400_000;

/** Reference conversion through the ECMAScript Date (UTC), independent of the code under test. */
function referenceDate(dayNumber: number): string {
  return new Date(dayNumber * MS_PER_DAY).toISOString().slice(0, 10);
}

// Dates between 1900-01-01 and 2100-12-31, as day numbers.
const dayNumberArb = fc.integer({ min: Date.UTC(1900, 0, 1) / MS_PER_DAY, max: Date.UTC(2100, 11, 31) / MS_PER_DAY });
const dateArb = dayNumberArb.map(referenceDate);

const MON_FRI: WorkingCalendar = { weekendDays: [6, 7], holidays: [] };

describe("parseCalendarDate / isCalendarDate", () => {
  it.each([
    ["2026-03-31", { year: 2026, month: 3, day: 31 }],
    ["2024-02-29", { year: 2024, month: 2, day: 29 }],
    ["2000-02-29", { year: 2000, month: 2, day: 29 }],
    ["0000-01-01", { year: 0, month: 1, day: 1 }],
    ["9999-12-31", { year: 9999, month: 12, day: 31 }],
  ])("accepts %s", (text, parts) => {
    expect(parseCalendarDate(text)).toEqual(parts);
    expect(isCalendarDate(text)).toBe(true);
  });

  // Source: Gregorian leap-year rule (every 4th year, except centuries not divisible by
  // 400), as used by ISO 8601: 1900 and 2100 are common years, 2000 a leap year.
  it.each(["2026-02-29", "1900-02-29", "2100-02-29", "2026-04-31", "2026-13-01", "2026-00-10", "2026-01-00"])(
    "rejects the non-existent day %s",
    (text) => {
      expect(() => parseCalendarDate(text)).toThrow(RangeError);
      expect(isCalendarDate(text)).toBe(false);
    },
  );

  it.each(["2026-3-31", "26-03-31", "2026-03-31T00:00:00Z", " 2026-03-31", "2026/03/31", "", "20260331"])(
    "rejects the malformed text %j",
    (text) => {
      expect(() => parseCalendarDate(text)).toThrow(RangeError);
      expect(isCalendarDate(text)).toBe(false);
    },
  );

  it("rejects values that are not strings", () => {
    expect(isCalendarDate(20260331)).toBe(false);
    expect(isCalendarDate(null)).toBe(false);
  });
});

describe("isLeapYear / daysInMonth", () => {
  // Source: Gregorian calendar rule (ISO 8601 uses the Gregorian calendar).
  it.each([
    [1900, false],
    [2000, true],
    [2023, false],
    [2024, true],
    [2100, false],
    [2400, true],
  ])("%i leap year: %s", (year, leap) => {
    expect(isLeapYear(year)).toBe(leap);
    expect(daysInMonth(year, 2)).toBe(leap ? 29 : 28);
  });

  it("gives 30 days to April, June, September and November and 31 to the rest", () => {
    expect([1, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].map((m) => daysInMonth(2026, m))).toEqual([31, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]);
  });
});

describe("day numbers", () => {
  // Source: ECMA-262 time values (Date.UTC counts milliseconds from 1970-01-01 UTC),
  // used as the reference conversion.
  it.each(["1970-01-01", "1969-12-31", "2000-02-29", "2026-07-15", "0000-01-01", "9999-12-31", "1600-03-01"])(
    "%s matches Date.UTC",
    (text) => {
      const { year, month, day } = parseCalendarDate(text);
      const reference = new Date(0);
      reference.setUTCFullYear(year, month - 1, day);
      expect(toDayNumber(text)).toBe(reference.getTime() / MS_PER_DAY);
      expect(fromDayNumber(toDayNumber(text))).toBe(text);
    },
  );

  it("agrees with Date.UTC on every day of 1900–2100 sampled at random (property)", () => {
    // Source: ECMA-262 Date.UTC as the reference calendar.
    fc.assert(
      fc.property(dayNumberArb, (n) => {
        expect(fromDayNumber(n)).toBe(referenceDate(n));
        expect(toDayNumber(referenceDate(n))).toBe(n);
      }),
    );
  });

  it("refuses day numbers outside years 0000–9999 and fractions", () => {
    expect(() => fromDayNumber(toDayNumber("9999-12-31") + 1)).toThrow(RangeError);
    expect(() => fromDayNumber(toDayNumber("0000-01-01") - 1)).toThrow(RangeError);
    expect(() => fromDayNumber(0.5)).toThrow(RangeError);
  });
});

describe("addDays / daysBetween", () => {
  // Our own examples (month ends, leap days, year ends).
  it.each([
    ["2026-01-31", 1, "2026-02-01"],
    ["2024-02-28", 1, "2024-02-29"],
    ["2026-02-28", 1, "2026-03-01"],
    ["2026-12-31", 1, "2027-01-01"],
    ["2026-03-01", -1, "2026-02-28"],
    ["2026-05-20", 0, "2026-05-20"],
    ["2026-01-01", 365, "2027-01-01"],
    ["2024-01-01", 366, "2025-01-01"],
  ])("%s moved by %i days → %s", (date, days, expected) => {
    expect(addDays(date, days)).toBe(expected);
    expect(daysBetween(date, expected)).toBe(days);
    expect(daysBetween(expected, date)).toBe(0 - days);
  });

  it("refuses a fractional number of days", () => {
    expect(() => addDays("2026-01-01", 1.5)).toThrow(RangeError);
  });

  it("round-trips: daysBetween(d, addDays(d, k)) = k (property)", () => {
    fc.assert(
      fc.property(dateArb, fc.integer({ min: -5000, max: 5000 }), (d, k) => {
        expect(daysBetween(d, addDays(d, k))).toBe(k);
      }),
    );
  });

  it("picks the earlier and later date", () => {
    expect(minDate("2026-03-01", "2026-02-28")).toBe("2026-02-28");
    expect(maxDate("2026-03-01", "2026-02-28")).toBe("2026-03-01");
  });
});

describe("ISO 8601 week dates", () => {
  // Source: ISO 8601; rows from the "ISO week date" encyclopaedia table (secondary),
  // the Python `datetime.isocalendar` documentation and the PostgreSQL documentation,
  // as listed in CHECKS.md. For 2022-12-31 one published copy prints 2023-W01-6, which
  // is wrong: 2022-12-31 is a Saturday, and the week of 2022-12-29 (its Thursday) is
  // week 52 of 2022.
  it.each([
    ["2008-12-28", "2008-W52-7", "encyclopaedia table"],
    ["2008-12-29", "2009-W01-1", "encyclopaedia table"],
    ["2005-01-01", "2004-W53-6", "encyclopaedia table"],
    ["2006-01-01", "2005-W52-7", "encyclopaedia table"],
    ["2007-01-01", "2007-W01-1", "encyclopaedia table"],
    ["2003-12-29", "2004-W01-1", "Python datetime.isocalendar docs"],
    ["2004-01-04", "2004-W01-7", "Python datetime.isocalendar docs"],
    ["2010-01-01", "2009-W53-5", "encyclopaedia table"],
    ["2012-12-31", "2013-W01-1", "PostgreSQL docs"],
    ["2022-12-31", "2022-W52-6", "encyclopaedia table (not the copy that prints 2023-W01-6)"],
  ])("%s is %s (%s)", (date, expected) => {
    expect(formatIsoWeekDate(isoWeekDate(date))).toBe(expected);
  });

  it("formats the parts with a zero-padded week", () => {
    expect(formatIsoWeekDate({ year: 2026, week: 3, day: 2 })).toBe("2026-W03-2");
  });

  it("agrees with luxon's ISO week numbering on random dates (property)", () => {
    // Source: luxon (npm), DateTime#weekYear / weekNumber / weekday, as a reference library.
    fc.assert(
      fc.property(dateArb, (d) => {
        const ref = DateTime.fromISO(d, { zone: "utc" });
        expect(isoWeekDate(d)).toEqual({ year: ref.weekYear, week: ref.weekNumber, day: ref.weekday });
        expect(isoWeekday(d)).toBe(ref.weekday);
      }),
    );
  });

  it("agrees with getUTCDay for the weekday (property)", () => {
    // Source: ECMA-262 Date.prototype.getUTCDay (0 = Sunday), as the reference.
    fc.assert(
      fc.property(dayNumberArb, (n) => {
        const utcDay = new Date(n * MS_PER_DAY).getUTCDay();
        expect(isoWeekday(referenceDate(n))).toBe(utcDay === 0 ? 7 : utcDay);
      }),
    );
  });
});

describe("startOfIsoWeek", () => {
  // Source: CHECKS.md ISO rows: 2008-12-29 and 2007-01-01 are the Mondays of week 1
  // (2009-W01-1, 2007-W01-1), so every day of those weeks starts on them.
  it.each([
    ["2008-12-29", "2008-12-29"],
    ["2009-01-04", "2008-12-29"],
    ["2007-01-07", "2007-01-01"],
    ["2005-01-01", "2004-12-27"],
    // Our own examples.
    ["2026-03-04", "2026-03-02"],
    ["2026-03-08", "2026-03-02"],
    ["2026-03-09", "2026-03-09"],
  ])("%s → %s", (date, monday) => {
    expect(startOfIsoWeek(date)).toBe(monday);
  });

  it("is a Monday in the same ISO week, at most six days earlier (property)", () => {
    fc.assert(
      fc.property(dateArb, (d) => {
        const monday = startOfIsoWeek(d);
        expect(isoWeekday(monday)).toBe(1);
        const back = daysBetween(monday, d);
        expect(back).toBeGreaterThanOrEqual(0);
        expect(back).toBeLessThanOrEqual(6);
        const { year, week } = isoWeekDate(d);
        expect(isoWeekDate(monday)).toEqual({ year, week, day: 1 });
      }),
    );
  });
});

/** Brute-force oracle: walks day by day using Date.UTC / getUTCDay only. */
function oracleWorkingDays(from: string, to: string, calendar: WorkingCalendar): number {
  const a = Date.parse(`${from}T00:00:00Z`) / MS_PER_DAY;
  const b = Date.parse(`${to}T00:00:00Z`) / MS_PER_DAY;
  const holidays = new Set(calendar.holidays);
  const working = (n: number): boolean => {
    const utcDay = new Date(n * MS_PER_DAY).getUTCDay();
    return !calendar.weekendDays.includes(utcDay === 0 ? 7 : utcDay) && !holidays.has(referenceDate(n));
  };
  let count = 0;
  const [lo, hi] = a <= b ? [a, b] : [b, a];
  for (let n = lo + 1; n <= hi; n += 1) if (working(n)) count += 1;
  return a <= b ? count : -count;
}

describe("working days", () => {
  // Our own project calendar: Saturday–Sunday weekend and a site shutdown over the
  // year end (invented dates).
  const SITE: WorkingCalendar = {
    weekendDays: [6, 7],
    holidays: ["2026-12-24", "2026-12-25", "2026-12-28", "2026-12-31", "2027-01-01", "2026-12-26" /* a Saturday */],
  };
  // A calendar with a Friday–Saturday weekend.
  const FRI_SAT: WorkingCalendar = { weekendDays: [5, 6], holidays: [] };

  it.each([
    // 2026-03-06 is a Friday, 2026-03-09 a Monday.
    ["2026-03-06", "2026-03-09", MON_FRI, 1],
    ["2026-03-09", "2026-03-06", MON_FRI, -1],
    ["2026-03-07", "2026-03-08", MON_FRI, 0], // Saturday → Sunday
    ["2026-03-06", "2026-03-07", MON_FRI, 0], // Friday → Saturday
    ["2026-03-02", "2026-03-02", MON_FRI, 0],
    ["2026-03-02", "2026-03-09", MON_FRI, 5],
    ["2026-03-02", "2026-03-30", MON_FRI, 20],
    ["2026-03-09", "2026-03-02", MON_FRI, -5],
    ["2026-12-23", "2027-01-04", SITE, 3], // 29th, 30th, 4th; the rest is weekend or shutdown
    ["2027-01-04", "2026-12-23", SITE, -3],
    ["2026-03-05", "2026-03-08", FRI_SAT, 1], // Thursday → Sunday: only the Sunday works
  ])("from %s to %s: %i", (from, to, calendar, expected) => {
    expect(workingDaysBetween(from, to, calendar as WorkingCalendar)).toBe(expected);
  });

  it("is 0 everywhere on a calendar with no working days", () => {
    const never: WorkingCalendar = { weekendDays: [1, 2, 3, 4, 5, 6, 7], holidays: [] };
    expect(workingDaysBetween("2026-01-01", "2026-12-31", never)).toBe(0);
    expect(() => addWorkingDays("2026-01-01", 1, never)).toThrow(RangeError);
  });

  it("refuses a weekend day outside 1–7", () => {
    expect(() => workingDaysBetween("2026-01-01", "2026-01-02", { weekendDays: [0], holidays: [] })).toThrow(RangeError);
  });

  it.each([
    ["2026-03-06", true],
    ["2026-03-07", false],
    ["2026-12-25", false],
    ["2026-12-29", true],
  ])("isWorkingDay(%s) on the site calendar: %s", (date, expected) => {
    expect(isWorkingDay(date, SITE)).toBe(expected);
  });

  it.each([
    ["2026-03-06", 1, MON_FRI, "2026-03-09"], // Friday + 1 → Monday
    ["2026-03-07", 1, MON_FRI, "2026-03-09"], // Saturday + 1 → Monday
    ["2026-03-09", -1, MON_FRI, "2026-03-06"], // Monday − 1 → Friday
    ["2026-03-07", -1, MON_FRI, "2026-03-06"], // Saturday − 1 → Friday
    ["2026-03-02", 5, MON_FRI, "2026-03-09"],
    ["2026-03-02", 10, MON_FRI, "2026-03-16"],
    ["2026-03-02", -10, MON_FRI, "2026-02-16"],
    ["2026-03-07", 0, MON_FRI, "2026-03-07"],
    ["2026-12-23", 1, SITE, "2026-12-29"],
    ["2026-12-30", 1, SITE, "2027-01-04"],
    ["2027-01-04", -2, SITE, "2026-12-29"],
  ])("%s moved by %i working days → %s", (date, n, calendar, expected) => {
    expect(addWorkingDays(date, n, calendar as WorkingCalendar)).toBe(expected);
  });

  it("refuses a fractional number of working days", () => {
    expect(() => addWorkingDays("2026-03-02", 0.5, MON_FRI)).toThrow(RangeError);
  });

  const calendarArb = fc.record({
    weekendDays: fc.subarray([1, 2, 3, 4, 5, 6, 7], { maxLength: 6 }),
    holidays: fc.array(fc.integer({ min: 20_000, max: 20_120 }).map(referenceDate), { maxLength: 30 }),
  });
  const nearDateArb = fc.integer({ min: 19_990, max: 20_130 }).map(referenceDate);

  it("agrees with a day-by-day count (property)", () => {
    fc.assert(
      fc.property(nearDateArb, nearDateArb, calendarArb, (from, to, calendar) => {
        expect(workingDaysBetween(from, to, calendar)).toBe(oracleWorkingDays(from, to, calendar));
      }),
    );
  });

  it("is antisymmetric (property)", () => {
    fc.assert(
      fc.property(nearDateArb, nearDateArb, calendarArb, (a, b, calendar) => {
        expect(workingDaysBetween(a, b, calendar) + workingDaysBetween(b, a, calendar)).toBe(0);
      }),
    );
  });

  it("addWorkingDays lands on a working day and round-trips through workingDaysBetween (property)", () => {
    fc.assert(
      fc.property(nearDateArb, fc.integer({ min: -60, max: 60 }), calendarArb, (d, n, calendar) => {
        const r = addWorkingDays(d, n, calendar);
        if (n === 0) {
          expect(r).toBe(d);
          return;
        }
        expect(isWorkingDay(r, calendar)).toBe(true);
        if (n > 0) {
          expect(workingDaysBetween(d, r, calendar)).toBe(n);
          // It is the first such day: the day before is one working day short.
          expect(workingDaysBetween(d, addDays(r, -1), calendar)).toBe(n - 1);
        } else {
          // Exactly |n| working days in [r, d).
          expect(oracleWorkingDays(addDays(r, -1), addDays(d, -1), calendar)).toBe(-n);
          if (isWorkingDay(d, calendar)) expect(workingDaysBetween(d, r, calendar)).toBe(n);
        }
      }),
    );
  });

  it("sees an edit to a calendar's holiday list made in place", () => {
    const calendar = { weekendDays: [6, 7], holidays: [] as string[] };
    expect(workingDaysBetween("2026-03-02", "2026-03-03", calendar)).toBe(1);
    calendar.holidays.push("2026-03-03");
    expect(workingDaysBetween("2026-03-02", "2026-03-03", calendar)).toBe(0);
  });
});
