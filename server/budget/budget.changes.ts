import type { BudgetChangeAnswer, BudgetChangeCreateInput, BudgetChangePatchInput, BudgetChangeStatus } from "#shared/schemas/budget.ts";
import type { BUDGET_ANSWERS } from "#shared/schemas/budget.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { RecordReader } from "#shared/domain/record-audience.ts";
import type { z } from "zod";
import { AppError } from "../core/app-error.ts";
import { changeDetail, changedFields, invalidFields, staleVersion, uniqueSorted } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import { budgetReaderOf, changeNotFound, referenceOf, type BudgetContext, type Reader, type Trx } from "./budget.context.ts";
import {
  CHANGE_FIELD_KEYS,
  deleteChange,
  findChange,
  insertChange,
  listChangeEvents,
  listChanges,
  replaceChangeLinks,
  updateChange,
  type ChangeFields,
  type ChangeRecord,
} from "./budget.repository.ts";

type BudgetEvent = z.infer<typeof BUDGET_ANSWERS.event>;

/** What a change's events and audit entries list: its written fields and links. */
const writtenOf = (c: ChangeFields & { linkedMilestones: number[]; linkedRisks: number[] }) => ({
  ...(Object.fromEntries(CHANGE_FIELD_KEYS.map((k) => [k, c[k]])) as unknown as ChangeFields),
  linkedMilestones: c.linkedMilestones,
  linkedRisks: c.linkedRisks,
});

