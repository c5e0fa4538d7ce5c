import { z } from "zod";
import { AudienceSchema, CalendarDateSchema, type Audience } from "./common.ts";
import type { MilestoneStatus } from "../domain/programme-health.ts";
import type { MilestoneMove } from "../domain/programme-changes.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the programme module (server/programme ↔ src/features/programme).
 * Calendar dates are `YYYY-MM-DD`; money is integer minor units of the project's currency.
 */

export const SystemSchema = z.enum(["building", "cooling", "power", "fuel", "security", "fit-out", "commissioning"]);
export type System = z.infer<typeof SystemSchema>;

const Name = plainText().min(1, "is required").max(200, "must be at most 200 characters");
const Percent = z.number({ error: "must be a number" }).min(0, "must be between 0 and 100").max(100, "must be between 0 and 100");
const Weight = z.number({ error: "must be a number" }).gt(0, "must be greater than 0").max(1_000_000);
const Budget = z.number().int("must be whole minor units").min(0, "must not be negative").max(1e15);
const DateOrNull = CalendarDateSchema.nullable();

const MilestoneFields = {
  name: Name,
  phase: Name,
  area: plainText().max(100).default(""),
  system: SystemSchema,
  description: multilineText({ trim: false }).max(5000).default(""),
  weight: Weight,
  percentComplete: Percent.default(0),
  plannedStart: DateOrNull.default(null),
  baselineFinish: CalendarDateSchema,
  forecastFinish: DateOrNull.default(null),
  actualFinish: DateOrNull.default(null),
  audience: AudienceSchema,
  budget: Budget.nullable().default(null),
  dependsOn: z.array(z.number().int().positive()).max(100).default([]),
};

const startBeforeFinish = (v: { plannedStart?: string | null; baselineFinish?: string }) =>
  !v.plannedStart || !v.baselineFinish || v.plannedStart <= v.baselineFinish;

/** POST /api/projects/:slug/milestones. The server also refuses an actual finish in the future. */
export const MilestoneCreateInputSchema = z
  .strictObject(MilestoneFields)
  .refine(startBeforeFinish, { path: ["baselineFinish"], message: "must not be before the planned start" });
export type MilestoneCreateInput = z.infer<typeof MilestoneCreateInputSchema>;

/**
 * PATCH /api/milestones/:id. `version` is the one the client last read; a stale one → 409.
 * The baseline finish changes only by re-baselining (POST …/baselines), which asks for a reason.
 */
export const MilestonePatchInputSchema = z.strictObject({
  version: z.number().int().min(1),
  name: Name.optional(),
  phase: Name.optional(),
  area: plainText().max(100).optional(),
  system: SystemSchema.optional(),
  description: multilineText({ trim: false }).max(5000).optional(),
  weight: Weight.optional(),
  percentComplete: Percent.optional(),
  plannedStart: DateOrNull.optional(),
  forecastFinish: DateOrNull.optional(),
  actualFinish: DateOrNull.optional(),
  audience: AudienceSchema.optional(),
  budget: Budget.nullable().optional(),
  dependsOn: z.array(z.number().int().positive()).max(100).optional(),
  /** Kept with the change in the milestone's history. */
  note: multilineText().max(1000).optional(),
});
export type MilestonePatchInput = z.infer<typeof MilestonePatchInputSchema>;

/** POST /api/projects/:slug/milestones/shift — move several forecasts by N working days. */
/**
 * POST /api/milestones/:id/remove and /restore. A milestone that has been on record (in a
 * baseline, linked by an update or a photo, or moved since it was entered) is never deleted:
 * it is removed from the programme with a reason, which its history and "what moved" keep.
 */
export const MilestoneRemovalInputSchema = z.strictObject({
  reason: multilineText({ error: "say why (at least 5 characters)" }).min(5, "say why (at least 5 characters)").max(1000, "must be at most 1000 characters"),
});
export type MilestoneRemovalInput = z.infer<typeof MilestoneRemovalInputSchema>;

/** DELETE /api/milestones/:id (optional body): only for a milestone entered by mistake and never on record. */
export const MilestoneDeleteInputSchema = z.strictObject({
  reason: multilineText().max(1000, "must be at most 1000 characters").optional(),
});

export const ShiftInputSchema = z.strictObject({
  ids: z.array(z.number().int().positive()).min(1, "choose at least one milestone").max(500),
  workingDays: z.number().int().min(-500).max(500).refine((n) => n !== 0, "must not be 0"),
  note: multilineText().max(1000).optional(),
});
export type ShiftInput = z.infer<typeof ShiftInputSchema>;

/**
 * POST /api/projects/:slug/baselines — a new baseline version. By default each milestone's
 * baseline becomes its current forecast (or stays where there is none); `overrides` sets
 * particular ones. The previous version's snapshot is kept.
 */
export const BaselineInputSchema = z.strictObject({
  reason: multilineText().min(5, "say why the programme is re-baselined (at least 5 characters)").max(1000),
  adoptForecasts: z.boolean().default(true),
  overrides: z
    .array(z.strictObject({ id: z.number().int().positive(), plannedStart: DateOrNull.optional(), baselineFinish: CalendarDateSchema }))
    .max(2000)
    .default([]),
});
export type BaselineInput = z.infer<typeof BaselineInputSchema>;

