import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  expectedCost,
  expectedCostPert,
  exposureTotals,
  pertMean,
  riskBand,
  riskGrid,
  riskScore,
  riskTrend,
  scoreAt,
  validateLevels,
  type LevelEvent,
} from "../../src/shared/domain/risks.ts";
import { DEFAULT_RISK_SCALE, RiskScaleSchema, type RiskBand, type RiskScale } from "../../src/shared/schemas/risks.ts";

const BAND_RANK: Record<RiskBand, number> = { low: 0, medium: 1, high: 2, critical: 3 };

describe("riskScore and riskBand", () => {
  // Common practice (no published source): score = likelihood × impact on a 5 × 5 grid.
  it.each([
    [1, 1, 1],
    [3, 4, 12],
    [5, 5, 25],
  ])("likelihood %i × impact %i scores %i", (l, i, score) => {
    expect(riskScore(l, i)).toBe(score);
  });

  // Common practice (no published source): default edges medium ≥ 5, high ≥ 10, critical ≥ 16
  // on the 5 × 5 grid; each edge belongs to the band it opens.
  it.each([
    [1, "low"],
    [4, "low"],
    [5, "medium"],
    [9, "medium"],
    [10, "high"],
    [15, "high"],
    [16, "critical"],
    [25, "critical"],
  ] as const)("score %i on the default scale is %s", (score, band) => {
    expect(riskBand(score, DEFAULT_RISK_SCALE)).toBe(band);
  });

  // Common practice (no published source): the bands follow the project's own edges.
  it("follows a project's own edges", () => {
    const scale: RiskScale = { likelihoodLevels: 4, impactLevels: 4, bandEdges: { medium: 3, high: 6, critical: 12 } };
    expect([2, 3, 5, 6, 11, 12].map((s) => riskBand(s, scale))).toEqual(["low", "medium", "medium", "high", "high", "critical"]);
  });
});

describe("scoreAt", () => {
  const risk = { likelihood: 4, impact: 5, createdAt: "2026-09-01T08:00:00Z" };
  const events: LevelEvent[] = [
    { field: "likelihood", from: "2", to: "3", at: "2026-10-01T09:00:00Z" },
    { field: "title", from: "Chiller", to: "Chiller delivery", at: "2026-10-05T09:00:00Z" },
    { field: "impact", from: "3", to: "5", at: "2026-10-10T09:00:00Z" },
    { field: "likelihood", from: "3", to: "4", at: "2026-11-01T09:00:00Z" },
  ];

  // Our own worked replay: undo the later level events, latest first.
  it.each([
    ["2026-12-01T00:00:00Z", 20],
    ["2026-11-01T09:00:00Z", 20], // an event at the instant has happened
    ["2026-10-20T00:00:00Z", 15],
    ["2026-10-06T00:00:00Z", 9],
    ["2026-09-15T00:00:00Z", 6],
    ["2026-09-01T08:00:00.000Z", 6], // created at the instant: it existed
  ])("at %s the score was %i", (instant, score) => {
    expect(scoreAt(risk, events, instant)).toBe(score);
  });

  it("is null before the risk was created", () => {
    expect(scoreAt(risk, events, "2026-08-31T23:59:59Z")).toBeNull();
  });

  it("does not depend on the order the events are given in", () => {
    expect(scoreAt(risk, [...events].reverse(), "2026-09-15T00:00:00Z")).toBe(6);
  });

  it("refuses an instant that is not one", () => {
    expect(() => scoreAt(risk, events, "last week")).toThrow(RangeError);
  });
});

describe("riskTrend", () => {
  // Common practice (no published source): registers compare the score period on period; any
  // move counts, also within a band (decision 035).
  it.each([
    [12, null, "new"],
    [12, 9, "rising"],
    [6, 8, "falling"], // both medium: still falling
    [12, 12, "steady"],
    [20, 12, "rising"],
  ] as const)("now %i against %s at the window start is %s", (now, start, trend) => {
    expect(riskTrend(now, start, DEFAULT_RISK_SCALE)).toBe(trend);
  });
});

