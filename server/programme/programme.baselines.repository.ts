import type { Audience } from "#shared/schemas/common.ts";
import type { BaselineVersion } from "#shared/schemas/programme.ts";
import { audiencesFor } from "#shared/domain/audience.ts";
import type { Q, Viewer } from "./programme.repository.ts";

// Baseline versions (the plans the programme was measured against) and cost actuals.

/** Numbers of the project's baseline versions whose snapshot holds the milestone. */
export async function baselinesHolding(q: Q, projectId: number, milestoneId: number): Promise<number[]> {
  const rows = (await q("baselines").where({ project_id: projectId }).orderBy("number").select("number", "snapshot")) as Array<{ number: number; snapshot: string }>;
  return rows.filter((r) => (JSON.parse(String(r.snapshot)) as BaselineSnapshotEntry[]).some((e) => e.id === milestoneId)).map((r) => Number(r.number));
}

/** One milestone's plan as a baseline version recorded it. */
export interface BaselineSnapshotEntry {
  id: number;
  name: string;
  audience: Audience;
  plannedStart: string | null;
  baselineFinish: string;
  weight: number;
  budget: number | null;
}

/** The snapshot entries the viewer may see (the audience the milestone had when the version was taken). */
export function visibleSnapshotEntries(entries: readonly BaselineSnapshotEntry[], viewer: Viewer): BaselineSnapshotEntry[] {
  const allowed = audiencesFor(viewer);
  return entries.filter((e) => allowed.includes(e.audience));
}

export async function maxBaselineNumber(q: Q, projectId: number): Promise<number> {
  const r = await q("baselines").where({ project_id: projectId }).max({ n: "number" }).first();
  return Number(r?.n ?? 0);
}

export async function insertBaseline(
  q: Q,
  b: { projectId: number; number: number; reason: string; byUserId: number | null; at: Date; snapshot: BaselineSnapshotEntry[] },
): Promise<void> {
  await q("baselines").insert({
    project_id: b.projectId,
    number: b.number,
    reason: b.reason,
    by_user_id: b.byUserId,
    at: b.at,
    snapshot: JSON.stringify(b.snapshot),
  });
}

/** A baseline version as stored: who set it by user id (the users module names them). */
export type BaselineVersionRecord = Omit<BaselineVersion, "by"> & { byUserId: number | null };

function baselineQuery(q: Q, projectId: number) {
  return q("baselines").where({ project_id: projectId });
}

function toBaseline(r: Record<string, unknown>, viewer: Viewer): BaselineVersionRecord & { milestones: BaselineSnapshotEntry[] } {
  const entries = visibleSnapshotEntries(JSON.parse(String(r.snapshot)) as BaselineSnapshotEntry[], viewer);
  return {
    number: Number(r.number),
    reason: String(r.reason),
    byUserId: r.by_user_id == null ? null : Number(r.by_user_id),
    at: (r.at as Date).toISOString(),
    milestoneCount: entries.length,
    milestones: entries,
  };
}

/** The project's baseline versions, oldest first, each counting the milestones the viewer may see. */
export async function listBaselines(q: Q, projectId: number, viewer: Viewer): Promise<BaselineVersionRecord[]> {
  const rows = (await baselineQuery(q, projectId).orderBy("number")) as Array<Record<string, unknown>>;
  return rows.map((r) => {
    const { milestones: _omitted, ...version } = toBaseline(r, viewer);
    return version;
  });
}

export async function findBaseline(q: Q, projectId: number, number: number, viewer: Viewer) {
  const r = (await baselineQuery(q, projectId).where({ number }).first()) as Record<string, unknown> | undefined;
  return r ? toBaseline(r, viewer) : null;
}

// Cost actuals

export interface CostActualRecord {
  periodEnd: string;
  amount: number;
}

export async function listCostActuals(q: Q, projectId: number): Promise<CostActualRecord[]> {
  const rows = await q("cost_actuals").where({ project_id: projectId }).orderBy("period_end").select("period_end", "amount");
  return (rows as Array<{ period_end: string; amount: number | string }>).map((r) => ({ periodEnd: String(r.period_end), amount: Number(r.amount) }));
}

/** One amount per period end: posting a period again replaces its amount. */
export async function upsertCostActual(q: Q, projectId: number, c: { periodEnd: string; amount: number; byUserId: number | null; at: Date }): Promise<void> {
  await q("cost_actuals")
    .insert({ project_id: projectId, period_end: c.periodEnd, amount: c.amount, by_user_id: c.byUserId, updated_at: c.at })
    .onConflict(["project_id", "period_end"])
    .merge(["amount", "by_user_id", "updated_at"]);
}
