import { describe, expect, it } from "vitest";
import { digestPeriodTitle } from "#shared/domain/digest-period.ts";
import { DATE_ERROR, formatAxisMonth, formatDayOfInstant, formatDayRange, formatInstant, formatLocalDateTime, formatLongDate, formatMonthYear, formatShortDate, formatTypedDate, parseTypedDate, parseTypedTime, typedDatePattern } from "#shared/domain/locale-dates.ts";
import { CalendarDateSchema } from "#shared/schemas/common.ts";

// Source: CLDR en-GB date patterns, as Node 20's Intl.DateTimeFormat("en-GB") prints them
// (the reference library each expectation is compared against below).
const reference = (iso: string, options: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat("en-GB", { ...options, timeZone: "UTC" }).format(new Date(`${iso}T00:00:00Z`));

describe("dates in the project's locale", () => {
  it.each(["2027-01-15", "2026-09-01", "2028-02-29", "2026-12-31"])("formats %s as the en-GB short, long and numeric forms", (iso) => {
    expect(formatShortDate(iso)).toBe(reference(iso, { day: "numeric", month: "short", year: "numeric" }));
    expect(formatLongDate(iso)).toBe(reference(iso, { day: "numeric", month: "long", year: "numeric" }));
    expect(formatTypedDate(iso)).toBe(reference(iso, { day: "2-digit", month: "2-digit", year: "numeric" }));
  });

  it("writes the demo's example as people read it", () => {
    expect(formatShortDate("2027-01-15")).toBe("15 Jan 2027");
    expect(formatLongDate("2027-01-15")).toBe("15 January 2027");
    expect(formatTypedDate("2027-01-15")).toBe("15/01/2027");
    expect(typedDatePattern()).toBe("dd/mm/yyyy");
    expect(DATE_ERROR).toBe("Enter a date, for example 15 January 2027");
  });

  it.each([
    ["15/01/2027", "2027-01-15"],
    ["15/1/2027", "2027-01-15"],
    ["5.3.2027", "2027-03-05"],
    ["15-01-2027", "2027-01-15"],
    ["15/01/27", "2027-01-15"],
    ["15 Jan 2027", "2027-01-15"],
    ["15 January 2027", "2027-01-15"],
    ["15 january 2027", "2027-01-15"],
    ["15th January 2027", "2027-01-15"],
    ["1 Sept 2026", "2026-09-01"],
    ["1 Sep 2026", "2026-09-01"],
    ["January 15, 2027", "2027-01-15"],
    ["2027-01-15", "2027-01-15"],
    ["  29/02/2028 ", "2028-02-29"],
  ])("reads %j as %s", (typed, iso) => {
    expect(parseTypedDate(typed)).toBe(iso);
  });

  it("reads back every day it writes, in all three forms", () => {
    for (let d = new Date(Date.UTC(2026, 0, 1)); d < new Date(Date.UTC(2029, 0, 1)); d = new Date(d.getTime() + 86_400_000 * 3)) {
      const iso = d.toISOString().slice(0, 10);
      expect(parseTypedDate(formatTypedDate(iso))).toBe(iso);
      expect(parseTypedDate(formatShortDate(iso))).toBe(iso);
      expect(parseTypedDate(formatLongDate(iso))).toBe(iso);
    }
  });

  // A month-first date is not guessed at: 01/15/2027 has no 15th month in en-GB.
  it.each(["01/15/2027", "31/02/2027", "29/02/2027", "2027-02-30", "15 Smarch 2027", "15/01", "tomorrow", "", "15/01/202", "00/01/2027"])("refuses %j", (typed) => {
    expect(parseTypedDate(typed)).toBeNull();
  });

  it("reads times on the 24-hour clock", () => {
    expect(parseTypedTime("9:30")).toBe("09:30");
    expect(parseTypedTime("0930")).toBe("09:30");
    expect(parseTypedTime("23.05")).toBe("23:05");
    expect(parseTypedTime("24:00")).toBeNull();
    expect(parseTypedTime("9:30 pm")).toBeNull();
  });

  it("gives the same sentence from the shared schema for text that is not a date and for a day that does not exist", () => {
    for (const bad of ["15/01/2027", "2027-02-30", "soon"]) {
      const r = CalendarDateSchema.safeParse(bad);
      expect(r.success).toBe(false);
      expect(r.error?.issues[0]?.message).toBe("Enter a date, for example 15 January 2027");
    }
    expect(CalendarDateSchema.safeParse("2027-01-15").success).toBe(true);
  });
});

describe("months, ranges, camera times and instants, in the same words", () => {
  it.each(["2026-01-01", "2026-06-15", "2026-09-30", "2027-12-31"])("names the month of %s as the en-GB long and chart forms", (iso) => {
    expect(formatMonthYear(iso)).toBe(reference(iso, { month: "long", year: "numeric" }));
    expect(formatMonthYear(iso.slice(0, 7))).toBe(reference(iso, { month: "long", year: "numeric" }));
    expect(formatAxisMonth(iso)).toBe(reference(iso, { month: "short", year: "2-digit" }));
    // The same label for the day number charts plot on (days since 1970-01-01).
    expect(formatAxisMonth(Date.parse(`${iso}T00:00:00Z`) / 86_400_000)).toBe(formatAxisMonth(iso));
  });

  it("writes September as en-GB does, in every form (CLDR's \"Sept\", as Node 20's ICU prints it)", () => {
    expect(formatShortDate("2026-09-14")).toBe("14 Sept 2026");
    expect(formatAxisMonth("2026-09-01")).toBe("Sept 26");
    expect(formatDayRange("2026-09-07", "2026-09-13")).toBe("7 to 13 Sept 2026");
    expect(formatLocalDateTime("2026-09-14T10:20:33")).toBe("14 Sept 2026, 10:20");
  });

  it("a digest's window is named with the pages' month words", () => {
    // Week 37 of 2026 runs Monday 7 to Sunday 13 September (ISO 8601 week date; common practice).
    const title = digestPeriodTitle({ frequency: "weekly", firstDay: "2026-09-07", lastDay: "2026-09-13", soFar: false });
    expect(title).toBe("week 37, 7 to 13 Sept 2026");
    expect(title.endsWith(formatShortDate("2026-09-13"))).toBe(true);
    expect(digestPeriodTitle({ frequency: "monthly", firstDay: "2026-09-01", lastDay: "2026-09-30", soFar: false })).toBe(formatMonthYear("2026-09"));
  });

  it("reads a camera's local time as it stands, with no zone applied", () => {
    expect(formatLocalDateTime("2026-03-14T10:20")).toBe("14 Mar 2026, 10:20");
    expect(formatLocalDateTime("2026-03-14T23:59:59+09:00")).toBe("14 Mar 2026, 23:59");
    expect(formatLocalDateTime("2026-02-30T10:00")).toBeNull();
    expect(formatLocalDateTime("14/03/2026 10:20")).toBeNull();
  });

  it("puts an instant on the project's clock, the zone shown", () => {
    // Source: IANA tz database — the UK's summer time in 2026 runs 29 March 01:00 UTC to 25 October 01:00 UTC.
    expect(formatInstant("2026-03-14T10:20:00Z", "Europe/London")).toBe("14 Mar 2026, 10:20 GMT");
    expect(formatInstant("2026-07-14T10:20:00Z", "Europe/London")).toBe("14 Jul 2026, 11:20 BST");
    expect(formatInstant(new Date("2026-07-14T10:20:00Z"), "Europe/London", "long")).toBe("14 July 2026, 11:20 BST");
    // 23:30 UTC on 14 July is already the 15th in Singapore (UTC+8, no summer time).
    expect(formatDayOfInstant("2026-07-14T23:30:00Z", "Asia/Singapore")).toBe("15 July 2026");
    expect(formatDayOfInstant("2026-07-14T23:30:00Z", "Europe/London")).toBe("15 July 2026");
    expect(formatDayOfInstant("2026-07-14T22:30:00Z", "Europe/London")).toBe("14 July 2026");
  });
});

