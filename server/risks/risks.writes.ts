import type { RiskAnswer, RiskCreateInput, RiskPatchInput, RiskToIssueInput } from "#shared/schemas/risks.ts";
import { AppError } from "../core/app-error.ts";
import { changeDetail, changedFields, staleVersion, uniqueSorted } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import { countEventsBeyondCreation } from "./risks.events.repository.ts";
import { deleteRisk, findIssuesFrom, findRisk, insertRisk, nextRiskNumber, replaceRiskLinks, updateRisk, type RiskFields, type RiskLinks, type RiskRecord } from "./risks.repository.ts";
import { invalid, referenceOf, type RisksContext } from "./risks.context.ts";
import type { RiskReadUseCases } from "./risks.reads.ts";

/** The fields a risk's events and audit entries list: its columns and its links. */
const WRITTEN = ["title", "description", "cause", "effect", "category", "ownerId", "likelihood", "impact", "costExposure", "scheduleDays", "status", "audience", "impactNow", "action", "dueDate", "linkedMilestones", "linkedBlocks", "linkedSystems"] as const;
const writtenOf = (r: RiskFields & RiskLinks): Record<string, unknown> => Object.fromEntries(WRITTEN.map((key) => [key, r[key]]));

const ALL_FIELDS = new Set(["likelihood", "impact", "ownerId", "linkedMilestones", "linkedBlocks", "linkedSystems"]);

const notOpen = (r: RiskRecord, what: string) =>
  new AppError("risk_not_open", `${referenceOf(r)} is ${r.status === "became_issue" ? "already an issue" : r.status}: only an open risk ${what}.`, 409);

