/**
 * Benchmark of the programme health computation: 2,000 invented milestones spread
 * over about 150 weekly periods. A plain script, not a test:
 *   npx tsx tests/bench/health.bench.ts
 * Target: ≤ 50 ms per computation.
 */
import { addDays } from "../../src/shared/domain/calendar.ts";
import { computeProgrammeHealth, type MilestoneInput, type ProgrammeSettings } from "../../src/shared/domain/programme-health.ts";

const MILESTONES = 2_000;
const WEEKS = 150;
const START = "2026-01-05"; // a Monday
const WARM_UP = 20;
const RUNS = 41;

// A small deterministic generator, so every run measures the same programme.
let seed = 20260105;
function random(): number {
  seed = (seed * 1_103_515_245 + 12_345) % 2_147_483_648;
  return seed / 2_147_483_648;
}

const holidays = Array.from({ length: 30 }, (_, i) => addDays(START, 17 + i * 35));
const settings: ProgrammeSettings = { toleranceWorkingDays: 5, behindWorkingDays: 15, calendar: { weekendDays: [6, 7], holidays } };

const milestones: MilestoneInput[] = Array.from({ length: MILESTONES }, (_, i) => {
  const finishDay = i === 0 ? WEEKS * 7 : Math.floor(random() * WEEKS * 7);
  const baselineFinish = addDays(START, finishDay);
  const point = random() < 0.2;
  const plannedStart = i === 0 ? START : point ? null : addDays(baselineFinish, -Math.min(finishDay, Math.floor(random() * 120)));
  const done = finishDay < 400 && random() < 0.8;
  return {
    id: i + 1,
    name: `Milestone ${i + 1}`,
    weight: 1 + Math.floor(random() * 10),
    percentComplete: done ? 100 : Math.floor(random() * 100),
    plannedStart,
    baselineFinish,
    forecastFinish: addDays(baselineFinish, Math.floor(random() * 40) - 10),
    actualFinish: done ? addDays(baselineFinish, Math.floor(random() * 10)) : null,
    budget: random() < 0.3 ? Math.floor(random() * 50_000_000) : null,
  };
});
const costActuals = Array.from({ length: 36 }, (_, i) => ({ periodEnd: addDays(START, 30 * (i + 1)), amount: 10_000_000 }));
const at = addDays(START, 420);

function run(): number {
  const t0 = performance.now();
  const health = computeProgrammeHealth({ milestones, at, settings, costActuals, currency: "GBP" });
  const elapsed = performance.now() - t0;
  if (health.milestones.length !== MILESTONES || health.earnedSchedule.es === null) throw new Error("unexpected benchmark result");
  return elapsed;
}

for (let i = 0; i < WARM_UP; i += 1) run();
const times = Array.from({ length: RUNS }, run).sort((a, b) => a - b);
const median = times[Math.floor(RUNS / 2)] as number;
const periods = Math.ceil(computeProgrammeHealth({ milestones, at, settings }).earnedSchedule.plannedDuration ?? 0);
process.stdout.write(`health: ${MILESTONES} milestones × ${periods} weekly periods: ${median.toFixed(2)} ms (median of ${RUNS})\n`);
