/**
 * Programme health at a date: weighted percent complete against planned percent,
 * earned value in weight units (and in money where milestones carry budgets), earned
 * schedule over weekly periods, slip and status per milestone, and forecast completion.
 *
 * Pure: the evaluation date is passed in, nothing is read from a clock, a database or
 * the network. The server calls this for the health endpoint; the site office calls it
 * in the browser to preview an edit before saving it.
 */
import {
  addDays,
  daysBetween,
  fromDayNumber,
  startOfIsoWeek,
  toDayNumber,
  workingDaysBetween,
  type CalendarDate,
  type WorkingCalendar,
} from "./calendar.ts";
import { computeEarnedSchedule } from "./earned-schedule.ts";
import { computeEarnedValue } from "./earned-value.ts";

/** A milestone as the computation sees it. Dates are `YYYY-MM-DD`. */
export interface MilestoneInput {
  id: number;
  name: string;
  /** Relative weight (> 0) in the programme's percent complete. */
  weight: number;
  /** 0–100; ignored (taken as 100) once `actualFinish` is set. */
  percentComplete: number;
  /** Optional: without it (or when it is not before the baseline finish) the milestone is a point in time. */
  plannedStart: CalendarDate | null;
  baselineFinish: CalendarDate;
  forecastFinish: CalendarDate | null;
  actualFinish: CalendarDate | null;
  /** Budget in minor units of the project's currency. */
  budget?: number | null;
  /** Ids of finish-to-start predecessors. */
  dependsOn?: number[];
}

/** The project settings the health figures depend on. */
export interface ProgrammeSettings {
  /** Slip in working days up to which a milestone is still on programme. */
  toleranceWorkingDays: number;
  /** Slip in working days beyond which a milestone is behind (larger than the tolerance). */
  behindWorkingDays: number;
  calendar: WorkingCalendar;
}

/** Actual cost booked for a period, in minor units; counted once `periodEnd` ≤ the status date. */
export interface CostActual {
  periodEnd: CalendarDate;
  amount: number;
}

export type MilestoneStatus = "complete" | "on_programme" | "at_risk" | "behind";

export interface MilestoneSlip {
  /** Calendar days from the baseline finish to the actual (else forecast) finish; positive = later. */
  slipDays: number;
  /** The same slip in working days of the project's calendar. */
  slipWorkingDays: number;
}

export interface ProgrammeHealthInput {
  milestones: readonly MilestoneInput[];
  /** Status date. */
  at: CalendarDate;
  settings: ProgrammeSettings;
  costActuals?: readonly CostActual[];
  currency?: string | null;
}

/** Earned value in money (minor units, unrounded). */
export interface MoneyHealth {
  bac: number;
  pv: number;
  ev: number;
  /** Sum of cost actuals with period end ≤ the status date; null when no cost actuals were given. */
  ac: number | null;
  sv: number;
  cv: number | null;
  spi: number | null;
  cpi: number | null;
  eac: number | null;
  etc: number | null;
  vac: number | null;
  tcpi: number | null;
  currency: string | null;
}

/** Earned schedule over weekly periods; times in weeks from `start`. */
export interface EarnedScheduleHealth {
  es: number | null;
  svT: number | null;
  spiT: number | null;
  ieacT: number | null;
  tspi: number | null;
  /** Weeks from `start` to the status date (fractions allowed; negative before the start). */
  actualTime: number | null;
  /** Weeks from `start` to the latest baseline finish. */
  plannedDuration: number | null;
  periodWeeks: 1;
  /** Monday of the ISO week of the earliest planned start; null for an empty programme. */
  start: CalendarDate | null;
}

export interface MilestoneHealth {
  id: number;
  status: MilestoneStatus;
  slipDays: number;
  slipWorkingDays: number;
  /** Planned percent (0–100) of this milestone at the status date. */
  plannedPercent: number;
}

/**
 * Said beside the headline figures wherever a page or message lists only some milestones: the
 * figures are computed over every milestone of the programme, for every reader (decision 004).
 */
export const WHOLE_PROGRAMME_NOTE = "These figures cover the whole programme, including work not listed here.";

