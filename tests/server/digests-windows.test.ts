import { describe, expect, it } from "vitest";
import { isoWeekDate, monthlySendTime, previousIsoWeek, previousMonth, sendTimes, weeklySendTime } from "../../server/digests/digests.windows.ts";

const LONDON = "Europe/London";
const HOUR = 3_600_000;

describe("ISO 8601 week dates", () => {
  // Source: CHECKS.md "ISO 8601 week dates" (ISO 8601; the "ISO week date" encyclopaedia table,
  // the Python datetime.isocalendar documentation, the PostgreSQL documentation).
  const table: Array<[string, string]> = [
    ["2008-12-28", "2008-W52-7"],
    ["2008-12-29", "2009-W01-1"],
    ["2005-01-01", "2004-W53-6"],
    ["2006-01-01", "2005-W52-7"],
    ["2007-01-01", "2007-W01-1"],
    ["2003-12-29", "2004-W01-1"],
    ["2004-01-04", "2004-W01-7"],
    ["2010-01-01", "2009-W53-5"],
    ["2012-12-31", "2013-W01-1"],
    ["2022-12-31", "2022-W52-6"],
  ];
  it.each(table)("%s is %s", (date, week) => {
    expect(isoWeekDate(date)).toBe(week);
  });

  it("a weekly run's window is the previous ISO week, Monday to Monday, named by its week", () => {
    // Source: CHECKS.md — 2008-12-29 is 2009-W01-1, so a run on Monday 2009-01-05 covers 2009-W01
    // (from 2008-12-29); the window crosses the calendar year as ISO weeks do.
    const w = previousIsoWeek(new Date("2009-01-05T09:00:00Z"), "UTC");
    expect(w.label).toBe("2009-W01");
    expect(w.start.toISOString()).toBe("2008-12-29T00:00:00.000Z");
    expect(w.end.toISOString()).toBe("2009-01-05T00:00:00.000Z");
    // Source: CHECKS.md — 2005-01-01 is 2004-W53-6: the week holding it is week 53 of 2004.
    const w53 = previousIsoWeek(new Date("2005-01-03T08:00:00Z"), "UTC");
    expect(w53.label).toBe("2004-W53");
    expect(w53.start.toISOString()).toBe("2004-12-27T00:00:00.000Z");
    // Source: CHECKS.md — 2010-01-01 is 2009-W53-5; the week from Monday 2009-12-28 is 2009-W53.
    expect(previousIsoWeek(new Date("2010-01-04T08:00:00Z"), "UTC").label).toBe("2009-W53");
  });
});

describe("Europe/London across daylight-saving changes", () => {
  // Source: Directive 2000/84/EC arts. 2–3 and the UK Summer Time Order 2002: summer time begins
  // at 01:00 UTC on the last Sunday of March and ends at 01:00 UTC on the last Sunday of October.
  // In 2026 those Sundays are 29 March and 25 October (derived below from the UTC calendar).
  it("the 2026 change days are the last Sundays of March and October", () => {
    expect(new Date(Date.UTC(2026, 2, 29)).getUTCDay()).toBe(0);
    expect(new Date(Date.UTC(2026, 2, 29 + 7)).getUTCMonth()).toBe(3);
    expect(new Date(Date.UTC(2026, 9, 25)).getUTCDay()).toBe(0);
    expect(new Date(Date.UTC(2026, 9, 25 + 7)).getUTCMonth()).toBe(10);
  });

  it("Monday 08:00 local is 08:00 UTC before the March change and 07:00 UTC after it", () => {
    expect(weeklySendTime(new Date("2026-03-25T12:00:00Z"), LONDON).toISOString()).toBe("2026-03-23T08:00:00.000Z");
    expect(weeklySendTime(new Date("2026-04-01T12:00:00Z"), LONDON).toISOString()).toBe("2026-03-30T07:00:00.000Z");
  });

  it("Monday 08:00 local is 07:00 UTC before the October change and 08:00 UTC after it", () => {
    expect(weeklySendTime(new Date("2026-10-21T12:00:00Z"), LONDON).toISOString()).toBe("2026-10-19T07:00:00.000Z");
    expect(weeklySendTime(new Date("2026-10-28T12:00:00Z"), LONDON).toISOString()).toBe("2026-10-26T08:00:00.000Z");
  });

  it("the weeks holding the changes are 167 and 169 hours long, midnight to midnight local", () => {
    const spring = previousIsoWeek(new Date("2026-03-30T07:00:00Z"), LONDON);
    expect(spring.start.toISOString()).toBe("2026-03-23T00:00:00.000Z");
    expect(spring.end.toISOString()).toBe("2026-03-29T23:00:00.000Z");
    expect((spring.end.getTime() - spring.start.getTime()) / HOUR).toBe(167);
    const autumn = previousIsoWeek(new Date("2026-10-26T08:00:00Z"), LONDON);
    expect(autumn.start.toISOString()).toBe("2026-10-18T23:00:00.000Z");
    expect(autumn.end.toISOString()).toBe("2026-10-26T00:00:00.000Z");
    expect((autumn.end.getTime() - autumn.start.getTime()) / HOUR).toBe(169);
  });

  it("a run is due from 08:00 local on the Monday, not a minute before", () => {
    const justBefore = sendTimes("weekly", new Date("2026-03-30T06:59:00Z"), LONDON);
    expect(justBefore.due.toISOString()).toBe("2026-03-23T08:00:00.000Z");
    expect(justBefore.next.toISOString()).toBe("2026-03-30T07:00:00.000Z");
    const at = sendTimes("weekly", new Date("2026-03-30T07:00:00Z"), LONDON);
    expect(at.due.toISOString()).toBe("2026-03-30T07:00:00.000Z");
    expect(at.next.toISOString()).toBe("2026-04-06T07:00:00.000Z");
    const autumn = sendTimes("weekly", new Date("2026-10-26T07:30:00Z"), LONDON);
    expect(autumn.next.toISOString()).toBe("2026-10-26T08:00:00.000Z");
  });
});

