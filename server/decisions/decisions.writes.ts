import type { DecisionAnswer, DecisionCreateInput, DecisionOutcomeInput, DecisionPatchInput } from "#shared/schemas/decisions.ts";
import { changeDetail, changedFields, staleVersion, uniqueSorted } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import { findDecision, insertDecision, nextDecisionNumber, replaceDecisionLinks, updateDecision, type DecisionFields, type DecisionLinks, type DecisionRecord } from "./decisions.repository.ts";
import { closedDecision, invalid, referenceOf, type DecisionsContext } from "./decisions.context.ts";
import type { DecisionReadUseCases } from "./decisions.reads.ts";

/** The fields a request's events and audit entries list: its columns and its links. */
const WRITTEN = ["title", "question", "background", "options", "recommendedOption", "recommendation", "decider", "neededBy", "audience", "linkedMilestones", "linkedRisks", "documentIds"] as const;
const writtenOf = (d: DecisionFields & DecisionLinks): Record<string, unknown> => Object.fromEntries(WRITTEN.map((key) => [key, d[key]]));

const ALL_FIELDS = new Set(["options", "recommendedOption", "linkedMilestones", "linkedRisks", "documentIds"]);
const ALL_AUDIENCES = ["investor", "internal"] as const;

/** Asking a decision, editing an open one (optimistic version), recording its outcome, withdrawing it. */
export function createDecisionWriteUseCases(ctx: DecisionsContext, reads: Pick<DecisionReadUseCases, "one">) {
  const { projects, now, change, recordWrite, checkFields, db } = ctx;

  const linksOf = (i: { linkedMilestones: number[]; linkedRisks: number[]; documentIds: number[] }): DecisionLinks => ({
    linkedMilestones: uniqueSorted(i.linkedMilestones),
    linkedRisks: uniqueSorted(i.linkedRisks),
    documentIds: uniqueSorted(i.documentIds),
  });

  /** The decision's version must be the one the caller read; it must still be open. */
  function checkWritable(d: DecisionRecord, version: number, what: string): void {
    if (d.version !== version) throw staleVersion("decision", d);
    if (d.status !== "open") throw closedDecision(d, what);
  }

  return {
    /** A new request; a needed-by date before today on site is refused (422 naming `neededBy`). */
    async create(slug: string, input: DecisionCreateInput, actor: Actor): Promise<DecisionAnswer> {
      const project = await projects.get(slug);
      const id = await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const next = { ...input, ...linksOf(input) };
        const fields: Record<string, string> = {};
        const today = projects.today(project);
        if (input.neededBy < today) fields.neededBy = `must not be before today (${today} in ${project.timeZone})`;
        await checkFields(project, next, ALL_FIELDS, fields);
        const at = now();
        const number = await nextDecisionNumber(trx, project.id);
        const { linkedMilestones, linkedRisks, documentIds, ...columns } = next;
        const id = await insertDecision(trx, { ...columns, projectId: project.id, number }, at);
        await replaceDecisionLinks(trx, id, { linkedMilestones, linkedRisks, documentIds });
        const decision = { id, number, title: input.title };
        await recordWrite(trx, actor, project, {
          action: "decision_created",
          decision,
          events: [{ field: "created", from: null, to: referenceOf(decision), at, note: null }],
          detail: { reference: referenceOf(decision), ...writtenOf(next) },
        });
        return id;
      });
      return reads.one(id, actor);
    },

    /** Edits an open request; a needed-by date moved before today is refused as on creation. */
    async patch(id: number, input: DecisionPatchInput, actor: Actor): Promise<DecisionAnswer> {
      await change(id, async (trx, before, project) => {
        checkWritable(before, input.version, "changed");
        const { version: _version, note, linkedMilestones, linkedRisks, documentIds, ...given } = input;
        const next: DecisionRecord = {
          ...before,
          ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)),
          ...linksOf({ linkedMilestones: linkedMilestones ?? before.linkedMilestones, linkedRisks: linkedRisks ?? before.linkedRisks, documentIds: documentIds ?? before.documentIds }),
        };
        const [was, will] = [writtenOf(before), writtenOf(next)];
        const changes = changedFields(was, will);
        if (changes.length === 0) return;
        const changed = new Set(changes.map((c) => c.field));
        const fields: Record<string, string> = {};
        const today = projects.today(project);
        if (changed.has("neededBy") && next.neededBy < today) fields.neededBy = `must not be before today (${today} in ${project.timeZone})`;
        await checkFields(project, next, changed, fields);
        const at = now();
        const { linkedMilestones: lm, linkedRisks: lr, documentIds: ld } = next;
        const columns: Partial<DecisionFields> = Object.fromEntries(Object.entries(writtenOf(next)).filter(([k]) => changed.has(k) && !["linkedMilestones", "linkedRisks", "documentIds"].includes(k)));
        if ((await updateDecision(trx, id, before.version, columns, at)) === 0) throw staleVersion("decision", await findDecision(trx, id, ALL_AUDIENCES));
        await replaceDecisionLinks(trx, id, { linkedMilestones: lm, linkedRisks: lr, documentIds: ld });
        await recordWrite(trx, actor, project, {
          action: "decision_updated",
          decision: next,
          events: changes.map((c) => ({ ...c, at, note: note ?? null })),
          detail: { reference: referenceOf(before), changes: changeDetail(was, will), note: note ?? null },
        });
      });
      return reads.one(id, actor);
    },

    /** Records the outcome: the option chosen (one of the request's), what was decided, by whom and on what day (not after today). */
    async recordOutcome(id: number, input: DecisionOutcomeInput, actor: Actor): Promise<DecisionAnswer> {
      await change(id, async (trx, before, project) => {
        checkWritable(before, input.version, "decided again");
        const fields: Record<string, string> = {};
        if (input.chosenOption !== null && input.chosenOption >= before.options.length) fields.chosenOption = `must be the number of one of the options (0 to ${before.options.length - 1})`;
        const today = projects.today(project);
        if (input.decidedOn > today) fields.decidedOn = `must not be after today (${today} in ${project.timeZone})`;
        if (Object.keys(fields).length > 0) throw invalid(fields);
        const at = now();
        const close = { status: "decided" as const, chosenOption: input.chosenOption, outcome: input.outcome, decidedBy: input.decidedBy, decidedOn: input.decidedOn, outcomeRecordedBy: actor.user?.id ?? null };
        if ((await updateDecision(trx, id, before.version, close, at)) === 0) throw staleVersion("decision", await findDecision(trx, id, ALL_AUDIENCES));
        const chosen = input.chosenOption === null ? null : before.options[input.chosenOption]!.label;
        await recordWrite(trx, actor, project, {
          action: "decision_decided",
          decision: before,
          events: [
            { field: "status", from: "open", to: "decided", at, note: input.outcome },
            { field: "chosenOption", from: null, to: chosen, at, note: null },
            { field: "decidedBy", from: null, to: input.decidedBy, at, note: null },
            { field: "decidedOn", from: null, to: input.decidedOn, at, note: null },
          ],
          detail: { reference: referenceOf(before), chosenOption: input.chosenOption, chosen, outcome: input.outcome, decidedBy: input.decidedBy, decidedOn: input.decidedOn },
        });
      });
      return reads.one(id, actor);
    },

    /** Withdraws an open request with a reason: it keeps its record. */
    async withdraw(id: number, input: { reason: string; version: number }, actor: Actor): Promise<DecisionAnswer> {
      await change(id, async (trx, before, project) => {
        checkWritable(before, input.version, "withdrawn");
        const at = now();
        if ((await updateDecision(trx, id, before.version, { status: "withdrawn", withdrawnReason: input.reason }, at)) === 0) throw staleVersion("decision", await findDecision(trx, id, ALL_AUDIENCES));
        await recordWrite(trx, actor, project, {
          action: "decision_withdrawn",
          decision: before,
          events: [{ field: "status", from: "open", to: "withdrawn", at, note: input.reason }],
          detail: { reference: referenceOf(before), reason: input.reason },
        });
      });
      return reads.one(id, actor);
    },
  };
}
