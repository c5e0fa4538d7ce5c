import { useId, useState } from "react";
import { toast } from "sonner";
import type { MediaVocabulary } from "#shared/schemas/media.ts";
import type { System } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { SYSTEM_WORD } from "../../../lib/format.ts";
import { useBulkTag } from "../api.ts";

/** Tags for every selected photo at once: an area, a system, a milestone. */
export function BulkTagBar({ slug, ids, vocabulary, onDone, onClear }: { slug: string; ids: number[]; vocabulary: MediaVocabulary; onDone: () => void; onClear: () => void }) {
  const [area, setArea] = useState("");
  const [system, setSystem] = useState<System | "">("");
  const [milestone, setMilestone] = useState("");
  const bulk = useBulkTag(slug);
  const areaId = useId();
  const nothing = area.trim() === "" && system === "" && milestone === "";
  const apply = () =>
    bulk.mutate(
      {
        ids,
        add: {
          ...(area.trim() ? { areas: [area.trim()] } : {}),
          ...(system ? { systems: [system] } : {}),
          ...(milestone ? { milestones: [Number(milestone)] } : {}),
        },
      },
      {
        onSuccess: (r) => {
          toast.success(`Tagged ${r.updated} photo${r.updated === 1 ? "" : "s"}${system === "security" ? "; they wait for a lead's review" : ""}`);
          setArea("");
          setSystem("");
          setMilestone("");
          onDone();
        },
      },
    );
  return (
    <section aria-label="Tag the selected photos" className="flex flex-col gap-3 border-2 border-ink bg-sheet p-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <p className="font-semibold" aria-live="polite">
          {ids.length} selected
        </p>
        <Button size="sm" variant="ghost" onClick={onClear}>
          Clear selection
        </Button>
      </div>
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-[1fr_1fr_1fr_auto] sm:items-end">
        <div className="flex flex-col gap-1">
          <label htmlFor={areaId} className="text-sm font-medium">
            Area to add
          </label>
          <input id={areaId} list={`${areaId}-list`} value={area} onChange={(e) => setArea(e.target.value)} className="w-full rounded-sm border border-rule-strong bg-sheet px-3 py-2" placeholder="e.g. Hall 2A" maxLength={100} />
          <datalist id={`${areaId}-list`}>
            {vocabulary.areas.map((a) => (
              <option key={a} value={a} />
            ))}
          </datalist>
        </div>
        <SelectField label="System to add" value={system} onChange={(e) => setSystem(e.target.value as System | "")} options={[{ value: "", label: "None" }, ...vocabulary.systems.map((s) => ({ value: s, label: SYSTEM_WORD[s] }))]} />
        <SelectField label="Milestone to add" value={milestone} onChange={(e) => setMilestone(e.target.value)} options={[{ value: "", label: "None" }, ...vocabulary.milestones.map((m) => ({ value: String(m.id), label: m.name }))]} />
        <Button variant="primary" onClick={apply} disabled={nothing} busy={bulk.isPending}>
          Add tags
        </Button>
      </div>
    </section>
  );
}
