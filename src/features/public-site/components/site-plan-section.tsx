import { useQuery } from "@tanstack/react-query";
import { useNavigate } from "react-router-dom";
import { SitePlanDrawing } from "../../../components/ui/site-plan-drawing.tsx";
import { publicPlan, sitePlanQueryOptions } from "../../../lib/site-plan.ts";

/**
 * The site plan on a public page: the public areas, each a link to the gallery's photographs of
 * it (the gallery's area filter), with its status by shape and word. Nothing is drawn while the
 * project has no public area.
 */
export function SitePlanSection({ slug, heading = "Site plan", selected = null, className = "" }: { slug: string; heading?: string; selected?: string | null; className?: string }) {
  const plan = useQuery(sitePlanQueryOptions(slug)).data;
  const navigate = useNavigate();
  if (!plan) return null;
  const shown = publicPlan(plan);
  if (shown.areas.length === 0) return null;
  const headingId = `site-plan-h-${heading.replace(/\W+/g, "-").toLowerCase()}`;
  return (
    <section aria-labelledby={headingId} className={className}>
      <h2 id={headingId} className="border-b-2 border-ink pb-2 text-xl font-semibold">
        {heading}
      </h2>
      <p className="mt-2 max-w-2xl text-sm text-ink-soft">A diagram of the site's parts, not to scale. Each area's status covers all its work, including work not listed here. Choose an area to see its photographs.</p>
      <SitePlanDrawing
        className="mt-3 max-w-3xl"
        plan={shown}
        title="Site plan: each area with its status"
        selected={selected}
        onFollow={(href) => void navigate(href)}
        hrefOf={(a) => `/projects/${slug}/gallery?area=${encodeURIComponent(a.name)}`}
      />
    </section>
  );
}
