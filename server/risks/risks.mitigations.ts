import type { MitigationInput, MitigationPatchInput, RiskAnswer } from "#shared/schemas/risks.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { changeDetail, changedFields, staleVersion } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import { deleteMitigation, findMitigation, findRiskProjectId, insertMitigation, updateMitigation, type MitigationFields } from "./risks.repository.ts";
import { invalid, referenceOf, type RisksContext } from "./risks.context.ts";
import type { RiskReadUseCases } from "./risks.reads.ts";

type MitigationAnswer = RiskAnswer["mitigations"][number];

const mitigationNotFound = () => notFound("That mitigation action");

/**
 * A risk's mitigation actions: each with an owner (an active member of staff), a due date and a
 * status. Each write is an event of the risk (`mitigation_added`, `mitigation.<field>`,
 * `mitigation_deleted`, the action named in the note) and an audit entry.
 */
export function createMitigationUseCases(ctx: RisksContext, reads: Pick<RiskReadUseCases, "one">) {
  const { db, now, change, recordWrite, ownerProblem } = ctx;

  /** The action as its writer sees it, inside its risk. */
  async function answer(riskId: number, mitigationId: number, actor: Actor): Promise<MitigationAnswer> {
    return (await reads.one(riskId, actor)).mitigations.find((m) => m.id === mitigationId)!;
  }

  async function checkOwner(ownerId: number, trx: Parameters<typeof ownerProblem>[1]): Promise<void> {
    const problem = await ownerProblem(ownerId, trx);
    if (problem) throw invalid({ ownerId: problem });
  }

  /** The risk a mitigation belongs to, for a write to the mitigation (404 when either has gone). */
  async function riskOfMitigation(id: number): Promise<number> {
    const m = await findMitigation(db, id);
    if (!m) throw mitigationNotFound();
    if ((await findRiskProjectId(db, m.riskId)) === null) throw mitigationNotFound();
    return m.riskId;
  }

  const fieldsOf = (m: MitigationFields): MitigationFields => ({ description: m.description, ownerId: m.ownerId, dueDate: m.dueDate, status: m.status });

  return {
    async addMitigation(riskId: number, input: MitigationInput, actor: Actor): Promise<MitigationAnswer> {
      const { result } = await change(riskId, async (trx, risk, project) => {
        if (risk.kind === "risk" && risk.status === "became_issue") throw new AppError("risk_not_open", `${referenceOf(risk)} became an issue: add the action to the issue.`, 409);
        await checkOwner(input.ownerId, trx);
        const at = now();
        const id = await insertMitigation(trx, riskId, fieldsOf(input), at);
        await recordWrite(trx, actor, project, {
          action: "risk_mitigation_added",
          risk,
          events: [{ field: "mitigation_added", from: null, to: input.status, at, note: input.description }],
          detail: { reference: referenceOf(risk), mitigation: { id, ...fieldsOf(input) } },
        });
        return id;
      });
      return answer(riskId, result, actor);
    },

    async patchMitigation(id: number, input: MitigationPatchInput, actor: Actor): Promise<MitigationAnswer> {
      const riskId = await riskOfMitigation(id);
      await change(riskId, async (trx, risk, project) => {
        const before = await findMitigation(trx, id, { forUpdate: true });
        if (!before || before.riskId !== riskId) throw mitigationNotFound();
        if (before.version !== input.version) throw staleVersion("mitigation action", before);
        const { version: _version, ...given } = input;
        const next: MitigationFields = { ...fieldsOf(before), ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) };
        const [was, will] = [fieldsOf(before) as unknown as Record<string, unknown>, next as unknown as Record<string, unknown>];
        const changes = changedFields(was, will);
        if (changes.length === 0) return;
        if (next.ownerId !== before.ownerId) await checkOwner(next.ownerId, trx);
        const at = now();
        if ((await updateMitigation(trx, id, before.version, next, at)) === 0) throw staleVersion("mitigation action", await findMitigation(trx, id));
        await recordWrite(trx, actor, project, {
          action: "risk_mitigation_updated",
          risk,
          events: changes.map((c) => ({ ...c, field: `mitigation.${c.field}`, at, note: next.description })),
          detail: { reference: referenceOf(risk), mitigation: id, changes: changeDetail(was, will) },
        });
      });
      return answer(riskId, id, actor);
    },

    async deleteMitigation(id: number, actor: Actor): Promise<void> {
      const riskId = await riskOfMitigation(id);
      await change(riskId, async (trx, risk, project) => {
        const m = await findMitigation(trx, id, { forUpdate: true });
        if (!m || m.riskId !== riskId) throw mitigationNotFound();
        await deleteMitigation(trx, id);
        await recordWrite(trx, actor, project, {
          action: "risk_mitigation_deleted",
          risk,
          events: [{ field: "mitigation_deleted", from: m.status, to: null, at: now(), note: m.description }],
          detail: { reference: referenceOf(risk), mitigation: { id, ...fieldsOf(m) } },
        });
      });
    },
  };
}
