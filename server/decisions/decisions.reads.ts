import { DateTime } from "luxon";
import type { DecisionAnswer, DecisionEvent, DecisionStatus } from "#shared/schemas/decisions.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { recordReaderOfViewer, type RecordReader } from "#shared/domain/record-audience.ts";
import { dateInZone } from "../projects/projects.service.ts";
import { listDecisionEvents, listDecisionStatusEventsIn } from "./decisions.events.repository.ts";
import { findDecision, listDecisions, listDecisionsLinkingRisk, type DecisionRecord } from "./decisions.repository.ts";
import { decisionNotFound, readerOf, referenceOf, type DecisionsContext, type Reader } from "./decisions.context.ts";

/** How far ahead a digest looks for decisions coming due. */
export const DUE_SOON_DAYS = 14;

/** Whole calendar days from `today` to `day` (both `YYYY-MM-DD`); negative when `day` has passed. */
export function daysBetween(today: string, day: string): number {
  return Math.round(DateTime.fromISO(day, { zone: "utc" }).diff(DateTime.fromISO(today, { zone: "utc" }), "days").days);
}

/**
 * One move of the decisions needed in a digest's window: a request newly needed (entered in the
 * window), one coming due (open, needed within 14 days of the window's last day, or overdue), one
 * decided. `daysLeft` counts from the window's last day on site.
 */
export type DecisionMove =
  | { kind: "needed" | "due_soon"; id: number; reference: string; title: string; audience: RecordAudience; decider: string; neededBy: string; daysLeft: number }
  | { kind: "decided"; id: number; reference: string; title: string; audience: RecordAudience; decidedBy: string; decidedOn: string; outcome: string };

/** Open first (by needed-by date, so overdue ones lead), then decided and withdrawn, latest first. */
function byUrgency(a: DecisionAnswer, b: DecisionAnswer): number {
  const openA = a.status === "open" ? 0 : 1;
  const openB = b.status === "open" ? 0 : 1;
  if (openA !== openB) return openA - openB;
  if (openA === 0) return a.neededBy.localeCompare(b.neededBy) || a.reference.localeCompare(b.reference);
  return (b.outcome?.decidedOn ?? b.neededBy).localeCompare(a.outcome?.decidedOn ?? a.neededBy) || b.reference.localeCompare(a.reference);
}

