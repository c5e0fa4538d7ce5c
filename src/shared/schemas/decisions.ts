import { z } from "zod";
import { CalendarDateSchema, NamedSchema, patchShape, VersionSchema } from "./common.ts";
import { RecordAudienceSchema, recordEventShape, RiskRefSchema } from "./risks.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of decisions needed (server/decisions ↔ the site office and the investor room):
 * a request to the investors, lender or board, with options, a recommendation, who decides and by
 * when, and once decided the outcome. Money is integer minor units; dates `YYYY-MM-DD`.
 */

export const DecisionStatusSchema = z.enum(["open", "decided", "withdrawn"]);
export type DecisionStatus = z.infer<typeof DecisionStatusSchema>;

const Title = plainText().min(1, "is required").max(200, "must be at most 200 characters");
const Text = multilineText().max(5000, "must be at most 5000 characters");
const Ids = z.array(z.number().int().positive()).max(100);

const OptionSchema = z.strictObject({
  label: plainText().min(1, "is required").max(120),
  consequence: Text.default(""),
  /** Cost of the option in minor units (may be negative: a saving), or none. */
  cost: z.number().int().min(-1e15).max(1e15).nullable().default(null),
});

const DECISION_FIELDS = {
  title: Title,
  question: Text.min(1, "is required"),
  background: Text,
  options: z.array(OptionSchema).min(1, "needs at least one option").max(8),
  /** Index into `options` of the recommended one, or none. */
  recommendedOption: z.number().int().min(0).nullable(),
  recommendation: Text,
  /** Who decides, in words: "Investors' committee", "Lender", "Board". */
  decider: plainText().min(1, "is required").max(120),
  neededBy: CalendarDateSchema,
  linkedMilestones: Ids,
  linkedRisks: Ids,
  /** Documents of the library attached to the request. */
  documentIds: Ids,
  audience: RecordAudienceSchema,
} as const;

/** POST: a needed-by date in the past (project's time zone) is refused with 422 naming `neededBy`. */
export const DecisionCreateInputSchema = z.strictObject({
  ...DECISION_FIELDS,
  background: DECISION_FIELDS.background.default(""),
  recommendedOption: DECISION_FIELDS.recommendedOption.default(null),
  recommendation: DECISION_FIELDS.recommendation.default(""),
  linkedMilestones: DECISION_FIELDS.linkedMilestones.default([]),
  linkedRisks: DECISION_FIELDS.linkedRisks.default([]),
  documentIds: DECISION_FIELDS.documentIds.default([]),
});
export type DecisionCreateInput = z.infer<typeof DecisionCreateInputSchema>;

export const DecisionPatchInputSchema = z.strictObject({ ...patchShape(DECISION_FIELDS), note: Text.optional() });
export type DecisionPatchInput = z.infer<typeof DecisionPatchInputSchema>;

/** POST /api/decisions/:id/outcome: records the decision (status → decided). */
export const DecisionOutcomeInputSchema = z.strictObject({
  chosenOption: z.number().int().min(0).nullable(),
  outcome: Text.min(1, "is required"),
  /** Who decided, in words (a committee, the lender, a named person). */
  decidedBy: plainText().min(1, "is required").max(120),
  decidedOn: CalendarDateSchema,
  version: VersionSchema,
});
export type DecisionOutcomeInput = z.infer<typeof DecisionOutcomeInputSchema>;

/** POST /api/decisions/:id/withdraw */
export const DecisionWithdrawInputSchema = z.strictObject({ reason: Text.min(1, "is required"), version: VersionSchema });

export const DecisionListQuerySchema = z.strictObject({ status: DecisionStatusSchema.optional() });

const DecisionAnswerSchema = z.object({
  id: z.number(),
  /** D-001 … per project. */
  reference: z.string(),
  ...z.object(DECISION_FIELDS).omit({ documentIds: true }).shape,
  /** Days from today (project time zone) to neededBy; negative when overdue; null once decided or withdrawn. */
  daysLeft: z.number().nullable(),
  overdue: z.boolean(),
  status: DecisionStatusSchema,
  outcome: z.object({ chosenOption: z.number().nullable(), text: z.string(), decidedBy: z.string(), decidedOn: z.string(), recordedBy: z.string().nullable() }).nullable(),
  withdrawnReason: z.string().nullable(),
  linkedMilestones: z.array(NamedSchema),
  linkedRisks: z.array(RiskRefSchema),
  documents: z.array(z.object({ id: z.number(), title: z.string() })),
  version: z.number(),
  updatedAt: z.string(),
});
export type DecisionAnswer = z.infer<typeof DecisionAnswerSchema>;

const DecisionEventSchema = z.object({ id: z.number(), decisionId: z.number(), ...recordEventShape });
export type DecisionEvent = z.infer<typeof DecisionEventSchema>;

export const DECISIONS_ANSWERS = { decision: DecisionAnswerSchema, event: DecisionEventSchema } as const;