describe("pertMean and expected cost", () => {
  // Source: CHECKS.md "Three-point estimates" (PMBOK Guide, "Estimate Activity Durations",
  // beta/PERT; secondary): optimistic 4, most likely 6, pessimistic 14 → 7.0.
  it("gives 7 for 4, 6, 14", () => {
    expect(pertMean(4, 6, 14)).toBe(7);
  });

  // Source: pmlearning.org glossary, "Three-Point Estimating (PERT)", worked example 4, 8, 24 → 10 (secondary).
  it("gives 10 for 4, 8, 24", () => {
    expect(pertMean(4, 8, 24)).toBe(10);
  });

  // Source: schematex.js.org example "Three-point (PERT) estimation with variance": 5/8/14 → 8.5 (secondary).
  it("gives 8.5 for 5, 8, 14", () => {
    expect(pertMean(5, 8, 14)).toBe(8.5);
  });

  // Derived from the formula of Malcolm et al. 1959: (2 + 16 + 12) / 6 = 5.
  it("gives 5 for 2, 4, 12", () => {
    expect(pertMean(2, 4, 12)).toBe(5);
  });

  // Source: the expected value of a risk's cost, probability × impact (PMBOK Guide, expected
  // monetary value analysis; secondary). 40 % of 250,000.00 in minor units.
  it("takes probability × most likely, unrounded", () => {
    expect(expectedCost({ probability: 0.4, mostLikely: 25_000_000 })).toBe(10_000_000);
    expect(expectedCost({ probability: 1 / 3, mostLikely: 100 })).toBeCloseTo(33.333333, 6);
  });

  // Derived: probability × PERT mean; 0.5 × (4 + 32 + 24) / 6 = 5.
  it("takes probability × the PERT mean on the alternative", () => {
    expect(expectedCostPert({ probability: 0.5, min: 4, mostLikely: 8, max: 24 })).toBe(5);
  });

  it("sums open risks only, both ways", () => {
    const exposure = { min: 4, mostLikely: 8, max: 24, probability: 0.5 };
    const totals = exposureTotals([
      { kind: "risk", status: "open", costExposure: exposure },
      { kind: "risk", status: "open", costExposure: { min: 0, mostLikely: 100, max: 200, probability: 0.25 } },
      { kind: "risk", status: "open", costExposure: null },
      { kind: "risk", status: "closed", costExposure: exposure },
      { kind: "risk", status: "became_issue", costExposure: exposure },
      { kind: "issue", status: "open", costExposure: exposure },
    ]);
    expect(totals).toEqual({ expected: 4 + 25, pert: 5 + 25 });
  });
});

describe("riskGrid", () => {
  // Common practice (no published source): the default 5 × 5 grid has 8 low, 7 medium,
  // 6 high and 4 critical cells with edges 5, 10 and 16 (counted by hand).
  it("has every cell of the scale with its band", () => {
    const grid = riskGrid([], DEFAULT_RISK_SCALE);
    expect(grid).toHaveLength(25);
    expect(grid[0]).toEqual({ likelihood: 1, impact: 1, count: 0, band: "low" });
    expect(grid[24]).toEqual({ likelihood: 5, impact: 5, count: 0, band: "critical" });
    const byBand = Object.fromEntries((["low", "medium", "high", "critical"] as const).map((b) => [b, grid.filter((c) => c.band === b).length]));
    expect(byBand).toEqual({ low: 8, medium: 7, high: 6, critical: 4 });
  });

  it("counts open risks in their cells and nothing else", () => {
    const grid = riskGrid(
      [
        { likelihood: 4, impact: 5, kind: "risk", status: "open" },
        { likelihood: 4, impact: 5, kind: "risk", status: "open" },
        { likelihood: 2, impact: 3, kind: "risk", status: "open" },
        { likelihood: 2, impact: 3, kind: "risk", status: "closed" },
        { likelihood: 5, impact: 5, kind: "risk", status: "became_issue" },
        { likelihood: 5, impact: 5, kind: "issue", status: "open" },
        { likelihood: 7, impact: 0, kind: "risk", status: "open" }, // scored on a larger scale
      ],
      DEFAULT_RISK_SCALE,
    );
    const at = (l: number, i: number) => grid.find((c) => c.likelihood === l && c.impact === i)?.count;
    expect(at(4, 5)).toBe(2);
    expect(at(2, 3)).toBe(1);
    expect(at(5, 5)).toBe(0);
    expect(at(5, 1)).toBe(1);
    expect(grid.reduce((n, c) => n + c.count, 0)).toBe(4);
  });
});

