import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import type { RiskAnswer, RiskScale } from "#shared/schemas/risks.ts";
import { Button } from "../../components/ui/button.tsx";
import { Notice, Sheet } from "../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../lib/format.ts";
import { officePageLoader } from "../../lib/office-page.tsx";
import { canKeepRecord, RecordPage } from "../../lib/record.tsx";
import { meQueryOptions } from "../../lib/session.ts";
import {
  riskFacilityQueryOptions,
  riskMilestonesQueryOptions,
  riskProjectQueryOptions,
  riskProjectsQueryOptions,
  riskSummaryQueryOptions,
  risksQueryOptions,
  staffQueryOptions,
  type StaffMember,
} from "./api.ts";
import { BandMark } from "./components/marks.tsx";
import { RiskForm } from "./components/risk-form.tsx";
import { IssueForm, RiskPanel } from "./components/risk-panel.tsx";
import { RiskRegister } from "./components/risk-table.tsx";
import { BAND_ORDER } from "./words.ts";

/** `/office/risks`: the project, its register, the summary (scale, totals) and what a risk may be linked to. */
export const risksLoader = officePageLoader(riskProjectsQueryOptions, (qc, slug) =>
  Promise.all([
    qc.ensureQueryData(riskProjectQueryOptions(slug)),
    qc.ensureQueryData(risksQueryOptions(slug)),
    qc.ensureQueryData(riskSummaryQueryOptions(slug)),
    qc.ensureQueryData(riskMilestonesQueryOptions(slug)),
    qc.ensureQueryData(riskFacilityQueryOptions(slug)),
  ]),
);

type Open = { what: "read"; id: number } | { what: "edit"; id: number | null } | { what: "issue"; id: number };

/**
 * Who may own a risk: the staff list, or (while it cannot be read) the signed-in lead and the
 * owners already in the register, so the form never offers nobody.
 */
function useOwners(editable: boolean, risks: readonly RiskAnswer[], me: StaffMember | null): StaffMember[] {
  const staff = useQuery({ ...staffQueryOptions(), enabled: editable });
  return useMemo(() => {
    if (staff.data?.length) return staff.data;
    const known = new Map<number, StaffMember>();
    if (me) known.set(me.id, me);
    for (const r of risks) known.set(r.owner.id, { id: r.owner.id, name: r.owner.name, role: "lead" });
    return [...known.values()];
  }, [staff.data, risks, me]);
}

function scaleOf(s: { likelihoodLevels: number; impactLevels: number; bandEdges: { medium: number; high: number; critical: number } }): RiskScale {
  return { likelihoodLevels: s.likelihoodLevels, impactLevels: s.impactLevels, bandEdges: s.bandEdges };
}

function RisksBody({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const project = useSuspenseQuery(riskProjectQueryOptions(slug)).data;
  const risks = useSuspenseQuery(risksQueryOptions(slug)).data;
  const summary = useSuspenseQuery(riskSummaryQueryOptions(slug)).data;
  const milestones = useSuspenseQuery(riskMilestonesQueryOptions(slug)).data;
  const facility = useSuspenseQuery(riskFacilityQueryOptions(slug)).data;
  const editable = canKeepRecord(me);
  const owners = useOwners(editable, risks, me ? { id: me.id, name: me.name, role: me.role } : null);
  const [open, setOpen] = useState<Open | null>(null);
  const close = () => setOpen(null);
  const riskOf = (id: number | null) => risks.find((r) => r.id === id) ?? null;
  const scale = scaleOf(summary.scale);

  const dialog = (() => {
    if (!open) return null;
    const risk = riskOf(open.id);
    if (open.what === "read" && risk)
      return <RiskPanel risk={risk} editable={editable} staff={owners} meId={me?.id ?? 0} currency={project.currency} timeZone={project.timeZone} onClose={close} onEdit={() => setOpen({ what: "edit", id: risk.id })} onIssue={() => setOpen({ what: "issue", id: risk.id })} />;
    if (open.what === "edit" && editable) return <RiskForm slug={slug} risk={risk} scale={scale} staff={owners} milestones={milestones} facility={facility} currency={project.currency} meId={me?.id ?? 0} onClose={close} />;
    if (open.what === "issue" && editable && risk) return <IssueForm risk={risk} onClose={close} />;
    return null;
  })();

  return (
    <div className="flex flex-col gap-6">
      {editable ? null : <Notice>Read-only for your role: you see the items shared with investors. Project leads and administrators keep the register.</Notice>}
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4" aria-label="The register in figures">
        <div className="border border-rule bg-sheet p-3">
          <dt className="label-caps">Open risks</dt>
          <dd className="tabular text-2xl font-semibold">{summary.openRisks}</dd>
        </div>
        <div className="border border-rule bg-sheet p-3">
          <dt className="label-caps">Open issues</dt>
          <dd className="tabular text-2xl font-semibold">{summary.openIssues}</dd>
        </div>
        <div className="border border-rule bg-sheet p-3">
          <dt className="label-caps">Open by band</dt>
          <dd className="flex flex-col gap-0.5 text-sm">
            {[...BAND_ORDER].reverse().map((b) => (
              <span key={b} className="inline-flex items-center justify-between gap-2">
                <BandMark band={b} />
                <span className="tabular">{summary.byBand[b] ?? 0}</span>
              </span>
            ))}
          </dd>
        </div>
        <div className="border border-rule bg-sheet p-3">
          <dt className="label-caps">Expected cost of open risks</dt>
          <dd className="tabular text-xl font-semibold">{summary.contingencyRemaining === null && !editable ? "—" : formatMoney(summary.totalExpectedCost, project.currency)}</dd>
          <dd className="text-xs text-ink-soft">
            three-point {formatMoney(summary.totalExpectedCostPert, project.currency)}
            {summary.contingencyRemaining !== null ? ` · contingency left ${formatMoney(summary.contingencyRemaining, project.currency)}` : ""}
          </dd>
        </div>
      </dl>
      <Sheet
        label={`Trend since ${formatDate(summary.windowStart)} · scale ${scale.likelihoodLevels} × ${scale.impactLevels}`}
        title="Register"
        actions={
          editable ? (
            <Button size="sm" variant="primary" onClick={() => setOpen({ what: "edit", id: null })}>
              Raise a risk or issue
            </Button>
          ) : null
        }
      >
        <p className="mb-3 text-sm text-ink-soft">
          Score = likelihood × impact. Bands on this project: medium from {scale.bandEdges.medium}, high from {scale.bandEdges.high}, critical from {scale.bandEdges.critical}. The trend compares today's score with the score at the start of the window.
        </p>
        <RiskRegister risks={risks} currency={project.currency} onOpen={(r) => setOpen({ what: "read", id: r.id })} />
      </Sheet>
      {dialog}
    </div>
  );
}

/** Site office › Risks: the register of risks and issues. */
export function RisksPage() {
  return <RecordPage projects={riskProjectsQueryOptions} sheet="Site office · Risks" title="Risks and issues" description="What could go wrong, who owns it, what is being done, and what has already happened." body={RisksBody} />;
}
