import type { Knex } from "knex";
import { DateTime } from "luxon";
import { addDays, toDayNumber } from "#shared/domain/calendar.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MilestoneEventFieldName, System } from "#shared/schemas/programme.ts";

/**
 * The Aldermere Campus Phase 2 programme of the invented demo scenario (DESIGN.md).
 *
 * Dates are placed relative to an anchor: the Monday of the week in which the seed runs
 * (Europe/London). Nine months (39 weeks) of history end just before it and the rest of
 * the programme runs after it, so a fresh demo always shows a programme in mid-flight —
 * some milestones complete, some slipping, Hall 2A's ready-for-service date ahead —
 * rather than one that has aged into "everything is late". Anchoring on a Monday keeps
 * every date on the same weekday whatever day the seed runs. `today` can be passed for a
 * fixed demo.
 *
 * The history is simulated, not typed in: the plan as first agreed (baseline v1), then
 * site walks every four weeks that move percent complete, forecast changes with their
 * reasons, completions, and a re-baseline (v2). Each change writes an event, and the
 * stored milestones are the state the events lead to, so replaying the events backwards
 * from today gives the programme as it stood on any date since the history began.
 */

const TZ = "Europe/London";

type Day = readonly [week: number, weekday: number];

interface SeedMilestone {
  key: string;
  name: string;
  phase: string;
  area: string;
  system: System;
  weight: number;
  audience: Audience;
  description: string;
  start: Day | null;
  /** Baseline finish of v1. */
  finish: Day;
  /** Pounds; stored in pence. Plant packages start at order: manufacture is part of "delivered and set". */
  budgetGbp?: number;
  deps?: string[];
  actual?: Day;
  /** Percent complete today for a milestone still open. */
  percent?: number;
  forecasts?: Array<{ at: Day; to: Day; note: string }>;
  /** Re-baseline v2 sets these explicitly (the other open milestones adopt their forecasts). */
  v2?: { finish: Day; start?: Day };
}

const PHASES = [
  "Enabling works",
  "Frame and envelope",
  "Plant",
  "Fit-out",
  "Security and access control",
  "Commissioning",
  "Ready for service",
];

const SLIP_NOTE = "Integrated systems test now ends two weeks later, behind generator commissioning";

