import type { ReactNode } from "react";
import type { MilestoneStatus } from "#shared/domain/programme-health.ts";
import type { SiteArea, SiteAreaKind, SitePlan } from "#shared/schemas/site-plan.ts";
import { STATUS_LOOK, StatusShape, StatusKey } from "./status-mark.tsx";

/** The word for each kind of area, said after its name to screen readers and in the office list. */
export const AREA_KIND_WORD: Record<SiteAreaKind, string> = {
  hall: "Data hall",
  suite: "Suite",
  plant_yard: "Plant yard",
  energy_centre: "Energy centre",
  client_area: "Client area",
  other: "Other area",
};

/** The status word of an area; an area with no programme work says so rather than guess. */
export function areaStatusWord(status: MilestoneStatus | null): string {
  return status === null ? "No programme work listed" : STATUS_LOOK[status].word;
}

/** Pixels per grid cell in the drawing's own units (the SVG scales to its box). */
export const CELL = 40;

/** The area's accessible name: its name, its status, and how much of its work is done. */
export function areaLabel(a: SiteArea): string {
  const counts = a.milestonesTotal > 0 ? `, ${a.milestonesComplete} of ${a.milestonesTotal} milestones complete` : "";
  return `${a.name}: ${areaStatusWord(a.status).toLowerCase()}${counts}`;
}

interface Props {
  plan: SitePlan;
  /** The drawing's title, read out first by screen readers. */
  title: string;
  /** Each area a link (the gallery of that area, say). */
  hrefOf?: (a: SiteArea) => string;
  /** Follows an area's link in the app (the router's navigate) rather than loading the page again. */
  onFollow?: (href: string) => void;
  /** Or each area a button (the site walk picks an area). */
  onPick?: (a: SiteArea) => void;
  /** The area shown as chosen (a filter that is on). */
  selected?: string | null;
  /** Drawn under the areas, inside the SVG (the office editor's grid, where a drag draws a new area). */
  underlay?: ReactNode;
  /** Drawn over the areas, inside the SVG (the area being drawn). */
  children?: ReactNode;
  className?: string;
}

/**
 * The site plan as a calm drawing: thin ink outlines on the paper, each area's name and its
 * status by shape and word, with a key. A diagram of the site's parts, never a map: the grid
 * has no scale and no north. Each area is a link or a button named with its status, so the
 * plan works as a filter from the keyboard and a screen reader as well as by touch.
 */
export function SitePlanDrawing({ plan, title, hrefOf, onFollow, onPick, selected = null, underlay, children, className = "" }: Props) {
  const width = plan.grid.columns * CELL;
  const height = plan.grid.rows * CELL;
  const titleId = `site-plan-title-${title.replace(/\W+/g, "-").toLowerCase()}`;
  return (
    <figure className={`flex flex-col gap-2 ${className}`}>
      <svg viewBox={`0 0 ${width} ${height}`} role="group" aria-labelledby={titleId} className="h-auto w-full rounded-sm border border-rule bg-paper" data-testid="site-plan">
        <title id={titleId}>{title}</title>
        {underlay}
        {plan.areas.map((a) => {
          const chosen = selected !== null && selected.toLowerCase() === a.name.toLowerCase();
          const body = <AreaShape area={a} chosen={chosen} />;
          if (hrefOf) {
            return (
              <a
                key={a.id}
                href={hrefOf(a)}
                aria-label={areaLabel(a)}
                aria-current={chosen ? "true" : undefined}
                className="site-plan-area"
                data-area={a.name}
                onClick={(e) => {
                  if (!onFollow || e.metaKey || e.ctrlKey || e.shiftKey || e.button !== 0) return;
                  e.preventDefault();
                  onFollow(hrefOf(a));
                }}
              >
                {body}
              </a>
            );
          }
          if (onPick) {
            return (
              <g
                key={a.id}
                role="button"
                tabIndex={0}
                aria-label={areaLabel(a)}
                aria-pressed={chosen}
                className="site-plan-area cursor-pointer"
                data-area={a.name}
                onClick={() => onPick(a)}
                onKeyDown={(e) => {
                  if (e.key === "Enter" || e.key === " ") {
                    e.preventDefault();
                    onPick(a);
                  }
                }}
              >
                {body}
              </g>
            );
          }
          return (
            <g key={a.id} role="img" aria-label={areaLabel(a)} data-area={a.name}>
              {body}
            </g>
          );
        })}
        {children}
      </svg>
      {plan.areas.length > 0 ? (
        <figcaption className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm text-ink-soft">
          <StatusKey />
          <span className="text-ink-faint">An area with no programme work listed has no shape.</span>
        </figcaption>
      ) : null}
    </figure>
  );
}

/** One area: its outline, its name and its status shape and word, sized to fit small areas. */
function AreaShape({ area: a, chosen }: { area: SiteArea; chosen: boolean }) {
  const x = a.x * CELL;
  const y = a.y * CELL;
  const w = a.w * CELL;
  const h = a.h * CELL;
  // Small areas keep their name and drop the status word (the shape and the accessible name carry it).
  const roomy = w >= 4 * CELL && h >= 2 * CELL;
  const fontSize = Math.min(18, Math.max(11, w / 9));
  return (
    <>
      <rect x={x + 1} y={y + 1} width={w - 2} height={h - 2} rx={3} fill={chosen ? "#fdeee4" : "#fffdf8"} stroke={chosen ? "#1d1f24" : "#4a4e57"} strokeWidth={chosen ? 3 : 1.2} />
      <text x={x + 10} y={y + 10 + fontSize} fontSize={fontSize} fill="#1d1f24" fontWeight={600}>
        {a.name}
      </text>
      {a.status !== null ? (
        <g data-status={a.status}>
          <StatusShape status={a.status} cx={x + 17} cy={y + h - 16} r={7} />
          {roomy ? (
            <text x={x + 30} y={y + h - 11} fontSize={13} fill="#4a4e57">
              {STATUS_LOOK[a.status].word}
            </text>
          ) : null}
        </g>
      ) : roomy ? (
        <text x={x + 10} y={y + h - 11} fontSize={12} fill="#6b6f78">
          No work listed
        </text>
      ) : null}
    </>
  );
}
