import { z } from "zod";
import { AudienceSchema, CalendarDateSchema, patchShape, VersionSchema } from "./common.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the facility module (server/facility ↔ src/features/facility and the
 * public and investor pages): capacity blocks, plant systems and their units, site features.
 * Figures are computed by src/shared/domain/facility.ts; every engineering figure travels with
 * the indicative caution. Calendar dates are `YYYY-MM-DD`; instants are ISO 8601 strings.
 */

const Name = plainText().min(1, "is required").max(120, "must be at most 120 characters");
const ShortText = plainText().max(200, "must be at most 200 characters");
const Notes = multilineText().max(4000, "must be at most 4000 characters");
const Count = (max: number) => z.number({ error: "must be a number" }).int("must be a whole number").min(0, "must not be negative").max(max, `must be at most ${max}`);
const Positive = (max: number) => z.number({ error: "must be a number" }).gt(0, "must be greater than 0").max(max, `must be at most ${max}`);
const MilestoneIds = z.array(z.number().int().positive()).max(100);
const BlockIds = z.array(z.number().int().positive()).max(50);

// ---------------------------------------------------------------------------------------------
// Capacity blocks
// ---------------------------------------------------------------------------------------------

/** Suggestions offered for the free-text cooling approach (any text is accepted). */
export const COOLING_APPROACH_SUGGESTIONS = [
  "Air-cooled chillers with free cooling",
  "Rear-door heat exchangers",
  "Direct-to-chip liquid cooling",
  "Indirect evaporative cooling",
  "In-row cooling",
] as const;

export const ContainmentSchema = z.enum(["none", "hot_aisle", "cold_aisle", "chimney", "enclosed_rack"]);
export type Containment = z.infer<typeof ContainmentSchema>;

export const BLOCK_FIELDS = {
  name: Name,
  racks: Count(100_000),
  itKw: z.number({ error: "must be a number" }).min(0, "must not be negative").max(1_000_000),
  maxKwPerRack: Positive(1_000),
  coolingApproach: ShortText,
  containment: ContainmentSchema,
  audience: AudienceSchema,
  /** Build stage the block belongs to, e.g. "Stage 1", "Stage 2 (later)". */
  stage: plainText().max(60),
  dependsOn: MilestoneIds,
  /** Notes for prospects (shown on the public page when the block is public). */
  notes: Notes,
} as const;

export const BlockCreateInputSchema = z.strictObject({
  ...BLOCK_FIELDS,
  coolingApproach: BLOCK_FIELDS.coolingApproach.default(""),
  containment: BLOCK_FIELDS.containment.default("none"),
  stage: BLOCK_FIELDS.stage.default(""),
  dependsOn: BLOCK_FIELDS.dependsOn.default([]),
  notes: BLOCK_FIELDS.notes.default(""),
});
export type BlockCreateInput = z.infer<typeof BlockCreateInputSchema>;
/** PATCH: any subset, with the version read (409 when someone saved in between). */
export const BlockPatchInputSchema = z.strictObject(patchShape(BLOCK_FIELDS));
export type BlockPatchInput = z.infer<typeof BlockPatchInputSchema>;

// ---------------------------------------------------------------------------------------------
// Plant systems and their units
// ---------------------------------------------------------------------------------------------

export const PlantKindSchema = z.enum([
  "cooling",
  "air_movement",
  "power_generation",
  "ups",
  "fuel_storage",
  "electrical_distribution",
  "fire_suppression",
  "security",
  "other",
]);
export type PlantKind = z.infer<typeof PlantKindSchema>;

export const RatingUnitSchema = z.enum(["kW", "kVA", "L", "m3/s"]);
export type RatingUnit = z.infer<typeof RatingUnitSchema>;

