import type { Audience } from "#shared/schemas/common.ts";
import type { CurveResponse, ProgrammeHealthResponse, ShownDrivers, System } from "#shared/schemas/programme.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";
import { daysBetween } from "#shared/domain/calendar.ts";
import { projectDrivers, type ProjectDrivers } from "#shared/domain/programme-dependencies.ts";
import { computeProgrammeHealth, earnedCurve, earnedPercentOfMilestone, milestoneFinish, type MilestoneInput, type ProgrammeHealth } from "#shared/domain/programme-health.ts";
import { AppError } from "../core/app-error.ts";
import { endOfDateInZone } from "../projects/projects.service.ts";
import { listCostActuals } from "./programme.baselines.repository.ts";
import { settingsOf, toInput, viewerOf, type ProgrammeContext, type Reader, type View } from "./programme.context.ts";
import { listProjectEvents } from "./programme.events.repository.ts";
import { listMilestones, type MilestoneRecord } from "./programme.repository.ts";

/** A milestone as it stood at a past day's end: the health computation's input, with its audience and system. */
export type MilestoneAsStood = MilestoneInput & { audience: Audience; system: System };

/** The programme as it stood at the end of a day: its milestones then, their health then, and what drove completion then. */
export interface ProgrammeAsStood {
  milestones: MilestoneAsStood[];
  health: ProgrammeHealth;
  drivers: ShownDrivers | null;
}

/** A curve of more points than this is a mistake in the query, not a chart. */
const MAX_CURVE_POINTS = 2_000;

/** The ids of the milestones among these that a viewer may see listed. */
function visibleIds(milestones: ReadonlyArray<{ id: number; audience: string }>, viewer: Viewer): Set<number> {
  const audiences = new Set<string>(audiencesFor(viewer));
  return new Set(milestones.filter((m) => audiences.has(m.audience)).map((m) => m.id));
}

/**
 * What drives the forecast completion, as a reader may see it: a run of milestones the reader
 * may not see is one link worded without their names or dates ("2 milestones not listed here"), the
 * way the facility words what a block still waits on, so the chain says that something stands
 * in the way without saying what.
 */
export function shownDrivers(drivers: ProjectDrivers | null, visible: ReadonlySet<number>): ShownDrivers | null {
  if (drivers === null) return null;
  const chain: ShownDrivers["chain"] = [];
  let hidden = 0;
  const flush = () => {
    if (hidden > 0) chain.push({ id: null, name: hidden === 1 ? "A milestone not listed here" : `${hidden} milestones not listed here`, finish: null });
    hidden = 0;
  };
  for (const link of drivers.chain) {
    if (visible.has(link.id)) {
      flush();
      chain.push(link);
    } else {
      hidden += 1;
    }
  }
  flush();
  return { milestoneId: visible.has(drivers.milestoneId) ? drivers.milestoneId : null, finish: drivers.finish, chain };
}

/**
 * The programme's figures: its health at a date (percent complete, planned percent, the
 * schedule and cost indices, earned schedule, status counts, what drives completion) and the
 * S-curve of planned against earned percent. A build has one set of headline figures, computed
 * over every milestone in the programme whoever asks (decision 004, issue #14): an audience
 * narrows what is listed (the per-milestone lines, the names in the driving chain), never the
 * figures, so no reader is shown a rosier build than the one on site. Visitors get no money.
 */
