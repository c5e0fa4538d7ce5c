import type { Milestone, ProgrammeHealthResponse } from "#shared/schemas/programme.ts";
import type { MilestoneEventFieldName } from "#shared/schemas/programme.ts";
import { milestoneFinish, type MilestoneStatus } from "#shared/domain/programme-health.ts";
import { formatMonthYear } from "#shared/domain/locale-dates.ts";

/** The statuses the health counts, in the order they are shown, each with its count's name. */
export const COUNTED_STATUSES: readonly { status: MilestoneStatus; count: keyof ProgrammeHealthResponse["counts"] }[] = [
  { status: "complete", count: "complete" },
  { status: "on_programme", count: "onProgramme" },
  { status: "at_risk", count: "atRisk" },
  { status: "behind", count: "behind" },
];

// One word per audience across the product (decision 056).
export { AUDIENCE_WORD } from "../../lib/words.ts";

export const FIELD_WORD: Record<MilestoneEventFieldName, string> = {
  forecast_finish: "Forecast finish",
  actual_finish: "Actual finish",
  percent_complete: "Percent complete",
  baseline_finish: "Baseline finish",
  audience: "Audience",
  planned_start: "Planned start",
  weight: "Weight",
  removed: "Removed from the programme",
};

const SMALL = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten", "eleven", "twelve"];

/** "two", "eleven", "14": small counts in words, as a person would write them. */
export function countInWords(n: number): string {
  return Number.isInteger(n) && n >= 0 && n < SMALL.length ? (SMALL[n] as string) : String(n);
}

/** "one week", "three weeks". */
function unit(n: number, one: string, many: string): string {
  return n === 1 ? `a ${one}` : `${countInWords(n)} ${many}`;
}

/**
 * A slip in calendar days as plain words relative to the plan: "on the planned date",
 * "3 days later than planned", "two weeks later than planned", "about two months
 * earlier than planned". Weeks from 7 days, months (of 30.44 days) from 8 weeks.
 */
export function slipInWords(days: number): string {
  if (days === 0) return "on the planned date";
  const dir = days > 0 ? "later" : "earlier";
  const d = Math.abs(days);
  if (d < 7) return `${unit(d, "day", "days")} ${dir} than planned`;
  if (d < 56) {
    const weeks = Math.round(d / 7);
    const exact = d % 7 === 0;
    return `${exact ? "" : "about "}${unit(weeks, "week", "weeks")} ${dir} than planned`;
  }
  const months = Math.round(d / 30.44);
  return `about ${unit(months, "month", "months")} ${dir} than planned`;
}

/** "+12 d" / "−3 d" / "0 d" for tables, where space is short. */
export function signedDays(days: number): string {
  if (days === 0) return "0 d";
  return `${days > 0 ? "+" : "−"}${Math.abs(days)} d`;
}

/** "62.4%" (one decimal; the figures are weighted averages, more digits would be noise). */
export function formatPercent(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  return `${p.toFixed(1)}%`;
}

/** An index such as SPI or CPI to two decimals, or a dash when undefined. */
export function formatIndex(v: number | null | undefined): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  return v.toFixed(2);
}

// Money is worded once for every feature (the investor room's cost, risks and decisions too).
export { formatMoney } from "../../lib/format.ts";

/** Whether a milestone marks a space becoming ready for service (the dates prospects care about). */
export function isReadyForService(m: Pick<Milestone, "name">): boolean {
  return /ready for service/i.test(m.name);
}

/**
 * The one line a visitor reads first, from the public milestones only, in plain
 * words: "7 of 12 public milestones complete; Hall 2A ready for service is forecast
 * for March 2027, two weeks later than planned". The milestone named is the next
 * open "ready for service" one, else the last open one.
 */
export function describePublicProgress(milestones: readonly Milestone[]): string {
  if (milestones.length === 0) return "No public milestones have been published yet.";
  const complete = milestones.filter((m) => m.actualFinish !== null).length;
  const head = `${complete} of ${milestones.length} public milestone${milestones.length === 1 ? "" : "s"} complete`;
  const open = milestones.filter((m) => m.actualFinish === null);
  if (open.length === 0) return `${head}: every published milestone is done.`;
  const byFinish = [...open].sort((a, b) => milestoneFinish(a).localeCompare(milestoneFinish(b)) || a.id - b.id);
  const next = byFinish.find(isReadyForService) ?? (byFinish[byFinish.length - 1] as Milestone);
  const when = formatMonthYear(milestoneFinish(next));
  const slip = next.slipDays === 0 ? "as planned" : slipInWords(next.slipDays);
  return `${head}; ${next.name} is forecast for ${when}, ${slip}.`;
}