const MILESTONES: SeedMilestone[] = [
  // Enabling works
  { key: "setup", name: "Site set-up, hoarding and welfare", phase: "Enabling works", area: "Site", system: "building", weight: 1, audience: "public", description: "Site compound, hoarding, welfare cabins and the escorted visitor route.", start: [-41, 0], finish: [-37, 4], actual: [-37, 3] },
  { key: "ground", name: "Ground works, drainage and utility diversions", phase: "Enabling works", area: "Plant yard", system: "building", weight: 3, audience: "public", description: "Pile caps, plant-yard slab, surface-water drainage and the diverted HV and water services.", start: [-39, 0], finish: [-31, 4], actual: [-30, 4], deps: ["setup"] },
  // Frame and envelope
  { key: "frame", name: "Steel frame topped out", phase: "Frame and envelope", area: "Hall 2A", system: "building", weight: 4, audience: "public", description: "Primary steel for Hall 2A, HD-1 and the Hall 2B shell.", start: [-32, 0], finish: [-23, 4], actual: [-23, 2], deps: ["ground"] },
  { key: "energy-centre", name: "Energy centre building complete", phase: "Frame and envelope", area: "Energy centre", system: "building", weight: 2, audience: "investor", description: "Generator hall, switch room and UPS rooms, weathertight with bunded floors.", start: [-30, 0], finish: [-16, 4], actual: [-16, 4], deps: ["ground"] },
  { key: "envelope", name: "Roof and cladding weathertight", phase: "Frame and envelope", area: "Hall 2A", system: "building", weight: 4, audience: "public", description: "Roof membrane, insulated cladding and louvres; the halls are dry for fit-out.", start: [-24, 0], finish: [-15, 4], actual: [-15, 1], deps: ["frame"] },
  // Plant
  { key: "chillers", name: "Chillers delivered and set (5 × 400 kW, free cooling)", phase: "Plant", area: "Plant yard", system: "cooling", weight: 4, audience: "public", description: "Five 400 kW air-cooled chillers with free-cooling coils; four carry the design load (N+1).", start: [-26, 0], finish: [-3, 4], budgetGbp: 1_850_000, deps: ["ground"], percent: 80, forecasts: [
    { at: [-15, 2], to: [-1, 4], note: "Chiller 3 failed its factory witness test on capacity; re-test booked and delivery re-planned" },
    { at: [-4, 3], to: [1, 0], note: "Shipping of the last two chillers held at the port for ten days" },
  ] },
  { key: "fans", name: "Supply fans installed (8 units)", phase: "Plant", area: "Hall 2A", system: "cooling", weight: 2, audience: "investor", description: "Eight supply fans for Hall 2A and HD-1; six carry the design airflow.", start: [-14, 0], finish: [2, 4], budgetGbp: 210_000, deps: ["envelope"], percent: 50 },
  { key: "hv", name: "HV switchgear and transformers energised", phase: "Plant", area: "Energy centre", system: "power", weight: 3, audience: "investor", description: "Ring main unit, two transformers and the LV main switchboards energised from the new supply.", start: [-24, 0], finish: [-3, 4], actual: [-3, 2], budgetGbp: 620_000, deps: ["energy-centre"] },
  { key: "generators", name: "Generators delivered and set (2 + 1 × 1,250 kVA)", phase: "Plant", area: "Energy centre", system: "power", weight: 4, audience: "public", description: "Three 1,250 kVA diesel generator sets; two carry the load, the third is the spare (N+1).", start: [-28, 0], finish: [-4, 4], actual: [-2, 3], budgetGbp: 1_150_000, deps: ["energy-centre"], forecasts: [
    { at: [-6, 2], to: [-2, 3], note: "Third generator set held at the factory for a governor retrofit" },
  ] },
  { key: "fuel", name: "Bulk fuel tank installed and tested (40,000 L)", phase: "Plant", area: "Plant yard", system: "fuel", weight: 2, audience: "public", description: "40,000 L double-skinned bulk tank with leak detection, transfer pumps and day tanks.", start: [-22, 0], finish: [-8, 2], actual: [-8, 2], budgetGbp: 240_000, deps: ["ground"] },
  { key: "ups", name: "UPS modules installed (4 × 500 kW)", phase: "Plant", area: "Energy centre", system: "power", weight: 3, audience: "investor", description: "Four 500 kW UPS modules, three carrying the load, with their battery strings.", start: [-20, 0], finish: [2, 4], budgetGbp: 980_000, deps: ["energy-centre", "hv"], percent: 70, forecasts: [
    { at: [-3, 1], to: [1, 4], note: "Modules released early from the supplier's regional depot" },
  ] },
  // Fit-out
  { key: "fitout-2a", name: "Hall 2A raised floor, containment and busbar", phase: "Fit-out", area: "Hall 2A", system: "fit-out", weight: 4, audience: "public", description: "Raised floor, hot-aisle containment, overhead busbar and cable tray for 48 racks.", start: [-12, 0], finish: [4, 4], deps: ["envelope"], percent: 65 },
  { key: "fitout-hd1", name: "HD-1 high-density containment and power", phase: "Fit-out", area: "HD-1", system: "fit-out", weight: 3, audience: "public", description: "Sealed containment and dual busbar for 20 racks at up to 25 kW each.", start: [-8, 0], finish: [8, 4], deps: ["envelope"], percent: 35 },
  { key: "client-areas", name: "Client build room, loading bay and meeting suite", phase: "Fit-out", area: "Client areas", system: "fit-out", weight: 2, audience: "investor", description: "Build room, goods lift and loading bay, and the client meeting suite.", start: [-4, 0], finish: [6, 4], deps: ["envelope"], percent: 25, forecasts: [
    { at: [-6, 3], to: [10, 4], note: "Ceiling grid and lighting redesigned for the client meeting suite" },
  ] },
  { key: "fitout-2b", name: "Hall 2B fit-out", phase: "Fit-out", area: "Hall 2B", system: "fit-out", weight: 4, audience: "public", description: "Raised floor, containment and busbar for the later 48-rack stage.", start: [10, 0], finish: [24, 4], deps: ["envelope"], v2: { finish: [32, 4], start: [18, 0] } },
  // Security and access control
  { key: "perimeter", name: "Perimeter fence, gatehouse and vehicle barriers", phase: "Security and access control", area: "Site", system: "security", weight: 1, audience: "public", description: "Security fence line, staffed gatehouse and rising-arm vehicle barriers.", start: [-28, 0], finish: [-18, 4], actual: [-18, 3], deps: ["setup"] },
  { key: "access", name: "Access control and CCTV head-end commissioned", phase: "Security and access control", area: "Hall 2A", system: "security", weight: 2, audience: "internal", description: "Card-and-PIN readers, camera coverage and the head-end; detail kept to staff.", start: [-2, 0], finish: [10, 4], deps: ["perimeter", "fitout-2a"], percent: 20 },
  { key: "zoning", name: "Security zoning and mantrap interlocks tested", phase: "Security and access control", area: "Hall 2A", system: "security", weight: 1, audience: "internal", description: "Zone-by-zone access rights and the interlocked entry doors proven.", start: [6, 0], finish: [12, 4], deps: ["access"] },
  // Commissioning
  { key: "l1", name: "L1 factory witness tests complete", phase: "Commissioning", area: "Plant yard", system: "commissioning", weight: 1, audience: "investor", description: "Level 1: chillers, generators, UPS and switchgear witnessed at the factories.", start: [-16, 0], finish: [-9, 4], actual: [-9, 4] },
  { key: "l2", name: "L2 installation verification", phase: "Commissioning", area: "Energy centre", system: "commissioning", weight: 2, audience: "investor", description: "Level 2: installed plant checked against the design before it is started.", start: [-4, 0], finish: [4, 4], deps: ["l1", "hv", "generators"], percent: 30 },
  { key: "l3", name: "L3 start-up and pre-functional checks", phase: "Commissioning", area: "Hall 2A", system: "commissioning", weight: 2, audience: "investor", description: "Level 3: each system started and proven on its own.", start: [2, 0], finish: [9, 4], deps: ["l2", "chillers", "fans"] },
  { key: "gen-comm", name: "Generator commissioning and load bank test", phase: "Commissioning", area: "Energy centre", system: "power", weight: 2, audience: "investor", description: "Each generator set run on a load bank at full load, then in parallel, with fuel transfer proven.", start: [7, 0], finish: [9, 4], deps: ["generators", "fuel", "hv"], forecasts: [
    { at: [-2, 1], to: [11, 4], note: "Load bank and fuel polishing contractor available two weeks later than planned" },
  ] },
  { key: "l4", name: "L4 functional performance tests", phase: "Commissioning", area: "Hall 2A", system: "commissioning", weight: 3, audience: "investor", description: "Level 4: systems tested across their operating range, including failure of a duty unit.", start: [10, 0], finish: [13, 4], deps: ["l3", "gen-comm", "chillers"], forecasts: [
    { at: [-2, 1], to: [15, 4], note: "Follows generator commissioning" },
  ] },
  { key: "ist", name: "L5 integrated systems test (Hall 2A and HD-1)", phase: "Commissioning", area: "Hall 2A", system: "commissioning", weight: 3, audience: "public", description: "Level 5: mains failure, generator start, UPS ride-through and cooling restart proven together under heat load.", start: [14, 0], finish: [16, 4], deps: ["l4", "ups", "fitout-2a", "fitout-hd1"], forecasts: [
    { at: [-2, 1], to: [18, 4], note: "Follows the functional performance tests" },
  ] },
  // Ready for service
  { key: "rfs-2a", name: "Hall 2A ready for service (48 racks, 480 kW)", phase: "Ready for service", area: "Hall 2A", system: "commissioning", weight: 1, audience: "public", description: "Hall 2A handed over for client installation.", start: null, finish: [17, 4], deps: ["ist", "access", "zoning"], forecasts: [
    { at: [-2, 1], to: [19, 4], note: SLIP_NOTE },
  ] },
  { key: "rfs-hd1", name: "HD-1 ready for service (20 racks, 500 kW)", phase: "Ready for service", area: "HD-1", system: "commissioning", weight: 1, audience: "public", description: "The high-density suite handed over for client installation.", start: null, finish: [19, 4], deps: ["ist", "fitout-hd1"], forecasts: [
    { at: [-2, 1], to: [20, 4], note: SLIP_NOTE },
  ] },
  { key: "rfs-2b", name: "Hall 2B ready for service (48 racks, 480 kW)", phase: "Ready for service", area: "Hall 2B", system: "commissioning", weight: 1, audience: "public", description: "The later stage: Hall 2B handed over for client installation.", start: null, finish: [26, 4], deps: ["fitout-2b", "ist"], v2: { finish: [34, 4] } },
];

