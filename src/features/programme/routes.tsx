import type { RowSelectionState } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { Link } from "react-router-dom";
import type { Milestone } from "#shared/schemas/programme.ts";
import { Button } from "../../components/ui/button.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { Notice, PageHeader, Sheet, Spinner } from "../../components/ui/sheet.tsx";
import { StatusKey } from "../../components/ui/status-mark.tsx";
import { formatDate } from "../../lib/format.ts";
import { useProjectParam } from "../../lib/projects.ts";
import { useMe } from "../../lib/session.ts";
import { canEditProgramme, milestonesCsvUrl, useHealth, useMilestones, useProgrammeProject, useProgrammeProjects } from "./api.ts";
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
import { todayIn } from "./dates.ts";
import { settingsOf } from "./preview.ts";
import { useDraftEditor } from "./use-draft-editor.ts";

/** The project the site office is working on: `?project=` or the first one. */
function useProjectSlug(): { slug: string; pending: boolean; choices: Array<{ value: string; label: string }>; setSlug: (s: string) => void } {
  const projects = useProgrammeProjects();
  return { ...useProjectParam(projects.data), pending: projects.isPending };
}

function ProgrammeEditor({ slug }: { slug: string }) {
  const me = useMe();
  const project = useProgrammeProject(slug);
  const milestones = useMilestones(slug);
  const health = useHealth(slug);
  const [open, setOpen] = useState<Milestone | null>(null);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [shifting, setShifting] = useState(false);
  const settings = useMemo(() => (project.data ? settingsOf(project.data) : null), [project.data]);
  const at = health.data?.at ?? (project.data ? todayIn(project.data.timeZone) : "");
  const list = useMemo(() => milestones.data ?? [], [milestones.data]);
  const editor = useDraftEditor({ slug, milestones: list, settings, at });
  const editable = canEditProgramme(me.data);

  if (project.isPending || milestones.isPending || health.isPending) return <Spinner label="Loading the programme" />;
  if (project.isError) return <Notice tone="error">{project.error.message}</Notice>;
  if (milestones.isError) return <Notice tone="error">{milestones.error.message}</Notice>;
  if (health.isError) return <Notice tone="error">{health.error.message}</Notice>;
  const p = project.data;
  const selected = Object.keys(selection).filter((k) => selection[k]).map(Number);

  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Status at ${formatDate(health.data.at)} · ${p.timeZone.replace("_", " ")}`} title="Health of the programme">
        <HealthStrip health={health.data} />
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
                <Button size="sm" variant="primary" disabled={selected.length === 0} onClick={() => setShifting(true)}>
                  Shift {selected.length || ""} forecast{selected.length === 1 ? "" : "s"}…
                </Button>
              </div>
            ) : null
          }
        />
        {editable && shifting && settings ? (
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
        <LazyProgrammeCharts slug={slug} milestones={list} health={health.data} />
      </Sheet>

      <Sheet label="Baselines" title="Re-baseline">
        {settings ? <RebaselineForm slug={slug} milestones={list} settings={settings} at={at} timeZone={p.timeZone} editable={editable} /> : null}
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
  const { slug, pending, choices, setSlug } = useProjectSlug();
  const me = useMe();
  return (
    <>
      <PageHeader
        sheet="Site office · Programme"
        title="Programme"
        description="Milestones with their baseline, forecast and actual dates; the health figures are computed from them."
        actions={
          slug ? (
            <>
              {canEditProgramme(me.data) ? (
                <Link to={`/office/programme/walk?project=${slug}`} className="inline-flex items-center rounded-sm border border-accent bg-accent px-4 py-2 text-[0.95rem] font-medium text-white hover:bg-[#9a3412]">
                  Start a site walk
                </Link>
              ) : null}
              <a href={milestonesCsvUrl(slug)} download className="inline-flex items-center rounded-sm border border-ink bg-sheet px-4 py-2 text-[0.95rem] font-medium hover:bg-paper">
                Export CSV
              </a>
            </>
          ) : null
        }
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="w-64" />
      {pending ? <Spinner /> : slug ? <ProgrammeEditor key={slug} slug={slug} /> : <Notice>There is no project in this site office yet.</Notice>}
    </>
  );
}

function WalkBody({ slug }: { slug: string }) {
  const project = useProgrammeProject(slug);
  const milestones = useMilestones(slug);
  const health = useHealth(slug);
  const me = useMe();
  if (project.isPending || milestones.isPending || health.isPending || me.isPending) return <Spinner label="Loading the programme" />;
  if (project.isError) return <Notice tone="error">{project.error.message}</Notice>;
  if (milestones.isError) return <Notice tone="error">{milestones.error.message}</Notice>;
  if (health.isError) return <Notice tone="error">{health.error.message}</Notice>;
  if (!canEditProgramme(me.data)) return <Notice>The site walk records progress, so it is for project leads and administrators. The programme page shows the same milestones read-only.</Notice>;
  return <SiteWalk slug={slug} milestones={milestones.data} settings={settingsOf(project.data)} at={health.data.at} />;
}

/** The phone view of the programme for a walk round the site. */
export function SiteWalkPage() {
  const { slug, pending } = useProjectSlug();
  return (
    <>
      <div className="mb-4 flex items-center justify-between gap-3 border-b-2 border-ink pb-2">
        <div>
          <p className="label-caps">Site office · Programme</p>
          <h1 className="text-2xl font-semibold tracking-tight">Site walk</h1>
        </div>
        <Link to={`/office/programme${slug ? `?project=${slug}` : ""}`} className="text-sm underline underline-offset-4">
          Back to the table
        </Link>
      </div>
      {pending ? <Spinner /> : slug ? <WalkBody slug={slug} /> : <Notice>There is no project in this site office yet.</Notice>}
    </>
  );
}
