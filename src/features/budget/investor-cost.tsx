import { useSuspenseQuery } from "@tanstack/react-query";
import { lazy, Suspense, type ReactNode } from "react";
import type { BudgetChangeAnswer, BudgetPosition } from "#shared/schemas/budget.ts";
import { Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../lib/format.ts";
import { budgetChangesQueryOptions, budgetPositionQueryOptions } from "./api.ts";
import { STEP_LOOK } from "./investor-walk-steps.ts";

// recharts is large; it loads only when the walk is shown.
const BudgetWalkChart = lazy(() => import("./investor-budget-walk.tsx").then((m) => ({ default: m.BudgetWalkChart })));

const index = (v: number | null) => (v === null ? "—" : v.toFixed(2));

function Figure({ label, value, children, testId }: { label: string; value: string; children?: ReactNode; testId?: string }) {
  return (
    <div className="flex flex-col gap-0.5" data-testid={testId}>
      <dt className="label-caps">{label}</dt>
      <dd className="tabular text-2xl font-semibold">{value}</dd>
      {children ? <dd className="text-sm text-ink-soft">{children}</dd> : null}
    </div>
  );
}

/** "From £48.0m approved at the start to £49.2m now; projected to finish at £51.3m." */
export function walkSentence(p: Pick<BudgetPosition, "originalBudget" | "currentBudget" | "projectedFinalCost" | "currency">): string {
  const m = (v: number) => formatMoney(v, p.currency);
  const head = `From ${m(p.originalBudget)} approved at the start to ${m(p.currentBudget)} now`;
  if (p.projectedFinalCost === null) return `${head}; no projection until cost has been booked against earned work.`;
  return `${head}; projected to finish at ${m(p.projectedFinalCost)}.`;
}

function WalkKey() {
  return (
    <ul aria-label="Key" className="flex flex-wrap gap-x-5 gap-y-1 text-sm">
      {Object.entries(STEP_LOOK).map(([k, look]) => (
        <li key={k} className="flex items-center gap-2">
          <svg aria-hidden width="22" height="12">
            <defs>
              <pattern id={`walk-key-${k}`} patternUnits="userSpaceOnUse" width="6" height="6">
                <rect width="6" height="6" fill="#fffdf8" />
                <path d="M-1 1l2-2M0 6l6-6M5 7l2-2" stroke="#1d1f24" strokeWidth="1" />
              </pattern>
            </defs>
            <rect x="1" y="1" width="20" height="10" fill={look.fill === "solid" ? "#1d1f24" : look.fill === "hatch" ? `url(#walk-key-${k})` : "#fffdf8"} stroke="#1d1f24" strokeDasharray={look.dashed ? "4 3" : undefined} />
          </svg>
          {look.word}
        </li>
      ))}
    </ul>
  );
}

function EacVariants({ p }: { p: BudgetPosition }) {
  return (
    <ol className="grid gap-4 md:grid-cols-3" data-testid="eac-variants">
      {p.eac.map((v) => {
        const chosen = v.method === p.projectedFinalCostMethod;
        return (
          <li key={v.method} className={`flex flex-col gap-2 p-4 ${chosen ? "border-2 border-ink" : "border border-rule"}`} data-testid="eac-variant" data-method={v.method}>
            <p className="font-mono text-sm">{v.formula}</p>
            <p className="tabular text-2xl font-semibold">{formatMoney(v.value, p.currency)}</p>
            <p className="text-sm text-ink-soft">{v.value === null ? "Not given until the indices it divides by are known." : v.sentence}</p>
            {chosen ? <p className="label-caps text-ink">✓ The projected final cost the project lead uses</p> : null}
          </li>
        );
      })}
    </ol>
  );
}

function Contingency({ p }: { p: BudgetPosition }) {
  const over = p.contingencyRemaining < 0;
  const exposureWords = (v: number) => (v <= p.contingencyRemaining ? "within what remains" : "more than what remains");
  return (
    <div className="flex flex-col gap-4">
      <dl className="grid gap-4 sm:grid-cols-3" data-testid="contingency">
        <Figure label="Held" value={formatMoney(p.contingencyHeld, p.currency)}>Set aside in the approved budget at the start.</Figure>
        <Figure label="Drawn" value={formatMoney(p.contingencyDrawn, p.currency)}>By approved changes that draw on it.</Figure>
        <Figure label="Remaining" value={formatMoney(p.contingencyRemaining, p.currency)}>{over ? "! More has been drawn than was held." : "Still available for what may go wrong."}</Figure>
      </dl>
      <p className="text-sm">
        Expected cost of the open risks: <span className="tabular font-semibold">{formatMoney(p.riskExposure.expected, p.currency)}</span> ({exposureWords(p.riskExposure.expected)}); on the three-point alternative{" "}
        <span className="tabular font-semibold">{formatMoney(p.riskExposure.pert, p.currency)}</span> ({exposureWords(p.riskExposure.pert)}).
      </p>
    </div>
  );
}

function ApprovedChanges({ changes, currency }: { changes: BudgetChangeAnswer[]; currency: string }) {
  const approved = changes.filter((c) => c.status === "approved").sort((a, b) => (a.approvedOn ?? "").localeCompare(b.approvedOn ?? "") || a.reference.localeCompare(b.reference));
  if (approved.length === 0) return <p className="text-sm text-ink-soft">No approved changes are shared with you.</p>;
  return (
    <ul className="divide-y divide-rule border-y border-rule" data-testid="approved-changes">
      {approved.map((c) => (
        <li key={c.id} className="flex flex-col gap-1 py-3 sm:flex-row sm:items-baseline sm:justify-between sm:gap-4">
          <div className="min-w-0">
            <p className="font-semibold">
              <span className="tabular text-ink-soft">{c.reference}</span> {c.description}
            </p>
            <p className="text-sm text-ink-soft">
              Approved by {c.approvedBy ?? "—"} on {formatDate(c.approvedOn)}
              {c.drawsOnContingency ? " · drawn from contingency" : ""}
              {c.linkedMilestones.length ? ` · ${c.linkedMilestones.map((m) => m.name).join(", ")}` : ""}
            </p>
          </div>
          <p className="tabular shrink-0 font-semibold">
            {c.amount > 0 ? "+" : "−"}
            {formatMoney(Math.abs(c.amount), currency)}
          </p>
        </li>
      ))}
    </ul>
  );
}

/**
 * The investor room's Cost: the budget walk from the original budget through the approved changes
 * to the current approved budget and the projected final cost, the three estimates at completion
 * side by side, the contingency held, drawn and remaining, and the approved changes.
 */
export function InvestorCost({ slug }: { slug: string }) {
  const p = useSuspenseQuery(budgetPositionQueryOptions(slug)).data;
  const changes = useSuspenseQuery(budgetChangesQueryOptions(slug)).data;
  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Cost position at ${formatDate(p.at)}`} title="The budget walk">
        <figure className="flex flex-col gap-3">
          <figcaption className="text-sm text-ink-soft" data-testid="walk-sentence">
            {walkSentence(p)}
          </figcaption>
          <Suspense fallback={<Spinner label="Loading the chart" />}>
            <BudgetWalkChart position={p} />
          </Suspense>
          <WalkKey />
        </figure>
      </Sheet>
      <Sheet label="Estimate at completion" title="What the build may cost in the end, three ways">
        <div className="flex flex-col gap-4">
          <dl className="grid grid-cols-2 gap-4 sm:grid-cols-5">
            <Figure label="Budget (BAC)" value={formatMoney(p.currentBudget, p.currency)} />
            <Figure label="Planned value" value={formatMoney(p.plannedValue, p.currency)} />
            <Figure label="Earned value" value={formatMoney(p.earnedValue, p.currency)} />
            <Figure label="Actual cost" value={formatMoney(p.actualCost, p.currency)} />
            <Figure label="CPI · SPI" value={`${index(p.cpi)} · ${index(p.spi)}`} />
          </dl>
          <EacVariants p={p} />
        </div>
      </Sheet>
      <Sheet label="Contingency" title="Held, drawn and remaining">
        <Contingency p={p} />
      </Sheet>
      <Sheet label="Budget changes" title="Approved changes">
        <ApprovedChanges changes={changes} currency={p.currency} />
      </Sheet>
      <p className="text-xs text-ink-soft" data-testid="cost-caution">
        {p.caution}
      </p>
    </div>
  );
}
