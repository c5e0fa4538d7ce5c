import { useParams } from "react-router-dom";
import { PublicTimelinePage, publicTimelineLoader } from "../../features/programme/public-routes.tsx";
import { ReadinessAtAGlance } from "../../features/public-site/components/readiness-glance.tsx";
import { facilityReadQueryOptions } from "../../features/public-site/facility-api.ts";
import type { RouteLoader } from "../../lib/loaders.ts";

// The public timeline belongs to the programme and the readiness bars to the public site;
// features never import each other, so the page is put together here (decision 050).

/** The timeline's own reads, and the facility answer asked for alongside (a failure there leaves the timeline whole). */
export const timelinePageLoader: RouteLoader = (qc) => {
  const timeline = publicTimelineLoader(qc);
  return async (args) => {
    await Promise.all([timeline(args), qc.prefetchQuery(facilityReadQueryOptions(args.params.slug ?? ""))]);
    return null;
  };
};

/** `/projects/:slug/timeline` with each block's readiness above the milestones. */
export function TimelinePage() {
  const { slug = "" } = useParams();
  return <PublicTimelinePage glance={<ReadinessAtAGlance slug={slug} publicOnly detailsHref={`/projects/${slug}/facility`} className="mt-6" />} />;
}