/**
 * Design figures, each optional; the ones a kind uses:
 * - air movement: `airflowM3s` (per unit) and `deltaTK` → air-side heat removal of N units;
 * - cooling: `chilledWaterFlowKgS` with `chilledWaterSupplyC` / `chilledWaterReturnC` → water-side
 *   heat removal; else N × rating in kW; `supplyAirC` → inlet temperature band;
 * - fuel storage: `usableFuelLitres`, `specificFuelConsumption` (L/kWh, default 0.27);
 * - power generation: rating per unit in kVA or kW (full generator load = N units at rating,
 *   kVA at a power factor of 0.8).
 */
const DESIGN_FIELDS = {
  airflowM3s: Positive(10_000).nullable(),
  deltaTK: Positive(100).nullable(),
  chilledWaterFlowKgS: Positive(10_000).nullable(),
  chilledWaterSupplyC: z.number().min(-20).max(60).nullable(),
  chilledWaterReturnC: z.number().min(-20).max(80).nullable(),
  supplyAirC: z.number().min(-20).max(60).nullable(),
  usableFuelLitres: Positive(100_000_000).nullable(),
  specificFuelConsumption: Positive(5),
} as const;
export const DesignFiguresSchema = z.strictObject({
  airflowM3s: DESIGN_FIELDS.airflowM3s.default(null),
  deltaTK: DESIGN_FIELDS.deltaTK.default(null),
  chilledWaterFlowKgS: DESIGN_FIELDS.chilledWaterFlowKgS.default(null),
  chilledWaterSupplyC: DESIGN_FIELDS.chilledWaterSupplyC.default(null),
  chilledWaterReturnC: DESIGN_FIELDS.chilledWaterReturnC.default(null),
  supplyAirC: DESIGN_FIELDS.supplyAirC.default(null),
  usableFuelLitres: DESIGN_FIELDS.usableFuelLitres.default(null),
  specificFuelConsumption: DESIGN_FIELDS.specificFuelConsumption.default(0.27),
});
export type DesignFigures = z.infer<typeof DesignFiguresSchema>;

const SYSTEM_FIELDS = {
  name: Name,
  kind: PlantKindSchema,
  audience: AudienceSchema,
  /** Blocks whose load the system serves. */
  serves: BlockIds,
  /** Units needed per system to carry the design load: N (at least 1). */
  neededPerSystem: z.number({ error: "must be a number" }).int("must be a whole number").min(1, "must be at least 1").max(1000),
  /** Independent systems (1 for N+k designs, 2 for 2N). */
  independentSystems: z.number().int().min(1, "must be at least 1").max(4),
  /** Rating of one unit and its unit: both or neither. */
  ratingPerUnit: Positive(1_000_000).nullable(),
  ratingUnit: RatingUnitSchema.nullable(),
  design: DesignFiguresSchema,
  linkedMilestones: MilestoneIds,
  notes: Notes,
} as const;

function ratingHasUnit(v: { ratingPerUnit?: number | null; ratingUnit?: RatingUnit | null }, ctx: z.RefinementCtx) {
  const hasRating = v.ratingPerUnit !== undefined && v.ratingPerUnit !== null;
  const hasUnit = v.ratingUnit !== undefined && v.ratingUnit !== null;
  if (hasRating && !hasUnit) ctx.addIssue({ code: "custom", path: ["ratingUnit"], message: "is required with a rating" });
  if (!hasRating && hasUnit) ctx.addIssue({ code: "custom", path: ["ratingPerUnit"], message: "is required with a unit" });
}

export const SystemCreateInputSchema = z
  .strictObject({
    ...SYSTEM_FIELDS,
    independentSystems: SYSTEM_FIELDS.independentSystems.default(1),
    serves: SYSTEM_FIELDS.serves.default([]),
    ratingPerUnit: SYSTEM_FIELDS.ratingPerUnit.default(null),
    ratingUnit: SYSTEM_FIELDS.ratingUnit.default(null),
    design: SYSTEM_FIELDS.design.default(DesignFiguresSchema.parse({})),
    linkedMilestones: SYSTEM_FIELDS.linkedMilestones.default([]),
    notes: SYSTEM_FIELDS.notes.default(""),
  })
  .superRefine(ratingHasUnit);