export interface ProgrammeHealth {
  at: CalendarDate;
  /** Weighted percent complete, 0–100. */
  percentComplete: number;
  /** Weighted planned percent at `at`, 0–100. */
  plannedPercent: number;
  /** Planned value in weight units. */
  pv: number;
  /** Earned value in weight units. */
  ev: number;
  /** SV = EV − PV, weight units. */
  sv: number;
  /** SPI = EV / PV; null when nothing was planned by `at`. */
  spi: number | null;
  /** Money figures; null unless at least one milestone has a budget. */
  money: MoneyHealth | null;
  earnedSchedule: EarnedScheduleHealth;
  /** Latest of each milestone's actual, else forecast, else baseline finish; null when empty. */
  forecastCompletion: CalendarDate | null;
  /** Latest baseline finish; null when empty. */
  baselineCompletion: CalendarDate | null;
  /** Calendar days from baseline completion to forecast completion; null when empty. */
  completionSlipDays: number | null;
  /** Start + IEAC(t) weeks, to the nearest day; null when IEAC(t) is undefined. */
  earnedScheduleCompletion: CalendarDate | null;
  counts: { complete: number; onProgramme: number; atRisk: number; behind: number };
  milestones: MilestoneHealth[];
}

/** The date a milestone is now expected to finish (or did): actual, else forecast, else baseline. */
export function milestoneFinish(m: Pick<MilestoneInput, "baselineFinish" | "forecastFinish" | "actualFinish">): CalendarDate {
  return m.actualFinish ?? m.forecastFinish ?? m.baselineFinish;
}

/**
 * Slip of a milestone: (actual ?? forecast ?? baseline finish) − baseline finish, in
 * calendar days and in working days of the project's calendar (see
 * `workingDaysBetween` for how a span is counted). Positive = later than baseline.
 */
export function milestoneSlip(m: MilestoneInput, settings: ProgrammeSettings): MilestoneSlip {
  const finish = milestoneFinish(m);
  return {
    slipDays: daysBetween(m.baselineFinish, finish),
    slipWorkingDays: workingDaysBetween(m.baselineFinish, finish, settings.calendar),
  };
}

function statusFromSlip(
  m: MilestoneInput,
  atDay: number,
  slipWorkingDays: number,
  settings: ProgrammeSettings,
): MilestoneStatus {
  if (m.actualFinish !== null) return "complete";
  const forecast = m.forecastFinish ?? m.baselineFinish;
  if (toDayNumber(forecast) < atDay || slipWorkingDays > settings.behindWorkingDays) return "behind";
  if (slipWorkingDays > settings.toleranceWorkingDays) return "at_risk";
  return "on_programme";
}

/**
 * Status of a milestone at `at`: `complete` once it has an actual finish; `behind`
 * when its forecast (else baseline) finish is before `at`, or its working-day slip
 * exceeds `behindWorkingDays`; `at_risk` when the slip exceeds `toleranceWorkingDays`;
 * otherwise `on_programme`.
 */
export function milestoneStatus(m: MilestoneInput, at: CalendarDate, settings: ProgrammeSettings): MilestoneStatus {
  return statusFromSlip(m, toDayNumber(at), milestoneSlip(m, settings).slipWorkingDays, settings);
}

/** Planned fraction 0–1 from day numbers; `start` null (or ≥ finish) means a point milestone. */
function plannedFraction(start: number | null, finish: number, t: number): number {
  if (start === null || start >= finish) return t >= finish ? 1 : 0;
  if (t <= start) return 0;
  if (t >= finish) return 1;
  return (t - start) / (finish - start);
}

/**
 * Planned percent (0–100) of a milestone at `at`: linear in calendar days from its
 * planned start (00:00, 0 %) to its baseline finish (00:00, 100 %). A point milestone
 * (no planned start, or a start not before the finish) counts 0 before its baseline
 * date and 100 from that date on.
 */
export function plannedPercentOfMilestone(m: MilestoneInput, at: CalendarDate): number {
  const start = m.plannedStart === null ? null : toDayNumber(m.plannedStart);
  return 100 * plannedFraction(start, toDayNumber(m.baselineFinish), toDayNumber(at));
}

