import { describe, expect, it } from "vitest";
import { DATE_ERROR, formatLongDate, formatShortDate, formatTypedDate, parseTypedDate, parseTypedTime, typedDatePattern } from "#shared/domain/locale-dates.ts";
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
