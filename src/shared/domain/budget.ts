import type { EacMethod } from "../schemas/budget.ts";
import { computeEarnedValue } from "./earned-value.ts";

/**
 * The cost position of a build: the approved budget after changes, the contingency held, drawn and
 * remaining, and the estimate at completion by the three PMBOK variants side by side. Pure; money in
 * integer minor units, results unrounded. The rules are in docs/decisions/035-investor-record-computation.md.
 */

export interface BudgetChangeInput {
  /** Positive adds, negative saves; minor units. */
  amount: number;
  status: "proposed" | "approved" | "rejected";
  drawsOnContingency: boolean;
  /** The step's name in the budget walk. */
  label: string;
}

export interface BudgetPositionInput {
  /** The original budget at completion (BAC before changes). */
  originalBudget: number;
  changes: readonly BudgetChangeInput[];
  contingencyHeld: number;
  plannedValue: number;
  earnedValue: number;
  actualCost: number;
  /** The variant the project lead selected as the projected final cost. */
  method: EacMethod;
}

export interface EacVariant {
  method: EacMethod;
  /** Null where the index it divides by is zero or unknown. */
  value: number | null;
  sentence: string;
  formula: string;
}

export interface BudgetWalkStep {
  label: string;
  /** The level for start, subtotal and projection; the difference for a change. */
  amount: number;
  kind: "start" | "change" | "subtotal" | "projection";
}

export interface BudgetPositionResult {
  approvedChanges: number;
  currentBudget: number;
  contingencyHeld: number;
  contingencyDrawn: number;
  /** Held − drawn; negative when more was drawn than held (the contingency is overspent). */
  contingencyRemaining: number;
  cpi: number | null;
  spi: number | null;
  /** All three variants, in EacMethodSchema's order. */
  eac: EacVariant[];
  projectedFinalCost: number | null;
  walk: BudgetWalkStep[];
}

/**
 * The variants' wording. Source: PMI, PMBOK Guide, Table 7-1 "Earned Value Calculations Summary
 * Table" (secondary, via CHECKS.md).
 */
export const EAC_VARIANTS: Readonly<Record<EacMethod, { formula: string; sentence: string }>> = {
  bac_over_cpi: {
    formula: "EAC = BAC / CPI",
    sentence: "If the cost performance so far continues, the build finishes at this figure.",
  },
  ac_plus_remaining: {
    formula: "EAC = AC + (BAC − EV)",
    sentence: "If the remaining work goes to budget, the build finishes at what has been spent plus the budget of what is left.",
  },
  ac_plus_remaining_over_cpi_spi: {
    formula: "EAC = AC + (BAC − EV) / (CPI × SPI)",
    sentence: "If both cost and schedule performance so far weigh on the remaining work, the build finishes at this figure.",
  },
};

const EAC_ORDER: readonly EacMethod[] = ["bac_over_cpi", "ac_plus_remaining", "ac_plus_remaining_over_cpi_spi"];

/**
 * The budget position. Only approved changes count. A change drawn on contingency moves money from
 * the contingency into the works: it leaves the current approved budget alone and reduces the
 * contingency remaining. Any other approved change moves the current approved budget, which is the
 * BAC of the EAC formulas.
 */
export function budgetPosition(input: BudgetPositionInput): BudgetPositionResult {
  const approved = input.changes.filter((c) => c.status === "approved");
  const budgetChanges = approved.filter((c) => !c.drawsOnContingency);
  const approvedChanges = sum(budgetChanges.map((c) => c.amount));
  const contingencyDrawn = sum(approved.filter((c) => c.drawsOnContingency).map((c) => c.amount));
  const currentBudget = input.originalBudget + approvedChanges;

  const pv = input.plannedValue;
  const ev = input.earnedValue;
  const ac = input.actualCost;
  const ev0 = computeEarnedValue({ pv, ev, ac, bac: currentBudget });
  const cpi = ev0.cpi;
  const spi = ev0.spi;
  const values: Record<EacMethod, number | null> = {
    bac_over_cpi: ev0.eac,
    ac_plus_remaining: ac + (currentBudget - ev),
    // (BAC − EV) / (CPI × SPI) = (BAC − EV) · AC · PV / EV², so the indices are not rounded to
    // floats first (the textbook row gives 168,750 exactly); null when either index is null or 0.
    ac_plus_remaining_over_cpi_spi: cpi === null || spi === null || cpi === 0 || spi === 0 ? null : ac + ((currentBudget - ev) * ac * pv) / (ev * ev),
  };
  const eac = EAC_ORDER.map((method) => ({ method, value: values[method], ...EAC_VARIANTS[method] }));
  const projectedFinalCost = values[input.method];

  const walk: BudgetWalkStep[] = [
    { label: "Original budget", amount: input.originalBudget, kind: "start" },
    ...budgetChanges.map((c) => ({ label: c.label, amount: c.amount, kind: "change" as const })),
    { label: "Current approved budget", amount: currentBudget, kind: "subtotal" },
  ];
  if (projectedFinalCost !== null) walk.push({ label: "Projected final cost", amount: projectedFinalCost, kind: "projection" });

  return {
    approvedChanges,
    currentBudget,
    contingencyHeld: input.contingencyHeld,
    contingencyDrawn,
    contingencyRemaining: input.contingencyHeld - contingencyDrawn,
    cpi,
    spi,
    eac,
    projectedFinalCost,
    walk,
  };
}

function sum(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0);
}