/** Earned percent (0–100) of a milestone: 100 once it has an actual finish, else its percent complete bounded to 0–100. */
export function earnedPercentOfMilestone(m: MilestoneInput): number {
  if (m.actualFinish !== null) return 100;
  const p = m.percentComplete;
  if (!Number.isFinite(p) || p <= 0) return 0;
  return p >= 100 ? 100 : p;
}

/** A weight that cannot make a sum NaN or negative; invalid weights count as 0. */
function usableWeight(w: number): number {
  return Number.isFinite(w) && w > 0 ? w : 0;
}

interface PreparedMilestone {
  source: MilestoneInput;
  start: number | null;
  finish: number;
  weight: number;
  /** Earned fraction 0–1. */
  earned: number;
}

function prepare(milestones: readonly MilestoneInput[]): PreparedMilestone[] {
  return milestones.map((m) => ({
    source: m,
    start: m.plannedStart === null ? null : toDayNumber(m.plannedStart),
    finish: toDayNumber(m.baselineFinish),
    weight: usableWeight(m.weight),
    earned: earnedPercentOfMilestone(m) / 100,
  }));
}

/** Weighted planned fraction (Σ wᵢ·fᵢ) at day `t`, in weight units. */
function plannedValueAt(prepared: readonly PreparedMilestone[], t: number): number {
  let pv = 0;
  for (const p of prepared) pv += p.weight * plannedFraction(p.start, p.finish, t);
  return pv;
}

/**
 * Where a milestone's planned progress begins: its planned start, or its baseline
 * finish when it is a point in time.
 */
function planStart(p: PreparedMilestone): number {
  return p.start === null || p.start >= p.finish ? p.finish : p.start;
}

/**
 * Health of a programme at the status date `at`.
 *
 * - percentComplete = Σ wᵢ·pᵢ / Σ wᵢ and plannedPercent likewise (0–100); pᵢ = 100
 *   once a milestone has an actual finish.
 * - pv, ev, sv, spi in weight units (Σ wᵢ × fraction); spi null when pv = 0.
 * - money: the same by each milestone's budget (minor units), with AC from the cost
 *   actuals booked up to `at`, and CV, CPI, EAC, ETC, VAC, TCPI; null without budgets.
 * - earnedSchedule: weekly periods from the Monday of the ISO week in which planned
 *   progress begins (the earliest planned start, counting a point milestone's baseline
 *   date as its start), the PV curve sampled at each period end in weight units.
 * - Empty programmes and zero planned value give zeros and nulls, never NaN.
 * @throws RangeError when a date is not a valid `YYYY-MM-DD`.
 */