export type SystemCreateInput = z.infer<typeof SystemCreateInputSchema>;
/** PATCH: rating and unit, when either is sent, are checked together against the stored pair by the service. */
export const SystemPatchInputSchema = z.strictObject({
  ...patchShape(SYSTEM_FIELDS),
  // Without defaults: a figure left out of a PATCH keeps its stored value.
  design: z.strictObject(DESIGN_FIELDS).partial().optional(),
});
export type SystemPatchInput = z.infer<typeof SystemPatchInputSchema>;

/**
 * A unit's progress, in order: ordered → delivered → installed → L1 … L5 (commissioning levels:
 * L1 factory witness test, L2 delivered and inspected, L3 installed and started, L4 functional
 * test, L5 integrated systems test — common practice; names vary by commissioning authority).
 */
export const UNIT_STAGES = ["ordered", "delivered", "installed", "L1", "L2", "L3", "L4", "L5"] as const;
export const UnitStageSchema = z.enum(UNIT_STAGES);
export type UnitStage = z.infer<typeof UnitStageSchema>;

const UNIT_FIELDS = {
  label: Name,
  tag: plainText().max(80),
  /** Which independent system (1 … independentSystems) the unit belongs to. */
  train: z.number().int().min(1).max(4),
} as const;

export const UnitCreateInputSchema = z.strictObject({
  ...UNIT_FIELDS,
  tag: UNIT_FIELDS.tag.default(""),
  train: UNIT_FIELDS.train.default(1),
  stage: UnitStageSchema.default("ordered"),
  /** The day on site the stage was reached (default: today in the project's time zone). */
  on: CalendarDateSchema.optional(),
  note: Notes.optional(),
});
export type UnitCreateInput = z.infer<typeof UnitCreateInputSchema>;

/** PATCH: the label, tag or train (the stage moves by POST …/units/:id/stage). */
export const UnitPatchInputSchema = z.strictObject(patchShape(UNIT_FIELDS));
export type UnitPatchInput = z.infer<typeof UnitPatchInputSchema>;

/** POST …/units/:id/stage: a stage that goes backwards needs a note (422 otherwise). */
export const UnitStageInputSchema = z.strictObject({
  stage: UnitStageSchema,
  on: CalendarDateSchema.optional(),
  note: Notes.optional(),
  version: VersionSchema,
});
export type UnitStageInput = z.infer<typeof UnitStageInputSchema>;

// ---------------------------------------------------------------------------------------------
// Site features for prospects
// ---------------------------------------------------------------------------------------------

export const FeatureKindSchema = z.enum(["security", "client", "connectivity", "certification"]);
export type FeatureKind = z.infer<typeof FeatureKindSchema>;
export const SecurityLayerSchema = z.enum(["perimeter", "building", "hall", "rack"]);
export type SecurityLayer = z.infer<typeof SecurityLayerSchema>;
/**
 * Status words by kind: security, client and connectivity use planned / in_progress / in_place,
 * connectivity also `contracted`; certifications use planned / in_audit / certified.
 */
export const FeatureStatusSchema = z.enum(["planned", "in_progress", "in_place", "contracted", "in_audit", "certified"]);
export type FeatureStatus = z.infer<typeof FeatureStatusSchema>;
export const FEATURE_STATUSES: Record<FeatureKind, readonly FeatureStatus[]> = {
  security: ["planned", "in_progress", "in_place"],
  client: ["planned", "in_progress", "in_place"],
  connectivity: ["planned", "contracted", "in_progress", "in_place"],
  certification: ["planned", "in_audit", "certified"],
};

const FEATURE_FIELDS = {
  kind: FeatureKindSchema,
  name: Name,
  detail: Notes,
  /** Security features only. */
  layer: SecurityLayerSchema.nullable(),
  status: FeatureStatusSchema,
  /** Date of the status (certified on, expected by); optional. */
  statusDate: CalendarDateSchema.nullable(),
  audience: AudienceSchema,
} as const;

