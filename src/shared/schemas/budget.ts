import { z } from "zod";
import { CalendarDateSchema, NamedSchema, patchShape } from "./common.ts";
import { RecordAudienceSchema, recordEventShape, RiskRefSchema } from "./risks.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of budget changes and the cost position (server/budget ↔ the site office and
 * the investor room's Cost). Figures are computed by src/shared/domain/budget.ts; the original budget
 * (BAC), PV, EV and AC come from the programme (milestone budgets and cost actuals). Money is integer
 * minor units of the project's currency.
 */

export const BudgetChangeStatusSchema = z.enum(["proposed", "approved", "rejected"]);
export type BudgetChangeStatus = z.infer<typeof BudgetChangeStatusSchema>;

/** The estimate at completion the project lead selects as the projected final cost (PMBOK variants). */
export const EacMethodSchema = z.enum(["bac_over_cpi", "ac_plus_remaining", "ac_plus_remaining_over_cpi_spi"]);
export type EacMethod = z.infer<typeof EacMethodSchema>;

const Text = multilineText().max(5000, "must be at most 5000 characters");
const Ids = z.array(z.number().int().positive()).max(100);
const Amount = z.number({ error: "must be a number" }).int("must be whole minor units").min(-1e15).max(1e15).refine((v) => v !== 0, "must not be zero");

const CHANGE_FIELDS = {
  description: plainText().min(1, "is required").max(500),
  detail: Text,
  /** Positive adds to the budget, negative saves; minor units. */
  amount: Amount,
  status: BudgetChangeStatusSchema,
  /** Who approved (a person or body, in words) and when: required when `status` is approved. */
  approvedBy: plainText().max(120).nullable(),
  approvedOn: CalendarDateSchema.nullable(),
  drawsOnContingency: z.boolean(),
  linkedMilestones: Ids,
  linkedRisks: Ids,
  audience: RecordAudienceSchema,
} as const;

function approvalComplete(v: { status?: BudgetChangeStatus; approvedBy?: string | null; approvedOn?: string | null }, ctx: z.RefinementCtx) {
  if (v.status !== "approved") return;
  if (!v.approvedBy) ctx.addIssue({ code: "custom", path: ["approvedBy"], message: "is required for an approved change" });
  if (!v.approvedOn) ctx.addIssue({ code: "custom", path: ["approvedOn"], message: "is required for an approved change" });
}

export const BudgetChangeCreateInputSchema = z
  .strictObject({
    ...CHANGE_FIELDS,
    detail: CHANGE_FIELDS.detail.default(""),
    status: CHANGE_FIELDS.status.default("proposed"),
    approvedBy: CHANGE_FIELDS.approvedBy.default(null),
    approvedOn: CHANGE_FIELDS.approvedOn.default(null),
    drawsOnContingency: CHANGE_FIELDS.drawsOnContingency.default(false),
    linkedMilestones: CHANGE_FIELDS.linkedMilestones.default([]),
    linkedRisks: CHANGE_FIELDS.linkedRisks.default([]),
  })
  .superRefine(approvalComplete);
export type BudgetChangeCreateInput = z.infer<typeof BudgetChangeCreateInputSchema>;

/** PATCH: approval completeness is checked by the service against the stored row merged with the patch. */
export const BudgetChangePatchInputSchema = z.strictObject({ ...patchShape(CHANGE_FIELDS), note: Text.optional() });
export type BudgetChangePatchInput = z.infer<typeof BudgetChangePatchInputSchema>;

export const BudgetChangeListQuerySchema = z.strictObject({ status: BudgetChangeStatusSchema.optional() });

/** PUT /api/projects/:slug/budget/settings (lead, admin). */
export const BudgetSettingsInputSchema = z.strictObject({
  /** Contingency held in the approved budget at the start, minor units. */
  contingencyHeld: z.number().int().min(0).max(1e15),
  projectedFinalCostMethod: EacMethodSchema,
});
export type BudgetSettingsInput = z.infer<typeof BudgetSettingsInputSchema>;

const BudgetChangeAnswerSchema = z.object({
  id: z.number(),
  /** C-001 … per project. */
  reference: z.string(),
  ...CHANGE_FIELDS,
  linkedMilestones: z.array(NamedSchema),
  linkedRisks: z.array(RiskRefSchema),
  version: z.number(),
  updatedAt: z.string(),
});
export type BudgetChangeAnswer = z.infer<typeof BudgetChangeAnswerSchema>;

const EacVariantSchema = z.object({
  method: EacMethodSchema,
  /** Null where the index it divides by is zero or unknown. */
  value: z.number().nullable(),
  /** One sentence saying what the variant assumes, in plain words. */
  sentence: z.string(),
  /** The formula as written in the source, e.g. "EAC = BAC / CPI". */
  formula: z.string(),
});

/** GET /api/projects/:slug/budget: the cost position at a date (investors and staff; counted over every approved change, whatever its audience, as the figures of one build). */
const BudgetPositionSchema = z.object({
  at: z.string(),
  currency: z.string(),
  originalBudget: z.number(),
  approvedChanges: z.number(),
  currentBudget: z.number(),
  contingencyHeld: z.number(),
  contingencyDrawn: z.number(),
  contingencyRemaining: z.number(),
  plannedValue: z.number(),
  earnedValue: z.number(),
  actualCost: z.number(),
  cpi: z.number().nullable(),
  spi: z.number().nullable(),
  eac: z.array(EacVariantSchema),
  projectedFinalCostMethod: EacMethodSchema,
  projectedFinalCost: z.number().nullable(),
  /** The walk for the chart: original → each approved change (visible ones named, the rest summed) → current → projected final. */
  walk: z.array(z.object({ label: z.string(), amount: z.number(), kind: z.enum(["start", "change", "subtotal", "projection"]) })),
  /** Expected cost exposure of open risks the caller may see, against the remaining contingency. */
  riskExposure: z.object({ expected: z.number(), pert: z.number() }),
  caution: z.string(),
});
export type BudgetPosition = z.infer<typeof BudgetPositionSchema>;

const BudgetEventSchema = z.object({ id: z.number(), changeId: z.number().nullable(), ...recordEventShape });

export const BUDGET_ANSWERS = { change: BudgetChangeAnswerSchema, position: BudgetPositionSchema, event: BudgetEventSchema } as const;