export function computeProgrammeHealth(input: ProgrammeHealthInput): ProgrammeHealth {
  const { milestones, at, settings } = input;
  const atDay = toDayNumber(at);
  const prepared = prepare(milestones);

  let totalWeight = 0;
  let pv = 0;
  let ev = 0;
  let hasBudget = false;
  let bac = 0;
  let moneyPv = 0;
  let moneyEv = 0;
  const counts = { complete: 0, onProgramme: 0, atRisk: 0, behind: 0 };
  const perMilestone: MilestoneHealth[] = [];
  let forecastDay: number | null = null;
  let baselineDay: number | null = null;
  let earliestStart: number | null = null;

  for (const p of prepared) {
    const m = p.source;
    const planned = plannedFraction(p.start, p.finish, atDay);
    totalWeight += p.weight;
    pv += p.weight * planned;
    ev += p.weight * p.earned;
    if (m.budget !== undefined && m.budget !== null && Number.isFinite(m.budget)) {
      hasBudget = true;
      bac += m.budget;
      moneyPv += m.budget * planned;
      moneyEv += m.budget * p.earned;
    }

    const slip = milestoneSlip(m, settings);
    const status = statusFromSlip(m, atDay, slip.slipWorkingDays, settings);
    if (status === "complete") counts.complete += 1;
    else if (status === "on_programme") counts.onProgramme += 1;
    else if (status === "at_risk") counts.atRisk += 1;
    else counts.behind += 1;
    perMilestone.push({ id: m.id, status, slipDays: slip.slipDays, slipWorkingDays: slip.slipWorkingDays, plannedPercent: 100 * planned });

    const finish = toDayNumber(milestoneFinish(m));
    forecastDay = forecastDay === null ? finish : Math.max(forecastDay, finish);
    baselineDay = baselineDay === null ? p.finish : Math.max(baselineDay, p.finish);
    const s = planStart(p);
    earliestStart = earliestStart === null ? s : Math.min(earliestStart, s);
  }

  // ev/Σw stays ≤ 1 in floating point (each wᵢ·pᵢ ≤ wᵢ and rounding is monotone), so the
  // percentages cannot overshoot 100.
  const percentComplete = totalWeight > 0 ? (ev / totalWeight) * 100 : 0;
  const plannedPercent = totalWeight > 0 ? (pv / totalWeight) * 100 : 0;
  const weightEvm = computeEarnedValue({ pv, ev, bac: totalWeight });

  let money: MoneyHealth | null = null;
  if (hasBudget) {
    let ac: number | null = null;
    if (input.costActuals !== undefined) {
      ac = 0;
      for (const c of input.costActuals) if (toDayNumber(c.periodEnd) <= atDay) ac += c.amount;
    }
    const evm = computeEarnedValue({ pv: moneyPv, ev: moneyEv, ac, bac });
    money = { bac, pv: moneyPv, ev: moneyEv, ac, ...evm, currency: input.currency ?? null };
  }

  const earnedSchedule = earnedScheduleOf(prepared, earliestStart, baselineDay, atDay, ev, totalWeight);
  const earnedScheduleCompletion =
    earnedSchedule.start === null || earnedSchedule.ieacT === null
      ? null
      : addDaysSafely(earnedSchedule.start, Math.round(earnedSchedule.ieacT * 7));

  return {
    at,
    percentComplete,
    plannedPercent,
    pv,
    ev,
    sv: weightEvm.sv,
    spi: weightEvm.spi,
    money,
    earnedSchedule,
    forecastCompletion: forecastDay === null ? null : fromDayNumber(forecastDay),
    baselineCompletion: baselineDay === null ? null : fromDayNumber(baselineDay),
    completionSlipDays: forecastDay === null || baselineDay === null ? null : forecastDay - baselineDay,
    earnedScheduleCompletion,
    counts,
    milestones: perMilestone,
  };
}

/** An IEAC(t) far beyond year 9999 (SPI(t) near 0) has no calendar date; answer null then. */
function addDaysSafely(date: CalendarDate, days: number): CalendarDate | null {
  try {
    return addDays(date, days);
  } catch {
    return null;
  }
}

function earnedScheduleOf(
  prepared: readonly PreparedMilestone[],
  earliestStart: number | null,
  latestBaseline: number | null,
  atDay: number,
  ev: number,
  totalWeight: number,
): EarnedScheduleHealth {
  if (earliestStart === null || latestBaseline === null) {
    return { es: null, svT: null, spiT: null, ieacT: null, tspi: null, actualTime: null, plannedDuration: null, periodWeeks: 1, start: null };
  }
  const start = toDayNumber(startOfIsoWeek(fromDayNumber(earliestStart)));
  const plannedDuration = (latestBaseline - start) / 7;
  const actualTime = (atDay - start) / 7;
  const periods = Math.ceil(plannedDuration);
  // One pass over the milestones per weekly period: 2,000 × 150 is 300,000 cheap steps.
  const cumulativePv: number[] = [];
  if (totalWeight > 0) {
    for (let k = 1; k <= periods; k += 1) cumulativePv.push(plannedValueAt(prepared, start + 7 * k));
  }
  const es = computeEarnedSchedule({ cumulativePv, ev, actualTime, plannedDuration });
  return { ...es, actualTime, plannedDuration, periodWeeks: 1, start: fromDayNumber(start) };
}

/** A point of the planned S-curve. */
export interface PlannedCurvePoint {
  date: CalendarDate;
  /** Weighted planned percent (0–100) at `date`. */
  plannedPercent: number;
}

