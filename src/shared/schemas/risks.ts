import { z } from "zod";
import { CalendarDateSchema, NamedSchema, patchShape, VersionSchema } from "./common.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the risks and issues register (server/risks ↔ src/features/risks and the
 * investor room). Scores, bands and trends are computed by src/shared/domain/risks.ts. Money is
 * integer minor units of the project's currency; calendar dates `YYYY-MM-DD`.
 */

/** Investor or internal only: nothing of the register is ever public. */
export const RecordAudienceSchema = z.enum(["investor", "internal"]);
export type RecordAudience = z.infer<typeof RecordAudienceSchema>;

export const RiskCategorySchema = z.enum(["programme", "cost", "supply_chain", "technical", "commercial", "safety", "regulatory", "other"]);
export type RiskCategory = z.infer<typeof RiskCategorySchema>;
/** A risk is open, closed, or became an issue; an issue is open or closed. */
export const RiskStatusSchema = z.enum(["open", "closed", "became_issue"]);
export type RiskStatus = z.infer<typeof RiskStatusSchema>;
export const RiskKindSchema = z.enum(["risk", "issue"]);
export type RiskKind = z.infer<typeof RiskKindSchema>;
export const ActionStatusSchema = z.enum(["planned", "in_progress", "done", "dropped"]);
export type ActionStatus = z.infer<typeof ActionStatusSchema>;
export const RiskBandSchema = z.enum(["low", "medium", "high", "critical"]);
export type RiskBand = z.infer<typeof RiskBandSchema>;
export const RiskTrendSchema = z.enum(["new", "rising", "falling", "steady"]);
export type RiskTrend = z.infer<typeof RiskTrendSchema>;

const Title = plainText().min(1, "is required").max(200, "must be at most 200 characters");
const Text = multilineText().max(5000, "must be at most 5000 characters");
const Money = z.number({ error: "must be a number" }).int("must be whole minor units").min(0, "must not be negative").max(1e15);
const Ids = z.array(z.number().int().positive()).max(100);
/** Likelihood and impact: whole levels 1 … the project's scale (checked by the service against the setting). */
const Level = z.number({ error: "must be a number" }).int("must be a whole level").min(1, "must be at least 1").max(10, "must be at most 10");

const CostExposureSchema = z
  .strictObject({
    min: Money,
    mostLikely: Money,
    max: Money,
    /** Probability the risk happens, 0 … 1. */
    probability: z.number().min(0, "must be between 0 and 1").max(1, "must be between 0 and 1"),
  })
  .superRefine((v, ctx) => {
    if (v.min > v.mostLikely) ctx.addIssue({ code: "custom", path: ["min"], message: "must not exceed the most likely" });
    if (v.mostLikely > v.max) ctx.addIssue({ code: "custom", path: ["max"], message: "must not be below the most likely" });
  });
export type CostExposure = z.infer<typeof CostExposureSchema>;

const RISK_FIELDS = {
  title: Title,
  description: Text,
  cause: Text,
  effect: Text,
  category: RiskCategorySchema,
  /** A staff user (admin, lead or marketing). */
  ownerId: z.number().int().positive(),
  likelihood: Level,
  impact: Level,
  costExposure: CostExposureSchema.nullable(),
  /** Schedule exposure in working days (0 … 1000), or none. */
  scheduleDays: z.number().int().min(0).max(1000).nullable(),
  linkedMilestones: Ids,
  linkedBlocks: Ids,
  linkedSystems: Ids,
  audience: RecordAudienceSchema,
  /** Issues only: the impact now, and the action taken; due date of that action. */
  impactNow: Text,
  action: Text,
  dueDate: CalendarDateSchema.nullable(),
} as const;

