import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { Button } from "../../components/ui/button.tsx";
import { Sheet } from "../../components/ui/sheet.tsx";
import { formatDate } from "../../lib/format.ts";
import { officePageLoader } from "../../lib/office-page.tsx";
import { RecordPage } from "../../lib/record.tsx";
import { budgetChangesQueryOptions, budgetMilestonesQueryOptions, budgetPositionQueryOptions, budgetProjectQueryOptions, budgetProjectsQueryOptions, budgetRisksQueryOptions } from "./api.ts";
import { ChangeForm } from "./components/change-form.tsx";
import { ChangeTable } from "./components/change-table.tsx";
import { BudgetSettingsForm, PositionFigures } from "./components/position.tsx";

/** `/office/budget` (lead and admin: money is not marketing's): the project, its changes and the position today. */
export const budgetLoader = officePageLoader(
  budgetProjectsQueryOptions,
  (qc, slug) => Promise.all([qc.ensureQueryData(budgetProjectQueryOptions(slug)), qc.ensureQueryData(budgetChangesQueryOptions(slug)), qc.ensureQueryData(budgetPositionQueryOptions(slug))]),
  ["lead", "admin"],
);

function BudgetBody({ slug }: { slug: string }) {
  const project = useSuspenseQuery(budgetProjectQueryOptions(slug)).data;
  const changes = useSuspenseQuery(budgetChangesQueryOptions(slug)).data;
  const position = useSuspenseQuery(budgetPositionQueryOptions(slug)).data;
  const milestones = useQuery(budgetMilestonesQueryOptions(slug));
  const risks = useQuery(budgetRisksQueryOptions(slug));
  const [editing, setEditing] = useState<{ id: number | null } | null>(null);
  const change = editing ? (changes.find((c) => c.id === editing.id) ?? null) : null;
  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Position at ${formatDate(position.at)}`} title="Where the money stands">
        <PositionFigures p={position} />
        <p className="mt-3 text-xs text-ink-soft" data-testid="budget-caution">
          * {position.caution}
        </p>
      </Sheet>
      <Sheet
        label="Register"
        title="Budget changes"
        actions={
          <Button size="sm" variant="primary" onClick={() => setEditing({ id: null })}>
            Record a change
          </Button>
        }
      >
        <p className="mb-3 text-sm text-ink-soft">Only approved changes move the figures. A change drawn on the contingency moves money from it into the works; any other approved change moves the approved budget.</p>
        <ChangeTable changes={changes} currency={position.currency} onEdit={(c) => setEditing({ id: c.id })} />
      </Sheet>
      <Sheet label="Settings" title="Contingency and the projected final cost">
        <BudgetSettingsForm key={`${position.contingencyHeld}:${position.projectedFinalCostMethod}`} slug={slug} p={position} />
      </Sheet>
      {editing ? <ChangeForm slug={slug} change={change} currency={project.currency} milestones={milestones.data ?? []} risks={risks.data ?? []} onClose={() => setEditing(null)} /> : null}
    </div>
  );
}

/** Site office › Budget: changes, contingency and the estimate at completion (lead and admin). */
export function BudgetPage() {
  return <RecordPage projects={budgetProjectsQueryOptions} sheet="Site office · Budget" title="Budget and contingency" description="The original budget, approved changes, the contingency and the projected final cost, with the reasoning behind each figure." body={BudgetBody} keepersOnly="The budget is kept by project leads and administrators; money figures are not shared with other roles." />;
}
