import type { Project } from "#shared/schemas/projects.ts";
import type { ReportState } from "#shared/schemas/reports.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { drivingChain } from "#shared/domain/programme-dependencies.ts";
import { milestoneFinish } from "#shared/domain/programme-health.ts";
import { INDICATIVE_CAUTION } from "#shared/domain/facility.ts";
import { monthEndOf, monthEndsBetween, nextMonth, previousMonth, SITE_SAFETY_NOTE, spiSentence, spiTSentence, type ReportBlockLine, type ReportFigures, type ReportPhoto } from "#shared/domain/report-figures.ts";
import { endOfDateInZone } from "../projects/projects.service.ts";
import type { ReportsDeps } from "./reports.context.ts";
import { formatMonthYear } from "#shared/domain/locale-dates.ts";

/** How many past month ends the milestone trend chart shows (the report's own last). */
const TREND_MONTHS = 6;
/** At most this many milestones on the trend chart: more lines than this are not read. */
const TREND_LINES = 6;
/** A milestone weighing at least this share of the programme is a key milestone (besides the blocks' ready-for-service milestones). */
const KEY_WEIGHT_SHARE = 0.08;
/** Photographs in a report: enough to show the month, few enough to keep the PDF small. */
const MAX_PHOTOS = 8;
/** The widest JPEG derivative the web page shows. */
const PHOTO_WIDTH = 1600;
/**
 * The widest JPEG derivative the PDF embeds: a photo prints about 86 mm wide, so 1024 px is about
 * 300 ppi — nothing visible is lost, and the PDF stays under half the bytes of a browser print.
 */
const PDF_PHOTO_WIDTH = 1024;

/**
 * The figures of a report: the record as it stood at the end of the month in the project's time
 * zone, for the report's audience. Every module is asked for its figures at that moment, from its
 * events, so a report for October computed in December shows October's record.
 */