export const RiskCreateInputSchema = z.strictObject({
  kind: RiskKindSchema.default("risk"),
  ...RISK_FIELDS,
  description: RISK_FIELDS.description.default(""),
  cause: RISK_FIELDS.cause.default(""),
  effect: RISK_FIELDS.effect.default(""),
  costExposure: RISK_FIELDS.costExposure.default(null),
  scheduleDays: RISK_FIELDS.scheduleDays.default(null),
  linkedMilestones: RISK_FIELDS.linkedMilestones.default([]),
  linkedBlocks: RISK_FIELDS.linkedBlocks.default([]),
  linkedSystems: RISK_FIELDS.linkedSystems.default([]),
  impactNow: RISK_FIELDS.impactNow.default(""),
  action: RISK_FIELDS.action.default(""),
  dueDate: RISK_FIELDS.dueDate.default(null),
});
export type RiskCreateInput = z.infer<typeof RiskCreateInputSchema>;

/** PATCH: any subset plus `status` and an optional note for the event; `version` read (409 when stale). */
export const RiskPatchInputSchema = z.strictObject({ ...patchShape(RISK_FIELDS), status: RiskStatusSchema.optional(), note: Text.optional() });
export type RiskPatchInput = z.infer<typeof RiskPatchInputSchema>;

/** POST /api/risks/:id/issue: the risk happened; an issue is opened from it and the risk marked `became_issue`. */
export const RiskToIssueInputSchema = z.strictObject({
  impactNow: Text.min(1, "is required"),
  action: Text.default(""),
  dueDate: CalendarDateSchema.nullable().default(null),
  note: Text.optional(),
  version: VersionSchema,
});
export type RiskToIssueInput = z.infer<typeof RiskToIssueInputSchema>;

const MITIGATION_FIELDS = {
  description: Title,
  ownerId: z.number().int().positive(),
  dueDate: CalendarDateSchema.nullable(),
  status: ActionStatusSchema,
} as const;
export const MitigationInputSchema = z.strictObject({
  ...MITIGATION_FIELDS,
  dueDate: MITIGATION_FIELDS.dueDate.default(null),
  status: MITIGATION_FIELDS.status.default("planned"),
});
export type MitigationInput = z.infer<typeof MitigationInputSchema>;
/** PATCH: any subset (no defaults: a field left out keeps its value); `version` read (409 when stale). */
export const MitigationPatchInputSchema = z.strictObject(patchShape(MITIGATION_FIELDS));
export type MitigationPatchInput = z.infer<typeof MitigationPatchInputSchema>;

/** GET /api/projects/:slug/risks?status&category&ownerId&band&kind&since — filters all optional. */
export const RiskListQuerySchema = z.strictObject({
  kind: RiskKindSchema.optional(),
  status: RiskStatusSchema.optional(),
  category: RiskCategorySchema.optional(),
  ownerId: z.coerce.number().int().positive().optional(),
  band: RiskBandSchema.optional(),
  /** Start of the reporting window for the trend (default: 30 days before today, in the project's time zone). */
  since: CalendarDateSchema.optional(),
});

/**
 * The project's risk scale: levels of likelihood and impact (default 5 × 5) and the lowest score of
 * each band above `low` (default medium ≥ 5, high ≥ 10, critical ≥ 16 — common practice on a 5 × 5
 * grid; see the risks decision record).
 */
export const RiskScaleSchema = z
  .strictObject({
    likelihoodLevels: z.number().int().min(3).max(10),
    impactLevels: z.number().int().min(3).max(10),
    bandEdges: z.strictObject({ medium: z.number().int().min(2), high: z.number().int().min(3), critical: z.number().int().min(4) }),
  })
  .superRefine((v, ctx) => {
    if (!(v.bandEdges.medium < v.bandEdges.high && v.bandEdges.high < v.bandEdges.critical)) ctx.addIssue({ code: "custom", path: ["bandEdges"], message: "must rise: medium < high < critical" });
    if (v.bandEdges.critical > v.likelihoodLevels * v.impactLevels) ctx.addIssue({ code: "custom", path: ["bandEdges", "critical"], message: "must be reachable on the scale" });
  });
