import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { toDayNumber } from "#shared/domain/calendar.ts";
import type { BlockAnswer } from "#shared/schemas/facility.ts";
import { STATUS_LOOK, StatusShape } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import { facilityReadQueryOptions } from "../facility-api.ts";
import { firstOfMonthTicks, tickWord } from "./month-ticks.ts";

/*
 * Readiness at a glance (decision 050): one row per capacity block from today to its
 * ready-for-service date, the original plan as an outline bar and today's forecast as a solid
 * ink bar. Plain HTML bars, not a charting library: this is the first thing on the public
 * project page, so it must paint with the page's text inside the public script budget. The
 * bars are drawn for the eye only; every fact they show is also written out in words.
 */

export type ReadinessBlock = Pick<BlockAnswer, "id" | "name" | "baselineReadyDate" | "forecastReadyDate" | "readyForService" | "slipWorkingDays" | "missing">;

/** Where a block stands, each with one shape and one word (shapes as in the programme's status marks). */
type Standing = "ready" | "on_plan" | "after_plan" | "undated";

const STANDING: Record<Standing, { word: string; shape: keyof typeof STATUS_LOOK | null }> = {
  ready: { word: "Ready for service", shape: "complete" },
  on_plan: { word: "On plan", shape: "on_programme" },
  after_plan: { word: "After plan", shape: "at_risk" },
  undated: { word: "No date yet", shape: null },
};

export function standingOf(b: ReadinessBlock): Standing {
  if (b.readyForService) return "ready";
  if (!b.forecastReadyDate) return "undated";
  return (b.slipWorkingDays ?? 0) > 0 ? "after_plan" : "on_plan";
}

/**
 * How many missing things a row names before "and N more": a glance, not the list (the facility
 * page has the list). One, because the demo's are a line each and three rows must fit a phone's
 * first screen.
 */
const MISSING_NAMED = 1;

/** "Still to do: A and 3 more", or null when nothing is missing. */
export function missingInWords(missing: string[]): string | null {
  if (missing.length === 0) return null;
  const named = missing.slice(0, MISSING_NAMED).join("; ");
  const more = missing.length - MISSING_NAMED;
  return `Still to do: ${named}${more > 0 ? ` and ${more} more` : ""}`;
}

const workingDays = (n: number) => `${n} working ${n === 1 ? "day" : "days"}`;

/** "Forecast 16 Apr 2027, 10 working days after plan (planned 2 Apr 2027)" and the ready and undated cases. */
export function readinessInWords(b: ReadinessBlock): string {
  if (b.readyForService) return b.forecastReadyDate ? `Ready for service since ${formatDate(b.forecastReadyDate)}` : "Ready for service";
  if (!b.forecastReadyDate) return "No ready-for-service date yet";
  const forecast = `Forecast ${formatDate(b.forecastReadyDate)}`;
  const slip = b.slipWorkingDays;
  if (!b.baselineReadyDate || slip === null) return forecast;
  if (slip === 0) return `${forecast}, as planned`;
  const against = slip > 0 ? `${workingDays(slip)} after plan` : `${workingDays(-slip)} ahead of plan`;
  return `${forecast}, ${against} (planned ${formatDate(b.baselineReadyDate)})`;
}

/** The axis runs from today to the first of the month after the latest date still to come. */
function axisOf(blocks: ReadinessBlock[], today: string): { from: number; to: number } | null {
  const from = toDayNumber(today);
  const ahead = blocks
    .filter((b) => !b.readyForService)
    .flatMap((b) => [b.baselineReadyDate, b.forecastReadyDate])
    .filter((d): d is string => d !== null)
    .map((d) => toDayNumber(d));
  if (ahead.length === 0) return null;
  const last = new Date(Math.max(...ahead) * 86_400_000);
  const to = Date.UTC(last.getUTCFullYear(), last.getUTCMonth() + 1, 1) / 86_400_000;
  return to > from ? { from, to } : null;
}

/** Percent along the axis, held inside it (a date already passed sits at today). */
const along = (axis: { from: number; to: number }, date: string) => Math.min(100, Math.max(0, ((toDayNumber(date) - axis.from) / (axis.to - axis.from)) * 100));

function Shape({ standing, size = 12 }: { standing: Standing; size?: number }) {
  const status = STANDING[standing].shape;
  return (
    <svg aria-hidden width={size} height={size} viewBox="0 0 12 12" className="inline-block shrink-0" data-shape={status ? STATUS_LOOK[status].shape : "dash"}>
      {status ? <StatusShape status={status} cx={6} cy={6} r={5} /> : <rect x={1} y={5} width={10} height={2} fill="currentColor" />}
    </svg>
  );
}

/** Month lines behind a row's bars, and the labels under the last row. */
function MonthGrid({ ticks, axis }: { ticks: number[]; axis: { from: number; to: number } }) {
  return (
    <>
      {ticks.map((t) => (
        <span key={t} className="absolute inset-y-0 w-px bg-rule" style={{ left: `${((t - axis.from) / (axis.to - axis.from)) * 100}%` }} />
      ))}
    </>
  );
}

