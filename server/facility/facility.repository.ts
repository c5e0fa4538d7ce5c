import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import {
  DesignFiguresSchema,
  type Containment,
  type DesignFigures,
  type FeatureKind,
  type FeatureStatus,
  type PlantKind,
  type RatingUnit,
  type SecurityLayer,
  type UnitStage,
} from "#shared/schemas/facility.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { firstRow, num, numOrNull, oneOf, oneOfOrNull, readRow, text, textOrNull, updateVersioned, type Row } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * The facility's stored record: capacity blocks (with the milestones they depend on), plant
 * systems (with the blocks they serve and their linked milestones), their units, and site
 * features. Reads return the whole record of a project: readiness is computed over all of it
 * (a hidden system still holds a block back), and the facility service shows each viewer only
 * what their audience allows (`forViewer` in facility.figures.ts), in that one place.
 */

// ---------------------------------------------------------------------------------------------
// Capacity blocks
// ---------------------------------------------------------------------------------------------

/** The written fields of a block, as its columns hold them (dependencies in their own table). */
export interface BlockFields {
  name: string;
  racks: number;
  itKw: number;
  maxKwPerRack: number;
  coolingApproach: string;
  containment: Containment;
  audience: Audience;
  stage: string;
  notes: string;
}

export interface BlockRecord extends BlockFields {
  id: number;
  projectId: number;
  /** Every milestone it depends on (any audience), ascending. */
  dependsOn: number[];
  version: number;
}

const BLOCK_COLUMNS: Record<keyof BlockFields, string> = {
  name: "name",
  racks: "racks",
  itKw: "it_kw",
  maxKwPerRack: "max_kw_per_rack",
  coolingApproach: "cooling_approach",
  containment: "containment",
  audience: "audience",
  stage: "stage",
  notes: "notes",
};

const readBlock = readRow<Omit<BlockRecord, "dependsOn">>({
  id: num(), projectId: num(), name: text(), racks: num(), itKw: num(), maxKwPerRack: num(), coolingApproach: text(), containment: oneOf<Containment>(),
  audience: oneOf<Audience>(), stage: text(), notes: text(), version: num(),
});
const toBlock = (r: Row, dependsOn: number[]): BlockRecord => ({ ...readBlock(r), dependsOn });

/** Pairs of (owner id, linked id) from a link table, grouped by owner, linked ids ascending. */
async function linksOf(q: Q, table: string, ownerColumn: string, linkedColumn: string, ownerIds: readonly number[]): Promise<Map<number, number[]>> {
  const map = new Map<number, number[]>();
  if (ownerIds.length === 0) return map;
  const rows = (await q(table).whereIn(ownerColumn, [...ownerIds]).select(ownerColumn, linkedColumn).orderBy(linkedColumn)) as Array<Record<string, unknown>>;
  for (const r of rows) {
    const owner = Number(r[ownerColumn]);
    const list = map.get(owner) ?? [];
    list.push(Number(r[linkedColumn]));
    map.set(owner, list);
  }
  return map;
}

const byOrder = [{ column: "sort_order" }, { column: "id" }];

export async function listBlocks(q: Q, projectId: number): Promise<BlockRecord[]> {
  const rows = (await q("capacity_blocks").where({ project_id: projectId }).orderBy(byOrder)) as Array<Record<string, unknown>>;
  const deps = await linksOf(q, "capacity_block_milestones", "block_id", "milestone_id", rows.map((r) => Number(r.id)));
  return rows.map((r) => toBlock(r, deps.get(Number(r.id)) ?? []));
}

