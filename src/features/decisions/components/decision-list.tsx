import { useState } from "react";
import type { DecisionAnswer } from "#shared/schemas/decisions.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Button } from "../../../components/ui/button.tsx";
import { ChangeHistory } from "../../../components/ui/change-history.tsx";
import { formatDate, formatMoney } from "../../../lib/format.ts";
import { useDecisionEvents } from "../api.ts";
import { daysLeftWords, EVENT_FIELD_WORD, STATUS_WORD } from "../words.ts";

/** The status by shape and word: an open diamond waiting, a struck diamond overdue, a filled one decided, a dashed one withdrawn. */
export function DecisionStatusMark({ d }: { d: Pick<DecisionAnswer, "status" | "overdue"> }) {
  const shape = d.status === "open" ? (d.overdue ? "overdue" : "open") : d.status;
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap font-medium" data-status={shape}>
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0" data-shape={shape}>
        <path d="M6 1 11 6 6 11 1 6z" fill={d.status === "decided" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.5" strokeDasharray={d.status === "withdrawn" ? "2 1.5" : undefined} />
        {shape === "overdue" ? <path d="M3 3 9 9" stroke="currentColor" strokeWidth="1.5" /> : null}
      </svg>
      {d.overdue && d.status === "open" ? "Overdue" : STATUS_WORD[d.status]}
    </span>
  );
}

function DecisionHistory({ id, timeZone }: { id: number; timeZone: string }) {
  return <ChangeHistory events={useDecisionEvents(id)} fieldWord={EVENT_FIELD_WORD} timeZone={timeZone} />;
}

export interface DecisionActions {
  onEdit: (d: DecisionAnswer) => void;
  onOutcome: (d: DecisionAnswer) => void;
  onWithdraw: (d: DecisionAnswer) => void;
}

/** One request, as its reader needs it: the question, the options, the recommendation, who decides by when, and once decided, the outcome. */
function DecisionCard({ d, currency, timeZone, actions }: { d: DecisionAnswer; currency: string; timeZone: string; actions?: DecisionActions }) {
  const [history, setHistory] = useState(false);
  const left = daysLeftWords(d);
  return (
    <li className={`border bg-sheet p-4 ${d.overdue && d.status === "open" ? "border-2 border-ink" : "border-rule"}`} data-decision-id={d.id} data-testid="decision">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <p className="label-caps">
            {d.reference} · {d.decider} decides
          </p>
          <h3 className="text-lg font-semibold">{d.title}</h3>
        </div>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <DecisionStatusMark d={d} />
          <AudienceMark audience={d.audience} />
        </div>
      </div>
      <p className="mt-1 text-sm">
        Needed by <strong>{formatDate(d.neededBy)}</strong>
        {left ? (
          <span className={`ml-2 tabular ${d.overdue ? "font-semibold" : ""}`} data-testid="days-left">
            {d.overdue ? "▲ " : ""}
            {left}
          </span>
        ) : null}
      </p>
      <p className="mt-2 whitespace-pre-line">{d.question}</p>
      {d.background ? <p className="mt-1 whitespace-pre-line text-sm text-ink-soft">{d.background}</p> : null}
      <ol className="mt-3 grid gap-2 sm:grid-cols-2" aria-label={`Options of ${d.reference}`}>
        {d.options.map((o, i) => {
          const chosen = d.outcome?.chosenOption === i;
          const recommended = d.recommendedOption === i;
          return (
            <li key={i} className={`border p-2 text-sm ${chosen ? "border-2 border-ink" : "border-rule"}`}>
              <p className="font-medium">
                {i + 1}. {o.label}
                {recommended ? <span className="ml-2 text-xs font-semibold uppercase">★ recommended</span> : null}
                {chosen ? <span className="ml-2 text-xs font-semibold uppercase">✓ chosen</span> : null}
              </p>
              {o.consequence ? <p className="text-ink-soft">{o.consequence}</p> : null}
              <p className="tabular text-xs">{o.cost === null ? "No cost given" : `Cost ${formatMoney(o.cost, currency)}`}</p>
            </li>
          );
        })}
      </ol>
      {d.recommendation ? (
        <p className="mt-2 text-sm">
          <span className="font-medium">Recommendation:</span> {d.recommendation}
        </p>
      ) : null}
      {d.linkedMilestones.length || d.linkedRisks.length || d.documents.length ? (
        <p className="mt-2 text-xs text-ink-soft">
          {[...d.linkedMilestones.map((m) => m.name), ...d.linkedRisks.map((r) => `${r.reference} ${r.title}`), ...d.documents.map((x) => `Document: ${x.title}`)].join(" · ")}
        </p>
      ) : null}
      {d.outcome ? (
        <div className="mt-3 border-l-4 border-ink bg-paper px-3 py-2 text-sm" data-testid="decision-outcome">
          <p className="font-semibold">
            Decided {formatDate(d.outcome.decidedOn)} by {d.outcome.decidedBy}
          </p>
          <p className="whitespace-pre-line">{d.outcome.text}</p>
          {d.outcome.recordedBy ? <p className="text-xs text-ink-faint">recorded by {d.outcome.recordedBy}</p> : null}
        </div>
      ) : null}
      {d.withdrawnReason ? <p className="mt-3 border-l-4 border-dashed border-ink px-3 text-sm">Withdrawn: {d.withdrawnReason}</p> : null}
      <div className="mt-3 flex flex-wrap gap-2">
        {actions && d.status === "open" ? (
          <>
            <Button size="sm" onClick={() => actions.onOutcome(d)}>
              Record the outcome
            </Button>
            <Button size="sm" onClick={() => actions.onEdit(d)}>
              Edit
            </Button>
            <Button size="sm" variant="ghost" onClick={() => actions.onWithdraw(d)}>
              Withdraw…
            </Button>
          </>
        ) : null}
        <Button size="sm" variant="ghost" aria-expanded={history} onClick={() => setHistory((h) => !h)}>
          {history ? "Hide the history" : "History"}
        </Button>
      </div>
      {history ? <DecisionHistory id={d.id} timeZone={timeZone} /> : null}
    </li>
  );
}

/** The requests in the server's order: open ones first, overdue first, then by needed-by; decided ones keep their record below. */
export function DecisionList({ decisions, currency, timeZone, actions }: { decisions: DecisionAnswer[]; currency: string; timeZone: string; actions?: DecisionActions }) {
  if (decisions.length === 0) return <p className="text-ink-soft">No decision has been asked for yet.</p>;
  return (
    <ol className="flex flex-col gap-4" aria-label="Decisions">
      {decisions.map((d) => (
        <DecisionCard key={d.id} d={d} currency={currency} timeZone={timeZone} actions={actions} />
      ))}
    </ol>
  );
}
