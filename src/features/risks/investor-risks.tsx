import { useSuspenseQuery } from "@tanstack/react-query";
import { lazy, Suspense, useState } from "react";
import type { Project } from "#shared/schemas/projects.ts";
import type { RiskAnswer, RiskSummary } from "#shared/schemas/risks.ts";
import { Button } from "../../components/ui/button.tsx";
import { Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../lib/format.ts";
import { riskSummaryQueryOptions, risksQueryOptions } from "./api.ts";
import { BandMark, gridRows, gridSentence, TrendMark } from "./investor-risk-marks.tsx";
import { ACTION_WORD, BAND_WORD, CATEGORY_WORD } from "./words.ts";

// recharts is large; it loads only when the grid is shown.
const RiskGridChart = lazy(() => import("./investor-risk-grid.tsx").then((m) => ({ default: m.RiskGridChart })));

/** How many risks the page opens with; the rest are one press away. */
const TOP = 5;

/** Why the exposure totals are not a forecast of spend. */
export const EXPOSURE_CAUTION =
  "Indicative: expected costs weigh each open risk's cost by its chance of happening. They help size the contingency; they are not a forecast of what will be spent.";

/** Open risks, highest score first; on a tie the one rising first, then by reference. */
export function topRisks(risks: readonly RiskAnswer[]): RiskAnswer[] {
  const rank = { rising: 0, new: 1, steady: 2, falling: 3 } as const;
  return risks
    .filter((r) => r.kind === "risk" && r.status === "open")
    .sort((a, b) => b.score - a.score || rank[a.trend] - rank[b.trend] || a.reference.localeCompare(b.reference));
}

function Linked({ risk }: { risk: RiskAnswer }) {
  const names = [...risk.linkedMilestones, ...risk.linkedBlocks, ...risk.linkedSystems].map((n) => n.name);
  if (names.length === 0) return null;
  return (
    <p className="text-sm">
      <span className="text-ink-soft">Affects: </span>
      {names.join(" · ")}
    </p>
  );
}

function Mitigations({ risk }: { risk: RiskAnswer }) {
  if (risk.mitigations.length === 0) return <p className="text-sm text-ink-soft">No mitigation recorded yet.</p>;
  return (
    <ul className="flex flex-col gap-1 border-l-2 border-rule pl-3 text-sm" aria-label={`Mitigation of ${risk.reference}`}>
      {risk.mitigations.map((m) => (
        <li key={m.id}>
          {m.description} <span className="text-ink-soft">— {m.owner.name}, {m.dueDate ? `due ${formatDate(m.dueDate)}` : "no date"}, </span>
          <span className="font-medium">{ACTION_WORD[m.status]}</span>
          {m.overdue ? <span className="ml-1 border border-ink px-1 text-xs font-semibold">! Overdue</span> : null}
        </li>
      ))}
    </ul>
  );
}

function RiskItem({ risk, currency }: { risk: RiskAnswer; currency: string }) {
  return (
    <li className="flex flex-col gap-2 py-4" data-testid="top-risk" data-risk-id={risk.id}>
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h3 className="font-semibold">
          <span className="tabular text-ink-soft">{risk.reference}</span> {risk.title}
        </h3>
        <span className="flex flex-wrap items-center gap-x-3">
          <BandMark band={risk.band} score={risk.score} />
          <TrendMark risk={risk} />
        </span>
      </div>
      <p className="text-sm text-ink-soft">
        {CATEGORY_WORD[risk.category]} · owner <span className="text-ink">{risk.owner.name}</span> · likelihood {risk.likelihood}, impact {risk.impact}
        {risk.expectedCost !== null ? ` · expected cost ${formatMoney(risk.expectedCost, currency)}` : ""}
        {risk.scheduleDays !== null ? ` · up to ${risk.scheduleDays} working days` : ""}
      </p>
      {risk.effect ? <p className="text-sm">{risk.effect}</p> : null}
      <Linked risk={risk} />
      <Mitigations risk={risk} />
    </li>
  );
}

function IssueItem({ issue }: { issue: RiskAnswer }) {
  return (
    <li className="flex flex-col gap-1 py-3" data-testid="open-issue">
      <h3 className="font-semibold">
        <span className="tabular text-ink-soft">{issue.reference}</span> {issue.title}
        {issue.fromRisk ? <span className="ml-2 text-sm font-normal text-ink-soft">(was {issue.fromRisk.reference})</span> : null}
      </h3>
      {issue.impactNow ? (
        <p className="text-sm">
          <span className="text-ink-soft">Impact now: </span>
          {issue.impactNow}
        </p>
      ) : null}
      {issue.action ? (
        <p className="text-sm">
          <span className="text-ink-soft">Action: </span>
          {issue.action} <span className="text-ink-soft">— {issue.owner.name}{issue.dueDate ? `, due ${formatDate(issue.dueDate)}` : ""}</span>
        </p>
      ) : null}
      <Linked risk={issue} />
    </li>
  );
}

/** The grid as a table for screen readers (the chart is a picture of the same counts). */
function GridTable({ summary }: { summary: RiskSummary }) {
  const rows = gridRows(summary);
  return (
    // A table ignores a width of 1px, so the hiding is done by a box around it.
    <div className="sr-only">
      <table data-testid="risk-grid-table">
        <caption>Open risks by likelihood (rows) and impact (columns)</caption>
        <thead>
          <tr>
            <th scope="col">Likelihood</th>
            {rows[0]?.cells.map((c) => (
              <th key={c.impact} scope="col">
                Impact {c.impact}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.likelihood}>
              <th scope="row">{r.likelihood}</th>
              {r.cells.map((c) => (
                <td key={c.impact} data-likelihood={c.likelihood} data-impact={c.impact}>
                  {c.count} ({BAND_WORD[c.band].toLowerCase()})
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Exposure({ summary, currency }: { summary: RiskSummary; currency: string }) {
  const { totalExpectedCost: expected, totalExpectedCostPert: pert, contingencyRemaining: remaining } = summary;
  // Money is not shown to every role (marketing reads the risks, never their cost).
  if (expected === null || pert === null) return null;
  const covered = (v: number) => (remaining !== null && v <= remaining ? "within" : "more than");
  return (
    <div className="flex flex-col gap-3" data-testid="risk-exposure">
      <dl className="grid gap-4 sm:grid-cols-3 lg:grid-cols-1">
        <div>
          <dt className="label-caps">Expected cost of open risks</dt>
          <dd className="tabular text-2xl font-semibold">{formatMoney(expected, currency)}</dd>
          <dd className="text-sm text-ink-soft">Each risk's chance × its most likely cost, added up.</dd>
        </div>
        <div>
          <dt className="label-caps">Three-point alternative</dt>
          <dd className="tabular text-2xl font-semibold">{formatMoney(pert, currency)}</dd>
          <dd className="text-sm text-ink-soft">The same with the PERT mean of the cost, (least + 4 × most likely + most) ÷ 6.</dd>
        </div>
        {remaining !== null ? (
          <div>
            <dt className="label-caps">Contingency remaining</dt>
            <dd className="tabular text-2xl font-semibold">{formatMoney(remaining, currency)}</dd>
            <dd className="text-sm text-ink-soft">
              The expected cost is {covered(expected)} it; the three-point figure is {covered(pert)} it.
            </dd>
          </div>
        ) : null}
      </dl>
      <p className="text-xs text-ink-soft" data-testid="exposure-caution">
        {EXPOSURE_CAUTION}
      </p>
    </div>
  );
}

/**
 * The investor room's Risks: where the open risks sit on the likelihood × impact grid, the top
 * risks by score with owner, mitigation, trend and what they affect, the open issues, and the
 * expected cost of the open risks against the contingency left. Only what the caller may see.
 */
export function InvestorRisks({ slug, project: { currency } }: { slug: string; project: Pick<Project, "currency"> }) {
  const risks = useSuspenseQuery(risksQueryOptions(slug)).data;
  const summary = useSuspenseQuery(riskSummaryQueryOptions(slug)).data;
  const [all, setAll] = useState(false);
  const open = topRisks(risks);
  const shown = all ? open : open.slice(0, TOP);
  const issues = risks.filter((r) => r.kind === "issue" && r.status === "open");
  const gone = risks.filter((r) => r.kind === "risk" && r.status !== "open");
  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Open risks · trend since ${formatDate(summary.windowStart)}`} title="Where the open risks sit">
        <div className="grid gap-6 lg:grid-cols-[minmax(0,32rem)_1fr]">
          <figure className="flex min-w-0 flex-col gap-2">
            <figcaption className="text-sm text-ink-soft" data-testid="risk-grid-sentence">
              {gridSentence(summary)} Each square counts the open risks at that likelihood and impact.
            </figcaption>
            <Suspense fallback={<Spinner label="Loading the grid" />}>
              <RiskGridChart summary={summary} />
            </Suspense>
            <GridTable summary={summary} />
          </figure>
          <Exposure summary={summary} currency={currency} />
        </div>
      </Sheet>
      <Sheet label={`${open.length} open · highest score first`} title="Top risks">
        {open.length === 0 ? (
          <p className="text-sm text-ink-soft">No open risks are shared with you.</p>
        ) : (
          <>
            <ol className="divide-y divide-rule border-y border-rule">
              {shown.map((r) => (
                <RiskItem key={r.id} risk={r} currency={currency} />
              ))}
            </ol>
            {open.length > TOP ? (
              <Button variant="secondary" className="mt-3" onClick={() => setAll(!all)}>
                {all ? `Show the top ${TOP} only` : `Show all ${open.length} open risks`}
              </Button>
            ) : null}
          </>
        )}
      </Sheet>
      <Sheet label={`${issues.length} open`} title="Issues: risks that happened, and problems raised">
        {issues.length === 0 ? (
          <p className="text-sm text-ink-soft">No open issues are shared with you.</p>
        ) : (
          <ul className="divide-y divide-rule border-y border-rule">
            {issues.map((i) => (
              <IssueItem key={i.id} issue={i} />
            ))}
          </ul>
        )}
      </Sheet>
      {gone.length > 0 ? (
        <Sheet label="Record" title="Closed, or became issues">
          <ul className="flex flex-col gap-1 text-sm" data-testid="risks-gone">
            {gone.map((r) => (
              <li key={r.id}>
                <span className="tabular text-ink-soft">{r.reference}</span> {r.title} —{" "}
                {r.status === "closed" ? "closed" : `became ${r.issue ? `issue ${r.issue.reference}` : "an issue"}`}
              </li>
            ))}
          </ul>
        </Sheet>
      ) : null}
    </div>
  );
}