describe("validateLevels", () => {
  it("accepts whole levels on the scale", () => {
    expect(validateLevels(1, 5, DEFAULT_RISK_SCALE)).toEqual([]);
  });

  it("names each field outside the scale", () => {
    expect(validateLevels(6, 0, DEFAULT_RISK_SCALE)).toEqual([
      { field: "likelihood", message: "must be a whole level from 1 to 5" },
      { field: "impact", message: "must be a whole level from 1 to 5" },
    ]);
    expect(validateLevels(2.5, 3, DEFAULT_RISK_SCALE).map((p) => p.field)).toEqual(["likelihood"]);
    expect(validateLevels(3, 4, { ...DEFAULT_RISK_SCALE, impactLevels: 3 }).map((p) => p.field)).toEqual(["impact"]);
  });
});

describe("properties", () => {
  const scaleArb = fc
    .record({
      likelihoodLevels: fc.integer({ min: 3, max: 10 }),
      impactLevels: fc.integer({ min: 3, max: 10 }),
      a: fc.integer({ min: 2, max: 100 }),
      b: fc.integer({ min: 2, max: 100 }),
      c: fc.integer({ min: 2, max: 100 }),
    })
    .map(({ likelihoodLevels, impactLevels, a, b, c }) => {
      const [medium, high, critical] = [a, a + b, a + b + c].map((x) => Math.min(x, likelihoodLevels * impactLevels)) as [number, number, number];
      return { likelihoodLevels, impactLevels, bandEdges: { medium, high, critical } };
    })
    .filter((s) => RiskScaleSchema.safeParse(s).success);

  it("scores every valid pair of levels within 1 … L·I", () => {
    fc.assert(
      fc.property(
        scaleArb.chain((s) => fc.tuple(fc.constant(s), fc.integer({ min: 1, max: s.likelihoodLevels }), fc.integer({ min: 1, max: s.impactLevels }))),
        ([s, l, i]) => {
          expect(validateLevels(l, i, s)).toEqual([]);
          const score = riskScore(l, i);
          expect(score).toBeGreaterThanOrEqual(1);
          expect(score).toBeLessThanOrEqual(s.likelihoodLevels * s.impactLevels);
        },
      ),
    );
  });

  it("never lowers the band as the score rises", () => {
    fc.assert(
      fc.property(scaleArb, fc.integer({ min: 1, max: 100 }), fc.integer({ min: 0, max: 100 }), (s, score, step) => {
        expect(BAND_RANK[riskBand(score + step, s)]).toBeGreaterThanOrEqual(BAND_RANK[riskBand(score, s)]);
      }),
    );
  });

  it("keeps the PERT mean between min and max", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 1e12 }), { minLength: 3, maxLength: 3 }), (points) => {
        const [min, mostLikely, max] = [...points].sort((x, y) => x - y) as [number, number, number];
        const mean = pertMean(min, mostLikely, max);
        expect(mean).toBeGreaterThanOrEqual(min);
        expect(mean).toBeLessThanOrEqual(max);
      }),
    );
  });
});
