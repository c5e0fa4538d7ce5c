import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Sheet } from "../../components/ui/sheet.tsx";
import type { RouteLoader } from "../../lib/loaders.ts";
import { OfficeProjectPage, officePageLoader } from "../../lib/office-page.tsx";
import { useProjectParam } from "../../lib/projects.ts";
import { meQueryOptions } from "../../lib/session.ts";
import { areaNamesQueryOptions, canEditSitePlan, sitePlanProjectsQueryOptions, sitePlanQueryOptions } from "./api.ts";
import { SitePlanEditor } from "./components/site-plan-editor.tsx";

/** `/office/site-plan`: the project's plan, drawn and kept by leads and administrators. */
export const sitePlanLoader: RouteLoader = officePageLoader(sitePlanProjectsQueryOptions, (qc, slug) => qc.ensureQueryData(sitePlanQueryOptions(slug)));

function PlanBody({ slug }: { slug: string }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const plan = useSuspenseQuery(sitePlanQueryOptions(slug)).data;
  const areaNames = useQuery(areaNamesQueryOptions(slug)).data ?? [];
  return (
    <Sheet title="Plan" label="Shown on the public facility and project pages, and as the gallery's filter">
      <SitePlanEditor slug={slug} plan={plan} areaNames={areaNames} editable={canEditSitePlan(me)} />
    </Sheet>
  );
}

/** Site office › Site plan: the site's areas on a grid, each with its status from the programme. */
export function SitePlanPage() {
  return (
    <OfficeProjectPage
      project={useProjectParam(useSuspenseQuery(sitePlanProjectsQueryOptions()).data)}
      pickerClassName="w-64"
      sheet="Site office · Site plan"
      title="Site plan"
      description="The site's halls, suites, plant yard, energy centre and client areas as simple shapes on a grid. Each area's status comes from the programme's milestones tagged with its name."
    >
      {(slug) => <PlanBody slug={slug} />}
    </OfficeProjectPage>
  );
}
