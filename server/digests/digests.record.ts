import { formatLongDate } from "#shared/domain/locale-dates.ts";
import type { RecordAudience, RiskBand } from "#shared/schemas/risks.ts";
import type { DigestItemRef } from "./digests.items.ts";
import { createRunMemo } from "./digests.run-memo.ts";

/**
 * The investor record's moves in a digest's window: risks, decisions needed, approved budget
 * changes and documents. Nothing of the record is public, so only investor digests carry it, and
 * only its investor-audience items (decision 041).
 */

/** A risk or issue as the record's services name it in a move. */
interface RiskItem {
  id: number;
  reference: string;
  title: string;
  audience: RecordAudience;
}

/** What the risks service reports of a window: entered, rose a band, closed, became issues. */
export interface RiskMovesAnswer {
  new: Array<RiskItem & { band?: RiskBand }>;
  roseBand: Array<RiskItem & { fromBand: RiskBand; toBand: RiskBand }>;
  closed: RiskItem[];
  becameIssues: Array<RiskItem & { issue: { id: number; reference: string } | null }>;
}

/** One line of the register's section. */
export type RiskMove =
  | (RiskItem & { kind: "new"; band?: RiskBand })
  | (RiskItem & { kind: "rose"; from: RiskBand; to: RiskBand })
  | (RiskItem & { kind: "closed" })
  | (RiskItem & { kind: "became_issue"; issueReference: string | null });

/** One move of the decisions needed. `neededBy`, `decidedOn`: calendar dates; `daysLeft` from the window's last day. */
export type DecisionMove =
  | { kind: "needed"; id: number; reference: string; title: string; audience: RecordAudience; decider: string; neededBy: string; daysLeft: number }
  | { kind: "due_soon"; id: number; reference: string; title: string; audience: RecordAudience; decider: string; neededBy: string; daysLeft: number }
  | { kind: "decided"; id: number; reference: string; title: string; audience: RecordAudience; decidedBy: string; decidedOn: string; outcome: string };

/** A budget change approved in the window; `amount` in minor units of the project's currency. */
export interface BudgetChangeMove {
  id: number;
  reference: string;
  description: string;
  audience: RecordAudience;
  amount: number;
  approvedBy: string;
  approvedOn: string;
  drawsOnContingency: boolean;
}

/** A document added (`new`, its first version) or given a new version in the window: its name and number, never its file. */
export interface DocumentMove {
  kind: "new" | "version";
  id: number;
  title: string;
  audience: RecordAudience;
  versionNumber: number;
}

/** Who reads the record for a digest: only an investor (a visitor reads none of it; staff get no digest). */
type RecordViewer = "investor";

/**
 * What digests ask of the record's services: the moves in the window `[from, to)` (instants), as
 * the viewer may see them. `currency` names the project's money (ISO 4217).
 */
export interface DigestRecordSource {
  risks: { movesIn(projectId: number, from: Date, to: Date, viewer: RecordViewer): Promise<RiskMovesAnswer> };
  decisions: { movesIn(projectId: number, from: Date, to: Date, viewer: RecordViewer): Promise<DecisionMove[]> };
  budget: { movesIn(projectId: number, from: Date, to: Date, viewer: RecordViewer): Promise<BudgetChangeMove[]> };
  documents: { movesIn(projectId: number, from: Date, to: Date, viewer: RecordViewer): Promise<DocumentMove[]> };
  currency(projectId: number): Promise<string>;
}

/** The record's part of one digest: each list empty when nothing moved. */
export interface DigestRecord {
  currency: string;
  risks: RiskMove[];
  decisions: DecisionMove[];
  changes: BudgetChangeMove[];
  documents: DocumentMove[];
  /** The project's page in the investor room (signed in): each section links to its part of it, never to a file. */
  roomUrl: string;
}

export const emptyRecord = (roomUrl: string): DigestRecord => ({ currency: "GBP", risks: [], decisions: [], changes: [], documents: [], roomUrl });

export const recordHasNews = (r: DigestRecord) => r.risks.length + r.decisions.length + r.changes.length + r.documents.length > 0;

/** The investor room's page of a project, where its documents are listed (signed in). */
export const investorRoomUrl = (publicUrl: string, slug: string) => `${publicUrl}/investors/projects/${encodeURIComponent(slug)}`;

/** Of the moves of one item, the one told: the lowest rank of its kind. */
function oneLineEach<K extends string, T extends { id: number; kind: K }>(items: readonly T[], rank: Record<K, number>): T[] {
  const best = new Map<number, T>();
  for (const x of items) {
    const had = best.get(x.id);
    if (!had || rank[x.kind] < rank[had.kind]) best.set(x.id, x);
  }
  return [...best.values()];
}

