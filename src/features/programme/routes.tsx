import { useQuery, useSuspenseQuery, type QueryClient } from "@tanstack/react-query";
import type { RowSelectionState } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import type { Milestone } from "#shared/schemas/programme.ts";
import { Button, buttonClass, PrimaryLink } from "../../components/ui/button.tsx";
import { Notice, Sheet } from "../../components/ui/sheet.tsx";
import { StatusKey } from "../../components/ui/status-mark.tsx";
import { WalkHeader } from "../../components/ui/walk-frame.tsx";
import { formatDate } from "../../lib/format.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { NoProjectNotice, OfficeProjectPage, officePageLoader } from "../../lib/office-page.tsx";
import { useProjectParam } from "../../lib/projects.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { sitePlanQueryOptions } from "../../lib/site-plan.ts";
import {
  baselinesQueryOptions,
  canEditProgramme,
  healthQueryOptions,
  milestonesCsvUrl,
  milestonesQueryOptions,
  programmeProjectQueryOptions,
  programmeProjectsQueryOptions,
  REMOVED_ONLY,
} from "./api.ts";
import { CsvPanel } from "./components/csv-panel.tsx";
import { LazyProgrammeCharts } from "./components/lazy-charts.tsx";
import { MilestoneHistoryDialog } from "./components/milestone-history.tsx";
import { RemovedMilestones } from "./components/milestone-removal.tsx";
import { MilestoneTable } from "./components/milestone-table.tsx";
import { PendingChanges } from "./components/pending-changes.tsx";
import { HealthStrip } from "./components/programme-summary.tsx";
import { RebaselineForm } from "./components/rebaseline-form.tsx";
import { ShiftPanel } from "./components/shift-panel.tsx";
import { SiteWalk } from "./components/site-walk.tsx";
import { settingsOf } from "./preview.ts";
import { useDraftEditor } from "./use-draft-editor.ts";

/** The project the site office is working on: `?project=` or the first one. */
function useProjectSlug() {
  return useProjectParam(useSuspenseQuery(programmeProjectsQueryOptions()).data);
}

/** What both programme pages show of the project: the project, its milestones and their health today. */
function primeProgramme(qc: QueryClient, slug: string) {
  return Promise.all([
    qc.ensureQueryData(programmeProjectQueryOptions(slug)),
    qc.ensureQueryData(milestonesQueryOptions(slug)),
    qc.ensureQueryData(healthQueryOptions(slug)),
  ]);
}

/** `/office/programme`: the programme, the milestones removed from it and its baseline versions. */
export const programmeLoader: RouteLoader = officePageLoader(programmeProjectsQueryOptions, (qc, slug) =>
  Promise.all([primeProgramme(qc, slug), qc.ensureQueryData(milestonesQueryOptions(slug, REMOVED_ONLY)), qc.ensureQueryData(baselinesQueryOptions(slug))]),
);

/** `/office/programme/walk`: the programme as the table shows it. */
export const siteWalkLoader: RouteLoader = officePageLoader(programmeProjectsQueryOptions, primeProgramme);

/** The project's programme as its route's loader primed it. */
function useProgramme(slug: string) {
  const project = useSuspenseQuery(programmeProjectQueryOptions(slug)).data;
  const milestones = useSuspenseQuery(milestonesQueryOptions(slug)).data;
  const health = useSuspenseQuery(healthQueryOptions(slug)).data;
  return { project, milestones, health };
}

