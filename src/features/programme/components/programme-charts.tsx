import { useId, useRef, useState, type KeyboardEvent } from "react";
import type { Milestone, ProgrammeHealthResponse } from "#shared/schemas/programme.ts";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { useCurve } from "../api.ts";
import { SCurveChart } from "./chart-s-curve.tsx";
import { SlipChart } from "./chart-slip.tsx";
import { TimelineChart } from "./chart-timeline.tsx";

const TABS = [
  { id: "curve", label: "Progress curve" },
  { id: "timeline", label: "Baseline and forecast" },
  { id: "slip", label: "Slip" },
] as const;
type TabId = (typeof TABS)[number]["id"];

/** The date range of the S-curve: from the week progress was planned to begin to the later of baseline and forecast completion. */
export function curveRange(health: Pick<ProgrammeHealthResponse, "earnedSchedule" | "baselineCompletion" | "forecastCompletion" | "at">): { from: string; to: string } {
  const from = health.earnedSchedule.start ?? health.at;
  const ends = [health.baselineCompletion, health.forecastCompletion, health.at].filter((d): d is string => Boolean(d)).sort();
  return { from, to: ends[ends.length - 1] ?? health.at };
}

function CurvePanel({ slug, health }: { slug: string; health: ProgrammeHealthResponse }) {
  const curve = useCurve(slug, curveRange(health));
  if (curve.isPending) return <Spinner label="Drawing the curve" />;
  if (curve.isError) return <Notice tone="error">{curve.error.message}</Notice>;
  return <SCurveChart curve={curve.data} />;
}

/**
 * The three programme charts behind tabs (one at a time keeps a phone screen
 * readable): the S-curve, baseline against forecast, and slip by milestone.
 */
export function ProgrammeCharts({ slug, milestones, health, initial = "curve" }: { slug: string; milestones: Milestone[]; health: ProgrammeHealthResponse; initial?: TabId }) {
  const [tab, setTab] = useState<TabId>(initial);
  const base = useId();
  const refs = useRef<Record<string, HTMLButtonElement | null>>({});
  const onKey = (e: KeyboardEvent) => {
    const i = TABS.findIndex((t) => t.id === tab);
    const next = e.key === "ArrowRight" ? (i + 1) % TABS.length : e.key === "ArrowLeft" ? (i + TABS.length - 1) % TABS.length : e.key === "Home" ? 0 : e.key === "End" ? TABS.length - 1 : -1;
    if (next < 0) return;
    e.preventDefault();
    const id = TABS[next]!.id;
    setTab(id);
    refs.current[id]?.focus();
  };
  return (
    <div className="flex flex-col gap-4">
      <div role="tablist" aria-label="Programme charts" className="flex flex-wrap gap-1 border-b border-rule" onKeyDown={onKey}>
        {TABS.map((t) => (
          <button
            key={t.id}
            ref={(el) => {
              refs.current[t.id] = el;
            }}
            type="button"
            role="tab"
            id={`${base}-${t.id}-tab`}
            aria-controls={`${base}-${t.id}-panel`}
            aria-selected={tab === t.id}
            tabIndex={tab === t.id ? 0 : -1}
            onClick={() => setTab(t.id)}
            className={`-mb-px border-b-4 px-3 py-2 text-sm ${tab === t.id ? "border-ink font-semibold text-ink" : "border-transparent text-ink-soft hover:text-ink"}`}
          >
            {t.label}
          </button>
        ))}
      </div>
      <div role="tabpanel" id={`${base}-${tab}-panel`} aria-labelledby={`${base}-${tab}-tab`} tabIndex={0}>
        {milestones.length === 0 ? (
          <p className="text-sm text-ink-soft">There are no milestones to chart yet.</p>
        ) : tab === "curve" ? (
          <CurvePanel slug={slug} health={health} />
        ) : tab === "timeline" ? (
          <TimelineChart milestones={milestones} at={health.at} />
        ) : (
          <SlipChart milestones={milestones} />
        )}
      </div>
    </div>
  );
}
