import type { BudgetPosition, BudgetSettingsInput } from "#shared/schemas/budget.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { budgetPosition, type BudgetChangeInput } from "#shared/domain/budget.ts";
import type { RecordReader } from "#shared/domain/record-audience.ts";
import { changedFields, changeDetail } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import { budgetReaderOf, referenceOf, type BudgetContext, type Reader } from "./budget.context.ts";
import { listChanges, listChangesApprovedIn, type ChangeRecord } from "./budget.repository.ts";

/** The caution every cost position carries, in the words of the product. */
export const BUDGET_CAUTION =
  "These cost figures are estimates drawn from the project record: milestone budgets, costs booked and approved changes. " +
  "They are not an audited account, and a projected final cost is a forecast, not a commitment.";

/** The walk's one step for the approved changes a reader may not see: they count in every figure, unnamed. */
export const OTHER_CHANGES_LABEL = "Other approved changes";

/**
 * The changes as the position's inputs. Every approved change counts, whatever its audience: one
 * build has one budget. Those the reader may see are named in the walk; the budget changes they
 * may not see are summed into one step, and contingency draws they may not see (which the walk
 * does not show) count unnamed.
 */
function positionChanges(approved: readonly ChangeRecord[], reader: RecordReader): BudgetChangeInput[] {
  const sees = (c: ChangeRecord) => reader.audiences.includes(c.audience);
  const named = approved.filter(sees).map((c) => ({ amount: c.amount, status: c.status, drawsOnContingency: c.drawsOnContingency, label: `${referenceOf(c.number)} ${c.description}` }));
  const hidden = approved.filter((c) => !sees(c));
  const hiddenDraws = hidden.filter((c) => c.drawsOnContingency).map((c) => ({ amount: c.amount, status: c.status, drawsOnContingency: true, label: OTHER_CHANGES_LABEL }));
  const hiddenSum = hidden.filter((c) => !c.drawsOnContingency).reduce((sum, c) => sum + c.amount, 0);
  const others = hiddenSum === 0 ? [] : [{ amount: hiddenSum, status: "approved" as const, drawsOnContingency: false, label: OTHER_CHANGES_LABEL }];
  return [...named, ...others, ...hiddenDraws];
}

/** The cost position, the budget settings, and what other modules read of the budget (the remaining contingency, a digest's approvals). */
export function createPositionUseCases(ctx: BudgetContext) {
  const { db, projects, programme, risks, now, recordWrite, underLock } = ctx;

  /** The whole build's figures at a date (approved changes up to it), with the walk named for the reader. */
  async function positionOf(project: Project, at: string, reader: RecordReader): Promise<BudgetPosition> {
    // The programme's money over every milestone, whatever the reader may see of them: one build, one budget.
    const [health, settings, approved, exposure] = await Promise.all([
      programme.health(project.slug, { at }, "staff"),
      projects.budgetSettings(project.id),
      listChanges(db, project.id, ["investor", "internal"], { status: "approved" }),
      risks.exposure(project.id, reader.viewer),
    ]);
    const money = health.money;
    const figures = {
      originalBudget: money?.bac ?? 0,
      plannedValue: money?.pv ?? 0,
      earnedValue: money?.ev ?? 0,
      // No costs booked means nothing spent is known: every variant that needs AC then divides by nothing.
      actualCost: money?.ac ?? 0,
    };
    const p = budgetPosition({
      ...figures,
      changes: positionChanges(
        approved.filter((c) => c.approvedOn !== null && c.approvedOn <= at),
        reader,
      ),
      contingencyHeld: settings.contingencyHeld,
      method: settings.projectedFinalCostMethod,
    });
    return {
      at,
      currency: project.currency,
      ...figures,
      approvedChanges: p.approvedChanges,
      currentBudget: p.currentBudget,
      contingencyHeld: p.contingencyHeld,
      contingencyDrawn: p.contingencyDrawn,
      contingencyRemaining: p.contingencyRemaining,
      cpi: p.cpi,
      spi: p.spi,
      eac: p.eac,
      projectedFinalCostMethod: settings.projectedFinalCostMethod,
      projectedFinalCost: p.projectedFinalCost,
      walk: p.walk,
      riskExposure: exposure,
      caution: BUDGET_CAUTION,
    };
  }

  return {
    /** GET /api/projects/:slug/budget: the cost position at a date (today on site unless given). */
    async position(slug: string, query: { at?: string }, reader: Reader): Promise<BudgetPosition> {
      const r = budgetReaderOf(reader);
      const project = await projects.get(slug);
      return positionOf(project, query.at ?? projects.today(project), r);
    },

    /** The contingency held and the EAC the lead chose: an event per changed setting (no change named) and an audit entry. */
    async putSettings(slug: string, input: BudgetSettingsInput, actor: Actor): Promise<BudgetPosition> {
      const reader = budgetReaderOf(actor);
      const project = await projects.get(slug);
      await underLock(project, async (trx) => {
        const before = await projects.budgetSettings(project.id, trx);
        const events = changedFields({ ...before }, { ...input });
        if (events.length === 0) return;
        await projects.writeBudgetSettings(trx, project.id, input);
        await recordWrite(trx, actor, project, {
          action: "budget_settings_changed",
          changeId: null,
          label: project.name,
          events: events.map((e) => ({ ...e, note: null })),
          at: now(),
          detail: { changes: changeDetail({ ...before }, { ...input }) },
        });
      });
      return positionOf(project, projects.today(project), reader);
    },

    /** The contingency remaining today over every approved change (the risks register sets its exposure against it). */
    async contingencyRemaining(projectId: number): Promise<number> {
      const [settings, approved] = await Promise.all([projects.budgetSettings(projectId), listChanges(db, projectId, ["investor", "internal"], { status: "approved" })]);
      const p = budgetPosition({
        originalBudget: 0,
        plannedValue: 0,
        earnedValue: 0,
        actualCost: 0,
        changes: approved.map((c) => ({ amount: c.amount, status: c.status, drawsOnContingency: c.drawsOnContingency, label: "" })),
        contingencyHeld: settings.contingencyHeld,
        method: settings.projectedFinalCostMethod,
      });
      return p.contingencyRemaining;
    },

    /**
     * Changes approved (their status set to approved) in [from, to) and approved still, that the
     * viewer may see: a digest's section (money in minor units; `approvedOn` the day the approver gave).
     */
    async movesIn(projectId: number, from: Date, to: Date, viewer: "investor" | "staff") {
      const r = budgetReaderOf(viewer);
      const changes = await listChangesApprovedIn(db, projectId, r.audiences, { from, before: to });
      return changes.map((c) => ({
        id: c.id,
        reference: referenceOf(c.number),
        description: c.description,
        audience: c.audience,
        amount: c.amount,
        approvedBy: c.approvedBy ?? "",
        approvedOn: c.approvedOn ?? "",
        drawsOnContingency: c.drawsOnContingency,
      }));
    },
  };
}
