import { useSuspenseQuery } from "@tanstack/react-query";
import type { Project } from "#shared/schemas/projects.ts";
import type { DecisionAnswer } from "#shared/schemas/decisions.ts";
import { Sheet } from "../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../lib/format.ts";
import { decisionsQueryOptions } from "./api.ts";
import { daysLeftWords, orderDecisions } from "./words.ts";

/** Within this many days an open decision is "due soon" (the digests use the same reach). */
export const DUE_SOON_DAYS = 14;

type Urgency = "overdue" | "soon" | "open";

function urgencyOf(d: DecisionAnswer): Urgency {
  if (d.overdue || (d.daysLeft ?? 0) < 0) return "overdue";
  return (d.daysLeft ?? Infinity) <= DUE_SOON_DAYS ? "soon" : "open";
}

/** Urgency by shape beside the words: a filled square when overdue, a triangle when due soon, an open ring otherwise. */
function UrgencyShape({ urgency }: { urgency: Urgency }) {
  return (
    <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0" data-shape={urgency}>
      {urgency === "overdue" ? <rect x="1" y="1" width="10" height="10" fill="currentColor" /> : null}
      {urgency === "soon" ? <path d="M6 1l5.2 9.5H0.8z" fill="currentColor" /> : null}
      {urgency === "open" ? <circle cx="6" cy="6" r="4.2" fill="none" stroke="currentColor" strokeWidth="1.6" /> : null}
    </svg>
  );
}

function Options({ decision, currency }: { decision: DecisionAnswer; currency: string }) {
  const chosen = decision.outcome?.chosenOption ?? null;
  return (
    <ol className="grid gap-3 md:grid-cols-2" aria-label={`Options of ${decision.reference}`}>
      {decision.options.map((o, i) => (
        <li key={i} className={`flex flex-col gap-1 border p-3 ${i === decision.recommendedOption ? "border-ink border-2" : "border-rule"}`} data-testid="decision-option">
          <p className="flex flex-wrap items-baseline justify-between gap-2">
            <span className="font-semibold">
              {String.fromCharCode(65 + i)}. {o.label}
            </span>
            {o.cost !== null ? <span className="tabular text-sm">{o.cost < 0 ? `saves ${formatMoney(-o.cost, currency)}` : `costs ${formatMoney(o.cost, currency)}`}</span> : null}
          </p>
          {o.consequence ? <p className="text-sm text-ink-soft">{o.consequence}</p> : null}
          {i === decision.recommendedOption ? <p className="label-caps text-ink">★ Recommended</p> : null}
          {i === chosen ? <p className="label-caps text-ink">✓ Chosen</p> : null}
        </li>
      ))}
    </ol>
  );
}

function Linked({ decision }: { decision: DecisionAnswer }) {
  const parts = [
    decision.linkedMilestones.length ? `Milestones: ${decision.linkedMilestones.map((m) => m.name).join(", ")}` : "",
    decision.linkedRisks.length ? `Risks: ${decision.linkedRisks.map((r) => `${r.reference} ${r.title}`).join(", ")}` : "",
    decision.documents.length ? `Papers: ${decision.documents.map((d) => d.title).join(", ")}` : "",
  ].filter(Boolean);
  if (parts.length === 0) return null;
  return (
    <ul className="text-sm text-ink-soft">
      {parts.map((p) => (
        <li key={p}>{p}</li>
      ))}
    </ul>
  );
}

function OpenDecision({ decision, currency }: { decision: DecisionAnswer; currency: string }) {
  const urgency = urgencyOf(decision);
  return (
    <li className="flex flex-col gap-3 py-5" data-testid="open-decision" data-decision-id={decision.id} data-urgency={urgency}>
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h3 className="text-lg font-semibold">
          <span className="tabular text-ink-soft">{decision.reference}</span> {decision.title}
        </h3>
        <p className={`inline-flex items-center gap-1.5 whitespace-nowrap font-semibold ${urgency === "overdue" ? "text-bad" : ""}`} data-testid="days-left">
          <UrgencyShape urgency={urgency} />
          {daysLeftWords(decision)}
        </p>
      </div>
      <p className="text-sm text-ink-soft">
        Needed by {formatDate(decision.neededBy)} · decided by <span className="text-ink">{decision.decider}</span>
      </p>
      <p className="font-medium">{decision.question}</p>
      {decision.background ? <p className="text-sm">{decision.background}</p> : null}
      <Options decision={decision} currency={currency} />
      {decision.recommendation ? (
        <p className="text-sm">
          <span className="font-semibold">Recommendation: </span>
          {decision.recommendation}
        </p>
      ) : null}
      <Linked decision={decision} />
    </li>
  );
}

function ClosedDecision({ decision, currency }: { decision: DecisionAnswer; currency: string }) {
  const o = decision.outcome;
  return (
    <li className="flex flex-col gap-2 py-4" data-testid="decided-decision" data-decision-id={decision.id}>
      <h3 className="font-semibold">
        <span className="tabular text-ink-soft">{decision.reference}</span> {decision.title}
      </h3>
      {o ? (
        <p className="text-sm" data-testid="decision-outcome">
          <span className="font-semibold">● Decided</span> on {formatDate(o.decidedOn)} by {o.decidedBy}
          {o.chosenOption !== null && decision.options[o.chosenOption] ? ` — option ${String.fromCharCode(65 + o.chosenOption)}, ${decision.options[o.chosenOption]!.label}` : ""}: {o.text}
        </p>
      ) : (
        <p className="text-sm">
          <span className="font-semibold">✕ Withdrawn</span>
          {decision.withdrawnReason ? `: ${decision.withdrawnReason}` : ""}
        </p>
      )}
      <details className="text-sm">
        <summary className="cursor-pointer text-ink-soft underline underline-offset-4">What was asked</summary>
        <div className="mt-2 flex flex-col gap-2">
          <p>{decision.question}</p>
          <Options decision={decision} currency={currency} />
        </div>
      </details>
    </li>
  );
}

/**
 * The investor room's Decisions: what the investors, the lender or the board are asked to decide
 * and by when — overdue ones first, in words — with the options, their consequence and cost, the
 * recommendation and who decides; decided and withdrawn ones keep their record below.
 */
export function InvestorDecisions({ slug, project: { currency } }: { slug: string; project: Pick<Project, "currency"> }) {
  const decisions = useSuspenseQuery(decisionsQueryOptions(slug)).data;
  const ordered = orderDecisions(decisions);
  const open = ordered.filter((d) => d.status === "open");
  const closed = ordered.filter((d) => d.status !== "open");
  const overdue = open.filter((d) => urgencyOf(d) === "overdue").length;
  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`${open.length} open${overdue ? ` · ${overdue} overdue` : ""}`} title="Decisions needed">
        {open.length === 0 ? (
          <p className="text-sm text-ink-soft">Nothing is waiting for a decision.</p>
        ) : (
          <ol className="divide-y divide-rule border-y border-rule">
            {open.map((d) => (
              <OpenDecision key={d.id} decision={d} currency={currency} />
            ))}
          </ol>
        )}
      </Sheet>
      <Sheet label="Record" title="Decided and withdrawn">
        {closed.length === 0 ? (
          <p className="text-sm text-ink-soft">None yet.</p>
        ) : (
          <ul className="divide-y divide-rule border-y border-rule">
            {closed.map((d) => (
              <ClosedDecision key={d.id} decision={d} currency={currency} />
            ))}
          </ul>
        )}
      </Sheet>
    </div>
  );
}
