import type { BudgetChangeStatus, EacMethod } from "#shared/schemas/budget.ts";

export const STATUS_WORD: Record<BudgetChangeStatus, string> = { proposed: "Proposed", approved: "Approved", rejected: "Rejected" };
/** Status by a glyph as well as the word (DEVELOPERS.md "Shapes"): a dotted ring waiting for a decision, a disc approved, a cross rejected. */
export const STATUS_GLYPH: Record<BudgetChangeStatus, string> = { proposed: "◌", approved: "●", rejected: "✕" };

export const METHOD_WORD: Record<EacMethod, string> = {
  bac_over_cpi: "Cost performance continues",
  ac_plus_remaining: "Remaining work to budget",
  ac_plus_remaining_over_cpi_spi: "Cost and schedule performance continue",
};

/** "+£12,500" / "−£3,000.50": a change's amount in full, signed, in the project's currency. */
export function signedMoney(minor: number, currency: string): string {
  try {
    return new Intl.NumberFormat("en-GB", { style: "currency", currency, signDisplay: "exceptZero", minimumFractionDigits: 0, maximumFractionDigits: 2 }).format(minor / 100).replace("-", "−");
  } catch {
    return `${minor >= 0 ? "+" : "−"}${Math.abs(minor / 100)} ${currency}`;
  }
}

/** "£1,234,567": a position figure in full (the register is exact; the investor room rounds). */
export function fullMoney(minor: number | null, currency: string): string {
  if (minor === null) return "—";
  try {
    return new Intl.NumberFormat("en-GB", { style: "currency", currency, maximumFractionDigits: 0 }).format(minor / 100).replace("-", "−");
  } catch {
    return `${Math.round(minor / 100)} ${currency}`;
  }
}