const V1_REASON = "Programme agreed at financial close";
const V2_REASON = "Chiller delivery re-planned after the factory witness re-test; Hall 2B moved to a later stage at the client's request";
const HISTORY_WEEKS = 39;
const V2_AT: Day = [-13, 1];

interface State {
  percentComplete: number;
  plannedStart: string | null;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
}

interface Happening {
  at: Date;
  key: string;
  changes: Partial<State>;
  note: string | null;
  baselineVersion: number | null;
}

const round5 = (x: number) => Math.max(0, Math.min(100, Math.round(x / 5) * 5));

/** The seed's anchor: Monday of the current week on site. */
export function demoAnchor(today?: string): string {
  const base = today ? DateTime.fromISO(today, { zone: TZ }) : DateTime.now().setZone(TZ);
  return base.startOf("week").toISODate()!;
}

/**
 * Writes the demo programme into an existing project that has no milestones yet:
 * phases, milestones, dependencies, baselines v1 and v2, nine months of events and
 * monthly cost actuals. One transaction. Returns the number of milestones written.
 */
export async function seedProgramme(db: Knex, projectId: number, opts: { byUserId: number | null; today?: string }): Promise<number> {
  const anchor = demoAnchor(opts.today);
  const day = (d: Day) => addDays(anchor, 7 * d[0] + d[1]);
  const instant = (date: string, hour: number) => DateTime.fromISO(`${date}T${String(hour).padStart(2, "0")}:00`, { zone: TZ }).toJSDate();
  const historyStart = day([-HISTORY_WEEKS, 0]);
  const lastWalk = day([-1, 2]);

  // The plan as first agreed, and the state on the first day of the history.
  const state = new Map<string, State>();
  for (const m of MILESTONES) {
    state.set(m.key, {
      percentComplete: progressAt(m, historyStart),
      plannedStart: m.start ? day(m.start) : null,
      baselineFinish: day(m.finish),
      forecastFinish: day(m.finish),
      actualFinish: null,
    });
  }
  const v1Snapshot = new Map([...state].map(([k, s]) => [k, { ...s }]));

  function progressAt(m: SeedMilestone, date: string): number {
    if (!m.start) return 0;
    const s = toDayNumber(day(m.start));
    const t = toDayNumber(date);
    if (t <= s) return 0;
    if (m.actual) {
      const f = toDayNumber(day(m.actual));
      return t >= f ? 100 : Math.min(95, round5((100 * (t - s)) / (f - s)));
    }
    const p = m.percent ?? 0;
    const l = toDayNumber(lastWalk);
    return t >= l ? p : Math.min(p, round5((p * (t - s)) / (l - s)));
  }

  const happenings: Happening[] = [];
  // Site walks every four weeks, and one last week.
  const walks: string[] = [];
  for (let d = addDays(historyStart, 2); d < lastWalk; d = addDays(d, 28)) walks.push(d);
  walks.push(lastWalk);
  for (const walk of walks) {
    for (const m of MILESTONES) {
      if (m.actual && day(m.actual) <= walk) continue;
      const p = progressAt(m, walk);
      if (p > 0) happenings.push({ at: instant(walk, 14), key: m.key, changes: { percentComplete: p }, note: null, baselineVersion: null });
    }
  }
  for (const m of MILESTONES) {
    if (m.actual) happenings.push({ at: instant(day(m.actual), 17), key: m.key, changes: { actualFinish: day(m.actual), percentComplete: 100 }, note: null, baselineVersion: null });
    for (const f of m.forecasts ?? []) happenings.push({ at: instant(day(f.at), 11), key: m.key, changes: { forecastFinish: day(f.to) }, note: f.note, baselineVersion: null });
  }
  happenings.sort((a, b) => a.at.getTime() - b.at.getTime());

  const v2At = instant(day(V2_AT), 10);
  const events: Array<{ key: string; field: MilestoneEventFieldName; from: string | null; to: string | null; at: Date; note: string | null; baselineVersion: number | null }> = [];
  const writes = new Map<string, number>();
  const apply = (h: Happening) => {
    const s = state.get(h.key)!;
    const fields: Array<[MilestoneEventFieldName, keyof State]> = [
      ["forecast_finish", "forecastFinish"],
      ["actual_finish", "actualFinish"],
      ["percent_complete", "percentComplete"],
      ["baseline_finish", "baselineFinish"],
      ["planned_start", "plannedStart"],
    ];
    let changed = false;
    for (const [field, k] of fields) {
      if (!(k in h.changes) || h.changes[k] === s[k]) continue;
      const from = s[k] === null ? null : String(s[k]);
      const value = h.changes[k]!;
      (s as unknown as Record<string, unknown>)[k] = value;
      events.push({ key: h.key, field, from, to: value === null ? null : String(value), at: h.at, note: h.note, baselineVersion: h.baselineVersion });
      changed = true;
    }
    if (changed) writes.set(h.key, (writes.get(h.key) ?? 0) + 1);
  };

  // Month ends inside the history, for the cost actuals: money earned by then, and spend
  // running a few percent ahead of it (the plant came in slightly over budget).
  const monthEnds: string[] = [];
  for (let m = DateTime.fromISO(historyStart, { zone: TZ }).endOf("month"); m.toISODate()! < anchor; m = m.plus({ months: 1 }).endOf("month")) {
    monthEnds.push(m.toISODate()!);
  }
  // The month in progress is booked to date (the day before the anchor), so spend is
  // compared with what has been earned since the last month end as well.
  const toDate = addDays(anchor, -1);
  if (monthEnds.at(-1) !== toDate) monthEnds.push(toDate);
  const earnedMoneyAt: number[] = [];
  const moneyEarned = () =>
    MILESTONES.reduce((sum, m) => {
      if (!m.budgetGbp) return sum;
      const s = state.get(m.key)!;
      return sum + m.budgetGbp * 100 * (s.actualFinish ? 1 : s.percentComplete / 100);
    }, 0);

  let v2Snapshot: Map<string, State> | null = null;
  let monthIndex = 0;
  const passMonthEnds = (until: Date) => {
    while (monthIndex < monthEnds.length && instant(addDays(monthEnds[monthIndex]!, 1), 0) <= until) {
      earnedMoneyAt.push(moneyEarned());
      monthIndex += 1;
    }
  };
  for (const h of happenings) {
    if (!v2Snapshot && h.at >= v2At) {
      passMonthEnds(v2At);
      v2Snapshot = rebaseline(v2At);
    }
    passMonthEnds(h.at);
    apply(h);
  }
  passMonthEnds(instant(anchor, 0));
  if (!v2Snapshot) v2Snapshot = rebaseline(v2At);

  function rebaseline(at: Date): Map<string, State> {
    for (const m of MILESTONES) {
      const s = state.get(m.key)!;
      const open = s.actualFinish === null;
      const finish = m.v2 ? day(m.v2.finish) : open && s.forecastFinish ? s.forecastFinish : s.baselineFinish;
      const changes: Partial<State> = { baselineFinish: finish };
      if (m.v2?.start) changes.plannedStart = day(m.v2.start);
      // A stage moved on purpose is forecast on its new date too.
      if (m.v2) changes.forecastFinish = finish;
      apply({ at, key: m.key, changes, note: V2_REASON, baselineVersion: 2 });
    }
    return new Map([...state].map(([k, s]) => [k, { ...s }]));
  }

  return db.transaction(async (trx) => {
    const phaseIds = new Map<string, number>();
    for (const [i, name] of PHASES.entries()) {
      const [id] = await trx("phases").insert({ project_id: projectId, name, sort_order: i + 1 });
      phaseIds.set(name, Number(id));
    }
    const ids = new Map<string, number>();
    const createdAt = instant(historyStart, 9);
    for (const m of MILESTONES) {
      const s = state.get(m.key)!;
      const [id] = await trx("milestones").insert({
        project_id: projectId,
        phase_id: phaseIds.get(m.phase),
        name: m.name,
        area: m.area,
        system: m.system,
        description: m.description,
        weight: m.weight,
        percent_complete: s.percentComplete,
        planned_start: s.plannedStart,
        baseline_finish: s.baselineFinish,
        forecast_finish: s.forecastFinish,
        actual_finish: s.actualFinish,
        audience: m.audience,
        budget: m.budgetGbp ? m.budgetGbp * 100 : null,
        version: 1 + (writes.get(m.key) ?? 0),
        created_at: createdAt,
        updated_at: events.filter((e) => e.key === m.key).at(-1)?.at ?? createdAt,
      });
      ids.set(m.key, Number(id));
    }
    const dependencies = MILESTONES.flatMap((m) => (m.deps ?? []).map((d) => ({ milestone_id: ids.get(m.key), depends_on_id: ids.get(d) })));
    await trx("milestone_dependencies").insert(dependencies);

    const snapshotOf = (snap: Map<string, State>) =>
      JSON.stringify(
        MILESTONES.map((m) => {
          const s = snap.get(m.key)!;
          return { id: ids.get(m.key), name: m.name, audience: m.audience, plannedStart: s.plannedStart, baselineFinish: s.baselineFinish, weight: m.weight, budget: m.budgetGbp ? m.budgetGbp * 100 : null };
        }),
      );
    await trx("baselines").insert([
      { project_id: projectId, number: 1, reason: V1_REASON, by_user_id: opts.byUserId, at: createdAt, snapshot: snapshotOf(v1Snapshot) },
      { project_id: projectId, number: 2, reason: V2_REASON, by_user_id: opts.byUserId, at: v2At, snapshot: snapshotOf(v2Snapshot) },
    ]);

    await trx("milestone_events").insert(
      events.map((e) => ({
        milestone_id: ids.get(e.key),
        project_id: projectId,
        field: e.field,
        from_value: e.from,
        to_value: e.to,
        at: e.at,
        by_user_id: opts.byUserId,
        note: e.note,
        baseline_version: e.baselineVersion,
      })),
    );

    // Cumulative spend = earned × a factor that drifts from 1.02 to 1.06 over the history.
    let previous = 0;
    const costs = monthEnds.map((periodEnd, i) => {
      const factor = 1.02 + (0.04 * (i + 1)) / monthEnds.length;
      const cumulative = Math.round((earnedMoneyAt[i] ?? 0) * factor / 100) * 100;
      const amount = Math.max(0, cumulative - previous);
      previous = Math.max(previous, cumulative);
      return { project_id: projectId, period_end: periodEnd, amount, by_user_id: opts.byUserId };
    });
    // Spend is booked from the first month with any (the budgets are on the plant packages).
    const booked = costs.slice(costs.findIndex((c) => c.amount > 0));
    if (costs.some((c) => c.amount > 0)) await trx("cost_actuals").insert(booked);
    return MILESTONES.length;
  });
}