export function createFigures(deps: ReportsDeps) {
  const { programme, facility, budget, risks, decisions, media } = deps;

  return async function figuresOf(project: Project, report: { month: string; audience: RecordAudience; state: ReportState }, computedAt: Date): Promise<ReportFigures> {
    const monthEnd = monthEndOf(report.month);
    const asAt = endOfDateInZone(monthEnd, project.timeZone);
    const lastInstant = new Date(asAt.getTime() - 1);
    const monthStart = endOfDateInZone(monthEndOf(previousMonth(report.month)), project.timeZone);
    const viewer = report.audience === "internal" ? "staff" : "investor";

    const [stood, site, position, register, open, gallery] = await Promise.all([
      programme.asStood(project.id, monthEnd, viewer),
      facility.figuresAt(project.id, monthEnd, viewer),
      budget.position(project.slug, { at: monthEnd }, viewer),
      risks.registerAt(project.id, lastInstant, monthStart, viewer),
      decisions.openAt(project.id, lastInstant, monthEnd, viewer),
      media.gallery(project.slug, viewer === "staff" ? ["public", "investor", "internal"] : ["public", "investor"], { month: report.month }),
    ]);
    const { health } = stood;
    const byId = new Map(stood.milestones.map((m) => [m.id, m]));
    const healthOf = new Map(health.milestones.map((m) => [m.id, m]));

    const blocks: ReportBlockLine[] = site.blocks.map((b) => ({ name: b.name, baselineReadyDate: b.baselineReadyDate, forecastReadyDate: b.forecastReadyDate, slipWorkingDays: b.slipWorkingDays, readyForService: b.readyForService }));

    // A late block's date is set by the latest of the milestones it waits on, and that one's chain.
    const drivers = site.blocks
      .filter((b) => (b.slipWorkingDays ?? 0) > 0)
      .flatMap((b) => {
        const waits = b.dependsOn.map((id) => byId.get(id)).filter((m) => m !== undefined);
        if (waits.length === 0) return [];
        const last = waits.reduce((a, m) => (milestoneFinish(m) > milestoneFinish(a) ? m : a));
        return [{ block: b.name, chain: drivingChain(last.id, stood.milestones).map((l) => l.name) }];
      });

    // Key milestones: what each block waits on last, then the heaviest of the programme.
    const totalWeight = stood.milestones.reduce((s, m) => s + m.weight, 0);
    const keyIds = new Set<number>();
    for (const b of site.blocks) {
      const waits = b.dependsOn.map((id) => byId.get(id)).filter((m) => m !== undefined);
      if (waits.length > 0) keyIds.add(waits.reduce((a, m) => (milestoneFinish(m) > milestoneFinish(a) ? m : a)).id);
    }
    for (const m of [...stood.milestones].sort((a, b) => b.weight - a.weight)) if (totalWeight > 0 && m.weight / totalWeight >= KEY_WEIGHT_SHARE) keyIds.add(m.id);
    const keys = [...keyIds].slice(0, TREND_LINES);
    let firstTrendMonth = report.month;
    for (let i = 1; i < TREND_MONTHS; i++) firstTrendMonth = previousMonth(firstTrendMonth);
    const trendEnds = monthEndsBetween(firstTrendMonth, report.month);
    const datesThen = await Promise.all(trendEnds.map((d) => programme.milestoneDatesAt(project.id, d)));
    const trend = keys.map((id) => ({
      milestone: byId.get(id)!.name,
      baseline: byId.get(id)!.baselineFinish,
      points: trendEnds.map((d, i) => {
        const then = datesThen[i]!.find((m) => m.id === id);
        return { monthEnd: d, forecast: then ? (then.actualFinish ?? then.forecastFinish ?? then.baselineFinish) : null };
      }),
    }));

    const nextEnd = monthEndOf(nextMonth(report.month));
    const monthFirst = `${report.month}-01`;
    const inMonth = (d: string | null) => d !== null && d >= monthFirst && d <= monthEnd;
    const schedule: ReportFigures["schedule"] = {
      completedInMonth: stood.milestones.filter((m) => inMonth(m.actualFinish)).map((m) => ({ name: m.name, actualFinish: m.actualFinish!, baselineFinish: m.baselineFinish })),
      dueNextMonth: stood.milestones
        .filter((m) => m.actualFinish === null && milestoneFinish(m) > monthEnd && milestoneFinish(m) <= nextEnd)
        .map((m) => ({ name: m.name, forecastFinish: milestoneFinish(m), baselineFinish: m.baselineFinish })),
      slips: stood.milestones
        .filter((m) => m.actualFinish === null && (healthOf.get(m.id)?.slipWorkingDays ?? 0) !== 0)
        .map((m) => ({ name: m.name, baselineFinish: m.baselineFinish, forecastFinish: milestoneFinish(m), slipWorkingDays: healthOf.get(m.id)!.slipWorkingDays }))
        .sort((a, b) => b.slipWorkingDays - a.slipWorkingDays),
      drivers,
      trend,
      ieacT: health.earnedSchedule.ieacT,
      ieacTCompletion: health.earnedScheduleCompletion,
      baselineCompletion: health.baselineCompletion,
      forecastCompletion: health.forecastCompletion,
    };

    const topRisk = (r: (typeof register.items)[number]) => ({ reference: r.reference, title: r.title, kind: r.kind, band: r.band, score: r.score, trend: r.trend });
    const photos: ReportPhoto[] = gallery.items.slice(0, MAX_PHOTOS).flatMap((p) => {
      const widest = (max: number) => [...(p.sources.jpeg ?? [])].filter((v) => v.width <= max).pop();
      const jpeg = widest(PHOTO_WIDTH);
      const printed = widest(PDF_PHOTO_WIDTH) ?? jpeg;
      if (!jpeg || !printed) return [];
      const name = printed.url.replace(/^.*\/media\/v\//, "");
      return [{ mediaId: p.id, caption: p.caption ?? "", alt: p.altText ?? "", takenOn: (p.takenAt ?? "").slice(0, 10), imagePath: `variants/${name}`, url: jpeg.url, width: jpeg.width, height: Math.round((jpeg.width * p.height) / Math.max(1, p.width)) }];
    });

    const pct = (n: number) => `${n.toFixed(1)}%`;
    const late = blocks.filter((b) => (b.slipWorkingDays ?? 0) > 0);
    const headline = [
      `At the end of ${formatMonthYear(report.month)} the build was ${pct(health.percentComplete)} complete against ${pct(health.plannedPercent)} planned.`,
      late.length === 0 ? "Every capacity block was forecast on or before its baseline ready-for-service date." : `${late.length} of ${blocks.length} capacity blocks were forecast later than their baseline ready-for-service date.`,
      position.projectedFinalCost === null ? "The projected final cost could not yet be worked out." : `The projected final cost stood at ${money(position.projectedFinalCost, project.currency)} against a current budget of ${money(position.currentBudget, project.currency)}.`,
    ];

    return {
      project: { slug: project.slug, name: project.name, operatorName: project.operatorName, currency: project.currency, timeZone: project.timeZone },
      month: report.month,
      monthEnd,
      asAt: asAt.toISOString(),
      state: report.state,
      computedAt: computedAt.toISOString(),
      summary: {
        percentComplete: health.percentComplete,
        plannedPercent: health.plannedPercent,
        spi: health.spi,
        spiT: health.earnedSchedule.spiT,
        spiSentence: spiSentence(health.spi),
        spiTSentence: spiTSentence(health.earnedSchedule.spiT),
        headline,
        blocks,
        budget: {
          currentBudget: position.currentBudget,
          projectedFinalCost: position.projectedFinalCost,
          contingencyRemaining: position.contingencyRemaining,
          sentence: headline[2]!,
        },
        topRisks: register.items.slice(0, 3).map(topRisk),
        openDecisions: open.map((d) => ({ reference: d.reference, title: d.title, neededBy: d.neededBy, daysLeft: d.daysLeft })),
      },
      schedule,
      budget: {
        currency: position.currency,
        originalBudget: position.originalBudget,
        approvedChanges: position.approvedChanges,
        currentBudget: position.currentBudget,
        projectedFinalCost: position.projectedFinalCost,
        walk: position.walk,
        eac: position.eac,
        projectedFinalCostMethod: position.projectedFinalCostMethod,
        contingency: { held: position.contingencyHeld, drawn: position.contingencyDrawn, remaining: position.contingencyRemaining },
        cpi: position.cpi,
        spi: position.spi,
        caution: position.caution,
      },
      facility: {
        ramp: site.ramp,
        blocks,
        systems: site.systems.map((s) => ({ name: s.name, kind: s.kind, design: s.redundancy.design, now: s.redundancy.now, summary: s.redundancy.summary, carriesLoad: s.redundancy.carriesLoad })),
        availableFromLevel: site.availableFromLevel,
      },
      risks: {
        top: register.items.slice(0, 10).map((r) => ({ ...topRisk(r), owner: r.owner, category: r.category, action: r.action })),
        grid: register.grid,
        scale: register.scale,
        openRisks: register.items.filter((r) => r.kind === "risk").length,
        openIssues: register.items.filter((r) => r.kind === "issue").length,
      },
      decisions: open,
      photos,
      cautions: { indicative: INDICATIVE_CAUTION, site: SITE_SAFETY_NOTE },
      milestones: stood.milestones
        .map((m) => ({
          name: m.name,
          system: m.system,
          baselineFinish: m.baselineFinish,
          forecastFinish: m.forecastFinish,
          actualFinish: m.actualFinish,
          slipWorkingDays: healthOf.get(m.id)?.slipWorkingDays ?? 0,
          status: healthOf.get(m.id)?.status ?? "on_programme",
        }))
        .sort((a, b) => (a.forecastFinish ?? a.baselineFinish ?? "").localeCompare(b.forecastFinish ?? b.baselineFinish ?? "") || a.name.localeCompare(b.name)),
    };
  };
}

/** Minor units as a whole amount with its currency code ("EUR 12,400,000"): the sentence's figure, not the table's. */
function money(minor: number, currency: string): string {
  return `${currency} ${Math.round(minor / 100).toLocaleString("en-GB")}`;
}