function Bars({ block, axis, ticks }: { block: ReadinessBlock; axis: { from: number; to: number }; ticks: number[] }) {
  const standing = standingOf(block);
  const planned = block.baselineReadyDate ? along(axis, block.baselineReadyDate) : null;
  const forecast = block.forecastReadyDate ? along(axis, block.forecastReadyDate) : null;
  return (
    <div aria-hidden className="relative mt-1.5 h-[22px] border-l border-ink" data-testid="readiness-bars">
      <MonthGrid ticks={ticks} axis={axis} />
      {standing === "ready" ? (
        <span className="absolute left-1 top-[5px] inline-flex items-center gap-1.5 text-xs font-medium">
          <Shape standing="ready" />
        </span>
      ) : (
        <>
          {planned !== null ? <span className="absolute left-0 top-[2px] h-[7px] border border-ink bg-sheet" style={{ width: `${planned}%` }} data-testid="bar-planned" /> : null}
          {forecast !== null ? <span className="absolute left-0 top-[12px] h-[7px] bg-ink" style={{ width: `${forecast}%` }} data-testid="bar-forecast" /> : null}
          {forecast !== null ? (
            <span className="absolute top-[5px] -translate-x-1/2" style={{ left: `${forecast}%` }}>
              <Shape standing={standing} />
            </span>
          ) : null}
        </>
      )}
    </div>
  );
}

/** Labels of the month ticks; the last ones hug the right edge so they never spill out. */
function AxisLabels({ ticks, axis, today }: { ticks: number[]; axis: { from: number; to: number }; today: string }) {
  const at = (t: number) => ((t - axis.from) / (axis.to - axis.from)) * 100;
  return (
    <div aria-hidden className="relative mt-1 h-4 text-[11px] leading-4 text-ink-soft">
      <span className="absolute left-0 font-medium text-ink">Today</span>
      {ticks.map((t) => (
          <span key={t} className={`absolute whitespace-nowrap ${at(t) > 88 ? "-translate-x-full" : "-translate-x-1/2"}`} style={{ left: `${at(t)}%` }}>
            {tickWord(t)}
          </span>
        ))}
      <span className="sr-only">{today}</span>
    </div>
  );
}

/** The drawing itself, from the blocks and today's date: what the client tests render. */
export function ReadinessBars({ blocks, today }: { blocks: ReadinessBlock[]; today: string }) {
  const axis = axisOf(blocks, today);
  // A month too near today would print over "Today": it is left out, line and label alike.
  const ticks = axis ? firstOfMonthTicks(axis.from, axis.to, 6).filter((t) => (t - axis.from) / (axis.to - axis.from) >= 0.14) : [];
  return (
    <div>
      <ol className="flex flex-col gap-3">
        {blocks.map((b) => {
          const standing = standingOf(b);
          const missing = b.readyForService ? null : missingInWords(b.missing);
          return (
            <li key={b.id} data-testid="readiness-row" data-block-id={b.id} data-standing={standing}>
              <div className="flex flex-wrap items-baseline justify-between gap-x-3">
                <h3 className="font-semibold">{b.name}</h3>
                <span className="inline-flex items-center gap-1.5 text-sm font-medium" data-testid="readiness-standing">
                  <Shape standing={standing} />
                  {STANDING[standing].word}
                </span>
              </div>
              {axis ? <Bars block={b} axis={axis} ticks={ticks} /> : null}
              <p className="mt-1 text-sm" data-testid="readiness-words">
                {readinessInWords(b)}
              </p>
              {missing ? (
                <p className="text-sm text-ink-soft" data-testid="readiness-missing">
                  {missing}
                </p>
              ) : null}
            </li>
          );
        })}
      </ol>
      {axis ? <AxisLabels ticks={ticks} axis={axis} today={today} /> : null}
    </div>
  );
}

/** Outline for the plan, solid for the forecast: the key to the bars, drawn as they are. */
function BarKey() {
  return (
    <ul aria-hidden className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft">
      <li className="inline-flex items-center gap-1.5">
        <span className="inline-block h-[7px] w-5 border border-ink bg-sheet" />
        Planned
      </li>
      <li className="inline-flex items-center gap-1.5">
        <span className="inline-block h-[7px] w-5 bg-ink" />
        Forecast
      </li>
    </ul>
  );
}

/**
 * The panel a page shows: the blocks the page's readers may see, as the facility answer gives
 * them. `publicOnly` keeps a public page to the public blocks whoever reads it (as the public
 * facility page does). Space is held while the answer comes so the page below does not jump;
 * without an answer the panel steps aside and the page reads on.
 */
export function ReadinessAtAGlance({ slug, publicOnly = false, detailsHref, className = "" }: { slug: string; publicOnly?: boolean; detailsHref?: string; className?: string }) {
  const facility = useQuery(facilityReadQueryOptions(slug));
  if (facility.isError) return null;
  const blocks = facility.data ? facility.data.blocks.filter((b) => !publicOnly || b.audience === "public") : null;
  if (blocks && blocks.length === 0) return null;
  return (
    <section aria-labelledby="readiness-glance" className={`border border-rule bg-sheet p-4 ${blocks ? "" : "min-h-72"} ${className}`} data-testid="readiness-glance">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h2 id="readiness-glance" className="font-semibold">
          When each block is ready for service
        </h2>
        <BarKey />
      </div>
      {blocks && facility.data ? (
        <div className="mt-3">
          <ReadinessBars blocks={blocks} today={facility.data.at} />
        </div>
      ) : (
        <p className="mt-3 text-sm text-ink-soft">Reading each block's dates…</p>
      )}
      {detailsHref ? (
        <p className="mt-3 text-sm">
          <Link to={detailsHref} className="font-medium underline underline-offset-4">
            Capacity, cooling and plant of each block →
          </Link>
        </p>
      ) : null}
    </section>
  );
}
