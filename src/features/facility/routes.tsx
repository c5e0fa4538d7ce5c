import { useSuspenseQuery, type QueryClient } from "@tanstack/react-query";
import { useState } from "react";
import type { FeatureAnswer, FeatureKind } from "#shared/schemas/facility.ts";
import { Button, PrimaryLink } from "../../components/ui/button.tsx";
import { Notice, Sheet } from "../../components/ui/sheet.tsx";
import { WalkHeader } from "../../components/ui/walk-frame.tsx";
import { formatDate } from "../../lib/format.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { NoProjectNotice, OfficeProjectPage, officePageLoader } from "../../lib/office-page.tsx";
import { useProjectParam } from "../../lib/projects.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { canEditFacility, facilityMilestonesQueryOptions, facilityProjectQueryOptions, facilityProjectsQueryOptions, facilityQueryOptions } from "./api.ts";
import { BlockForm } from "./components/block-form.tsx";
import { CarryLoadSetting } from "./components/carry-load-setting.tsx";
import { BlockTable } from "./components/block-table.tsx";
import { FeatureForm } from "./components/feature-form.tsx";
import { FeatureList } from "./components/feature-list.tsx";
import { FacilityWalk } from "./components/site-walk.tsx";
import { SystemForm } from "./components/system-form.tsx";
import { SystemTable } from "./components/system-table.tsx";
import { EditUnitForm, NewUnitForm } from "./components/unit-form.tsx";
import { StageKey } from "./components/unit-shapes.tsx";

/** The project the site office is working on: `?project=` or the first one. */
function useProjectSlug() {
  return useProjectParam(useSuspenseQuery(facilityProjectsQueryOptions()).data);
}

/** What both facility pages read: the project (its calendar and time zone), the facility and the programme's milestones. */
function primeFacility(qc: QueryClient, slug: string) {
  return Promise.all([qc.ensureQueryData(facilityProjectQueryOptions(slug)), qc.ensureQueryData(facilityQueryOptions(slug)), qc.ensureQueryData(facilityMilestonesQueryOptions(slug))]);
}

const facilityPagesLoader = officePageLoader(facilityProjectsQueryOptions, primeFacility);

/** `/office/facility`: blocks, systems with their units, and site features. */
export const facilityLoader: RouteLoader = facilityPagesLoader;
/** `/office/facility/walk`: the same record, unit by unit. */
export const facilityWalkLoader: RouteLoader = facilityPagesLoader;

/** The project's facility as its route's loader primed it. */
function useFacility(slug: string) {
  const project = useSuspenseQuery(facilityProjectQueryOptions(slug)).data;
  const facility = useSuspenseQuery(facilityQueryOptions(slug)).data;
  const milestones = useSuspenseQuery(facilityMilestonesQueryOptions(slug)).data;
  const calendar = { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays };
  return { project, facility, milestones, calendar };
}

type Editing =
  | { what: "block"; id: number | null }
  | { what: "system"; id: number | null }
  | { what: "new-unit"; systemId: number }
  | { what: "unit"; systemId: number; unitId: number }
  | { what: "feature"; feature: FeatureAnswer | null; kind: FeatureKind };

