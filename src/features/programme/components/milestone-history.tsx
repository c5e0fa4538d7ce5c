import { useEffect, useRef, type ReactNode } from "react";
import type { Milestone, MilestoneEventRow } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { ChangeHistory } from "../../../components/ui/change-history.tsx";
import { Notice, Spinner } from "../../../components/ui/sheet.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate, SYSTEM_WORD } from "../../../lib/format.ts";
import { useMilestoneDrivers, useMilestoneEvents } from "../api.ts";
import { AUDIENCE_WORD, FIELD_WORD, signedDays } from "../words.ts";
import { MilestoneRemoval } from "./milestone-removal.tsx";

function valueOf(e: MilestoneEventRow, v: string | null): string {
  if (v === null || v === "") return "none";
  if (e.field.endsWith("_finish") || e.field === "planned_start") return formatDate(v);
  if (e.field === "percent_complete") return `${v}%`;
  if (e.field === "audience") return AUDIENCE_WORD[v as keyof typeof AUDIENCE_WORD] ?? v;
  if (e.field === "removed") return v === "true" ? "removed" : "in the programme";
  return v;
}

/** One of the milestone's figures: its name over its value. */
function Fact({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div>
      <dt className="label-caps">{term}</dt>
      <dd>{children}</dd>
    </div>
  );
}

function DrivingChain({ id }: { id: number }) {
  const drivers = useMilestoneDrivers(id);
  if (drivers.isPending) return <Spinner label="Tracing what drives it" />;
  if (drivers.isError) return <Notice tone="error">{drivers.error.message}</Notice>;
  const chain = drivers.data;
  if (chain.length <= 1) return <p className="text-sm text-ink-soft">Nothing before it in the programme sets this date: it depends on no other milestone.</p>;
  return (
    <ol className="flex flex-col gap-1 text-sm" aria-label="Driving chain">
      {chain.map((link, i) => (
        <li key={link.id} className="flex items-baseline gap-2">
          <span aria-hidden className="w-4 text-ink-faint">
            {i === 0 ? "▸" : "↑"}
          </span>
          <span className={i === 0 ? "font-semibold" : ""}>{link.name}</span>
          <span className="tabular text-ink-soft">{formatDate(link.finish)}</span>
          {i === 0 ? <span className="text-xs text-ink-faint">(this milestone)</span> : null}
        </li>
      ))}
    </ol>
  );
}

function History({ id, timeZone }: { id: number; timeZone: string }) {
  return (
    <ChangeHistory
      events={useMilestoneEvents(id)}
      fieldWord={FIELD_WORD}
      timeZone={timeZone}
      value={valueOf}
      aside={(e) => (e.baselineVersion ? <span className="ml-1 text-xs text-ink-faint">(baseline v{e.baselineVersion})</span> : null)}
      empty="No change has been recorded since the milestone was created."
    />
  );
}

/**
 * One milestone's record: its dates, what drives its forecast, and every recorded change;
 * with `removal` (leads and admins), removing it from the programme or restoring it.
 */
export function MilestoneHistoryDialog({
  milestone,
  timeZone,
  onClose,
  removal,
}: {
  milestone: Milestone | null;
  timeZone: string;
  onClose: () => void;
  removal?: { slug: string };
}) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (milestone && !d.open) d.showModal?.();
    if (!milestone && d.open) d.close();
  }, [milestone]);
  return (
    <dialog
      ref={ref}
      onClose={onClose}
      aria-labelledby="milestone-history-title"
      className="m-0 ml-auto h-full max-h-none w-full max-w-xl overflow-y-auto border-l-2 border-ink bg-sheet p-0 text-ink backdrop:bg-ink/30"
    >
      {milestone ? (
        <div className="flex flex-col gap-5 p-5">
          <header className="flex items-start justify-between gap-3 border-b-2 border-ink pb-3">
            <div>
              <p className="label-caps">
                {milestone.phase} · {[milestone.area, SYSTEM_WORD[milestone.system]].filter(Boolean).join(" · ")}
              </p>
              <h2 id="milestone-history-title" className="text-xl font-semibold">
                {milestone.name}
              </h2>
              <div className="mt-1">
                <StatusMark status={milestone.status} />
              </div>
            </div>
            <Button size="sm" onClick={() => ref.current?.close()}>
              Close
            </Button>
          </header>
          {milestone.description ? <p className="font-serif text-ink-soft">{milestone.description}</p> : null}
          <dl className="tabular grid grid-cols-2 gap-2 text-sm sm:grid-cols-3">
            <Fact term="Planned start">{formatDate(milestone.plannedStart)}</Fact>
            <Fact term="Baseline finish">{formatDate(milestone.baselineFinish)}</Fact>
            <Fact term="Forecast finish">{formatDate(milestone.forecastFinish)}</Fact>
            <Fact term="Actual finish">{formatDate(milestone.actualFinish)}</Fact>
            <Fact term="Slip">
              {signedDays(milestone.slipDays)} ({milestone.slipWorkingDays} working days)
            </Fact>
            <Fact term="Done · weight">
              {milestone.percentComplete}% · {milestone.weight}
            </Fact>
          </dl>
          <section>
            <h3 className="mb-2 font-semibold">What sets its forecast</h3>
            <DrivingChain id={milestone.id} />
          </section>
          <section>
            <h3 className="mb-1 font-semibold">History</h3>
            <History id={milestone.id} timeZone={timeZone} />
          </section>
          {removal ? <MilestoneRemoval key={milestone.id} slug={removal.slug} milestone={milestone} timeZone={timeZone} onDone={() => ref.current?.close()} /> : null}
        </div>
      ) : null}
    </dialog>
  );
}