/** The register of budget changes: reading it by audience, entering, editing (optimistic version) and deleting a proposal. */
export function createChangeUseCases(ctx: BudgetContext) {
  const { db, projects, programme, risks, accounts, now, recordWrite, projectOfChange, underLock } = ctx;

  /** Changes as the reader sees them: linked milestones and risks named only where the reader may see them. */
  async function present(project: Project, records: readonly ChangeRecord[], reader: RecordReader): Promise<BudgetChangeAnswer[]> {
    if (records.length === 0) return [];
    const [milestones, linkedRisks] = await Promise.all([
      records.some((c) => c.linkedMilestones.length > 0) ? programme.list(project.slug, { removed: "include" }, reader.viewer) : Promise.resolve([]),
      risks.risksNamed(project.id, uniqueSorted(records.flatMap((c) => c.linkedRisks)), reader.viewer),
    ]);
    const milestoneName = new Map(milestones.map((m) => [m.id, m.name]));
    const risk = new Map(linkedRisks.map((r) => [r.id, r]));
    return records.map((c) => ({
      id: c.id,
      reference: referenceOf(c.number),
      description: c.description,
      detail: c.detail,
      amount: c.amount,
      status: c.status,
      approvedBy: c.approvedBy,
      approvedOn: c.approvedOn,
      drawsOnContingency: c.drawsOnContingency,
      linkedMilestones: c.linkedMilestones.filter((id) => milestoneName.has(id)).map((id) => ({ id, name: milestoneName.get(id)! })),
      linkedRisks: c.linkedRisks.filter((id) => risk.has(id)).map((id) => risk.get(id)!),
      audience: c.audience,
      version: c.version,
      updatedAt: c.updatedAt,
    }));
  }

  /**
   * The checks a change makes against the record, on the row as it will be: an approved change
   * says who approved it and when (not after today on site); it names the project's own
   * milestones and risks. A 422 names each field.
   */
  async function check(project: Project, next: ChangeFields & { linkedMilestones: number[]; linkedRisks: number[] }, changed: (field: string) => boolean): Promise<void> {
    const fields: Record<string, string> = {};
    if (next.status === "approved") {
      if (!next.approvedBy) fields.approvedBy = "is required for an approved change";
      if (!next.approvedOn) fields.approvedOn = "is required for an approved change";
    }
    const today = projects.today(project);
    if (changed("approvedOn") && next.approvedOn !== null && next.approvedOn > today) fields.approvedOn = `must not be after today (${today} in ${project.timeZone})`;
    if (changed("linkedMilestones") && next.linkedMilestones.length > 0) {
      const known = await programme.milestoneIdsOf(project.id, next.linkedMilestones);
      const unknown = next.linkedMilestones.filter((id) => !known.has(id));
      if (unknown.length > 0) fields.linkedMilestones = `names no milestone of this project: ${unknown.join(", ")}`;
    }
    if (changed("linkedRisks") && next.linkedRisks.length > 0) {
      const known = await risks.riskIdsOf(project.id, next.linkedRisks);
      const unknown = next.linkedRisks.filter((id) => !known.has(id));
      if (unknown.length > 0) fields.linkedRisks = `names no risk or issue of this project: ${unknown.join(", ")}`;
    }
    if (Object.keys(fields).length > 0) throw invalidFields(fields, "invalid_budget_change");
  }

  /** The change by id as the caller sees it, with its project (404 for a change they may not see). */
  async function visible(id: number, reader: RecordReader): Promise<{ project: Project; change: ChangeRecord }> {
    const project = await projectOfChange(id);
    const change = await findChange(db, id, reader.audiences);
    if (!change) throw changeNotFound();
    return { project, change };
  }

  /** A write to one change: under the project's lock, its row locked, 404 when it has gone. */
  async function change<T>(id: number, write: (trx: Trx, found: ChangeRecord, project: Project) => Promise<T>): Promise<{ project: Project; result: T }> {
    const project = await projectOfChange(id);
    const result = await underLock(project, async (trx) => {
      const found = await findChange(trx, id, ["investor", "internal"], { forUpdate: true });
      if (!found) throw changeNotFound();
      return write(trx, found, project);
    });
    return { project, result };
  }

  const staffAnswer = async (project: Project, id: number, reader: RecordReader): Promise<BudgetChangeAnswer> => (await present(project, [(await findChange(db, id, reader.audiences))!], reader))[0]!;

  return {
    async listChanges(slug: string, query: { status?: BudgetChangeStatus }, reader: Reader): Promise<BudgetChangeAnswer[]> {
      const r = budgetReaderOf(reader);
      const project = await projects.get(slug);
      return present(project, await listChanges(db, project.id, r.audiences, query), r);
    },

    async getChange(id: number, reader: Reader): Promise<BudgetChangeAnswer> {
      const r = budgetReaderOf(reader);
      const { project, change } = await visible(id, r);
      return (await present(project, [change], r))[0]!;
    },

    /** A change's history, newest first, for whoever may see the change. */
    async changeEvents(id: number, reader: Reader): Promise<BudgetEvent[]> {
      await visible(id, budgetReaderOf(reader));
      const events = await listChangeEvents(db, id);
      const names = await accounts.namesOf(uniqueSorted(events.map((e) => e.byUserId).filter((u): u is number => u !== null)));
      return events.map((e) => ({ id: e.id, changeId: e.changeId, field: e.field, from: e.from, to: e.to, at: e.at, by: (e.byUserId === null ? null : names.get(e.byUserId)) ?? null, note: e.note }));
    },

    async createChange(slug: string, input: BudgetChangeCreateInput, actor: Actor): Promise<BudgetChangeAnswer> {
      const reader = budgetReaderOf(actor);
      const project = await projects.get(slug);
      const next = { ...input, linkedMilestones: uniqueSorted(input.linkedMilestones), linkedRisks: uniqueSorted(input.linkedRisks) };
      await check(project, next, () => true);
      const id = await underLock(project, async (trx) => {
        const at = now();
        const { linkedMilestones, linkedRisks, ...fields } = next;
        const created = await insertChange(trx, project.id, fields, at);
        await replaceChangeLinks(trx, created.id, { milestones: linkedMilestones, risks: linkedRisks });
        const reference = referenceOf(created.number);
        await recordWrite(trx, actor, project, {
          action: "budget_change_created",
          changeId: created.id,
          label: `${reference} ${next.description}`,
          // The status has its own event from the start, so "approved in the window" is one query over events.
          events: [
            { field: "created", from: null, to: reference, note: null },
            { field: "status", from: null, to: next.status, note: null },
          ],
          at,
          detail: { reference, ...writtenOf(next) },
        });
        return created.id;
      });
      return staffAnswer(project, id, reader);
    },

    /** An edit: the stored row merged with the patch is checked whole (an approval names who and when), one event per changed field. */
    async patchChange(id: number, input: BudgetChangePatchInput, actor: Actor): Promise<BudgetChangeAnswer> {
      const reader = budgetReaderOf(actor);
      const { project } = await change(id, async (trx, before, project) => {
        if (before.version !== input.version) throw staleVersion("budget change", (await present(project, [before], reader))[0]);
        const { version: _version, note, linkedMilestones, linkedRisks, ...given } = input;
        const next: ChangeRecord = {
          ...before,
          ...(Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) as Partial<ChangeFields>),
          linkedMilestones: linkedMilestones === undefined ? before.linkedMilestones : uniqueSorted(linkedMilestones),
          linkedRisks: linkedRisks === undefined ? before.linkedRisks : uniqueSorted(linkedRisks),
        };
        const [was, will] = [writtenOf(before), writtenOf(next)];
        const changes = changeDetail(was, will);
        if (Object.keys(changes).length === 0) return;
        await check(project, next, (field) => field in changes);
        const at = now();
        const { linkedMilestones: _m, linkedRisks: _r, ...fields } = will;
        if ((await updateChange(trx, id, before.version, fields, at)) === 0) throw staleVersion("budget change", null);
        await replaceChangeLinks(trx, id, { milestones: "linkedMilestones" in changes ? next.linkedMilestones : undefined, risks: "linkedRisks" in changes ? next.linkedRisks : undefined });
        await recordWrite(trx, actor, project, {
          action: "budget_change_updated",
          changeId: id,
          label: `${referenceOf(before.number)} ${next.description}`,
          events: changedFields(was, will).map((e) => ({ ...e, note: note ?? null })),
          at,
          detail: { changes, ...(note ? { note } : {}) },
        });
      });
      return staffAnswer(project, id, reader);
    },

    /**
     * Deletes a change entered by mistake: only a proposal may go. An approved or rejected change
     * is the record of a decision about the money; it stays (correct it by a new change).
     */
    async deleteChange(id: number, actor: Actor): Promise<void> {
      budgetReaderOf(actor);
      await change(id, async (trx, c, project) => {
        if (c.status !== "proposed") {
          throw new AppError("change_on_record", `${referenceOf(c.number)} is ${c.status}: it stays on record. Enter a new change to correct it.`, 409);
        }
        await deleteChange(trx, id);
        // The change's events go with it (ON DELETE CASCADE); the audit entry keeps what it was.
        await recordWrite(trx, actor, project, {
          action: "budget_change_deleted",
          changeId: null,
          auditChangeId: id,
          label: `${referenceOf(c.number)} ${c.description}`,
          events: [{ field: "deleted", from: referenceOf(c.number), to: null, note: null }],
          at: now(),
          detail: { change: { id, reference: referenceOf(c.number), ...writtenOf(c) } },
        });
      });
    },
  };
}