export type RiskScale = z.infer<typeof RiskScaleSchema>;
export const DEFAULT_RISK_SCALE: RiskScale = { likelihoodLevels: 5, impactLevels: 5, bandEdges: { medium: 5, high: 10, critical: 16 } };

// ---------------------------------------------------------------------------------------------
// Answers
// ---------------------------------------------------------------------------------------------

const Named = NamedSchema;

/** A risk as other records link it: its id, reference and title. */
export const RiskRefSchema = z.object({ id: z.number(), reference: z.string(), title: z.string() });

/**
 * What a row of the investor record's history says after its own id and its subject's: the field
 * changed, from → to, when, by whom, and the note (risks, decisions and budget changes keep their events alike).
 */
export const recordEventShape = {
  field: z.string(),
  from: z.string().nullable(),
  to: z.string().nullable(),
  at: z.string(),
  by: z.string().nullable(),
  note: z.string().nullable(),
};

const MitigationAnswerSchema = z.object({ id: z.number(), ...z.object(MITIGATION_FIELDS).omit({ ownerId: true }).shape, owner: Named, overdue: z.boolean(), version: z.number() });

const RiskAnswerSchema = z.object({
  id: z.number(),
  kind: RiskKindSchema,
  /** R-001 for risks, I-001 for issues, per project. */
  reference: z.string(),
  ...z.object(RISK_FIELDS).omit({ ownerId: true }).shape,
  owner: Named,
  score: z.number(),
  band: RiskBandSchema,
  trend: RiskTrendSchema,
  /** The score at the start of the window (null when the item is newer). */
  scoreAtWindowStart: z.number().nullable(),
  /** probability × most likely, minor units. */
  expectedCost: z.number().nullable(),
  /** probability × (min + 4·most likely + max) / 6, minor units. */
  expectedCostPert: z.number().nullable(),
  /** Only the linked milestones, blocks and systems the caller may see. */
  linkedMilestones: z.array(Named),
  linkedBlocks: z.array(Named),
  linkedSystems: z.array(Named),
  status: RiskStatusSchema,
  /** For an issue opened from a risk, the risk's id and reference; for such a risk, its issue's. */
  fromRisk: z.object({ id: z.number(), reference: z.string() }).nullable(),
  issue: z.object({ id: z.number(), reference: z.string() }).nullable(),
  mitigations: z.array(MitigationAnswerSchema),
  version: z.number(),
  updatedAt: z.string(),
});
export type RiskAnswer = z.infer<typeof RiskAnswerSchema>;

const RiskEventSchema = z.object({ id: z.number(), riskId: z.number(), ...recordEventShape });
export type RiskEvent = z.infer<typeof RiskEventSchema>;

/** GET /api/projects/:slug/risks/summary: the grid and totals for the investor room and the office. */
const RiskSummarySchema = z.object({
  scale: z.object({ likelihoodLevels: z.number(), impactLevels: z.number(), bandEdges: z.object({ medium: z.number(), high: z.number(), critical: z.number() }) }),
  /** Open risks counted by likelihood (1 …) and impact (1 …). */
  grid: z.array(z.object({ likelihood: z.number(), impact: z.number(), count: z.number(), band: RiskBandSchema })),
  openRisks: z.number(),
  openIssues: z.number(),
  byBand: z.record(RiskBandSchema, z.number()),
  /** Summed expected cost of the open risks, both ways (null for callers who may not see money). */
  totalExpectedCost: z.number().nullable(),
  totalExpectedCostPert: z.number().nullable(),
  /** Remaining contingency (null for callers who may not see money). */
  contingencyRemaining: z.number().nullable(),
  windowStart: z.string(),
});
export type RiskSummary = z.infer<typeof RiskSummarySchema>;

export const RISKS_ANSWERS = { risk: RiskAnswerSchema, event: RiskEventSchema, summary: RiskSummarySchema, mitigation: MitigationAnswerSchema } as const;