/** Entering a risk or an issue, editing it (optimistic version), opening an issue from a risk, deleting one entered by mistake. */
export function createRiskWriteUseCases(ctx: RisksContext, reads: Pick<RiskReadUseCases, "one">) {
  const { now, addTo, change, recordWrite, checkFields, deps } = ctx;

  /** The written risk as its writer (a lead or an administrator) sees it, trend over the default window. */
  const answer = (w: { result: number }, actor: Actor): Promise<RiskAnswer> => reads.one(w.result, actor);

  return {
    async create(slug: string, input: RiskCreateInput, actor: Actor): Promise<RiskAnswer> {
      const written = await addTo(slug, async (trx, project, scale) => {
        const next = { ...input, status: "open" as const, linkedMilestones: uniqueSorted(input.linkedMilestones), linkedBlocks: uniqueSorted(input.linkedBlocks), linkedSystems: uniqueSorted(input.linkedSystems) };
        await checkFields(trx, project, scale, next, ALL_FIELDS);
        const at = now();
        const number = await nextRiskNumber(trx, project.id, input.kind);
        const { kind: _kind, linkedMilestones, linkedBlocks, linkedSystems, ...fields } = next;
        const id = await insertRisk(trx, { ...fields, projectId: project.id, kind: input.kind, number, fromRiskId: null }, at);
        await replaceRiskLinks(trx, id, { linkedMilestones, linkedBlocks, linkedSystems });
        const risk = { id, kind: input.kind, number, title: input.title };
        await recordWrite(trx, actor, project, {
          action: input.kind === "risk" ? "risk_created" : "issue_created",
          risk,
          events: [{ field: "created", from: null, to: referenceOf(risk), at, note: null }],
          detail: { reference: referenceOf(risk), ...writtenOf(next) },
        });
        return id;
      });
      return answer(written, actor);
    },

    async patch(id: number, input: RiskPatchInput, actor: Actor): Promise<RiskAnswer> {
      const written = await change(id, async (trx, before, project, scale) => {
        if (before.version !== input.version) throw staleVersion(before.kind, before);
        const { version: _version, note, linkedMilestones, linkedBlocks, linkedSystems, ...given } = input;
        const next: RiskRecord = {
          ...before,
          ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)),
          linkedMilestones: linkedMilestones === undefined ? before.linkedMilestones : uniqueSorted(linkedMilestones),
          linkedBlocks: linkedBlocks === undefined ? before.linkedBlocks : uniqueSorted(linkedBlocks),
          linkedSystems: linkedSystems === undefined ? before.linkedSystems : uniqueSorted(linkedSystems),
        };
        const [was, will] = [writtenOf(before), writtenOf(next)];
        const changes = changedFields(was, will);
        if (changes.length === 0) return id;
        if (next.status !== before.status) {
          if (next.status === "became_issue") throw invalid({ status: "becomes an issue through POST /api/risks/:id/issue, which opens the issue" });
          if (before.status === "became_issue") throw invalid({ status: "stays became_issue: the issue opened from it carries on" });
        }
        await checkFields(trx, project, scale, next, new Set(changes.map((c) => c.field)));
        const at = now();
        const { id: _id, projectId: _p, kind: _k, number: _n, fromRiskId: _f, version: _v, createdAt: _c, updatedAt: _u, linkedMilestones: _lm, linkedBlocks: _lb, linkedSystems: _ls, ...fields } = next;
        if ((await updateRisk(trx, id, before.version, fields, at)) === 0) throw staleVersion(before.kind, await findRisk(trx, id, ["investor", "internal"]));
        await replaceRiskLinks(trx, id, { linkedMilestones, linkedBlocks, linkedSystems });
        await recordWrite(trx, actor, project, {
          action: before.kind === "risk" ? "risk_updated" : "issue_updated",
          risk: next,
          events: changes.map((c) => ({ ...c, at, note: note ?? null })),
          detail: { reference: referenceOf(before), changes: changeDetail(was, will), note: note ?? null },
        });
        return id;
      });
      return answer(written, actor);
    },

    /**
     * The risk happened: in one transaction the risk is marked `became_issue` and an issue is
     * opened from it (I-00n), carrying its title, cause, effect, category, owner, impact, exposure,
     * links and audience, with the impact now and the action taken. Its likelihood is the top of the
     * scale: it has happened.
     */
    async toIssue(id: number, input: RiskToIssueInput, actor: Actor): Promise<RiskAnswer> {
      const written = await change(id, async (trx, risk, project, scale) => {
        if (risk.version !== input.version) throw staleVersion("risk", risk);
        if (risk.kind !== "risk") throw invalid({ kind: "is issue: only a risk becomes an issue" });
        if (risk.status !== "open") throw notOpen(risk, "becomes an issue");
        const at = now();
        const number = await nextRiskNumber(trx, project.id, "issue");
        const fields: RiskFields = { ...risk, likelihood: scale.likelihoodLevels, status: "open", impactNow: input.impactNow, action: input.action, dueDate: input.dueDate };
        const issueId = await insertRisk(trx, { ...fields, projectId: project.id, kind: "issue", number, fromRiskId: risk.id }, at);
        await replaceRiskLinks(trx, issueId, { linkedMilestones: risk.linkedMilestones, linkedBlocks: risk.linkedBlocks, linkedSystems: risk.linkedSystems });
        if ((await updateRisk(trx, id, risk.version, { status: "became_issue" }, at)) === 0) throw staleVersion("risk", await findRisk(trx, id, ["investor", "internal"]));
        const issue = { id: issueId, kind: "issue" as const, number, title: risk.title };
        const note = input.note ?? null;
        await recordWrite(trx, actor, project, {
          action: "risk_became_issue",
          risk,
          events: [
            { field: "status", from: risk.status, to: "became_issue", at, note },
            { field: "issue", from: null, to: referenceOf(issue), at, note },
            { subjectId: issueId, field: "created", from: null, to: referenceOf(issue), at, note: `Opened from ${referenceOf(risk)}` },
          ],
          detail: { reference: referenceOf(risk), issue: { id: issueId, reference: referenceOf(issue) }, impactNow: input.impactNow, action: input.action, dueDate: input.dueDate, note },
        });
        return issueId;
      });
      return answer(written, actor);
    },

    /**
     * Deletes a risk or issue entered by mistake: only while nothing has it on record (no change
     * since it was entered, no issue opened from it, not opened from a risk, no decision or budget
     * change linking it); otherwise 409 `on_record`, and the caller closes it instead. Its links,
     * mitigations and events go with it; the audit entry keeps what it was.
     */
    async delete(id: number, actor: Actor): Promise<void> {
      await change(id, async (trx, risk, project) => {
        const reasons: string[] = [];
        if ((await countEventsBeyondCreation(trx, id)) > 0) reasons.push("it has changed since it was entered");
        const issue = (await findIssuesFrom(trx, [id])).get(id);
        if (issue) reasons.push(`issue ${referenceOf({ kind: "issue", number: issue.number })} was opened from it`);
        if (risk.fromRiskId !== null) reasons.push("it was opened from a risk");
        reasons.push(...((await deps.references?.(id)) ?? []));
        if (reasons.length > 0) {
          throw new AppError("on_record", `${referenceOf(risk)} is on record (${reasons.join("; ")}), so it cannot be deleted. Close it instead: its history stays.`, 409, undefined, { onRecord: reasons });
        }
        await recordWrite(trx, actor, project, {
          action: risk.kind === "risk" ? "risk_deleted" : "issue_deleted",
          risk,
          events: [],
          detail: { reference: referenceOf(risk), [risk.kind]: writtenOf(risk) },
        });
        await deleteRisk(trx, id);
      });
    },
  };
}