/**
 * One line per decision: decided ones first, then new requests, then others due soon; a decision
 * both new and due soon is told once, as new with its days left.
 */
export function decisionLines(moves: readonly DecisionMove[]): DecisionMove[] {
  const rank = { decided: 0, needed: 1, due_soon: 2 } as const;
  return oneLineEach(moves, rank).sort((a, b) => rank[a.kind] - rank[b.kind] || a.reference.localeCompare(b.reference));
}

/**
 * One line per risk, by reference: a risk that became an issue is told once as such (not also as
 * closed), and the issue opened from it is not told again as new.
 */
export function riskLines(m: RiskMovesAnswer): RiskMove[] {
  const opened = new Set(m.becameIssues.flatMap((x) => (x.issue ? [x.issue.id] : [])));
  const all: RiskMove[] = [
    ...m.becameIssues.map(({ issue, ...x }) => ({ ...x, kind: "became_issue" as const, issueReference: issue?.reference ?? null })),
    ...m.closed.map((x) => ({ ...x, kind: "closed" as const })),
    ...m.roseBand.map(({ fromBand, toBand, ...x }) => ({ ...x, kind: "rose" as const, from: fromBand, to: toBand })),
    ...m.new.filter((x) => !opened.has(x.id)).map((x) => ({ ...x, kind: "new" as const })),
  ];
  return oneLineEach(all, { became_issue: 0, closed: 1, rose: 2, new: 3 }).sort((a, b) => a.reference.localeCompare(b.reference));
}

/** One line per document: "new" when it arrived in the window (whatever versions followed), else its latest new version. */
function documentLines(moves: readonly DocumentMove[]): DocumentMove[] {
  const best = new Map<number, DocumentMove>();
  for (const m of moves) {
    const had = best.get(m.id);
    if (!had) best.set(m.id, m);
    else if (m.kind === "new" || (had.kind !== "new" && m.versionNumber > had.versionNumber)) best.set(m.id, { ...m, kind: m.kind === "new" || had.kind === "new" ? "new" : "version" });
  }
  return [...best.values()].sort((a, b) => a.title.localeCompare(b.title));
}

/**
 * The record's moves of a run, worked out once per (project, window) and shared by every investor
 * reader of that window. Only investor-audience items are kept, whatever a service answers: an
 * internal item reaches no subscriber.
 */
export function createRecordMovesCache(source: DigestRecordSource) {
  const moves = createRunMemo<Omit<DigestRecord, "roomUrl">>();
  const investorOnly = <T extends { audience: RecordAudience }>(items: readonly T[]) => items.filter((x) => x.audience === "investor");
  return function movesIn(projectId: number, from: Date, to: Date): Promise<Omit<DigestRecord, "roomUrl">> {
    return moves(`${projectId}|investor|${from.toISOString()}|${to.toISOString()}`, async () => {
      const [risks, decisions, changes, documents, currency] = await Promise.all([
        source.risks.movesIn(projectId, from, to, "investor"),
        source.decisions.movesIn(projectId, from, to, "investor"),
        source.budget.movesIn(projectId, from, to, "investor"),
        source.documents.movesIn(projectId, from, to, "investor"),
        source.currency(projectId),
      ]);
      return {
        currency,
        risks: investorOnly(riskLines(risks)),
        decisions: decisionLines(investorOnly(decisions)),
        changes: investorOnly(changes).sort((a, b) => a.approvedOn.localeCompare(b.approvedOn) || a.reference.localeCompare(b.reference)),
        documents: documentLines(investorOnly(documents)),
      };
    });
  };
}
export type RecordMovesCache = ReturnType<typeof createRecordMovesCache>;

// ---------------------------------------------------------------------------------------------
// Words
// ---------------------------------------------------------------------------------------------

const longDate = (iso: string) => formatLongDate(iso.slice(0, 10));
const plural = (n: number, one: string) => `${n} ${one}${n === 1 ? "" : "s"}`;

/**
 * An amount of money in minor units, exact and signed, in the project's currency:
 * "+£250,000", "−£40,000.50". A digest reports approved changes, so it gives the figure as
 * approved rather than rounded.
 */