function featureFits(v: { kind?: FeatureKind; status?: FeatureStatus; layer?: SecurityLayer | null }, ctx: z.RefinementCtx) {
  if (v.kind && v.status && !FEATURE_STATUSES[v.kind].includes(v.status)) {
    ctx.addIssue({ code: "custom", path: ["status"], message: `must be one of ${FEATURE_STATUSES[v.kind].join(", ")} for ${v.kind}` });
  }
  if (v.kind === "security" && !v.layer) ctx.addIssue({ code: "custom", path: ["layer"], message: "is required for security" });
  if (v.kind && v.kind !== "security" && v.layer) ctx.addIssue({ code: "custom", path: ["layer"], message: "applies to security only" });
}

export const FeatureCreateInputSchema = z
  .strictObject({ ...FEATURE_FIELDS, detail: FEATURE_FIELDS.detail.default(""), layer: FEATURE_FIELDS.layer.default(null), statusDate: FEATURE_FIELDS.statusDate.default(null) })
  .superRefine(featureFits);
export type FeatureCreateInput = z.infer<typeof FeatureCreateInputSchema>;
/** PATCH: the kind is fixed once created; status and layer are checked against it by the service. */
export const FeaturePatchInputSchema = z.strictObject(patchShape(z.object(FEATURE_FIELDS).omit({ kind: true }).shape));
export type FeaturePatchInput = z.infer<typeof FeaturePatchInputSchema>;

/** GET /api/projects/:slug/facility?at=YYYY-MM-DD (staff only may ask for another day). */
export const FacilityQuerySchema = z.strictObject({ at: CalendarDateSchema.optional() });

/** GET /api/projects/:slug/facility/events?from&to: days recorded, inclusive, in the project's time zone; either end may be left open. */
export const FacilityEventsQuerySchema = z
  .strictObject({ from: CalendarDateSchema.optional(), to: CalendarDateSchema.optional() })
  .refine((v) => v.from === undefined || v.to === undefined || v.from <= v.to, { path: ["to"], message: "must not be before from" });

// ---------------------------------------------------------------------------------------------
// Answers
// ---------------------------------------------------------------------------------------------

const Instant = z.string();

const UnitAnswerSchema = z.object({
  id: z.number(),
  ...UNIT_FIELDS,
  /** ordered | delivered | installed | commissioned */
  status: z.enum(["ordered", "delivered", "installed", "commissioned"]),
  /** 1 … 5 when commissioned, else null. */
  commissioningLevel: z.number().nullable(),
  stage: UnitStageSchema,
  /** Commissioned to at least the project's level for carrying load (default L4). */
  available: z.boolean(),
  version: z.number(),
});
export type UnitAnswer = z.infer<typeof UnitAnswerSchema>;

const RedundancyAnswerSchema = z.object({
  /** Label from the units planned, e.g. "N+1". */
  design: z.string(),
  /** Label from the units available, e.g. "N" or "short by 1". */
  now: z.string(),
  /** Units still to make available before the design label is reached. */
  shortfall: z.number(),
  available: z.number(),
  planned: z.number(),
  /** "design N+1 · now N (4 of 5 commissioned)" */
  summary: z.string(),
  /** The now-label carries the design load (at least N in every system needed for one). */
  carriesLoad: z.boolean(),
});

const HeatAnswerSchema = z.object({
  removalKw: z.number(),
  loadKw: z.number(),
  marginKw: z.number(),
  /** "air" (ρ·cp·V̇·ΔT), "water" (ṁ·cp·ΔT) or "rating" (N × kW rating). */
  method: z.enum(["air", "water", "rating"]),
  /** Inlet band of the supply air figure, when given. */
  inletBand: z.string().nullable(),
});

const FuelAnswerSchema = z.object({
  usableLitres: z.number(),
  specificFuelConsumption: z.number(),
  designLoadKw: z.number(),
  fullLoadKw: z.number().nullable(),
  autonomyHoursAtDesignLoad: z.number().nullable(),
  autonomyHoursAtFullLoad: z.number().nullable(),
});

