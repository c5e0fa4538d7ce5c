import { z } from "zod";
import { AudienceSchema, CalendarDateSchema } from "./common.ts";
import type { MilestoneInput, MilestoneStatus, ProgrammeHealth } from "../domain/programme-health.ts";
import type { DrivingLink, ProjectDrivers } from "../domain/programme-dependencies.ts";
import type { MilestoneMove } from "../domain/programme-changes.ts";
import { SlugParamSchema } from "./projects.ts";
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

const DependsOn = z.array(z.number().int().positive()).max(100);

/**
 * How a field's value is written outside JSON: in a CSV cell and in its stored column.
 * `line` one-line text (a line break a spreadsheet kept reads as a space), `text` text kept as
 * typed, `code` a required code or date (trimmed), `number`, `optional-number` and
 * `optional-date` (empty = none), `ids` milestone ids or names (`;` between them).
 */
export type MilestoneFieldKind = "line" | "text" | "code" | "number" | "optional-number" | "optional-date" | "ids";

/**
 * The fields a person writes on a milestone, once: their zod types and how each is written
 * outside JSON. The create and patch schemas, the CSV columns, the repository's column map
 * and the browser's preview input are all derived from this list; a new field is added here.
 * The order is the create schema's (which orders its messages) and the CSV's, except that the
 * CSV puts `description`, the long free text, last.
 */
export const MILESTONE_FIELDS = {
  name: { type: Name, kind: "line" },
  phase: { type: Name, kind: "line" },
  area: { type: plainText().max(100), kind: "line" },
  system: { type: SystemSchema, kind: "code" },
  description: { type: multilineText({ trim: false }).max(5000), kind: "text" },
  weight: { type: Weight, kind: "number" },
  percentComplete: { type: Percent, kind: "number" },
  plannedStart: { type: DateOrNull, kind: "optional-date" },
  baselineFinish: { type: CalendarDateSchema, kind: "code" },
  forecastFinish: { type: DateOrNull, kind: "optional-date" },
  actualFinish: { type: DateOrNull, kind: "optional-date" },
  audience: { type: AudienceSchema, kind: "code" },
  budget: { type: Budget.nullable(), kind: "optional-number" },
  dependsOn: { type: DependsOn, kind: "ids" },
} as const satisfies Record<string, { type: z.ZodType; kind: MilestoneFieldKind }>;

export type MilestoneFieldName = keyof typeof MILESTONE_FIELDS;
export const MILESTONE_FIELD_NAMES = Object.keys(MILESTONE_FIELDS) as MilestoneFieldName[];

/** The milestone fields as one object schema, each required, no defaults. */
export const MilestoneFieldsSchema = z.object(
  Object.fromEntries(MILESTONE_FIELD_NAMES.map((f) => [f, MILESTONE_FIELDS[f].type])) as { [F in MilestoneFieldName]: (typeof MILESTONE_FIELDS)[F]["type"] },
);
/** The values of a milestone's written fields. */
export type MilestoneFieldValues = z.output<typeof MilestoneFieldsSchema>;

type SnakeCase<S extends string> = S extends `${infer H}${infer T}` ? `${H extends Lowercase<H> ? H : `_${Lowercase<H>}`}${SnakeCase<T>}` : S;

