import type { BaselineDetail, BaselineInput, BaselineVersion, CostActualRow } from "#shared/schemas/programme.ts";
import { notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import {
  findBaseline,
  insertBaseline,
  listBaselines,
  listCostActuals,
  maxBaselineNumber,
  upsertCostActual,
  type BaselineSnapshotEntry,
  type BaselineVersionRecord,
} from "./programme.baselines.repository.ts";
import { fieldsOf, invalid, userIdsOf, viewerOf, type ProgrammeContext, type Reader } from "./programme.context.ts";
import { listMilestones } from "./programme.repository.ts";

/**
 * The plans the programme is measured against, and what it cost: baseline versions (reading
 * them, and re-baselining with a reason, which keeps the old version) and cost actuals.
 */
export function createBaselineUseCases(ctx: ProgrammeContext) {
  const { db, projects, accounts, now, record } = ctx;

  /** Versions with the names of the people who set them, asked for in one read. */
  async function named<T extends BaselineVersionRecord>(versions: readonly T[]): Promise<Array<Omit<T, "byUserId"> & { by: string | null }>> {
    const names = await accounts.namesOf(userIdsOf(versions.map((v) => v.byUserId)));
    return versions.map(({ byUserId, ...v }) => ({ ...v, by: (byUserId === null ? null : names.get(byUserId)) ?? null }));
  }

  return {
    async baselines(slug: string, reader: Reader): Promise<BaselineVersion[]> {
      const project = await projects.get(slug);
      return named(await listBaselines(db, project.id, viewerOf(reader)));
    },

    async baseline(slug: string, number: number, reader: Reader): Promise<BaselineDetail> {
      const project = await projects.get(slug);
      const viewer = viewerOf(reader);
      const found = await findBaseline(db, project.id, number, viewer);
      if (!found) throw notFound("That baseline version");
      const [b] = await named([found]);
      return { ...b!, milestones: b!.milestones.map((e) => ({ ...e, budget: viewer === "public" ? null : e.budget })) };
    },

    /**
     * Re-baselining: version n+1 records the plan it sets. Open milestones take their
     * forecast as the new baseline finish (unless `adoptForecasts` is false); finished
     * ones keep the baseline their work was measured against; `overrides` set
     * particular ones. Each baseline change is an event tagged with the version.
     */
    async rebaseline(slug: string, input: BaselineInput, actor: Actor): Promise<BaselineVersion> {
      const project = await projects.get(slug);
      return db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const all = await listMilestones(trx, project.id, "staff");
        const byId = new Map(all.map((m) => [m.id, m]));
        const overrides = new Map<number, BaselineInput["overrides"][number]>();
        const problems: string[] = [];
        for (const o of input.overrides) {
          if (!byId.has(o.id)) problems.push(`${o.id} is not a milestone of this project`);
          else if (overrides.has(o.id)) problems.push(`${byId.get(o.id)!.name} is given twice`);
          overrides.set(o.id, o);
        }
        if (problems.length > 0) throw invalid({ overrides: problems.join("; ") }, "invalid_baseline");

        const plan = all.map((m) => {
          const o = overrides.get(m.id);
          const adopted = input.adoptForecasts && m.actualFinish === null && m.forecastFinish !== null ? m.forecastFinish : m.baselineFinish;
          const baselineFinish = o ? o.baselineFinish : adopted;
          const plannedStart = o && o.plannedStart !== undefined ? o.plannedStart : m.plannedStart;
          return { m, next: { ...fieldsOf(m), baselineFinish, plannedStart } };
        });
        const late = plan.filter((p) => p.next.plannedStart !== null && p.next.plannedStart > p.next.baselineFinish);
        if (late.length > 0) {
          throw invalid(
            {
              [overrides.size > 0 ? "overrides" : "adoptForecasts"]: `would put a planned start after the baseline finish: ${late.map((p) => `${p.m.name} (${p.next.plannedStart} > ${p.next.baselineFinish})`).join(", ")}`,
            },
            "invalid_baseline",
          );
        }

        const number = (await maxBaselineNumber(trx, project.id)) + 1;
        const at = now();
        const snapshot: BaselineSnapshotEntry[] = plan.map(({ m, next }) => ({
          id: m.id,
          name: m.name,
          audience: m.audience,
          plannedStart: next.plannedStart,
          baselineFinish: next.baselineFinish,
          weight: m.weight,
          budget: m.budget,
        }));
        await insertBaseline(trx, { projectId: project.id, number, reason: input.reason, byUserId: actor.user?.id ?? null, at, snapshot });
        let moved = 0;
        for (const { m, next } of plan) {
          if (await ctx.writeUpdate(trx, m, next, { at, byUserId: actor.user?.id ?? null, note: input.reason, baselineVersion: number }, project)) moved += 1;
        }
        await record(trx, actor, "programme_rebaselined", { type: "project", id: project.id, label: project.slug }, {
          number,
          reason: input.reason,
          adoptForecasts: input.adoptForecasts,
          overrides: input.overrides.length,
          milestones: snapshot.length,
          changed: moved,
        });
        return { number, reason: input.reason, by: actor.user?.name ?? null, at: at.toISOString(), milestoneCount: snapshot.length };
      });
    },

    async costActuals(slug: string): Promise<CostActualRow[]> {
      const project = await projects.get(slug);
      return listCostActuals(db, project.id);
    },

    async addCostActual(slug: string, input: { periodEnd: string; amount: number }, actor: Actor): Promise<CostActualRow> {
      const project = await projects.get(slug);
      await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const previous = (await listCostActuals(trx, project.id)).find((c) => c.periodEnd === input.periodEnd)?.amount ?? null;
        await upsertCostActual(trx, project.id, { ...input, byUserId: actor.user?.id ?? null, at: now() });
        await record(trx, actor, "cost_actual_recorded", { type: "project", id: project.id, label: project.slug }, { periodEnd: input.periodEnd, amount: input.amount, previous, currency: project.currency });
      });
      return { periodEnd: input.periodEnd, amount: input.amount };
    },
  };
}
