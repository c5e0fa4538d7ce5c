import { useState } from "react";
import type { Milestone } from "#shared/schemas/programme.ts";
import { Notice, Sheet, Spinner } from "../../../components/ui/sheet.tsx";
import { StatusKey } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import { useHealth, useMilestones, useMoves } from "../api.ts";
import { addMonths } from "../dates.ts";
import { HealthFigures } from "./health-figures.tsx";
import { LazyProgrammeCharts } from "./lazy-charts.tsx";
import { MilestoneHistoryDialog } from "./milestone-history.tsx";
import { MilestoneTable } from "./milestone-table.tsx";
import { MovesList } from "./moves-list.tsx";
import { WholeProgrammeNote } from "./whole-programme-note.tsx";

function Moves({ slug, at }: { slug: string; at: string }) {
  const range = { from: addMonths(at, -1), to: at };
  const moves = useMoves(slug, range);
  if (moves.isPending) return <Spinner label="Reading what moved" />;
  if (moves.isError) return <Notice tone="error">{moves.error.message}</Notice>;
  return <MovesList moves={moves.data} {...range} />;
}

/**
 * The investor room's view of one programme: health figures explained, the three
 * charts, what moved in the last month, and the milestones (read-only). The figures
 * cover the whole programme; the lists hold what an investor may see.
 */
export function InvestorProgramme({ slug, currency }: { slug: string; currency?: string }) {
  const health = useHealth(slug);
  const milestones = useMilestones(slug);
  const [open, setOpen] = useState<Milestone | null>(null);
  if (health.isPending || milestones.isPending) return <Spinner label="Computing programme health" />;
  if (health.isError) return <Notice tone="error">{health.error.message}</Notice>;
  if (milestones.isError) return <Notice tone="error">{milestones.error.message}</Notice>;
  const h = health.data;
  return (
    <div className="flex flex-col gap-6">
      <Sheet label={`Status at ${formatDate(h.at)} · times in ${h.timeZone.replace("_", " ")}`} title="Programme health">
        <div className="flex flex-col gap-3">
          <WholeProgrammeNote />
          <HealthFigures health={h} currency={currency} />
        </div>
      </Sheet>
      <Sheet label="Charts" title="How the programme is going">
        <LazyProgrammeCharts slug={slug} milestones={milestones.data} health={h} />
      </Sheet>
      <Sheet label="Since last month" title="What moved">
        <Moves slug={slug} at={h.at} />
      </Sheet>
      <Sheet label="Programme" title="Milestones">
        <div className="flex flex-col gap-3">
          <StatusKey />
          <MilestoneTable milestones={milestones.data} caption="Milestones of the programme" onOpen={setOpen} />
        </div>
      </Sheet>
      <MilestoneHistoryDialog milestone={open} timeZone={h.timeZone} onClose={() => setOpen(null)} />
    </div>
  );
}