/** A field's name outside JSON: its CSV column and its stored column (`baselineFinish` → `baseline_finish`). */
export function milestoneColumn<F extends MilestoneFieldName>(field: F): SnakeCase<F> {
  return field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`) as SnakeCase<F>;
}

const F = MilestoneFieldsSchema.shape;

/** The fields the programme's figures are computed from (`computeProgrammeHealth`'s input). */
const MILESTONE_INPUT_KEYS = ["id", "name", "weight", "percentComplete", "plannedStart", "baselineFinish", "forecastFinish", "actualFinish", "budget", "dependsOn"] as const satisfies ReadonlyArray<keyof MilestoneInput>;
// Fails to compile when the health computation gains an input field this list lacks.
const _everyInputKey: Record<Exclude<keyof MilestoneInput, (typeof MILESTONE_INPUT_KEYS)[number]>, never> = {};
void _everyInputKey;

/** A milestone (as stored or as the API gives it) as the health computation's input: server and browser compute from the same fields. */
export function milestoneInputOf(m: Pick<MilestoneInput, (typeof MILESTONE_INPUT_KEYS)[number]>): MilestoneInput {
  return Object.fromEntries(MILESTONE_INPUT_KEYS.map((k) => [k, m[k]])) as unknown as MilestoneInput;
}

const startBeforeFinish = (v: { plannedStart?: string | null; baselineFinish?: string }) =>
  !v.plannedStart || !v.baselineFinish || v.plannedStart <= v.baselineFinish;

/** POST /api/projects/:slug/milestones: every field, with these defaults. The server also refuses an actual finish in the future. */
export const MilestoneCreateInputSchema = z
  .strictObject({
    ...F,
    area: F.area.default(""),
    description: F.description.default(""),
    percentComplete: F.percentComplete.default(0),
    plannedStart: F.plannedStart.default(null),
    forecastFinish: F.forecastFinish.default(null),
    actualFinish: F.actualFinish.default(null),
    budget: F.budget.default(null),
    dependsOn: F.dependsOn.default([]),
  })
  .refine(startBeforeFinish, { path: ["baselineFinish"], message: "must not be before the planned start" });
export type MilestoneCreateInput = z.infer<typeof MilestoneCreateInputSchema>;

/**
 * PATCH /api/milestones/:id: any field but the baseline finish. `version` is the one the client
 * last read; a stale one → 409. The baseline finish changes only by re-baselining (POST
 * …/baselines), which asks for a reason.
 */
export const MilestonePatchInputSchema = z.strictObject({
  version: z.number().int().min(1),
  ...MilestoneFieldsSchema.omit({ baselineFinish: true }).partial().shape,
  /** Kept with the change in the milestone's history. */
  note: multilineText().max(1000).optional(),
});
export type MilestonePatchInput = z.infer<typeof MilestonePatchInputSchema>;

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

/** POST /api/projects/:slug/milestones/shift — move several forecasts by N working days. */
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

export const MilestoneStatusSchema = z.enum(["complete", "on_programme", "at_risk", "behind"]) satisfies z.ZodType<MilestoneStatus>;

export const HealthQuerySchema = z.strictObject({ at: CalendarDateSchema.optional() });
export const RangeQuerySchema = z
  .strictObject({ from: CalendarDateSchema, to: CalendarDateSchema })
  .refine((v) => v.from <= v.to, { path: ["to"], message: "must not be before from" });
export const MilestoneListQuerySchema = z.strictObject({
  at: CalendarDateSchema.optional(),
  audience: AudienceSchema.optional(),
  system: SystemSchema.optional(),
  area: plainText({ trim: false }).max(100).optional(),
  status: MilestoneStatusSchema.optional(),
  /** Milestones removed from the programme: hidden by default; `include` lists them too, `only` lists just them (each with `removal`). */
  removed: z.enum(["exclude", "include", "only"]).default("exclude"),
});

// Answers. Their types are inferred from these schemas; the server builds them and the browser
// reads them. They describe what the server sends, not input: they are exported together in
// PROGRAMME_ANSWERS (below) rather than one by one, so no one takes one for an input schema, and
// the text-field check over exported input schemas leaves them out.

const Instant = z.string();

const MilestoneRemovalSchema = z.object({ at: Instant, by: z.string().nullable(), reason: z.string() });
export type MilestoneRemoval = z.infer<typeof MilestoneRemovalSchema>;

/** One milestone as the API returns it; status and slip are computed at the request's date. */
const MilestoneSchema = z.object({
  id: z.number(),
  ...MilestoneFieldsSchema.shape,
  phaseId: z.number(),
  /** Null for callers who may not see money (visitors) and where none is set. */
  budget: F.budget,
  status: MilestoneStatusSchema,
  /** Calendar days: (actual ?? forecast ?? baseline) − baseline finish. */
  slipDays: z.number(),
  slipWorkingDays: z.number(),
  version: z.number(),
  updatedAt: Instant,
  /** Set when the milestone was removed from the programme: it no longer counts in any figure. */
  removal: MilestoneRemovalSchema.nullable(),
});
export type Milestone = z.infer<typeof MilestoneSchema>;

/** The fields whose changes are events; `removed` is "false" → "true" when removed from the programme, "true" → "false" when restored, with the reason as note. */
export const MilestoneEventFieldNameSchema = z.enum(["forecast_finish", "actual_finish", "percent_complete", "baseline_finish", "audience", "planned_start", "weight", "removed"]);
export type MilestoneEventFieldName = z.infer<typeof MilestoneEventFieldNameSchema>;

/** GET /api/milestones/:id/events and GET /api/projects/:slug/changes rows. */
const MilestoneEventRowSchema = z.object({
  id: z.number(),
  milestoneId: z.number(),
  milestoneName: z.string(),
  field: MilestoneEventFieldNameSchema,
  from: z.string().nullable(),
  to: z.string().nullable(),
  at: Instant,
  by: z.string().nullable(),
  note: z.string().nullable(),
  baselineVersion: z.number().nullable(),
});
export type MilestoneEventRow = z.infer<typeof MilestoneEventRowSchema>;

const BaselineVersionSchema = z.object({
  number: z.number(),
  reason: z.string(),
  by: z.string().nullable(),
  at: Instant,
  milestoneCount: z.number(),
});
export type BaselineVersion = z.infer<typeof BaselineVersionSchema>;

/** Error body of a refused CSV import (422, code `csv_invalid`): nothing was written. */
export interface CsvImportErrorBody {
  error: { code: "csv_invalid"; message: string; rows: Array<{ line: number; reason: string }> };
}

/** A CSV column: `id`, then each milestone field by its column name. */
export type MilestoneCsvColumn = "id" | SnakeCase<MilestoneFieldName>;

/**
 * The CSV columns, in order, for export and import (import matches rows by id when given, else
 * by name): the fields in their order, with the long free text last.
 */
export const MILESTONE_CSV_COLUMNS: readonly MilestoneCsvColumn[] = [
  "id",
  ...MILESTONE_FIELD_NAMES.filter((f) => f !== "description").map(milestoneColumn),
  milestoneColumn("description"),
];

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

export const BaselineParamSchema = SlugParamSchema.extend({ number: z.coerce.number().int().positive() });

/** One milestone's plan in a baseline version (GET /api/projects/:slug/baselines/:number). */
const BaselineSnapshotMilestoneSchema = MilestoneFieldsSchema.pick({ name: true, audience: true, plannedStart: true, baselineFinish: true, weight: true }).extend({
  id: z.number(),
  /** Null for visitors and where none was set. */
  budget: F.budget,
});
export type BaselineSnapshotMilestone = z.infer<typeof BaselineSnapshotMilestoneSchema>;

const BaselineDetailSchema = BaselineVersionSchema.extend({ milestones: z.array(BaselineSnapshotMilestoneSchema) });
export type BaselineDetail = z.infer<typeof BaselineDetailSchema>;

/** GET /api/projects/:slug/curve. */
const CurveResponseSchema = z.object({
  at: z.string(),
  points: z.array(z.object({ date: z.string(), plannedPercent: z.number(), earnedPercent: z.number().nullable() })),
});
export type CurveResponse = z.infer<typeof CurveResponseSchema>;

/** GET /api/projects/:slug/moves rows; each move as `summariseChanges` reports it. */
const MilestoneMovesRowSchema = z.object({ milestoneId: z.number(), milestoneName: z.string(), moves: z.array(z.custom<MilestoneMove>()) });
export type MilestoneMovesRow = z.infer<typeof MilestoneMovesRowSchema>;

/** POST /api/projects/:slug/milestones/import → 200. */
const CsvImportResultSchema = z.object({
  created: z.number(),
  updated: z.number(),
  /** Rows that matched a milestone and changed nothing. */
  unchanged: z.number(),
});
export type CsvImportResult = z.infer<typeof CsvImportResultSchema>;

const CostActualRowSchema = z.object({ periodEnd: z.string(), amount: z.number() });
export type CostActualRow = z.infer<typeof CostActualRowSchema>;

/**
 * A link of the chain that drives the forecast completion as a reader sees it: a milestone they
 * may see, or a run of those they may not, worded without names or dates ("A milestone not listed here").
 */
export type ShownDrivingLink = DrivingLink | { id: null; name: string; finish: null };

/** What drives the forecast completion as a reader sees it; `milestoneId` null when the reader may not see that milestone. */
export type ShownDrivers = Omit<ProjectDrivers, "milestoneId" | "chain"> & { milestoneId: number | null; chain: ShownDrivingLink[] };

/**
 * GET /api/projects/:slug/health: the figures `computeProgrammeHealth` gives over every milestone
 * in the programme, the same for every caller (the domain's type: the shared pure function is their
 * definition); the per-milestone lines only of the milestones the caller may see; what drives the
 * forecast completion, worded for the caller; and the project's time zone. Visitors get no money.
 */
export type ProgrammeHealthResponse = ProgrammeHealth & { drivers: ShownDrivers | null; timeZone: string };

/** The schemas of the programme's answers, by route; their types are the exported `Milestone`, `MilestoneEventRow`, …. */
export const PROGRAMME_ANSWERS = {
  milestone: MilestoneSchema,
  milestoneEvent: MilestoneEventRowSchema,
  baselineVersion: BaselineVersionSchema,
  baselineDetail: BaselineDetailSchema,
  curve: CurveResponseSchema,
  moves: MilestoneMovesRowSchema,
  csvImport: CsvImportResultSchema,
  costActual: CostActualRowSchema,
} as const;