/** Decisions' reads: the list by audience with days left, one, its history, and a window's moves for digests. */
export function createDecisionReadUseCases(ctx: DecisionsContext) {
  const { db, projects, programme, risks, deps } = ctx;

  async function present(project: Project, records: readonly DecisionRecord[], reader: RecordReader, actor: Reader): Promise<DecisionAnswer[]> {
    if (records.length === 0) return [];
    const today = projects.today(project);
    const milestoneIds = records.flatMap((d) => d.linkedMilestones);
    const riskIds = [...new Set(records.flatMap((d) => d.linkedRisks))];
    const documentIds = [...new Set(records.flatMap((d) => d.documentIds))];
    const [milestones, linkedRisks, documents, names] = await Promise.all([
      milestoneIds.length ? programme.list(project.slug, { removed: "include" }, reader.viewer) : Promise.resolve([]),
      risks.referencesOf(project.id, riskIds, reader.audiences),
      documentIds.length && deps.documents && !("audiences" in actor) ? deps.documents.documentsNamed(project.id, documentIds, actor) : Promise.resolve([]),
      ctx.deps.accounts.namesOf([...new Set(records.map((d) => d.outcomeRecordedBy).filter((id): id is number => id !== null))]),
    ]);
    const milestoneNames = new Map(milestones.map((m) => [m.id, m.name]));
    const riskById = new Map(linkedRisks.map((r) => [r.id, r]));
    const documentById = new Map(documents.map((d) => [d.id, d]));
    return records.map((d) => {
      const open = d.status === "open";
      const daysLeft = open ? daysBetween(today, d.neededBy) : null;
      return {
        id: d.id,
        reference: referenceOf(d),
        title: d.title,
        question: d.question,
        background: d.background,
        options: d.options.map((o) => ({ label: o.label, consequence: o.consequence, cost: reader.money ? o.cost : null })),
        recommendedOption: d.recommendedOption,
        recommendation: d.recommendation,
        decider: d.decider,
        neededBy: d.neededBy,
        daysLeft,
        overdue: daysLeft !== null && daysLeft < 0,
        status: d.status,
        outcome:
          d.status === "decided"
            ? { chosenOption: d.chosenOption, text: d.outcome ?? "", decidedBy: d.decidedBy ?? "", decidedOn: d.decidedOn ?? "", recordedBy: d.outcomeRecordedBy === null ? null : (names.get(d.outcomeRecordedBy) ?? null) }
            : null,
        withdrawnReason: d.status === "withdrawn" ? d.withdrawnReason : null,
        linkedMilestones: d.linkedMilestones.filter((id) => milestoneNames.has(id)).map((id) => ({ id, name: milestoneNames.get(id)! })),
        linkedRisks: d.linkedRisks.filter((id) => riskById.has(id)).map((id) => ({ id, reference: riskById.get(id)!.reference, title: riskById.get(id)!.title })),
        documents: d.documentIds.filter((id) => documentById.has(id)).map((id) => ({ id, title: documentById.get(id)!.title })),
        audience: d.audience,
        version: d.version,
        updatedAt: d.updatedAt,
      };
    });
  }

  async function one(id: number, reader: Reader): Promise<DecisionAnswer> {
    const r = readerOf(reader);
    const record = await findDecision(db, id, r.audiences);
    if (!record) throw decisionNotFound();
    return (await present(await projects.getById(record.projectId), [record], r, reader))[0]!;
  }

  return {
    one,

    /** A project's decisions by the caller's audience: open ones first, overdue leading, then by needed-by date; decided and withdrawn ones after. */
    async list(slug: string, filter: { status?: DecisionStatus }, reader: Reader): Promise<DecisionAnswer[]> {
      const r = readerOf(reader);
      const project = await projects.get(slug);
      const records = (await listDecisions(db, project.id, r.audiences)).filter((d) => filter.status === undefined || d.status === filter.status);
      return (await present(project, records, r, reader)).sort(byUrgency);
    },

    /**
     * The decisions open at `instant` (entered by then, and not yet decided or withdrawn then: later
     * status changes undone), for a monthly report written for `viewer`; `daysLeft` counts from
     * `day`, the report's month end on site. Needed-by dates are today's.
     */
    async openAt(projectId: number, instant: Date, day: string, viewer: "investor" | "staff") {
      const reader = recordReaderOfViewer(viewer);
      const records = (await listDecisions(db, projectId, reader.audiences)).filter((d) => Date.parse(d.createdAt) <= instant.getTime());
      const statusThen = new Map<number, string>();
      for (const e of await listDecisionStatusEventsIn(db, projectId, new Date(instant.getTime() + 1), new Date(8.64e15))) if (!statusThen.has(e.subjectId) && e.from !== null) statusThen.set(e.subjectId, e.from);
      return records
        .filter((d) => (statusThen.get(d.id) ?? d.status) === "open")
        .map((d) => ({ reference: referenceOf(d), title: d.title, question: d.question, decider: d.decider, neededBy: d.neededBy, daysLeft: daysBetween(day, d.neededBy), recommendation: d.recommendation }))
        .sort((a, b) => a.neededBy.localeCompare(b.neededBy) || a.reference.localeCompare(b.reference));
    },

    /** A decision's history, newest first, for whoever may see it; changes of options (their costs) are left out for readers who may not see money. */
    async events(id: number, reader: Reader): Promise<DecisionEvent[]> {
      const r = readerOf(reader);
      if (!(await findDecision(db, id, r.audiences))) throw decisionNotFound();
      const events = (await listDecisionEvents(db, id)).filter((e) => r.money || e.field !== "options");
      const names = await ctx.deps.accounts.namesOf([...new Set(events.map((e) => e.byUserId).filter((u): u is number => u !== null))]);
      return events.map((e) => ({ id: e.id, decisionId: e.subjectId, field: e.field, from: e.from, to: e.to, at: e.at, by: e.byUserId === null ? null : (names.get(e.byUserId) ?? null), note: e.note }));
    },

    /**
     * What moved in [from, to), for a digest written for `viewer`: requests entered (`needed`),
     * other open ones needed within 14 days of the window's last day or overdue (`due_soon`), and
     * those decided in the window and decided still (`decided`). Investors' digests name only
     * investor-audience decisions.
     */
    async movesIn(projectId: number, from: Date, to: Date, viewer: "investor" | "staff"): Promise<DecisionMove[]> {
      const reader = recordReaderOfViewer(viewer);
      const project = await projects.getById(projectId);
      const lastDay = dateInZone(new Date(to.getTime() - 1), project.timeZone);
      const records = await listDecisions(db, projectId, reader.audiences);
      const decidedIds = new Set((await listDecisionStatusEventsIn(db, projectId, from, to)).filter((e) => e.to === "decided").map((e) => e.subjectId));
      const entered = (d: DecisionRecord) => Date.parse(d.createdAt) >= from.getTime() && Date.parse(d.createdAt) < to.getTime();
      const base = (d: DecisionRecord) => ({ id: d.id, reference: referenceOf(d), title: d.title, audience: d.audience });
      const asked = (kind: "needed" | "due_soon") => (d: DecisionRecord): DecisionMove => ({ kind, ...base(d), decider: d.decider, neededBy: d.neededBy, daysLeft: daysBetween(lastDay, d.neededBy) });
      const byNeededBy = (a: DecisionRecord, b: DecisionRecord) => a.neededBy.localeCompare(b.neededBy) || a.number - b.number;
      const open = records.filter((d) => d.status === "open").sort(byNeededBy);
      return [
        ...open.filter(entered).map(asked("needed")),
        ...open.filter((d) => !entered(d) && daysBetween(lastDay, d.neededBy) <= DUE_SOON_DAYS).map(asked("due_soon")),
        ...records
          .filter((d) => d.status === "decided" && decidedIds.has(d.id))
          .map((d): DecisionMove => ({ kind: "decided", ...base(d), decidedBy: d.decidedBy ?? "", decidedOn: d.decidedOn ?? "", outcome: d.outcome ?? "" })),
      ];
    },

    /** The decisions (any audience) linking a risk, in words: what keeps the risk on record. */
    async linkingRisk(riskId: number): Promise<string[]> {
      return (await listDecisionsLinkingRisk(db, riskId)).map((d) => `decision ${referenceOf(d)} links it`);
    },
  };
}

export type DecisionReadUseCases = ReturnType<typeof createDecisionReadUseCases>;