export async function findBlock(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<BlockRecord | null> {
  const r = await findRow(q, "capacity_blocks", id, opts);
  if (!r) return null;
  const deps = await linksOf(q, "capacity_block_milestones", "block_id", "milestone_id", [id]);
  return toBlock(r, deps.get(id) ?? []);
}

/** The written fields of a block, from an input or a record. */
export function blockFieldsOf(b: BlockFields): BlockFields {
  return Object.fromEntries(Object.keys(BLOCK_COLUMNS).map((k) => [k, b[k as keyof BlockFields]])) as unknown as BlockFields;
}

const blockRow = (fields: Partial<BlockFields>) => rowOf(fields, BLOCK_COLUMNS);

export async function insertBlock(q: Q, projectId: number, fields: BlockFields, at: Date): Promise<number> {
  const [id] = await q("capacity_blocks").insert({ ...blockRow(fields), project_id: projectId, sort_order: await nextOrder(q, "capacity_blocks", projectId), version: 1, created_at: at, updated_at: at });
  return Number(id);
}

/** Optimistic concurrency (see `updateRow`): 0 = someone else saved first. */
export const updateBlock = (q: Q, id: number, version: number, fields: Partial<BlockFields>, at: Date) => updateRow(q, "capacity_blocks", id, version, blockRow(fields), at);

export async function replaceBlockMilestones(q: Q, blockId: number, milestoneIds: readonly number[]): Promise<void> {
  await replaceChildRows(q, "capacity_block_milestones", { block_id: blockId }, ["milestone_id"], milestoneIds.map((id) => ({ block_id: blockId, milestone_id: id })));
}

export const deleteBlock = (q: Q, id: number) => deleteRow(q, "capacity_blocks", id);

/** Blocks of the project by name (any audience), for the unique-name check. */
export async function findBlockIdByName(q: Q, projectId: number, name: string): Promise<number | null> {
  const r = await q("capacity_blocks").where({ project_id: projectId, name }).first("id");
  return r ? Number(r.id) : null;
}

// ---------------------------------------------------------------------------------------------
// Plant systems
// ---------------------------------------------------------------------------------------------

export interface SystemFields {
  name: string;
  kind: PlantKind;
  audience: Audience;
  neededPerSystem: number;
  independentSystems: number;
  ratingPerUnit: number | null;
  ratingUnit: RatingUnit | null;
  design: DesignFigures;
  notes: string;
}

export interface SystemRecord extends SystemFields {
  id: number;
  projectId: number;
  /** Blocks whose load it serves (any audience), ascending. */
  serves: number[];
  /** Milestones linked to it (any audience), ascending. */
  linkedMilestones: number[];
  version: number;
}

const readSystem = readRow<Omit<SystemRecord, "serves" | "linkedMilestones">>({
  id: num(), projectId: num(), name: text(), kind: oneOf<PlantKind>(), audience: oneOf<Audience>(), neededPerSystem: num(), independentSystems: num(),
  ratingPerUnit: numOrNull(), ratingUnit: oneOfOrNull<RatingUnit>(),
  // Stored as JSON; parsed through the schema so a figure added later reads with its default.
  design: (row) => DesignFiguresSchema.parse(JSON.parse(String(row.design ?? "{}"))),
  notes: text(), version: num(),
});
const toSystem = (r: Row, serves: number[], linkedMilestones: number[]): SystemRecord => ({ ...readSystem(r), serves, linkedMilestones });

const SYSTEM_COLUMNS: Record<keyof SystemFields, string> = {
  name: "name",
  kind: "kind",
  audience: "audience",
  neededPerSystem: "needed_per_system",
  independentSystems: "independent_systems",
  ratingPerUnit: "rating_per_unit",
  ratingUnit: "rating_unit",
  design: "design",
  notes: "notes",
};

function systemRow(fields: Partial<SystemFields>): Record<string, unknown> {
  return rowOf({ ...fields, design: fields.design === undefined ? undefined : JSON.stringify(fields.design) }, SYSTEM_COLUMNS);
}

async function systemsFrom(q: Q, rows: Array<Record<string, unknown>>): Promise<SystemRecord[]> {
  const ids = rows.map((r) => Number(r.id));
  const serves = await linksOf(q, "plant_system_blocks", "system_id", "block_id", ids);
  const milestones = await linksOf(q, "plant_system_milestones", "system_id", "milestone_id", ids);
  return rows.map((r) => toSystem(r, serves.get(Number(r.id)) ?? [], milestones.get(Number(r.id)) ?? []));
}

export async function listSystems(q: Q, projectId: number): Promise<SystemRecord[]> {
  return systemsFrom(q, (await q("plant_systems").where({ project_id: projectId }).orderBy(byOrder)) as Array<Record<string, unknown>>);
}

export async function findSystem(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<SystemRecord | null> {
  const r = await findRow(q, "plant_systems", id, opts);
  return r ? (await systemsFrom(q, [r]))[0]! : null;
}

export async function findSystemIdByName(q: Q, projectId: number, name: string): Promise<number | null> {
  const r = await q("plant_systems").where({ project_id: projectId, name }).first("id");
  return r ? Number(r.id) : null;
}

export async function insertSystem(q: Q, projectId: number, fields: SystemFields, at: Date): Promise<number> {
  const [id] = await q("plant_systems").insert({ ...systemRow(fields), project_id: projectId, sort_order: await nextOrder(q, "plant_systems", projectId), version: 1, created_at: at, updated_at: at });
  return Number(id);
}

export const updateSystem = (q: Q, id: number, version: number, fields: Partial<SystemFields>, at: Date) => updateRow(q, "plant_systems", id, version, systemRow(fields), at);

export async function replaceSystemLinks(q: Q, systemId: number, links: { serves?: readonly number[]; linkedMilestones?: readonly number[] }): Promise<void> {
  const parent = { system_id: systemId };
  if (links.serves !== undefined) {
    await replaceChildRows(q, "plant_system_blocks", parent, ["block_id"], links.serves.map((id) => ({ ...parent, block_id: id })));
  }
  if (links.linkedMilestones !== undefined) {
    await replaceChildRows(q, "plant_system_milestones", parent, ["milestone_id"], links.linkedMilestones.map((id) => ({ ...parent, milestone_id: id })));
  }
}

export const deleteSystem = (q: Q, id: number) => deleteRow(q, "plant_systems", id);

// ---------------------------------------------------------------------------------------------
// Units
// ---------------------------------------------------------------------------------------------

export interface UnitFields {
  label: string;
  tag: string;
  train: number;
  stage: UnitStage;
  /** The day on site the current stage was reached. */
  stageOn: string;
}

export interface UnitRecord extends UnitFields {
  id: number;
  systemId: number;
  version: number;
}

const toUnit = readRow<UnitRecord>({ id: num(), systemId: num(), label: text(), tag: text(), train: num(), stage: oneOf<UnitStage>(), stageOn: text(), version: num() });

/** The columns of a unit's written fields (the demo seed writes its units' dated history with them). */
export const unitRow = (fields: Partial<UnitFields>) => rowOf(fields, { label: "label", tag: "tag", train: "train", stage: "stage", stageOn: "stage_on" });

/** Units of these systems, by system, then order of entry. */
export async function listUnits(q: Q, systemIds: readonly number[]): Promise<UnitRecord[]> {
  if (systemIds.length === 0) return [];
  return ((await q("plant_units").whereIn("system_id", [...systemIds]).orderBy([{ column: "system_id" }, ...byOrder])) as Array<Record<string, unknown>>).map(toUnit);
}

export async function findUnit(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<UnitRecord | null> {
  const r = await findRow(q, "plant_units", id, opts);
  return r ? toUnit(r) : null;
}

export async function findUnitIdByLabel(q: Q, systemId: number, label: string): Promise<number | null> {
  const r = await q("plant_units").where({ system_id: systemId, label }).first("id");
  return r ? Number(r.id) : null;
}

export async function insertUnit(q: Q, systemId: number, fields: UnitFields, at: Date): Promise<number> {
  const max = await q("plant_units").where({ system_id: systemId }).max({ n: "sort_order" }).first();
  const [id] = await q("plant_units").insert({ ...unitRow(fields), system_id: systemId, sort_order: Number(max?.n ?? 0) + 1, version: 1, created_at: at, updated_at: at });
  return Number(id);
}

export const updateUnit = (q: Q, id: number, version: number, fields: Partial<UnitFields>, at: Date) => updateRow(q, "plant_units", id, version, unitRow(fields), at);

export const deleteUnit = (q: Q, id: number) => deleteRow(q, "plant_units", id);

// ---------------------------------------------------------------------------------------------
// Site features
// ---------------------------------------------------------------------------------------------

export interface FeatureFields {
  kind: FeatureKind;
  name: string;
  detail: string;
  layer: SecurityLayer | null;
  status: FeatureStatus;
  statusDate: string | null;
  audience: Audience;
}

export interface FeatureRecord extends FeatureFields {
  id: number;
  projectId: number;
  version: number;
}

const toFeature = readRow<FeatureRecord>({
  id: num(), projectId: num(), kind: oneOf<FeatureKind>(), name: text(), detail: text(), layer: oneOfOrNull<SecurityLayer>(), status: oneOf<FeatureStatus>(),
  statusDate: textOrNull(), audience: oneOf<Audience>(), version: num(),
});

const featureRow = (fields: Partial<FeatureFields>) =>
  rowOf(fields, { kind: "kind", name: "name", detail: "detail", layer: "layer", status: "status", statusDate: "status_date", audience: "audience" });

/** Features by kind in the order the page shows them, then order of entry. */
export async function listFeatures(q: Q, projectId: number): Promise<FeatureRecord[]> {
  return ((await q("site_features").where({ project_id: projectId }).orderBy([{ column: "kind" }, ...byOrder])) as Array<Record<string, unknown>>).map(toFeature);
}

export async function findFeature(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<FeatureRecord | null> {
  const r = await findRow(q, "site_features", id, opts);
  return r ? toFeature(r) : null;
}

export async function insertFeature(q: Q, projectId: number, fields: FeatureFields, at: Date): Promise<number> {
  const [id] = await q("site_features").insert({ ...featureRow(fields), project_id: projectId, sort_order: await nextOrder(q, "site_features", projectId), version: 1, created_at: at, updated_at: at });
  return Number(id);
}

export const updateFeature = (q: Q, id: number, version: number, fields: Partial<FeatureFields>, at: Date) => updateRow(q, "site_features", id, version, featureRow(fields), at);

export const deleteFeature = (q: Q, id: number) => deleteRow(q, "site_features", id);

// ---------------------------------------------------------------------------------------------
// Shared
// ---------------------------------------------------------------------------------------------

type FacilityTable = "capacity_blocks" | "plant_systems" | "plant_units" | "site_features";

/** One row by id; `forUpdate` locks it for the rest of the transaction. */
const findRow = (q: Q, table: FacilityTable, id: number, opts: { forUpdate?: boolean }) => firstRow(q(table).where({ id }), opts);

/**
 * Optimistic concurrency: changes the row only while it still has `version`, and its version goes
 * up by one. Returns the number of rows changed (0 = someone else saved first).
 */
const updateRow = (q: Q, table: FacilityTable, id: number, version: number, row: Row, at: Date) => updateVersioned(q, table, id, version, row, at);

async function deleteRow(q: Q, table: FacilityTable, id: number): Promise<void> {
  await q(table).where({ id }).delete();
}

/** The columns of the fields a write gives (a field left undefined keeps its column as it is). */
function rowOf<F extends object>(fields: Partial<F>, columns: Record<keyof F, string>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, column] of Object.entries(columns) as Array<[keyof F, string]>) {
    if (fields[key] !== undefined) row[column] = fields[key];
  }
  return row;
}

/** The next sort position among a project's rows of a table (new rows go last). */
async function nextOrder(q: Q, table: "capacity_blocks" | "plant_systems" | "site_features", projectId: number): Promise<number> {
  const max = await q(table).where({ project_id: projectId }).max({ n: "sort_order" }).first();
  return Number(max?.n ?? 0) + 1;
}

/** The project a block, system, unit or feature belongs to, whoever may see it (the caller's audience is checked after). */
export async function findProjectIdOf(q: Q, subject: "block" | "system" | "unit" | "feature", id: number): Promise<number | null> {
  const r =
    subject === "unit"
      ? await q("plant_units as u").join("plant_systems as s", "s.id", "u.system_id").where("u.id", id).first("s.project_id")
      : await q(subject === "block" ? "capacity_blocks" : subject === "system" ? "plant_systems" : "site_features").where({ id }).first("project_id");
  return r ? Number(r.project_id) : null;
}

/** Blocks and plant systems that depend on or link a milestone (the programme refuses to delete it). */
export async function listMilestoneLinks(q: Q, milestoneId: number): Promise<Array<{ kind: "block" | "system"; id: number; name: string }>> {
  const blocks = (await q("capacity_block_milestones as l").join("capacity_blocks as b", "b.id", "l.block_id").where("l.milestone_id", milestoneId).select("b.id", "b.name").orderBy("b.id")) as Array<{ id: number; name: string }>;
  const systems = (await q("plant_system_milestones as l").join("plant_systems as s", "s.id", "l.system_id").where("l.milestone_id", milestoneId).select("s.id", "s.name").orderBy("s.id")) as Array<{ id: number; name: string }>;
  return [...blocks.map((b) => ({ kind: "block" as const, id: Number(b.id), name: String(b.name) })), ...systems.map((s) => ({ kind: "system" as const, id: Number(s.id), name: String(s.name) }))];
}