function ProgrammeEditor({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const { project: p, milestones: list, health } = useProgramme(slug);
  const [open, setOpen] = useState<Milestone | null>(null);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [shifting, setShifting] = useState(false);
  const settings = useMemo(() => settingsOf(p), [p]);
  const at = health.at;
  const editor = useDraftEditor({ slug, milestones: list, settings, at });
  const editable = canEditProgramme(me);
  const selected = Object.keys(selection).filter((k) => selection[k]).map(Number);

  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Status at ${formatDate(health.at)} · ${p.timeZone.replace("_", " ")}`} title="Health of the programme">
        <HealthStrip health={health} />
      </Sheet>

      <section aria-labelledby="milestones-h" className="flex flex-col gap-3">
        <div className="flex flex-wrap items-end justify-between gap-2">
          <div>
            <h2 id="milestones-h" className="text-lg font-semibold">
              Milestones
            </h2>
            <p className="text-sm text-ink-soft">
              {editable
                ? "Change a value in the table to see its effect below; nothing is saved until you save it. The baseline changes only by re-baselining."
                : "Read-only for your role: project leads and administrators keep the programme."}{" "}
              Open a milestone's name for its history and what drives it.
            </p>
          </div>
          <StatusKey />
        </div>
        <MilestoneTable
          milestones={list}
          caption={`Milestones of ${p.name}`}
          editable={editable}
          drafts={editor.drafts}
          onDraft={editor.setDraft}
          errors={editor.errors}
          previewed={editor.previewed}
          rowSelection={selection}
          onRowSelectionChange={setSelection}
          onOpen={setOpen}
          toolbar={
            editable ? (
              <div className="flex flex-wrap gap-2">
                <Button size="sm" onClick={() => setSelection(Object.fromEntries(list.filter((m) => m.actualFinish === null).map((m) => [String(m.id), true])))}>
                  Select all open
                </Button>
                {selected.length > 0 ? (
                  <Button size="sm" onClick={() => setSelection({})}>
                    Clear selection
                  </Button>
                ) : null}
                <Button size="sm" disabled={selected.length === 0} onClick={() => setShifting(true)}>
                  Shift {selected.length || ""} forecast{selected.length === 1 ? "" : "s"}…
                </Button>
              </div>
            ) : null
          }
        />
        {editable && shifting ? (
          <ShiftPanel
            slug={slug}
            milestones={list}
            selected={selected}
            settings={settings}
            at={at}
            onDone={() => {
              setShifting(false);
              setSelection({});
            }}
          />
        ) : null}
        {editable ? <PendingChanges editor={editor} milestones={list} /> : null}
      </section>

      <Sheet label="Charts" title="Progress, baseline against forecast, and slip">
        <LazyProgrammeCharts slug={slug} milestones={list} health={health} />
      </Sheet>

      <Sheet label="Baselines" title="Re-baseline">
        <RebaselineForm slug={slug} milestones={list} settings={settings} at={at} timeZone={p.timeZone} editable={editable} />
      </Sheet>

      <Sheet label="Files" title="CSV export and import">
        <CsvPanel slug={slug} editable={editable} />
      </Sheet>

      <Sheet label="On record" title="Removed from the programme">
        <RemovedMilestones slug={slug} timeZone={p.timeZone} onOpen={setOpen} />
      </Sheet>

      <MilestoneHistoryDialog milestone={open} timeZone={p.timeZone} onClose={() => setOpen(null)} removal={editable ? { slug } : undefined} />
    </div>
  );
}

/** Site office › Programme: the milestone table, its live preview, charts, baselines and files. */
export function ProgrammePage() {
  const project = useProjectSlug();
  const me = useSuspenseQuery(meQueryOptions()).data;
  return (
    <OfficeProjectPage
      project={project}
      pickerClassName="w-64"
      sheet="Site office · Programme"
      title="Programme"
      description="Milestones with their baseline, forecast and actual dates; the health figures are computed from them."
      actions={
        project.slug ? (
          <>
            {canEditProgramme(me) ? (
              <PrimaryLink to={`/office/programme/walk?project=${project.slug}`}>Start a site walk</PrimaryLink>
            ) : null}
            <a href={milestonesCsvUrl(project.slug)} download className={buttonClass()}>
              Export CSV
            </a>
          </>
        ) : null
      }
    >
      {(slug) => <ProgrammeEditor slug={slug} />}
    </OfficeProjectPage>
  );
}

function WalkBody({ slug }: { slug: string }) {
  const { project, milestones, health } = useProgramme(slug);
  const me = useSuspenseQuery(meQueryOptions()).data;
  // The site plan, when there is one, lets the lead pick an area by tapping it.
  const plan = useQuery(sitePlanQueryOptions(slug)).data;
  if (!canEditProgramme(me)) return <Notice>The site walk records progress, so it is for project leads and administrators. The programme page shows the same milestones read-only.</Notice>;
  return <SiteWalk slug={slug} milestones={milestones} settings={settingsOf(project)} at={health.at} plan={plan} />;
}

/** The phone view of the programme for a walk round the site. */
export function SiteWalkPage() {
  const { slug } = useProjectSlug();
  return (
    <>
      <WalkHeader sheet="Site office · Programme" title="Site walk" back={`/office/programme${slug ? `?project=${slug}` : ""}`} backLabel="Back to the table" />
      {slug ? <WalkBody slug={slug} /> : <NoProjectNotice />}
    </>
  );
}