describe("monthly runs", () => {
  it("go out at 08:00 local on the first working day, for the previous calendar month", () => {
    // 1 August 2026 is a Saturday (derived): the first working day is Monday 3 August, in summer time.
    expect(new Date(Date.UTC(2026, 7, 1)).getUTCDay()).toBe(6);
    expect(monthlySendTime(new Date("2026-08-20T12:00:00Z"), LONDON).toISOString()).toBe("2026-08-03T07:00:00.000Z");
    // 1 November 2026 is a Sunday (derived): Monday 2 November, after the change back to GMT.
    expect(new Date(Date.UTC(2026, 10, 1)).getUTCDay()).toBe(0);
    expect(monthlySendTime(new Date("2026-11-20T12:00:00Z"), LONDON).toISOString()).toBe("2026-11-02T08:00:00.000Z");
    const w = previousMonth(new Date("2026-11-02T08:00:00Z"), LONDON);
    expect(w.label).toBe("2026-10");
    // October 2026 in London: 1 October 00:00 BST to 1 November 00:00 GMT, 31 days and one hour.
    expect(w.start.toISOString()).toBe("2026-09-30T23:00:00.000Z");
    expect(w.end.toISOString()).toBe("2026-11-01T00:00:00.000Z");
    expect((w.end.getTime() - w.start.getTime()) / HOUR).toBe(31 * 24 + 1);
  });

  it("a project elsewhere keeps its own zone: Monday 08:00 in New York after its November change", () => {
    // Source: US Energy Policy Act of 2005 §110 — daylight time ends the first Sunday of November
    // (1 November 2026), so Monday 2 November 08:00 EST is 13:00 UTC.
    expect(weeklySendTime(new Date("2026-11-04T12:00:00Z"), "America/New_York").toISOString()).toBe("2026-11-02T13:00:00.000Z");
    expect(weeklySendTime(new Date("2026-10-28T12:00:00Z"), "America/New_York").toISOString()).toBe("2026-10-26T12:00:00.000Z");
  });
});

describe("monthly send time on the project's working calendar", () => {
  it("skips the project's holidays as well as weekends", () => {
    const monthly = monthlySendTime;
    // Our own example: 1 Mar 2027 is a Monday; with it declared a holiday the run moves to Tuesday 2 Mar.
    // Europe/London is on GMT in early March, so 08:00 local is 08:00 UTC.
    const plain = monthly(new Date("2027-03-15T12:00:00Z"), LONDON);
    expect(plain.toISOString()).toBe("2027-03-01T08:00:00.000Z");
    const withHoliday = monthly(new Date("2027-03-15T12:00:00Z"), LONDON, { weekendDays: [6, 7], holidays: ["2027-03-01"] });
    expect(withHoliday.toISOString()).toBe("2027-03-02T08:00:00.000Z");
    // 1 Jan 2027 is a Friday and a holiday in the demo calendar; the next working day is Monday 4 Jan.
    const newYear = monthly(new Date("2027-01-20T12:00:00Z"), LONDON, { weekendDays: [6, 7], holidays: ["2027-01-01"] });
    expect(newYear.toISOString()).toBe("2027-01-04T08:00:00.000Z");
  });
});