export const CostActualInputSchema = z.strictObject({ periodEnd: CalendarDateSchema, amount: Budget });

export const HealthQuerySchema = z.strictObject({ at: CalendarDateSchema.optional() });
export const RangeQuerySchema = z
  .strictObject({ from: CalendarDateSchema, to: CalendarDateSchema })
  .refine((v) => v.from <= v.to, { path: ["to"], message: "must not be before from" });
export const MilestoneListQuerySchema = z.strictObject({
  at: CalendarDateSchema.optional(),
  audience: AudienceSchema.optional(),
  system: SystemSchema.optional(),
  area: plainText({ trim: false }).max(100).optional(),
  status: z.enum(["complete", "on_programme", "at_risk", "behind"]).optional(),
  /** Milestones removed from the programme: hidden by default; `include` lists them too, `only` lists just them (each with `removal`). */
  removed: z.enum(["exclude", "include", "only"]).default("exclude"),
});

/** One milestone as the API returns it; status and slip are computed at the request's date. */
export interface Milestone {
  id: number;
  name: string;
  phase: string;
  phaseId: number;
  area: string;
  system: System;
  description: string;
  weight: number;
  percentComplete: number;
  plannedStart: string | null;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
  audience: Audience;
  /** Null for callers who may not see money (visitors) and where none is set. */
  budget: number | null;
  dependsOn: number[];
  status: MilestoneStatus;
  /** Calendar days: (actual ?? forecast ?? baseline) − baseline finish. */
  slipDays: number;
  slipWorkingDays: number;
  version: number;
  updatedAt: string;
  /** Set when the milestone was removed from the programme: it no longer counts in any figure. */
  removal: MilestoneRemoval | null;
}

export interface MilestoneRemoval {
  at: string;
  by: string | null;
  reason: string;
}

export type MilestoneEventFieldName =
  | "forecast_finish"
  | "actual_finish"
  | "percent_complete"
  | "baseline_finish"
  | "audience"
  | "planned_start"
  | "weight"
  /** "false" → "true" when removed from the programme, "true" → "false" when restored; the note is the reason. */
  | "removed";

/** GET /api/milestones/:id/events and GET /api/projects/:slug/changes rows. */
export interface MilestoneEventRow {
  id: number;
  milestoneId: number;
  milestoneName: string;
  field: MilestoneEventFieldName;
  from: string | null;
  to: string | null;
  at: string;
  by: string | null;
  note: string | null;
  baselineVersion: number | null;
}

export interface BaselineVersion {
  number: number;
  reason: string;
  by: string | null;
  at: string;
  milestoneCount: number;
}

/** Error body of a refused CSV import (422, code `csv_invalid`): nothing was written. */
export interface CsvImportErrorBody {
  error: { code: "csv_invalid"; message: string; rows: Array<{ line: number; reason: string }> };
}

/** The CSV columns, in order, for export and import (import matches rows by id when given, else by name). */
export const MILESTONE_CSV_COLUMNS = [
  "id",
  "name",
  "phase",
  "area",
  "system",
  "weight",
  "percent_complete",
  "planned_start",
  "baseline_finish",
  "forecast_finish",
  "actual_finish",
  "audience",
  "budget",
  "depends_on",
  "description",
] as const;

/** GET /api/projects/:slug/curve. Without `from`/`to` the curve spans the visible programme. */
export const CurveQuerySchema = z
  .strictObject({
    from: CalendarDateSchema.optional(),
    to: CalendarDateSchema.optional(),
    step: z.coerce.number({ error: "must be a number" }).int("must be whole days").min(1, "must be at least 1 day").max(366, "must be at most 366 days").optional(),
  })
  .refine((v) => !v.from || !v.to || v.from <= v.to, { path: ["to"], message: "must not be before from" });

/** POST /api/projects/:slug/milestones/import. */
export const CsvImportInputSchema = z.strictObject({
  csv: multilineText({ error: "is required", trim: false }).min(1, "is empty").max(2_000_000, "is too large"),
});

export const BaselineParamSchema = z.strictObject({
  slug: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address").max(100),
  number: z.coerce.number().int().positive(),
});

/** One milestone's plan in a baseline version (GET /api/projects/:slug/baselines/:number). */
export interface BaselineSnapshotMilestone {
  id: number;
  name: string;
  audience: Audience;
  plannedStart: string | null;
  baselineFinish: string;
  weight: number;
  /** Null for visitors and where none was set. */
  budget: number | null;
}

export interface BaselineDetail extends BaselineVersion {
  milestones: BaselineSnapshotMilestone[];
}

/** GET /api/projects/:slug/curve. */
export interface CurveResponse {
  at: string;
  points: Array<{ date: string; plannedPercent: number; earnedPercent: number | null }>;
}

/** GET /api/projects/:slug/moves rows. */
export interface MilestoneMovesRow {
  milestoneId: number;
  milestoneName: string;
  moves: MilestoneMove[];
}

/** POST /api/projects/:slug/milestones/import → 200. */
export interface CsvImportResult {
  created: number;
  updated: number;
  /** Rows that matched a milestone and changed nothing. */
  unchanged: number;
}

export interface CostActualRow {
  periodEnd: string;
  amount: number;
}
