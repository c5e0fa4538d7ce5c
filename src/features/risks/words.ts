import type { ActionStatus, RiskBand, RiskCategory, RiskKind, RiskStatus, RiskTrend } from "#shared/schemas/risks.ts";

export const CATEGORY_WORD: Record<RiskCategory, string> = {
  programme: "Programme",
  cost: "Cost",
  supply_chain: "Supply chain",
  technical: "Technical",
  commercial: "Commercial",
  safety: "Safety",
  regulatory: "Regulatory",
  other: "Other",
};

export const KIND_WORD: Record<RiskKind, string> = { risk: "Risk", issue: "Issue" };

/** A risk's status; an issue is only ever open or closed. */
export const STATUS_WORD: Record<RiskStatus, string> = { open: "Open", closed: "Closed", became_issue: "Became an issue" };

export const ACTION_WORD: Record<ActionStatus, string> = { planned: "Planned", in_progress: "Under way", done: "Done", dropped: "Dropped" };

export const BAND_WORD: Record<RiskBand, string> = { low: "Low", medium: "Medium", high: "High", critical: "Critical" };
export const BAND_ORDER: readonly RiskBand[] = ["low", "medium", "high", "critical"];

/** The trend over the reporting window, as a word; the arrow beside it is its shape. */
export const TREND_WORD: Record<RiskTrend, string> = { rising: "Rising", falling: "Falling", steady: "Steady", new: "New" };

/** What a change in a risk's history was about, in words. */
export const EVENT_FIELD_WORD: Record<string, string> = {
  created: "Raised",
  likelihood: "Likelihood",
  impact: "Impact",
  score: "Score",
  status: "Status",
  ownerId: "Owner",
  owner: "Owner",
  title: "Title",
  audience: "Audience",
  became_issue: "Became an issue",
  mitigation: "Action",
  costExposure: "Cost exposure",
  scheduleDays: "Schedule exposure",
};

/** "12 wd": schedule exposure in working days, or a dash. */
export function workingDays(days: number | null): string {
  return days === null ? "—" : `${days} wd`;
}

/** "40%": a probability as people say it. */
export function percentOf(p: number): string {
  return `${Math.round(p * 100)}%`;
}