export function createHealthUseCases(ctx: ProgrammeContext) {
  const { db, projects } = ctx;

  /**
   * Earned percent at each past date, reconstructed from the current state by undoing,
   * newest first, every percent and actual-finish event made after that date ended in
   * the project's time zone. Weights are today's, like the planned curve's.
   */
  async function replayEarned(view: View, records: readonly MilestoneRecord[], dates: readonly string[]): Promise<Map<string, number>> {
    const result = new Map<string, number>();
    if (dates.length === 0) return result;
    const tz = view.project.timeZone;
    const state = new Map(records.map((m) => [m.id, toInput(m)]));
    let totalWeight = 0;
    for (const m of records) totalWeight += m.weight;
    // Every milestone's events: the curve, like the headline, covers the whole programme.
    const events = await listProjectEvents(db, view.project.id, "staff", {
      from: endOfDateInZone(dates[0]!, tz),
      fields: ["percent_complete", "actual_finish"],
    });
    let next = 0;
    for (const date of [...dates].sort().reverse()) {
      const boundary = endOfDateInZone(date, tz).getTime();
      while (next < events.length && Date.parse(events[next]!.at) >= boundary) {
        const e = events[next]!;
        next += 1;
        const m = state.get(e.milestoneId);
        if (!m) continue;
        if (e.field === "percent_complete") m.percentComplete = e.from === null ? 0 : Number(e.from);
        else m.actualFinish = e.from;
      }
      // The same sum, in the same order, as computeProgrammeHealth's percent complete, so the
      // replayed point just before today and today's figure differ only by what changed.
      let earned = 0;
      for (const m of state.values()) earned += m.weight * (earnedPercentOfMilestone(m) / 100);
      result.set(date, totalWeight > 0 ? (earned / totalWeight) * 100 : 0);
    }
    return result;
  }

  return {
    async health(slug: string, query: { at?: string }, reader: Reader): Promise<ProgrammeHealthResponse> {
      const view = ctx.viewOf(await projects.get(slug), viewerOf(reader), query.at);
      const records = await listMilestones(db, view.project.id, "staff");
      const inputs = records.map(toInput);
      const visible = visibleIds(records, view.viewer);
      const costs = view.viewer === "public" ? [] : await listCostActuals(db, view.project.id);
      const health = computeProgrammeHealth({
        milestones: inputs,
        at: view.at,
        settings: view.settings,
        // No cost actuals recorded means cost is not tracked (AC null), not that nothing was spent.
        costActuals: costs.length > 0 ? costs : undefined,
        currency: view.project.currency,
      });
      return {
        ...health,
        money: view.viewer === "public" ? null : health.money,
        milestones: health.milestones.filter((m) => visible.has(m.id)),
        drivers: shownDrivers(projectDrivers(inputs), visible),
        timeZone: view.project.timeZone,
      };
    },

    /**
     * The programme as it stood at the end of `date` in the project's time zone, for a viewer: the
     * milestones that existed then, with every tracked field's later change undone (newest first),
     * those in the programme and visible to the viewer then, and the health computed over every
     * milestone in the programme then (one set of figures for every audience; its per-milestone
     * lines only for those listed). What a monthly report shows for its month end, however the
     * record moved since.
     */
    async asStood(projectId: number, date: string, viewer: "investor" | "staff"): Promise<ProgrammeAsStood> {
      const project = await projects.getById(projectId);
      const boundary = endOfDateInZone(date, project.timeZone);
      const records = (await listMilestones(db, projectId, "staff", { removed: "include" })).filter((m) => m.createdAt < boundary);
      const state = new Map(records.map((m) => [m.id, { ...toInput(m), audience: m.audience as Audience, system: m.system, removed: m.removal !== null }]));
      for (const e of await listProjectEvents(db, projectId, "staff", { from: boundary })) {
        const m = state.get(e.milestoneId);
        if (!m) continue;
        if (e.field === "forecast_finish") m.forecastFinish = e.from;
        else if (e.field === "actual_finish") m.actualFinish = e.from;
        else if (e.field === "percent_complete") m.percentComplete = e.from === null ? 0 : Number(e.from);
        else if (e.field === "baseline_finish") m.baselineFinish = e.from ?? m.baselineFinish;
        else if (e.field === "planned_start") m.plannedStart = e.from;
        else if (e.field === "weight" && e.from !== null) m.weight = Number(e.from);
        else if (e.field === "audience" && e.from !== null) m.audience = e.from as Audience;
        else if (e.field === "removed") m.removed = e.from === "true";
      }
      const inProgramme = [...state.values()].filter((m) => !m.removed).map(({ removed, ...m }) => (void removed, m));
      const all = new Set(inProgramme.map((m) => m.id));
      const whole = inProgramme.map((m) => ({ ...m, dependsOn: (m.dependsOn ?? []).filter((id) => all.has(id)) }));
      const visible = visibleIds(inProgramme, viewer);
      const milestones = inProgramme.filter((m) => visible.has(m.id)).map((m) => ({ ...m, dependsOn: (m.dependsOn ?? []).filter((id) => visible.has(id)) }));
      const costs = await listCostActuals(db, projectId);
      const health = computeProgrammeHealth({ milestones: whole, at: date, settings: settingsOf(project), costActuals: costs.length > 0 ? costs.filter((c) => c.periodEnd <= date) : undefined, currency: project.currency });
      return { milestones, health: { ...health, milestones: health.milestones.filter((m) => visible.has(m.id)) }, drivers: shownDrivers(projectDrivers(whole), visible) };
    },

    async curve(slug: string, query: { from?: string; to?: string; step?: number }, reader: Reader): Promise<CurveResponse> {
      const view = ctx.viewOf(await projects.get(slug), viewerOf(reader));
      // The whole programme for every reader: today's earned point is the headline percent complete.
      const records = await listMilestones(db, view.project.id, "staff");
      const inputs = records.map(toInput);
      const at = view.at;
      if (inputs.length === 0) return { at, points: [] };
      const from = query.from ?? inputs.reduce((min, m) => ((m.plannedStart ?? m.baselineFinish) < min ? (m.plannedStart ?? m.baselineFinish) : min), "9999-12-31");
      const to =
        query.to ??
        inputs.reduce((max, m) => {
          const latest = milestoneFinish(m) > m.baselineFinish ? milestoneFinish(m) : m.baselineFinish;
          return latest > max ? latest : max;
        }, "0000-01-01");
      const step = query.step ?? 7;
      if (to < from) throw new AppError("validation", "Check to.", 400, { to: "must not be before from" });
      if (daysBetween(from, to) / step > MAX_CURVE_POINTS) {
        throw new AppError("validation", "Check step.", 400, { step: `gives more than ${MAX_CURVE_POINTS} points between from and to; use a longer step` });
      }
      const grid = earnedCurve({ milestones: inputs, from, to, stepDays: step, at });
      const pastDates = grid.map((p) => p.date).filter((d) => d < at);
      const earned = await replayEarned(view, records, pastDates);
      return {
        at,
        points: grid.map((p) => ({
          date: p.date,
          plannedPercent: p.plannedPercent,
          earnedPercent: p.date < at ? (earned.get(p.date) ?? null) : p.date === at ? (p.earnedPercent ?? null) : null,
        })),
      };
    },
  };
}
