import { useMemo, useState } from "react";
import type { Milestone } from "#shared/schemas/programme.ts";
import { AudienceMark } from "../../../components/ui/audience-mark.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { TextField } from "../../../components/ui/field.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";

/** Chooses a milestone of the programme (GET /api/projects/:slug/milestones), with its status shown. */
export function MilestonePickerDialog({ open, milestones, onClose, onChoose, title = "Choose a milestone" }: { open: boolean; milestones: readonly Milestone[]; onClose: () => void; onChoose: (m: Milestone) => void; title?: string }) {
  const [q, setQ] = useState("");
  const shown = useMemo(() => {
    const needle = q.trim().toLowerCase();
    return milestones.filter((m) => !needle || `${m.name} ${m.area} ${m.phase}`.toLowerCase().includes(needle));
  }, [milestones, q]);
  return (
    <Dialog open={open} title={title} onClose={onClose} wide>
      <TextField label="Find a milestone" type="search" value={q} onChange={(e) => setQ(e.target.value)} placeholder="Name, area or phase" />
      <ul className="mt-3 divide-y divide-rule border-y border-rule">
        {shown.map((m) => (
          <li key={m.id}>
            <button type="button" onClick={() => onChoose(m)} className="flex w-full flex-col gap-0.5 px-2 py-2 text-left hover:bg-paper sm:flex-row sm:items-center sm:justify-between" data-testid="milestone-choice">
              <span className="min-w-0">
                <span className="block font-medium">{m.name}</span>
                <span className="block text-xs text-ink-soft">
                  {[m.phase, m.area].filter(Boolean).join(" · ")} · {m.actualFinish ? `finished ${formatDate(m.actualFinish)}` : `forecast ${formatDate(m.forecastFinish ?? m.baselineFinish)}`}
                </span>
              </span>
              <span className="flex items-center gap-2 text-sm">
                <AudienceMark audience={m.audience} hidePublic />
                <StatusMark status={m.status} />
              </span>
            </button>
          </li>
        ))}
        {shown.length === 0 ? <li className="py-4 text-center text-ink-soft">No milestone matches.</li> : null}
      </ul>
    </Dialog>
  );
}
