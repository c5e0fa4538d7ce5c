import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import { Button } from "../../components/ui/button.tsx";
import { Notice, Sheet } from "../../components/ui/sheet.tsx";
import { todayIn } from "../../lib/format.ts";
import { formatDate } from "../../lib/format.ts";
import { officePageLoader } from "../../lib/office-page.tsx";
import { canKeepRecord, RecordPage } from "../../lib/record.tsx";
import { meQueryOptions } from "../../lib/session.ts";
import { decisionDocumentsQueryOptions, decisionMilestonesQueryOptions, decisionProjectQueryOptions, decisionProjectsQueryOptions, decisionRisksQueryOptions, decisionsQueryOptions } from "./api.ts";
import { OutcomeForm, WithdrawForm } from "./components/decision-actions.tsx";
import { DecisionForm } from "./components/decision-form.tsx";
import { DecisionList } from "./components/decision-list.tsx";
import { orderDecisions } from "./words.ts";

/** `/office/decisions`: the project and its requests. What a request may link to is read when a form opens. */
export const decisionsLoader = officePageLoader(decisionProjectsQueryOptions, (qc, slug) => Promise.all([qc.ensureQueryData(decisionProjectQueryOptions(slug)), qc.ensureQueryData(decisionsQueryOptions(slug))]));

type Open = { what: "edit"; id: number | null } | { what: "outcome"; id: number } | { what: "withdraw"; id: number };

function DecisionsBody({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const project = useSuspenseQuery(decisionProjectQueryOptions(slug)).data;
  const decisions = useSuspenseQuery(decisionsQueryOptions(slug)).data;
  const editable = canKeepRecord(me);
  // The links a form offers; only the lead's forms need them.
  const milestones = useQuery({ ...decisionMilestonesQueryOptions(slug), enabled: editable });
  const risks = useQuery({ ...decisionRisksQueryOptions(slug), enabled: editable });
  const documents = useQuery({ ...decisionDocumentsQueryOptions(slug), enabled: editable });
  const [open, setOpen] = useState<Open | null>(null);
  const ordered = useMemo(() => orderDecisions(decisions), [decisions]);
  const today = todayIn(project.timeZone);
  const close = () => setOpen(null);
  const decisionOf = (id: number | null) => decisions.find((d) => d.id === id) ?? null;

  const dialog = (() => {
    if (!open || !editable) return null;
    const d = decisionOf(open.id);
    if (open.what === "edit")
      return <DecisionForm slug={slug} decision={d} today={today} currency={project.currency} milestones={milestones.data ?? []} risks={risks.data ?? []} documents={documents.data ?? []} onClose={close} />;
    if (open.what === "outcome" && d) return <OutcomeForm decision={d} today={today} onClose={close} />;
    if (open.what === "withdraw" && d) return <WithdrawForm decision={d} onClose={close} />;
    return null;
  })();

  const openCount = decisions.filter((d) => d.status === "open").length;
  const overdue = decisions.filter((d) => d.status === "open" && d.overdue).length;
  return (
    <div className="flex flex-col gap-6">
      {editable ? null : <Notice>Read-only for your role: you see the requests shared with investors. Project leads and administrators keep them.</Notice>}
      <Sheet
        label={`${openCount} open · ${overdue} overdue · today ${formatDate(today)} (${project.timeZone.replace("_", " ")})`}
        title="Decisions needed"
        actions={
          editable ? (
            <Button size="sm" variant="primary" onClick={() => setOpen({ what: "edit", id: null })}>
              Ask for a decision
            </Button>
          ) : null
        }
      >
        <DecisionList
          decisions={ordered}
          currency={project.currency}
          timeZone={project.timeZone}
          actions={editable ? { onEdit: (d) => setOpen({ what: "edit", id: d.id }), onOutcome: (d) => setOpen({ what: "outcome", id: d.id }), onWithdraw: (d) => setOpen({ what: "withdraw", id: d.id }) } : undefined}
        />
      </Sheet>
      {dialog}
    </div>
  );
}

/** Site office › Decisions: what the investors, lender or board are asked to decide, and by when. */
export function DecisionsPage() {
  return <RecordPage projects={decisionProjectsQueryOptions} sheet="Site office · Decisions" title="Decisions needed" description="Requests to the investors, the lender or the board: the options, the recommendation, the date it is needed by, and the outcome once decided." body={DecisionsBody} />;
}
