import { describe, expect, it } from "vitest";
import { addDays, formatIsoWeekDate, isoWeekDate } from "../../src/shared/domain/calendar.ts";
import { digestPeriodTitle, type DigestPeriod } from "../../src/shared/domain/digest-period.ts";
import { formatDayRange } from "../../src/shared/domain/locale-dates.ts";

const weekly = (firstDay: string, lastDay: string, soFar = false): DigestPeriod => ({ frequency: "weekly", firstDay, lastDay, soFar });
const monthly = (firstDay: string, lastDay: string, soFar = false): DigestPeriod => ({ frequency: "monthly", firstDay, lastDay, soFar });

describe("digestPeriodTitle: a whole ISO 8601 week is named by its number and its seven days", () => {
  // Source: CHECKS.md "ISO 8601 week dates" (ISO 8601; the "ISO week date" encyclopaedia table,
  // the Python datetime.isocalendar documentation, the PostgreSQL documentation). Each row's
  // date lies in the week titled; the Monday and Sunday are derived from its weekday.
  const table: Array<[date: string, weekDate: string, monday: string, title: string]> = [
    ["2008-12-28", "2008-W52-7", "2008-12-22", "week 52, 22 to 28 Dec 2008"],
    ["2008-12-29", "2009-W01-1", "2008-12-29", "week 1 of 2009, 29 Dec 2008 to 4 Jan 2009"],
    ["2005-01-01", "2004-W53-6", "2004-12-27", "week 53 of 2004, 27 Dec 2004 to 2 Jan 2005"],
    ["2006-01-01", "2005-W52-7", "2005-12-26", "week 52 of 2005, 26 Dec 2005 to 1 Jan 2006"],
    ["2007-01-01", "2007-W01-1", "2007-01-01", "week 1, 1 to 7 Jan 2007"],
    ["2003-12-29", "2004-W01-1", "2003-12-29", "week 1 of 2004, 29 Dec 2003 to 4 Jan 2004"], // Python docs
    ["2004-01-04", "2004-W01-7", "2003-12-29", "week 1 of 2004, 29 Dec 2003 to 4 Jan 2004"], // Python docs
    ["2010-01-01", "2009-W53-5", "2009-12-28", "week 53 of 2009, 28 Dec 2009 to 3 Jan 2010"],
    ["2012-12-31", "2013-W01-1", "2012-12-31", "week 1 of 2013, 31 Dec 2012 to 6 Jan 2013"], // PostgreSQL docs
    ["2022-12-31", "2022-W52-6", "2022-12-26", "week 52 of 2022, 26 Dec 2022 to 1 Jan 2023"], // one copy prints 2023-W01-6: wrong
  ];
  it.each(table)("the week holding %s (%s) runs from %s: “%s”", (date, weekDate, monday, title) => {
    expect(formatIsoWeekDate(isoWeekDate(date))).toBe(weekDate);
    expect(addDays(date, 1 - isoWeekDate(date).day)).toBe(monday);
    expect(digestPeriodTitle(weekly(monday, addDays(monday, 6)))).toBe(title);
  });

  it("names ISO week 48 of 2026 as 23 to 29 November, not to the day the digest was sent", () => {
    // Our own example, from the issue: 2026-11-23 is a Monday (2026-W48-1), so week 48 ends on the 29th.
    expect(formatIsoWeekDate(isoWeekDate("2026-11-23"))).toBe("2026-W48-1");
    expect(digestPeriodTitle(weekly("2026-11-23", "2026-11-29"))).toBe("week 48, 23 to 29 Nov 2026");
  });
});

describe("digestPeriodTitle: a period in progress says “so far”", () => {
  it.each<[DigestPeriod, string]>([
    // Our own examples: a test digest sent on Friday 4 December 2026 covers week 49 from Monday 30 November.
    [weekly("2026-11-30", "2026-12-04", true), "week 49 so far, 30 Nov to 4 Dec 2026"],
    [weekly("2026-11-30", "2026-11-30", true), "week 49 so far, 30 Nov 2026"],
    // A monthly preview on 4 December covers December so far, never "November 2026".
    [monthly("2026-12-01", "2026-12-04", true), "December 2026 so far, 1 to 4 Dec 2026"],
    // A window that has not begun yet (opened at midnight exactly) counts as its first day.
    [monthly("2026-12-01", "2026-11-30", true), "December 2026 so far, 1 Dec 2026"],
  ])("%o → %s", (period, title) => {
    expect(digestPeriodTitle(period)).toBe(title);
  });
});

describe("digestPeriodTitle: anything else names its days", () => {
  it.each<[DigestPeriod, string]>([
    // Our own examples.
    [monthly("2026-11-01", "2026-11-30"), "November 2026"],
    [monthly("2024-02-01", "2024-02-29"), "February 2024"],
    // A weekly reader whose last digest was two weeks ago: the window is both weeks, said as days.
    [weekly("2026-11-16", "2026-11-29"), "16 to 29 Nov 2026"],
    // The defect in the issue: 23 November to 4 December is not week 48, and not finished.
    [weekly("2026-11-23", "2026-12-04", true), "23 Nov to 4 Dec 2026 so far"],
    // A monthly preview that starts where the reader's last digest ended, mid-month.
    [monthly("2026-11-01", "2026-12-04", true), "1 Nov to 4 Dec 2026 so far"],
    // A week that does not start on a Monday is not an ISO week.
    [weekly("2026-11-24", "2026-11-30"), "24 to 30 Nov 2026"],
    [{ frequency: "immediate", firstDay: "2026-12-04", lastDay: "2026-12-04", soFar: false }, "4 Dec 2026"],
  ])("%o → %s", (period, title) => {
    expect(digestPeriodTitle(period)).toBe(title);
  });

  it("writes each part of a range once and the year always", () => {
    expect(formatDayRange("2026-12-04", "2026-12-04")).toBe("4 Dec 2026");
    expect(formatDayRange("2026-11-23", "2026-11-29")).toBe("23 to 29 Nov 2026");
    expect(formatDayRange("2026-11-30", "2026-12-06")).toBe("30 Nov to 6 Dec 2026");
    expect(formatDayRange("2008-12-29", "2009-01-04")).toBe("29 Dec 2008 to 4 Jan 2009");
  });
});
