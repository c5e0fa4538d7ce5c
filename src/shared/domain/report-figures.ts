import type { BudgetPosition } from "../schemas/budget.ts";
import type { FacilityAnswer } from "../schemas/facility.ts";
import type { ReportState } from "../schemas/reports.ts";
import type { RiskBand, RiskKind, RiskSummary, RiskTrend } from "../schemas/risks.ts";

/**
 * The figures of a monthly report: the ONE object both the PDF (server/reports/reports.pdf.ts) and
 * the investor room's web page are drawn from, so the two can never disagree. Every figure is the
 * record as it stood at `monthEnd` (the last moment of the month in the project's time zone); an
 * issued report keeps this object frozen as JSON. Dates are `YYYY-MM-DD`, instants ISO 8601, money
 * integer minor units of `project.currency`.
 */
export interface ReportFigures {
  project: { slug: string; name: string; operatorName: string; currency: string; timeZone: string };
  /** YYYY-MM. */
  month: string;
  /** The month's last day, YYYY-MM-DD (the figures are as at its end, project time zone). */
  monthEnd: string;
  /** The instant the figures were computed for: the end of `monthEnd` in the project's time zone. */
  asAt: string;
  state: ReportState;
  /** When these figures were computed (for a draft: now; for an issued report: at issue). */
  computedAt: string;
  summary: ReportSummary;
  schedule: ReportSchedule;
  budget: ReportBudget;
  facility: ReportFacility;
  risks: ReportRisks;
  decisions: ReportDecision[];
  photos: ReportPhoto[];
  cautions: { indicative: string; site: string };
  /** The appendix: every milestone the report's audience may see, as at the month end. */
  milestones: ReportMilestoneRow[];
}

export interface ReportBlockLine {
  name: string;
  baselineReadyDate: string | null;
  forecastReadyDate: string | null;
  /** Positive: late; null when either date is unknown. */
  slipWorkingDays: number | null;
  readyForService: boolean;
}

export interface ReportTopRisk {
  reference: string;
  title: string;
  kind: RiskKind;
  band: RiskBand;
  score: number;
  /** Against the score a month earlier (the report's month start). */
  trend: RiskTrend;
}

export interface ReportDecision {
  reference: string;
  title: string;
  question: string;
  decider: string;
  neededBy: string;
  /** Days from the month end to neededBy (negative: overdue at the month end). */
  daysLeft: number;
  recommendation: string;
}

export interface ReportSummary {
  /** Weighted percent complete, 0–100. */
  percentComplete: number;
  /** Weighted planned percent at the month end, 0–100. */
  plannedPercent: number;
  spi: number | null;
  spiT: number | null;
  /** One sentence each, in plain words. */
  spiSentence: string;
  spiTSentence: string;
  /** The whole report in a few plain sentences (what a reader who stops at page one should know). */
  headline: string[];
  blocks: ReportBlockLine[];
  budget: { currentBudget: number; projectedFinalCost: number | null; contingencyRemaining: number; sentence: string };
  /** The three highest-scoring open risks and issues. */
  topRisks: ReportTopRisk[];
  openDecisions: Array<Pick<ReportDecision, "reference" | "title" | "neededBy" | "daysLeft">>;
}

export interface ReportTrendPoint {
  /** A past month end (YYYY-MM-DD), oldest first, the report's month end last. */
  monthEnd: string;
  /** The milestone's forecast (or actual) finish as the record stood then; null before it existed. */
  forecast: string | null;
}

export interface ReportSchedule {
  completedInMonth: Array<{ name: string; actualFinish: string; baselineFinish: string | null }>;
  dueNextMonth: Array<{ name: string; forecastFinish: string; baselineFinish: string | null }>;
  /** The slip chart: late or early milestones by working days (positive: late). */
  slips: Array<{ name: string; baselineFinish: string | null; forecastFinish: string; slipWorkingDays: number }>;
  /** For each late block, the chain of milestones (names, first to last) that sets its date. */
  drivers: Array<{ block: string; chain: string[] }>;
  /** Milestone trend chart: each key milestone's forecast at each past month end. */
  trend: Array<{ milestone: string; baseline: string | null; points: ReportTrendPoint[] }>;
  /** IEAC(t) in weeks, and the completion date it implies; null when undefined. */
  ieacT: number | null;
  ieacTCompletion: string | null;
  baselineCompletion: string | null;
  forecastCompletion: string | null;
}

