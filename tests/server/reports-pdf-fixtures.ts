import type { ReportFigures, ReportImageLoader } from "#shared/domain/report-figures.ts";
import { INDICATIVE_CAUTION } from "#shared/domain/facility.ts";
import { spiSentence, spiTSentence } from "#shared/domain/report-figures.ts";

/**
 * A hand-built report resembling the demo's (Kestrel Colocation, Aldermere Campus Phase 2: all
 * invented) for the PDF tests and the benchmark: October 2026, two capacity blocks, twelve
 * milestones, six months of forecast trend, `photoCount` photographs.
 */
export function reportFiguresFixture(photoCount = 2): ReportFigures {
  const months = ["2026-05-31", "2026-06-30", "2026-07-31", "2026-08-31", "2026-09-30", "2026-10-31"];
  const names = ["Building envelope watertight", "Utility connection energised", "Chiller plant set to work", "Generators load-bank tested", "UPS L4 commissioning", "Hall 2A integrated systems test", "Hall 2B containment complete", "Fuel polishing skid installed", "Security access control live", "Hall 2A ready for service", "Hall 2B ready for service", "Practical completion"];
  const milestones = names.map((name, i) => {
    const baseline = `2026-${String(7 + Math.floor(i / 2)).padStart(2, "0")}-${String(10 + (i % 2) * 10).padStart(2, "0")}`;
    const slip = [0, 3, 8, -2, 12, 15, 5, 0, 1, 15, 9, 20][i]!;
    const done = i < 4;
    return {
      name,
      system: ["building", "power", "cooling", "power", "power", "commissioning", "fit-out", "fuel", "security", "commissioning", "commissioning", "building"][i]!,
      baselineFinish: baseline,
      forecastFinish: baseline,
      actualFinish: done ? baseline : null,
      slipWorkingDays: slip,
      status: (done ? "complete" : slip > 10 ? "behind" : slip > 4 ? "at_risk" : "on_programme") as "complete" | "behind" | "at_risk" | "on_programme",
    };
  });
  const photos = Array.from({ length: photoCount }, (_, i) => ({
    mediaId: 100 + i,
    caption: ["Chiller 3 lifted onto the roof deck", "Hall 2A hot-aisle containment", "Generator 4 on the load bank", "Fuel polishing skid in place", "Switchroom B busbar", "Cable tray in Hall 2B", "Security gatehouse", "Roof plant from the north"][i % 8]!,
    alt: `Construction photograph ${i + 1} of Aldermere Campus Phase 2`,
    takenOn: `2026-10-${String(3 + i * 3).padStart(2, "0")}`,
    imagePath: `variants/photo-${i + 1}-1600w.jpg`,
    url: `/media/variants/photo-${i + 1}-1600w.jpg`,
    width: 1600,
    height: 1067,
  }));
  const blocks = [
    { name: "Hall 2A (1.2 MW)", baselineReadyDate: "2027-01-15", forecastReadyDate: "2027-02-05", slipWorkingDays: 15, readyForService: false },
    { name: "Hall 2B (1.2 MW)", baselineReadyDate: "2027-04-16", forecastReadyDate: "2027-04-29", slipWorkingDays: 9, readyForService: false },
  ];
  const top = [
    { reference: "R-07", title: "Chiller delivery slips past set-to-work window", kind: "risk" as const, band: "critical" as const, score: 20, trend: "rising" as const, owner: "Priya Castellane", category: "Supply chain", action: "Second supplier quoted; weekly factory call" },
    { reference: "I-02", title: "Grid connection energisation date moved", kind: "issue" as const, band: "high" as const, score: 16, trend: "steady" as const, owner: "Tomasz Wren", category: "Utilities", action: "Temporary supply from generators agreed" },
    { reference: "R-11", title: "Commissioning agent resourcing in January", kind: "risk" as const, band: "high" as const, score: 12, trend: "new" as const, owner: "Harriet Oyelaran", category: "Commissioning", action: "Second team booked from 4 Jan" },
    ...Array.from({ length: 7 }, (_, i) => ({ reference: `R-${20 + i}`, title: `Lesser risk ${i + 1} on the Phase 2 works`, kind: "risk" as const, band: (i < 3 ? "medium" : "low") as "medium" | "low", score: 9 - i, trend: "falling" as const, owner: "Site team", category: "Construction", action: "Monitored at the weekly progress meeting" })),
  ];
  const grid = [];
  for (let l = 1; l <= 5; l += 1)
    for (let i = 1; i <= 5; i += 1) {
      const score = l * i;
      grid.push({ likelihood: l, impact: i, count: (l * 7 + i * 3) % 4 === 0 ? 1 + ((l + i) % 3) : 0, band: (score >= 20 ? "critical" : score >= 12 ? "high" : score >= 6 ? "medium" : "low") as "critical" | "high" | "medium" | "low" });
    }
  const decisions = [
    { reference: "D-04", title: "Approve second chiller supplier", question: "Should the project place a standby order with a second chiller supplier to protect the Hall 2A date?", decider: "Investment committee", neededBy: "2026-11-14", daysLeft: 14, recommendation: "Approve the standby order, capped at the quoted deposit." },
    { reference: "D-05", title: "Release contingency for temporary power", question: "Release contingency to hire temporary generation until the grid connection is energised?", decider: "Lender's technical adviser", neededBy: "2026-10-28", daysLeft: -3, recommendation: "Release the amount in change BC-12." },
  ];
  return {
    project: { slug: "aldermere-phase-2", name: "Aldermere Campus Phase 2", operatorName: "Kestrel Colocation", currency: "GBP", timeZone: "Europe/London" },
    month: "2026-10",
    monthEnd: "2026-10-31",
    asAt: "2026-10-31T23:59:59.999Z",
    state: "draft",
    computedAt: "2026-11-03T09:00:00.000Z",
    summary: {
      percentComplete: 61.4,
      plannedPercent: 66.2,
      spi: 0.93,
      spiT: 0.91,
      spiSentence: spiSentence(0.93),
      spiTSentence: spiTSentence(0.91),
      headline: ["The build is three weeks behind its baseline on Hall 2A, driven by the chiller delivery.", "The projected final cost is within the current budget; contingency is a third drawn."],
      blocks,
      budget: { currentBudget: 48_250_000_00, projectedFinalCost: 47_900_000_00, contingencyRemaining: 2_100_000_00, sentence: "The projected final cost is within the current budget." },
      topRisks: top.slice(0, 3).map(({ reference, title, kind, band, score, trend }) => ({ reference, title, kind, band, score, trend })),
      openDecisions: decisions.map(({ reference, title, neededBy, daysLeft }) => ({ reference, title, neededBy, daysLeft })),
    },
    schedule: {
      completedInMonth: [{ name: "Generators load-bank tested", actualFinish: "2026-10-20", baselineFinish: "2026-10-20" }],
      dueNextMonth: [{ name: "UPS L4 commissioning", forecastFinish: "2026-11-27", baselineFinish: "2026-11-10" }],
      slips: milestones.filter((m) => !m.actualFinish).map((m) => ({ name: m.name, baselineFinish: m.baselineFinish, forecastFinish: m.forecastFinish!, slipWorkingDays: m.slipWorkingDays })),
      drivers: [
        { block: "Hall 2A (1.2 MW)", chain: ["Chiller plant set to work", "UPS L4 commissioning", "Hall 2A integrated systems test", "Hall 2A ready for service"] },
        { block: "Hall 2B (1.2 MW)", chain: ["Hall 2B containment complete", "Hall 2B ready for service"] },
      ],
      trend: ["Hall 2A ready for service", "Hall 2B ready for service", "Practical completion", "UPS L4 commissioning"].map((milestone, k) => ({
        milestone,
        baseline: ["2027-01-15", "2027-04-16", "2027-06-30", "2026-11-10"][k]!,
        points: months.map((monthEnd, i) => ({ monthEnd, forecast: new Date(Date.UTC(2027, [0, 3, 5, -2][k]!, [15, 16, 30, 10][k]! + i * (k + 1) * 2)).toISOString().slice(0, 10) })),
      })),
      ieacT: 58.3,
      ieacTCompletion: "2027-07-21",
      baselineCompletion: "2027-06-30",
      forecastCompletion: "2027-07-28",
    },
    budget: {
      currency: "GBP",
      originalBudget: 46_000_000_00,
      approvedChanges: 2_250_000_00,
      currentBudget: 48_250_000_00,
      projectedFinalCost: 47_900_000_00,
      walk: [
        { label: "Original budget", amount: 46_000_000_00, kind: "start" },
        { label: "BC-03 Second fuel tank", amount: 850_000_00, kind: "change" },
        { label: "BC-07 Chiller upgrade", amount: 1_600_000_00, kind: "change" },
        { label: "BC-09 Value engineering", amount: -200_000_00, kind: "change" },
        { label: "Current budget", amount: 48_250_000_00, kind: "subtotal" },
        { label: "Projected final cost", amount: 47_900_000_00, kind: "projection" },
      ],
      eac: [
        { method: "bac_over_cpi", value: 49_100_000_00, sentence: "If cost performance so far continues for the rest of the build.", formula: "EAC = BAC / CPI" },
        { method: "ac_plus_remaining", value: 47_900_000_00, sentence: "If the rest of the work costs what the budget says.", formula: "EAC = AC + (BAC − EV)" },
        { method: "ac_plus_remaining_over_cpi_spi", value: 50_300_000_00, sentence: "If both cost and schedule performance so far carry on.", formula: "EAC = AC + (BAC − EV) / (CPI × SPI)" },
      ],
      projectedFinalCostMethod: "ac_plus_remaining",
      contingency: { held: 3_000_000_00, drawn: 900_000_00, remaining: 2_100_000_00 },
      cpi: 0.98,
      spi: 0.93,
      caution: "Cost figures are the project's own estimates, not audited accounts.",
    },
    facility: {
      ramp: [
        { date: "2027-01-15", racksBaseline: 240, racksForecast: 0, kwBaseline: 1200, kwForecast: 0 },
        { date: "2027-02-05", racksBaseline: 240, racksForecast: 240, kwBaseline: 1200, kwForecast: 1200 },
        { date: "2027-04-16", racksBaseline: 480, racksForecast: 240, kwBaseline: 2400, kwForecast: 1200 },
        { date: "2027-04-29", racksBaseline: 480, racksForecast: 480, kwBaseline: 2400, kwForecast: 2400 },
      ],
      blocks,
      systems: [
        { name: "Chilled water", kind: "cooling", design: "N+1", now: "N", summary: "Three of four chillers available; the design needs three.", carriesLoad: false },
        { name: "UPS A and B", kind: "power", design: "2N", now: "2N", summary: "Both UPS systems commissioned to L4.", carriesLoad: false },
        { name: "Standby generation", kind: "power", design: "N+1", now: "N+1", summary: "Five generators, four needed at full load.", carriesLoad: false },
      ],
      availableFromLevel: 4,
    },
    risks: { top, grid, scale: { likelihoodLevels: 5, impactLevels: 5, bandEdges: { medium: 6, high: 12, critical: 20 } }, openRisks: 9, openIssues: 1 },
    decisions,
    photos,
    cautions: { indicative: INDICATIVE_CAUTION, site: "The site is a construction site: visits only by arrangement, with an induction and the protective equipment the site team issues." },
    milestones,
  };
}

/** A site photograph's derivative: a drawn site scene with sensor-like grain, so its JPEG bytes are like a real one's. */
export async function sitePhoto(seed: number, width = 1600, height = 1067): Promise<Buffer> {
  // Imported here so a process that only renders (the benchmark's) does not load libvips.
  const { makePatternedImage } = await import("../helpers/images.ts");
  return makePatternedImage({ width, height, seed, noise: 6, texture: 10, format: "jpeg", quality: 82 });
}

/** A loader over photos made in memory, keyed as the figures name them. */
export async function photoLoader(figures: ReportFigures, width = 1600, height = 1067): Promise<ReportImageLoader> {
  const bytes = new Map<string, Buffer>();
  await Promise.all(figures.photos.map(async (p, i) => bytes.set(p.imagePath, await sitePhoto(i + 1, width, height))));
  return async (key) => bytes.get(key) ?? null;
}
