import { DateTime } from "luxon";
import type { RiskAnswer, RiskBand, RiskEvent, RiskScale, RiskSummary, RecordAudience } from "#shared/schemas/risks.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { audiencesFor } from "#shared/domain/audience.ts";
import { recordReaderOfViewer, type RecordReader } from "#shared/domain/record-audience.ts";
import { expectedCost, expectedCostPert, exposureTotals, riskBand, riskGrid, riskScore, riskTrend, scoreAt } from "#shared/domain/risks.ts";
import { startOfDateInZone } from "../projects/projects.service.ts";
import { listLevelEvents, listRiskEvents, listStatusEventsIn, type RiskEventRecord } from "./risks.events.repository.ts";
import { findIssuesFrom, findRisk, findRisksOfProject, listMitigations, listRisks, type RiskRecord } from "./risks.repository.ts";
import { readerOf, referenceOf, riskNotFound, type Reader, type RisksContext } from "./risks.context.ts";

/** The reporting window when the caller names none: the 30 days before today on site. */
const DEFAULT_WINDOW_DAYS = 30;

export interface RiskListFilter {
  kind?: RiskRecord["kind"];
  status?: RiskRecord["status"];
  category?: RiskRecord["category"];
  ownerId?: number;
  band?: RiskBand;
  since?: string;
}

/** A risk or issue as a digest names it. */
export interface RiskMoveItem {
  id: number;
  reference: string;
  title: string;
  audience: RecordAudience;
}

export interface RiskMoves {
  /** Risks and issues entered in the window, with their band now. */
  new: Array<RiskMoveItem & { band: RiskBand }>;
  /** Open risks whose band at the end of the window is above their band at its start. */
  roseBand: Array<RiskMoveItem & { fromBand: RiskBand; toBand: RiskBand }>;
  /** Risks and issues closed in the window (and still closed at its end). */
  closed: RiskMoveItem[];
  /** Risks that became issues in the window, with the issue opened from each. */
  becameIssues: Array<RiskMoveItem & { issue: { id: number; reference: string } | null }>;
}

const BAND_ORDER: Record<RiskBand, number> = { low: 0, medium: 1, high: 2, critical: 3 };