/**
 * The planned S-curve: weighted planned percent at `from`, every `stepDays` calendar
 * days after it, and at `to` (always the last point). Empty when `to` is before
 * `from`; every point is 0 when no milestone carries weight.
 * @throws RangeError when `stepDays` is not a whole number ≥ 1.
 */
export function plannedCurve(
  milestones: readonly MilestoneInput[],
  from: CalendarDate,
  to: CalendarDate,
  stepDays: number,
): PlannedCurvePoint[] {
  if (!Number.isInteger(stepDays) || stepDays < 1) throw new RangeError(`Step must be a whole number of days ≥ 1: ${stepDays}`);
  const prepared = prepare(milestones);
  const totalWeight = prepared.reduce((s, p) => s + p.weight, 0);
  const a = toDayNumber(from);
  const b = toDayNumber(to);
  const points: PlannedCurvePoint[] = [];
  const push = (t: number): void => {
    points.push({ date: fromDayNumber(t), plannedPercent: totalWeight > 0 ? (plannedValueAt(prepared, t) / totalWeight) * 100 : 0 });
  };
  for (let t = a; t <= b; t += stepDays) push(t);
  if (b >= a && (b - a) % stepDays !== 0) push(b);
  return points;
}

/** A recorded programme percent complete on a past date (e.g. stored with each site update). */
export interface ProgressSnapshot {
  date: CalendarDate;
  percentComplete: number;
}

/** A point of the S-curve chart: planned percent, and earned percent where it is known. */
export interface CurvePoint extends PlannedCurvePoint {
  earnedPercent?: number;
}

export interface EarnedCurveInput {
  milestones: readonly MilestoneInput[];
  from: CalendarDate;
  to: CalendarDate;
  stepDays: number;
  /** Status date: earned percent is given only up to it. */
  at: CalendarDate;
  /** Past programme percent complete, in any order. */
  snapshots?: readonly ProgressSnapshot[];
}

/**
 * Planned and earned S-curves on one grid. The current milestones say only where the
 * programme stands at `at`, not where it stood before, so earned percent at a past
 * date is the latest snapshot on or before it (a step: what was known then, nothing
 * interpolated); at `at` it is today's computed percent complete; after `at`, and
 * before the first snapshot, it is absent. `at` is added to the grid when it falls
 * inside [from, to], so the chart can mark today with both values.
 * @throws RangeError when `stepDays` is not a whole number ≥ 1.
 */
export function earnedCurve(input: EarnedCurveInput): CurvePoint[] {
  const { milestones, from, to, stepDays, at } = input;
  const planned: CurvePoint[] = plannedCurve(milestones, from, to, stepDays);
  const atDay = toDayNumber(at);
  if (toDayNumber(from) <= atDay && atDay <= toDayNumber(to) && !planned.some((p) => p.date === at)) {
    const [point] = plannedCurve(milestones, at, at, 1);
    if (point !== undefined) {
      const index = planned.findIndex((p) => p.date > at);
      planned.splice(index === -1 ? planned.length : index, 0, point);
    }
  }
  const prepared = prepare(milestones);
  const totalWeight = prepared.reduce((s, p) => s + p.weight, 0);
  const current = totalWeight > 0 ? (prepared.reduce((s, p) => s + p.weight * p.earned, 0) / totalWeight) * 100 : 0;
  const snapshots = [...(input.snapshots ?? [])]
    .map((s) => ({ day: toDayNumber(s.date), percentComplete: s.percentComplete }))
    .filter((s) => s.day < atDay)
    .sort((x, y) => x.day - y.day);
  let next = 0;
  let known: number | undefined;
  return planned.map((point) => {
    const t = toDayNumber(point.date);
    if (t > atDay) return point;
    if (t === atDay) return { ...point, earnedPercent: current };
    while (next < snapshots.length && (snapshots[next] as { day: number }).day <= t) {
      known = (snapshots[next] as { percentComplete: number }).percentComplete;
      next += 1;
    }
    return known === undefined ? point : { ...point, earnedPercent: known };
  });
}
