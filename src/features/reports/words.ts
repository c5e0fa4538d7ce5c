import { formatMonthYear } from "#shared/domain/locale-dates.ts";
import type { ReportListItem, ReportSection, ReportState } from "#shared/schemas/reports.ts";

/** A report's state by word and by shape: an open square for a draft, a filled disc once issued, a struck ring when superseded. */
export const STATE_LOOK: Record<ReportState, { word: string; shape: "square" | "disc" | "struck" }> = {
  draft: { word: "Draft", shape: "square" },
  issued: { word: "Issued", shape: "disc" },
  superseded: { word: "Superseded", shape: "struck" },
};

/** The sections' headings, the same words the PDF prints. */
export const SECTION_TITLE: Record<ReportSection, string> = {
  summary: "Summary",
  schedule: "Schedule",
  budget: "Budget",
  facility: "Facility readiness",
  risks: "Risks and issues",
  decisions: "Decisions needed",
  photos: "Photographs of the month",
  cautions: "Indicative figures and site safety",
};

/** `2026-11` → "November 2026". */
export const monthWords = (month: string): string => formatMonthYear(month);

/**
 * The months a draft may be made for: those that have ended by `today` (the project's date),
 * newest first, `count` of them. The server refuses a month still running; the picker never offers one.
 */
export function endedMonths(today: string, count = 12): string[] {
  const [y, m] = today.split("-").map(Number) as [number, number];
  return Array.from({ length: count }, (_, i) => {
    const d = new Date(Date.UTC(y, m - 2 - i, 1));
    return `${d.getUTCFullYear()}-${String(d.getUTCMonth() + 1).padStart(2, "0")}`;
  });
}

/** Newest month first; for one month, the latest issue (a correction) first. */
export function orderReports<T extends Pick<ReportListItem, "month" | "id">>(list: readonly T[]): T[] {
  return [...list].sort((a, b) => b.month.localeCompare(a.month) || b.id - a.id);
}

/** "12 working days late", "on the baseline", "3 working days early"; a dash when unknown. */
export function slipWords(days: number | null): string {
  if (days === null) return "—";
  if (days === 0) return "on the baseline";
  return `${Math.abs(days)} working day${Math.abs(days) === 1 ? "" : "s"} ${days > 0 ? "late" : "early"}`;
}

/** Days left to a decision at the month end: "12 days left", "Due on the month end", "3 days overdue". */
export function daysLeftWords(days: number): string {
  if (days === 0) return "Due on the month end";
  if (days < 0) return `${-days} day${days === -1 ? "" : "s"} overdue`;
  return `${days} day${days === 1 ? "" : "s"} left`;
}

export const TREND_WORD = { new: "New", rising: "Rising", falling: "Falling", steady: "Steady" } as const;
export const BAND_WORD = { low: "Low", medium: "Medium", high: "High", critical: "Critical" } as const;
export const MILESTONE_STATUS_WORD = { complete: "Complete", on_programme: "On programme", at_risk: "At risk", behind: "Behind" } as const;

/** "52.4%" */
export const percent = (v: number) => `${v.toFixed(1)}%`;
