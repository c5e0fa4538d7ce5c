import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { budgetPosition, type BudgetChangeInput, type BudgetPositionInput } from "../../src/shared/domain/budget.ts";
import { EacMethodSchema } from "../../src/shared/schemas/budget.ts";

function position(over: Partial<BudgetPositionInput> = {}) {
  return budgetPosition({
    originalBudget: 120_000,
    changes: [],
    contingencyHeld: 0,
    plannedValue: 23_000,
    earnedValue: 20_000,
    actualCost: 25_000,
    method: "bac_over_cpi",
    ...over,
  });
}

const eacValues = (p: ReturnType<typeof budgetPosition>) => p.eac.map((v) => v.value);

function change(amount: number, status: BudgetChangeInput["status"] = "approved", drawsOnContingency = false, label = `Change ${amount}`): BudgetChangeInput {
  return { amount, status, drawsOnContingency, label };
}

describe("estimate at completion, the three variants", () => {
  // Source: Schwalbe, Information Technology Project Management, ch. 7, exercise 1 (secondary,
  // via CHECKS.md): EAC = BAC / CPI = 150,000; the other two derived with CPI 0.8 and SPI 0.869565
  // (PMI PMBOK Guide, Table 7-1 "Earned Value Calculations Summary Table"; secondary).
  it("gives 150,000 · 125,000 · 168,750 for PV 23,000 · EV 20,000 · AC 25,000 · BAC 120,000", () => {
    const p = position();
    expect(p.eac.map((v) => v.method)).toEqual(EacMethodSchema.options);
    expect(eacValues(p)).toEqual([150_000, 125_000, 168_750]);
    expect(p.cpi).toBe(0.8);
    expect(p.spi).toBeCloseTo(0.869565, 6);
  });

  // Source: PMI PMBOK Guide, Table 7-1 (secondary): the formulas as written.
  it("names each variant's formula and says what it assumes", () => {
    expect(position().eac.map((v) => v.formula)).toEqual(["EAC = BAC / CPI", "EAC = AC + (BAC − EV)", "EAC = AC + (BAC − EV) / (CPI × SPI)"]);
    for (const v of position().eac) expect(v.sentence).toMatch(/^If .+\.$/);
  });

  // Source: a PMP study guide (secondary, via CHECKS.md): the guide prints 538,344 after rounding
  // CPI to .93; at full precision EAC = BAC / CPI is 540,000 exactly.
  it("gives BAC / CPI = 540,000 exactly for BAC 500,000 · EV 150,000 · AC 162,000", () => {
    const p = position({ originalBudget: 500_000, plannedValue: 150_000, earnedValue: 150_000, actualCost: 162_000 });
    expect(p.eac[0]?.value).toBe(540_000);
    expect(p.projectedFinalCost).toBe(540_000);
  });

  // Source: trade press article, 2006 (secondary, via CHECKS.md): printed 240.96 after rounding
  // CPI; at full precision 240 exactly.
  it("gives BAC / CPI = 240 exactly for BAC 200 · EV 50 · AC 60", () => {
    expect(position({ originalBudget: 200, plannedValue: 50, earnedValue: 50, actualCost: 60 }).eac[0]?.value).toBe(240);
  });

  // Source: the Schwalbe row again, with the BAC built as original 100,000 + an approved change of
  // 20,000: the formulas take the current approved budget as BAC (decision 035).
  it("takes the current approved budget as BAC", () => {
    const p = position({ originalBudget: 100_000, changes: [change(20_000)] });
    expect(p.currentBudget).toBe(120_000);
    expect(eacValues(p)).toEqual([150_000, 125_000, 168_750]);
  });

  it("gives the projected final cost by the lead's selected variant", () => {
    expect(position({ method: "ac_plus_remaining" }).projectedFinalCost).toBe(125_000);
    expect(position({ method: "ac_plus_remaining_over_cpi_spi" }).projectedFinalCost).toBe(168_750);
  });

  // Our own examples: where an index divides by zero the variant has no value, never NaN.
  it("has no value where an index is zero or unknown", () => {
    const nothingEarned = position({ earnedValue: 0 });
    expect(eacValues(nothingEarned)).toEqual([null, 145_000, null]);
    const nothingSpent = position({ actualCost: 0 });
    expect(nothingSpent.cpi).toBeNull();
    expect(eacValues(nothingSpent)).toEqual([null, 100_000, null]);
    const nothingPlanned = position({ plannedValue: 0 });
    expect(nothingPlanned.spi).toBeNull();
    expect(eacValues(nothingPlanned)).toEqual([150_000, 125_000, null]);
    expect(nothingEarned.projectedFinalCost).toBeNull();
    expect(nothingEarned.walk.map((s) => s.kind)).toEqual(["start", "subtotal"]);
  });
});