export function formatAmount(minor: number, currency: string): string {
  let code = currency;
  let digits: number;
  try {
    digits = new Intl.NumberFormat("en-GB", { style: "currency", currency }).resolvedOptions().maximumFractionDigits ?? 2;
  } catch {
    // Not a currency Intl knows: shown as the code, in hundredths like most.
    code = "XXX";
    digits = 2;
  }
  const major = Math.abs(minor) / 10 ** digits;
  const shown = new Intl.NumberFormat("en-GB", { style: "currency", currency: code, minimumFractionDigits: Number.isInteger(major) ? 0 : digits, maximumFractionDigits: digits }).format(major);
  return `${minor < 0 ? "−" : "+"}${code === currency ? shown : `${shown.replace(/XXX\s?/, "")} ${currency}`}`;
}

/** A risk's move after its reference and title: "new, high", "rose from medium to high". */
export function describeRiskMove(m: RiskMove): string {
  switch (m.kind) {
    case "new":
      return m.band ? `new, ${m.band}` : "new";
    case "rose":
      return `rose from ${m.from} to ${m.to}`;
    case "closed":
      return "closed";
    case "became_issue":
      return `happened, and is now an issue${m.issueReference ? ` (${m.issueReference})` : ""}`;
  }
}

const daysLeftWords = (d: number) => (d < 0 ? `${plural(-d, "day")} overdue` : d === 0 ? "due today" : `${plural(d, "day")} left`);

/** A decision's move after its reference and title. */
export function describeDecisionMove(m: DecisionMove): string {
  switch (m.kind) {
    case "needed":
      return `new request, needed by ${longDate(m.neededBy)} (${daysLeftWords(m.daysLeft)}; ${m.decider} decides)`;
    case "due_soon":
      return `needed by ${longDate(m.neededBy)}: ${daysLeftWords(m.daysLeft)} (${m.decider} decides)`;
    case "decided":
      return `decided on ${longDate(m.decidedOn)} by ${m.decidedBy}: ${m.outcome}`;
  }
}

/** An approved change after its reference and description: "+£250,000, approved by … on …". */
export function describeChange(m: BudgetChangeMove, currency: string): string {
  return `${formatAmount(m.amount, currency)}, approved by ${m.approvedBy} on ${longDate(m.approvedOn)}${m.drawsOnContingency ? "; drawn from the contingency" : ""}`;
}

/** A document's move after its title: ": new", ": version 2". */
export const describeDocument = (m: DocumentMove): string => (m.kind === "new" ? ": new" : `: version ${m.versionNumber}`);

/** The record's sections, each a title and its lines (plain text; the HTML escapes and bolds the names). */
export function recordSections(r: DigestRecord): Array<{ title: string; lines: Array<{ name: string; rest: string; ref: DigestItemRef }>; link: { url: string; label: string } }> {
  const out: ReturnType<typeof recordSections> = [];
  if (r.risks.length) {
    out.push({ title: "Risks and issues", lines: r.risks.map((m) => ({ name: `${m.reference} ${m.title}`, rest: `: ${describeRiskMove(m)}`, ref: { kind: "risk", id: m.id } })), link: { url: `${r.roomUrl}/risks`, label: "The register in the investor room" } });
  }
  if (r.decisions.length) {
    out.push({ title: "Decisions needed", lines: r.decisions.map((m) => ({ name: `${m.reference} ${m.title}`, rest: `: ${describeDecisionMove(m)}`, ref: { kind: "decision", id: m.id } })), link: { url: `${r.roomUrl}/decisions`, label: "The decisions, their options and papers in the investor room" } });
  }
  if (r.changes.length) {
    out.push({ title: "Approved budget changes", lines: r.changes.map((m) => ({ name: `${m.reference} ${m.description}`, rest: `: ${describeChange(m, r.currency)}`, ref: { kind: "change", id: m.id } })), link: { url: `${r.roomUrl}/cost`, label: "The cost position in the investor room" } });
  }
  if (r.documents.length) {
    out.push({ title: "New documents", lines: r.documents.map((m) => ({ name: m.title, rest: describeDocument(m), ref: { kind: "document", id: m.id } })), link: { url: `${r.roomUrl}/documents`, label: "Read them in the investor room (sign in; each copy is marked for its reader)" } });
  }
  return out;
}

/** Counts for the preheader: "2 risk changes, 1 decision, 1 budget change, 3 documents". */
export function recordCounts(r: DigestRecord): string[] {
  const parts: string[] = [];
  if (r.risks.length) parts.push(`${plural(r.risks.length, "risk change")}`);
  if (r.decisions.length) parts.push(`${plural(r.decisions.length, "decision")}`);
  if (r.changes.length) parts.push(`${plural(r.changes.length, "budget change")}`);
  if (r.documents.length) parts.push(`${plural(r.documents.length, "document")}`);
  return parts;
}