function FacilityBody({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const { project, facility, milestones, calendar } = useFacility(slug);
  const editable = canEditFacility(me);
  const [editing, setEditing] = useState<Editing | null>(null);
  const close = () => setEditing(null);
  const systemOf = (id: number) => facility.systems.find((s) => s.id === id);
  /** A sheet's button for entering a new block or system, for those who keep the facility. */
  const newButton = (what: "block" | "system", label: string) =>
    editable ? (
      // Secondary: the page's one primary action is the plant walk (orange is for one action a screen).
      <Button size="sm" onClick={() => setEditing({ what, id: null })}>
        {label}
      </Button>
    ) : null;

  const dialog = (() => {
    if (!editable || !editing) return null;
    switch (editing.what) {
      case "block":
        return <BlockForm slug={slug} block={facility.blocks.find((b) => b.id === editing.id) ?? null} milestones={milestones} onClose={close} />;
      case "system":
        return <SystemForm slug={slug} system={systemOf(editing.id ?? 0) ?? null} blocks={facility.blocks} milestones={milestones} onClose={close} />;
      case "new-unit": {
        const s = systemOf(editing.systemId);
        return s ? <NewUnitForm slug={slug} systemId={s.id} systemName={s.name} trains={s.independentSystems} at={facility.at} onClose={close} /> : null;
      }
      case "unit": {
        const s = systemOf(editing.systemId);
        const unit = s?.units.find((u) => u.id === editing.unitId);
        return s && unit ? <EditUnitForm stageProps={{ slug, unit, system: s, facility, milestones, calendar }} timeZone={project.timeZone} onClose={close} /> : null;
      }
      case "feature":
        return <FeatureForm slug={slug} feature={editing.feature} kind={editing.kind} onClose={close} />;
    }
  })();

  return (
    <div className="flex flex-col gap-6">
      {editable ? null : <Notice>Read-only for your role: project leads and administrators keep the facility.</Notice>}
      <Sheet
        label={`Status at ${formatDate(facility.at)} · ${project.timeZone.replace("_", " ")}`}
        title="Capacity blocks"
        actions={newButton("block", "New block")}
      >
        <p className="mb-3 text-sm text-ink-soft">
          A block is ready for service when every milestone it depends on is complete and every system serving it carries its load (units commissioned to L{facility.availableFromLevel} or beyond). Slip is in working days.
        </p>
        <BlockTable blocks={facility.blocks} onEdit={editable ? (b) => setEditing({ what: "block", id: b.id }) : undefined} />
      </Sheet>

      <Sheet
        label="Plant"
        title="Plant systems and their units"
        actions={newButton("system", "New system")}
      >
        {editable ? <CarryLoadSetting slug={slug} level={facility.availableFromLevel} /> : null}
        <StageKey availableFromLevel={facility.availableFromLevel} className="mb-3" />
        <SystemTable
          systems={facility.systems}
          blocks={facility.blocks}
          actions={
            editable
              ? {
                  onEdit: (s) => setEditing({ what: "system", id: s.id }),
                  onAddUnit: (s) => setEditing({ what: "new-unit", systemId: s.id }),
                  onEditUnit: (s, u) => setEditing({ what: "unit", systemId: s.id, unitId: u.id }),
                }
              : undefined
          }
        />
        <p className="mt-3 text-xs text-ink-soft" data-testid="facility-caution">
          * {facility.caution}
        </p>
      </Sheet>

      <Sheet label="For prospects" title="Site features">
        <FeatureList features={facility.features} onEdit={editable ? (f) => setEditing({ what: "feature", feature: f, kind: f.kind }) : undefined} onAdd={editable ? (kind) => setEditing({ what: "feature", feature: null, kind }) : undefined} />
      </Sheet>
      {dialog}
    </div>
  );
}

/** Site office › Facility: capacity blocks, plant systems with their units, site features. */
export function FacilityPage() {
  const project = useProjectSlug();
  const me = useSuspenseQuery(meQueryOptions()).data;
  return (
    <OfficeProjectPage
      project={project}
      pickerClassName="w-64"
      sheet="Site office · Facility"
      title="Facility"
      description="What a prospect asks first: racks and kilowatts, density, when each block is ready, and how resilient the plant is today and at design."
      actions={
        project.slug && canEditFacility(me) ? (
          <PrimaryLink to={`/office/facility/walk?project=${project.slug}`}>Start a plant walk</PrimaryLink>
        ) : null
      }
    >
      {(slug) => <FacilityBody slug={slug} />}
    </OfficeProjectPage>
  );
}

function WalkBody({ slug }: { slug: string }) {
  const { project, facility, milestones, calendar } = useFacility(slug);
  const me = useSuspenseQuery(meQueryOptions()).data;
  if (!canEditFacility(me)) return <Notice>The plant walk records progress, so it is for project leads and administrators. The facility page shows the same units read-only.</Notice>;
  return <FacilityWalk slug={slug} facility={facility} milestones={milestones} calendar={calendar} timeZone={project.timeZone} />;
}

/** The phone view of the plant for a walk round the site. */
export function FacilityWalkPage() {
  const { slug } = useProjectSlug();
  return (
    <>
      <WalkHeader sheet="Site office · Facility" title="Plant walk" back={`/office/facility${slug ? `?project=${slug}` : ""}`} backLabel="Back to the tables" />
      {slug ? <WalkBody slug={slug} /> : <NoProjectNotice />}
    </>
  );
}
