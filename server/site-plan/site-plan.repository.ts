import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { SiteAreaKind } from "#shared/schemas/site-plan.ts";
import { insertRecordEvents, type NewRecordEvent } from "../core/record-events.ts";
import { firstRow, num, oneOf, projectIdOf, readRow, text, updateVersioned } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * The site plan as stored: one row per area of a project, its cells on the grid, and the area's
 * events. Every read that serves a caller takes the audiences that caller may see and filters
 * in the query, in that one place (`listAreas`).
 */

export interface SiteAreaFields {
  name: string;
  kind: SiteAreaKind;
  audience: Audience;
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface SiteAreaRecord extends SiteAreaFields {
  id: number;
  projectId: number;
  version: number;
}

const toRecord = readRow<SiteAreaRecord>({ id: num(), projectId: num(), name: text(), kind: oneOf<SiteAreaKind>(), audience: oneOf<Audience>(), x: num(), y: num(), w: num(), h: num(), version: num() });

/** A project's areas of these audiences, top-left first (the order a reader's eye and a screen reader take them). */
export async function listAreas(q: Q, projectId: number, audiences: readonly Audience[]): Promise<SiteAreaRecord[]> {
  const rows = (await q("site_areas").where({ project_id: projectId }).whereIn("audience", [...audiences]).orderBy([{ column: "y" }, { column: "x" }, { column: "id" }])) as Array<Record<string, unknown>>;
  return rows.map(toRecord);
}

/** One area (any audience: only staff write); `forUpdate` locks its row for the rest of the transaction. */
export async function findArea(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<SiteAreaRecord | null> {
  const row = await firstRow(q("site_areas").where({ id }), opts);
  return row ? toRecord(row) : null;
}

export const findAreaProjectId = (q: Q, id: number) => projectIdOf(q, "site_areas", id);

export async function insertArea(q: Q, projectId: number, f: SiteAreaFields, at: Date): Promise<number> {
  const [id] = await q("site_areas").insert({ project_id: projectId, ...f, created_at: at, updated_at: at });
  return Number(id);
}

/** Writes the fields when the row is still at `version`; how many rows changed (0 = someone else wrote first). */
export const updateArea = (q: Q, id: number, version: number, f: Partial<SiteAreaFields>, at: Date) => updateVersioned(q, "site_areas", id, version, f, at);

export async function deleteArea(q: Q, id: number): Promise<void> {
  await q("site_areas").where({ id }).delete();
}

export const insertAreaEvents = (q: Q, events: ReadonlyArray<NewRecordEvent<number | null>>) => insertRecordEvents(q, "site_area_events", "site_area_id", events);