/** The register's reads: the list by audience with scores, bands and trends, one item, its history, the summary, and a window's moves for digests. */
export function createRiskReadUseCases(ctx: RisksContext) {
  const { db, projects, programme, facility, accounts, deps } = ctx;

  /** The start of the reporting window: 00:00 on site of `since`, or of 30 days before today. */
  function windowStartOf(project: Project, since: string | undefined): { day: string; instant: string } {
    const day = since ?? DateTime.fromISO(projects.today(project)).minus({ days: DEFAULT_WINDOW_DAYS }).toISODate()!;
    return { day, instant: startOfDateInZone(day, project.timeZone).toISOString() };
  }

  /** Names of the linked milestones, blocks and systems this reader may see, by id (asked only when some are linked). */
  async function linkNames(project: Project, records: readonly RiskRecord[], reader: RecordReader) {
    const wantsMilestones = records.some((r) => r.linkedMilestones.length > 0);
    const wantsFacility = records.some((r) => r.linkedBlocks.length > 0 || r.linkedSystems.length > 0);
    const [milestones, subjects] = await Promise.all([
      wantsMilestones ? programme.list(project.slug, { removed: "include" }, reader.viewer) : Promise.resolve([]),
      wantsFacility ? facility.tagSubjects(project.id) : Promise.resolve([]),
    ]);
    const visible = new Set(audiencesFor(reader.viewer));
    const seen = subjects.filter((s) => visible.has(s.audience));
    return {
      milestones: new Map(milestones.map((m) => [m.id, m.name])),
      blocks: new Map(seen.filter((s) => s.kind === "block").map((s) => [s.id, s.name])),
      systems: new Map(seen.filter((s) => s.kind === "plant").map((s) => [s.id, s.name])),
    };
  }

  const named = (ids: readonly number[], names: Map<number, string>) => ids.filter((id) => names.has(id)).map((id) => ({ id, name: names.get(id)! }));

  /** Records as this reader sees them: scores, bands and the trend over the window; links, owners and money by what the reader may see. */
  async function present(project: Project, records: readonly RiskRecord[], reader: RecordReader, windowStart: string): Promise<RiskAnswer[]> {
    if (records.length === 0) return [];
    const ids = records.map((r) => r.id);
    const scale = await projects.riskScale(project.id);
    const [mitigations, levelEvents, issues, links] = await Promise.all([listMitigations(db, ids), listLevelEvents(db, ids), findIssuesFrom(db, ids), linkNames(project, records, reader)]);
    const fromIds = records.map((r) => r.fromRiskId).filter((id): id is number => id !== null);
    const fromRisks = new Map((await findRisksOfProject(db, project.id, fromIds, reader.audiences)).map((r) => [r.id, r]));
    const names = await accounts.namesOf([...new Set([...records.map((r) => r.ownerId), ...mitigations.map((m) => m.ownerId)])]);
    const today = projects.today(project);
    const nameOf = (id: number) => ({ id, name: names.get(id) ?? "(former account)" });
    return records.map((r) => {
      const score = riskScore(r.likelihood, r.impact);
      const atStart = scoreAt(r, levelEvents.filter((e) => e.subjectId === r.id), windowStart);
      const issue = issues.get(r.id);
      const from = r.fromRiskId === null ? undefined : fromRisks.get(r.fromRiskId);
      const money = reader.money ? r.costExposure : null;
      return {
        id: r.id,
        kind: r.kind,
        reference: referenceOf(r),
        title: r.title,
        description: r.description,
        cause: r.cause,
        effect: r.effect,
        category: r.category,
        owner: nameOf(r.ownerId),
        likelihood: r.likelihood,
        impact: r.impact,
        score,
        band: riskBand(score, scale),
        trend: riskTrend(score, atStart, scale),
        scoreAtWindowStart: atStart,
        costExposure: money,
        expectedCost: money ? expectedCost(money) : null,
        expectedCostPert: money ? expectedCostPert(money) : null,
        scheduleDays: r.scheduleDays,
        linkedMilestones: named(r.linkedMilestones, links.milestones),
        linkedBlocks: named(r.linkedBlocks, links.blocks),
        linkedSystems: named(r.linkedSystems, links.systems),
        status: r.status,
        audience: r.audience,
        impactNow: r.impactNow,
        action: r.action,
        dueDate: r.dueDate,
        fromRisk: from ? { id: from.id, reference: referenceOf(from) } : null,
        issue: issue && reader.audiences.includes(issue.audience) ? { id: issue.id, reference: referenceOf({ kind: "issue", number: issue.number }) } : null,
        mitigations: mitigations
          .filter((m) => m.riskId === r.id)
          .map((m) => ({
            id: m.id,
            description: m.description,
            owner: nameOf(m.ownerId),
            dueDate: m.dueDate,
            status: m.status,
            overdue: m.dueDate !== null && m.dueDate < today && (m.status === "planned" || m.status === "in_progress"),
            version: m.version,
          })),
        version: r.version,
        updatedAt: r.updatedAt,
      };
    });
  }

  /** One risk or issue as this reader sees it (404 when it is not theirs to see). */
  async function one(id: number, reader: Reader, since?: string): Promise<RiskAnswer> {
    const r = readerOf(reader);
    const record = await findRisk(db, id, r.audiences);
    if (!record) throw riskNotFound();
    const project = await projects.getById(record.projectId);
    return (await present(project, [record], r, windowStartOf(project, since).instant))[0]!;
  }

  const sortOrder = (a: RiskAnswer, b: RiskAnswer) => b.score - a.score || (a.kind === b.kind ? 0 : a.kind === "risk" ? -1 : 1) || a.reference.localeCompare(b.reference);

  return {
    present,
    one,

    /** The register by the caller's audience, filtered, highest score first. */
    async list(slug: string, filter: RiskListFilter, reader: Reader): Promise<RiskAnswer[]> {
      const r = readerOf(reader);
      const project = await projects.get(slug);
      const records = (await listRisks(db, project.id, r.audiences)).filter(
        (x) =>
          (filter.kind === undefined || x.kind === filter.kind) &&
          (filter.status === undefined || x.status === filter.status) &&
          (filter.category === undefined || x.category === filter.category) &&
          (filter.ownerId === undefined || x.ownerId === filter.ownerId),
      );
      const answers = await present(project, records, r, windowStartOf(project, filter.since).instant);
      return answers.filter((a) => filter.band === undefined || a.band === filter.band).sort(sortOrder);
    },

    /** A risk's history, newest first, for whoever may see it; changes of money are left out for readers who may not see money. */
    async events(id: number, reader: Reader): Promise<RiskEvent[]> {
      const r = readerOf(reader);
      if (!(await findRisk(db, id, r.audiences))) throw riskNotFound();
      const events = (await listRiskEvents(db, id)).filter((e) => r.money || e.field !== "costExposure");
      const names = await accounts.namesOf([...new Set(events.map((e) => e.byUserId).filter((u): u is number => u !== null))]);
      return events.map((e) => ({ id: e.id, riskId: e.subjectId, field: e.field, from: e.from, to: e.to, at: e.at, by: e.byUserId === null ? null : (names.get(e.byUserId) ?? null), note: e.note }));
    },

    /** The grid of open risks, counts by band, the expected exposure and the contingency left (money only for those who may see it). */
    async summary(slug: string, query: { since?: string }, reader: Reader): Promise<RiskSummary> {
      const r = readerOf(reader);
      const project = await projects.get(slug);
      const scale: RiskScale = await projects.riskScale(project.id);
      const records = await listRisks(db, project.id, r.audiences);
      const open = records.filter((x) => x.status === "open");
      const openRisks = open.filter((x) => x.kind === "risk");
      const byBand: Record<RiskBand, number> = { low: 0, medium: 0, high: 0, critical: 0 };
      for (const x of openRisks) byBand[riskBand(riskScore(x.likelihood, x.impact), scale)] += 1;
      const totals = exposureTotals(records);
      return {
        scale,
        grid: riskGrid(records, scale),
        openRisks: openRisks.length,
        openIssues: open.length - openRisks.length,
        byBand,
        totalExpectedCost: r.money ? totals.expected : null,
        totalExpectedCostPert: r.money ? totals.pert : null,
        contingencyRemaining: r.money && deps.contingencyRemaining ? await deps.contingencyRemaining(project.id) : null,
        windowStart: windowStartOf(project, query.since).day,
      };
    },

    /**
     * What moved in the register in [from, to), for a digest written for `viewer`: risks and issues
     * entered, open risks that rose a band (band at `to` against band at `from`), those closed, and
     * risks that became issues. Investors' digests name only investor-audience items.
     */
    async movesIn(projectId: number, from: Date, to: Date, viewer: "investor" | "staff"): Promise<RiskMoves> {
      const reader = recordReaderOfViewer(viewer);
      const [scale, records] = await Promise.all([projects.riskScale(projectId), listRisks(db, projectId, reader.audiences)]);
      const item = (x: RiskRecord): RiskMoveItem => ({ id: x.id, reference: referenceOf(x), title: x.title, audience: x.audience });
      const inWindow = (iso: string) => Date.parse(iso) >= from.getTime() && Date.parse(iso) < to.getTime();
      const byId = new Map(records.map((x) => [x.id, x]));
      const levelEvents = await listLevelEvents(db, records.map((x) => x.id));
      const statusEvents: RiskEventRecord[] = (await listStatusEventsIn(db, projectId, from, to)).filter((e) => byId.has(e.subjectId));
      const lastStatus = new Map<number, RiskEventRecord>();
      for (const e of statusEvents) lastStatus.set(e.subjectId, e);
      const issues = await findIssuesFrom(db, records.map((x) => x.id));
      // The band at a moment: the levels then, undone from today's through the later events.
      const bandAt = (x: RiskRecord, instant: Date) => {
        const s = scoreAt(x, levelEvents.filter((e) => e.subjectId === x.id), instant.toISOString());
        return s === null ? null : riskBand(s, scale);
      };
      const roseBand: RiskMoves["roseBand"] = [];
      for (const x of records) {
        if (x.kind !== "risk" || x.status !== "open" || inWindow(x.createdAt)) continue;
        const [before, after] = [bandAt(x, from), bandAt(x, new Date(to.getTime() - 1))];
        if (before && after && BAND_ORDER[after] > BAND_ORDER[before]) roseBand.push({ ...item(x), fromBand: before, toBand: after });
      }
      return {
        new: records.filter((x) => inWindow(x.createdAt)).map((x) => ({ ...item(x), band: riskBand(riskScore(x.likelihood, x.impact), scale) })),
        roseBand,
        closed: [...lastStatus.values()].filter((e) => e.to === "closed").map((e) => item(byId.get(e.subjectId)!)),
        becameIssues: [...lastStatus.values()]
          .filter((e) => e.to === "became_issue")
          .map((e) => {
            const issue = issues.get(e.subjectId);
            const visible = issue && reader.audiences.includes(issue.audience);
            return { ...item(byId.get(e.subjectId)!), issue: visible ? { id: issue.id, reference: referenceOf({ kind: "issue", number: issue.number }) } : null };
          }),
      };
    },

    /**
     * The register as it stood at `instant`, for a monthly report written for `viewer`: the risks
     * and issues entered by then and open then (later status changes undone), their levels then
     * (later likelihood and impact changes undone), the trend against `windowStart`, and the grid.
     */
    async registerAt(projectId: number, instant: Date, windowStart: Date, viewer: "investor" | "staff") {
      const reader = recordReaderOfViewer(viewer);
      const [scale, records] = await Promise.all([projects.riskScale(projectId), listRisks(db, projectId, reader.audiences)]);
      const existing = records.filter((x) => Date.parse(x.createdAt) <= instant.getTime());
      const levelEvents = await listLevelEvents(db, existing.map((x) => x.id));
      // The first status change after the instant says what the status was then.
      const statusThen = new Map<number, string>();
      for (const e of await listStatusEventsIn(db, projectId, new Date(instant.getTime() + 1), new Date(8.64e15))) if (!statusThen.has(e.subjectId) && e.from !== null) statusThen.set(e.subjectId, e.from);
      const owners = await accounts.namesOf([...new Set(existing.map((x) => x.ownerId))]);
      const items = existing
        .map((x) => {
          const levels = { likelihood: x.likelihood, impact: x.impact };
          const later = levelEvents.filter((e) => e.subjectId === x.id && Date.parse(e.at) > instant.getTime()).sort((a, b) => Date.parse(b.at) - Date.parse(a.at));
          for (const e of later) if (e.from !== null && Number.isFinite(Number(e.from))) levels[e.field as "likelihood" | "impact"] = Number(e.from);
          const score = riskScore(levels.likelihood, levels.impact);
          const atStart = scoreAt(x, levelEvents.filter((e) => e.subjectId === x.id), windowStart.toISOString());
          return {
            id: x.id,
            reference: referenceOf(x),
            title: x.title,
            kind: x.kind,
            category: x.category,
            owner: owners.get(x.ownerId) ?? "",
            action: x.action,
            status: statusThen.get(x.id) ?? x.status,
            ...levels,
            score,
            band: riskBand(score, scale),
            trend: riskTrend(score, atStart, scale),
          };
        })
        .filter((x) => x.status === "open")
        .sort((a, b) => b.score - a.score || a.reference.localeCompare(b.reference));
      return { scale, items, grid: riskGrid(items, scale) };
    },

    /** Which of these ids are risks or issues of the project (any audience): what the budget's changes may link. */
    async riskIdsOf(projectId: number, ids: readonly number[]): Promise<Set<number>> {
      return new Set((await findRisksOfProject(db, projectId, ids, ["investor", "internal"])).map((x) => x.id));
    },

    /** The risks and issues of these ids that a viewer may see, by reference (budget changes name them). */
    async risksNamed(projectId: number, ids: readonly number[], viewer: "investor" | "staff"): Promise<Array<{ id: number; reference: string; title: string }>> {
      return (await findRisksOfProject(db, projectId, ids, recordReaderOfViewer(viewer).audiences)).map((x) => ({ id: x.id, reference: referenceOf(x), title: x.title }));
    },

    /** The expected cost exposure of the open risks a viewer may see, both ways (the budget's cost section). */
    async exposure(projectId: number, viewer: "investor" | "staff"): Promise<{ expected: number; pert: number }> {
      return exposureTotals(await listRisks(db, projectId, recordReaderOfViewer(viewer).audiences));
    },

    /** Risks and issues of a project among these ids that an audience may see, by reference (decisions link them). */
    async referencesOf(projectId: number, ids: readonly number[], audiences: readonly RecordAudience[]): Promise<Array<{ id: number; reference: string; title: string; audience: RecordAudience }>> {
      return (await findRisksOfProject(db, projectId, ids, audiences)).map((x) => ({ id: x.id, reference: referenceOf(x), title: x.title, audience: x.audience }));
    },
  };
}

export type RiskReadUseCases = ReturnType<typeof createRiskReadUseCases>;