describe("approved budget and contingency", () => {
  // Common practice (no published source): only approved changes move the budget; a change drawn
  // on contingency moves money from the contingency into the works (decision 035).
  it("counts approved changes only, and those drawn on contingency against the contingency", () => {
    const p = position({
      originalBudget: 1_000_000,
      contingencyHeld: 50_000,
      changes: [
        change(30_000, "approved", false, "Second chiller pad"),
        change(-8_000, "approved", false, "Value engineering: cable trays"),
        change(90_000, "proposed"),
        change(12_000, "rejected"),
        change(15_000, "approved", true, "Ground conditions"),
        change(40_000, "proposed", true),
      ],
    });
    expect(p.approvedChanges).toBe(22_000);
    expect(p.currentBudget).toBe(1_022_000);
    expect(p.contingencyHeld).toBe(50_000);
    expect(p.contingencyDrawn).toBe(15_000);
    expect(p.contingencyRemaining).toBe(35_000);
  });

  it("lets the contingency remaining go negative when more is drawn than held", () => {
    const p = position({ contingencyHeld: 10_000, changes: [change(6_000, "approved", true), change(7_000, "approved", true)] });
    expect(p.contingencyDrawn).toBe(13_000);
    expect(p.contingencyRemaining).toBe(-3_000);
    expect(p.currentBudget).toBe(120_000);
  });

  it("walks from the original budget through each approved change to the projected final cost", () => {
    const p = position({
      originalBudget: 100_000,
      changes: [change(25_000, "approved", false, "Extra hall fit-out"), change(-5_000, "approved", false, "Smaller generator yard"), change(3_000, "approved", true, "Drawn"), change(9_000, "proposed")],
    });
    expect(p.walk).toEqual([
      { label: "Original budget", amount: 100_000, kind: "start" },
      { label: "Extra hall fit-out", amount: 25_000, kind: "change" },
      { label: "Smaller generator yard", amount: -5_000, kind: "change" },
      { label: "Current approved budget", amount: 120_000, kind: "subtotal" },
      { label: "Projected final cost", amount: 150_000, kind: "projection" },
    ]);
  });

  it("keeps the walk's steps adding up to the current approved budget", () => {
    const changeArb = fc.record({
      amount: fc.integer({ min: -1e9, max: 1e9 }).filter((a) => a !== 0),
      status: fc.constantFrom("proposed" as const, "approved" as const, "rejected" as const),
      drawsOnContingency: fc.boolean(),
      label: fc.string(),
    });
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1e12 }), fc.integer({ min: 0, max: 1e10 }), fc.array(changeArb, { maxLength: 12 }), (original, held, changes) => {
        const p = position({ originalBudget: original, contingencyHeld: held, changes });
        const steps = p.walk.filter((s) => s.kind === "start" || s.kind === "change");
        expect(steps.reduce((n, s) => n + s.amount, 0)).toBe(p.currentBudget);
        expect(p.walk.find((s) => s.kind === "subtotal")?.amount).toBe(p.currentBudget);
        expect(p.currentBudget - original).toBe(p.approvedChanges);
        expect(p.contingencyRemaining + p.contingencyDrawn).toBe(held);
      }),
    );
  });
});