const BlockAnswerSchema = z.object({
  id: z.number(),
  ...BLOCK_FIELDS,
  /** Only the milestones the caller may see. */
  dependsOn: z.array(z.number()),
  baselineReadyDate: z.string().nullable(),
  forecastReadyDate: z.string().nullable(),
  readyForService: z.boolean(),
  slipWorkingDays: z.number().nullable(),
  /** What still stands between the block and service, in plain words. */
  missing: z.array(z.string()),
  /** Systems serving it that the caller may see. */
  systemIds: z.array(z.number()),
  version: z.number(),
});
export type BlockAnswer = z.infer<typeof BlockAnswerSchema>;

const SystemAnswerSchema = z.object({
  id: z.number(),
  ...SYSTEM_FIELDS,
  units: z.array(UnitAnswerSchema),
  redundancy: RedundancyAnswerSchema,
  heat: HeatAnswerSchema.optional(),
  fuel: FuelAnswerSchema.optional(),
  version: z.number(),
});
export type SystemAnswer = z.infer<typeof SystemAnswerSchema>;

const FeatureAnswerSchema = z.object({ id: z.number(), ...FEATURE_FIELDS, version: z.number() });
export type FeatureAnswer = z.infer<typeof FeatureAnswerSchema>;

const RampPointSchema = z.object({ date: z.string(), racksBaseline: z.number(), racksForecast: z.number(), kwBaseline: z.number(), kwForecast: z.number() });

/** GET /api/projects/:slug/facility (fixed interface), filtered by the caller's audience. */
const FacilityAnswerSchema = z.object({
  at: z.string(),
  availableFromLevel: z.number(),
  blocks: z.array(BlockAnswerSchema),
  systems: z.array(SystemAnswerSchema),
  ramp: z.array(RampPointSchema),
  features: z.array(FeatureAnswerSchema),
  caution: z.string(),
});
export type FacilityAnswer = z.infer<typeof FacilityAnswerSchema>;

/** The subject of a facility event. */
export const FacilitySubjectSchema = z.enum(["block", "system", "unit", "feature"]);
export type FacilitySubject = z.infer<typeof FacilitySubjectSchema>;

/** GET /api/projects/:slug/facility/events and …/units/:id/events rows (staff). */
const FacilityEventSchema = z.object({
  id: z.number(),
  subject: FacilitySubjectSchema,
  subjectId: z.number(),
  subjectName: z.string(),
  field: z.string(),
  from: z.string().nullable(),
  to: z.string().nullable(),
  /** The day on site the change happened (units' stages), else the day it was recorded. */
  on: z.string(),
  at: Instant,
  by: z.string().nullable(),
  note: z.string().nullable(),
});
export type FacilityEvent = z.infer<typeof FacilityEventSchema>;

/** The schemas of the facility's answers (exempt from the input text check). */
export const FACILITY_ANSWERS = {
  facility: FacilityAnswerSchema,
  block: BlockAnswerSchema,
  system: SystemAnswerSchema,
  unit: UnitAnswerSchema,
  feature: FeatureAnswerSchema,
  event: FacilityEventSchema,
} as const;

/**
 * PUT /api/projects/:slug/facility/settings (leads and admins): the commissioning level from which
 * a unit counts as carrying its load. L3 (started up) at the earliest, L5 (integrated systems test)
 * at the latest; L4 (functional performance tested) unless the lead says otherwise.
 */
export const FacilitySettingsInputSchema = z.strictObject({
  availableFromLevel: z
    .number({ error: "must be a commissioning level: 3, 4 or 5" })
    .int("must be a commissioning level: 3, 4 or 5")
    .min(3, "must be L3 or later: a unit not yet started up carries no load")
    .max(5, "must be L5 at the latest: there is no level after the integrated systems test"),
});
export type FacilitySettingsInput = z.infer<typeof FacilitySettingsInputSchema>;
/** The answer: the setting as it now stands. */
export const FacilitySettingsSchema = z.object({ availableFromLevel: z.number() });
export type FacilitySettings = z.infer<typeof FacilitySettingsSchema>;