export interface ReportBudget {
  currency: string;
  originalBudget: number;
  approvedChanges: number;
  currentBudget: number;
  projectedFinalCost: number | null;
  /** Original → each approved change → current → projected final (the chart). */
  walk: BudgetPosition["walk"];
  /** The EAC variants with their sentences and formulas. */
  eac: BudgetPosition["eac"];
  projectedFinalCostMethod: BudgetPosition["projectedFinalCostMethod"];
  contingency: { held: number; drawn: number; remaining: number };
  cpi: number | null;
  spi: number | null;
  caution: string;
}

export interface ReportFacility {
  /** Capacity ramp: racks and kW, baseline against forecast. */
  ramp: FacilityAnswer["ramp"];
  blocks: ReportBlockLine[];
  /** Redundancy per system: design label against the label the available units give now. */
  systems: Array<{ name: string; kind: string; design: string; now: string; summary: string; carriesLoad: boolean }>;
  availableFromLevel: number;
}

export interface ReportRisks {
  /** Up to ten open risks and issues, highest score first, each with its trend over the month. */
  top: Array<ReportTopRisk & { owner: string; category: string; action: string }>;
  /** Likelihood × impact grid of open risks at the month end. */
  grid: RiskSummary["grid"];
  scale: RiskSummary["scale"];
  openRisks: number;
  openIssues: number;
}

/**
 * A photograph of the month: cleared, visible to the report's audience, taken in the month.
 * `imagePath` is the MEDIA STORAGE KEY of the photo's JPEG derivative (≤ 1600 px wide, e.g.
 * `variants/<hash>-1600w.jpg`): the PDF reads its bytes with `MediaStorage.get(imagePath)` (the
 * reports service hands the renderer a loader); `url` is the same derivative for the web page.
 */
export interface ReportPhoto {
  mediaId: number;
  caption: string;
  alt: string;
  /** YYYY-MM-DD in the project's time zone. */
  takenOn: string;
  imagePath: string;
  url: string;
  width: number;
  height: number;
}

export interface ReportMilestoneRow {
  name: string;
  system: string;
  baselineFinish: string | null;
  forecastFinish: string | null;
  actualFinish: string | null;
  slipWorkingDays: number;
  status: "complete" | "on_programme" | "at_risk" | "behind";
}

/** The site-safety note every report carries (the product's words). */
export const SITE_SAFETY_NOTE =
  "The construction site is a controlled workplace. Photographs are taken under the site's safety rules by people inducted to it; " +
  "nothing in this report is an invitation to visit. Visits are arranged through the project team and follow the site induction.";

/** Reads a photo's bytes by its `imagePath` (null when missing): what the PDF renderer is given. */
export type ReportImageLoader = (imagePath: string) => Promise<Uint8Array | null>;

/** The last day of a YYYY-MM month, YYYY-MM-DD. */
export function monthEndOf(month: string): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  const last = new Date(Date.UTC(y, m, 0)).getUTCDate();
  return `${month}-${String(last).padStart(2, "0")}`;
}

/** The month before a YYYY-MM month. */
export function previousMonth(month: string): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  return m === 1 ? `${y - 1}-12` : `${y}-${String(m - 1).padStart(2, "0")}`;
}

/** The month after a YYYY-MM month. */
export function nextMonth(month: string): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  return m === 12 ? `${y + 1}-01` : `${y}-${String(m + 1).padStart(2, "0")}`;
}

/** Month ends from `fromMonth` to `toMonth` inclusive (YYYY-MM-DD), oldest first. */
export function monthEndsBetween(fromMonth: string, toMonth: string): string[] {
  const out: string[] = [];
  for (let m = fromMonth; m <= toMonth; m = nextMonth(m)) out.push(monthEndOf(m));
  return out;
}

/** "SPI 0.94: for every week of work planned by the month end, 0.94 weeks' worth was done." */
export function spiSentence(spi: number | null): string {
  if (spi === null) return "SPI is not yet defined: nothing was planned to be done by the month end.";
  const f = spi.toFixed(2);
  if (spi >= 1) return `SPI ${f}: work is at or ahead of the plan by value — ${f} of each unit planned by the month end was earned.`;
  return `SPI ${f}: less work was done than planned — ${f} of each unit planned by the month end was earned.`;
}

/** SPI(t) in plain words: time-based, so it keeps meaning near the end of the build. */
export function spiTSentence(spiT: number | null): string {
  if (spiT === null) return "SPI(t) is not yet defined: the programme had not started by the month end.";
  const f = spiT.toFixed(2);
  if (spiT >= 1) return `SPI(t) ${f}: measured in time, the build is keeping pace with the baseline.`;
  return `SPI(t) ${f}: measured in time, each week brought ${f} of a week's planned progress.`;
}
