import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { useMemo } from "react";
import { useForm, useWatch } from "react-hook-form";
import { toast } from "sonner";
import { BaselineInputSchema, type Milestone } from "#shared/schemas/programme.ts";
import type { ProgrammeSettings } from "#shared/domain/programme-health.ts";
import { Button } from "../../../components/ui/button.tsx";
import { TextAreaField } from "../../../components/ui/field.tsx";
import { formatInstant } from "../../../lib/format.ts";
import { baselinesQueryOptions, useRebaseline } from "../api.ts";
import { previewDrafts, rebaselineDrafts } from "../preview.ts";
import { HealthPreview } from "./health-preview.tsx";
import { submitting } from "../../../lib/forms.ts";

/** The baseline versions, as the page's loader primed them. */
function Versions({ slug, timeZone }: { slug: string; timeZone: string }) {
  const baselines = useSuspenseQuery(baselinesQueryOptions(slug));
  if (baselines.data.length === 0) return <p className="text-sm text-ink-soft">No baseline has been recorded yet.</p>;
  return (
    <ol className="flex flex-col divide-y divide-rule text-sm" aria-label="Baseline versions, newest first">
      {[...baselines.data]
        .sort((a, b) => b.number - a.number)
        .map((b) => (
          <li key={b.number} className="py-2">
            <p>
              <span className="font-semibold">v{b.number}</span> · {formatInstant(b.at, timeZone)}
              {b.by ? ` · ${b.by}` : ""} · {b.milestoneCount} milestones
            </p>
            <p className="font-serif text-ink-soft">“{b.reason}”</p>
          </li>
        ))}
    </ol>
  );
}

/**
 * Re-baselining: the current plan becomes a new baseline version, the old one is kept,
 * and a reason is required. The preview shows what adopting the forecasts does to
 * slip and SPI before it is recorded.
 */
export function RebaselineForm({ slug, milestones, settings, at, timeZone, editable }: { slug: string; milestones: Milestone[]; settings: ProgrammeSettings; at: string; timeZone: string; editable: boolean }) {
  const rebaseline = useRebaseline(slug);
  const form = useForm({ resolver: zodResolver(BaselineInputSchema), defaultValues: { reason: "", adoptForecasts: true, overrides: [] } });
  const adopt = useWatch({ control: form.control, name: "adoptForecasts" });
  const preview = useMemo(() => (adopt ? previewDrafts(milestones, rebaselineDrafts(milestones), settings, at) : null), [adopt, milestones, settings, at]);
  const onSubmit = submitting(form, async (v) => {
    const r = await rebaseline.mutateAsync(v);
    toast.success(`Baseline v${r.number} recorded`);
    form.reset({ reason: "", adoptForecasts: true, overrides: [] });
  });
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      {editable ? (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-label="Re-baseline the programme">
          <TextAreaField
            label="Reason for re-baselining"
            rows={3}
            hint="Kept with the new baseline version and shown in its history, e.g. a change of scope agreed with the client."
            error={form.formState.errors.reason?.message}
            {...form.register("reason")}
          />
          <label className="flex items-start gap-2 text-sm">
            <input type="checkbox" className="mt-0.5 size-4" {...form.register("adoptForecasts")} />
            <span>Adopt each milestone's current forecast as its new baseline finish (otherwise the baseline is recorded as it stands)</span>
          </label>
          {preview ? <HealthPreview preview={preview} title="Effect of the new baseline" maxStatuses={4} /> : null}
          <div>
            <Button type="submit" busy={rebaseline.isPending}>
              Record a new baseline
            </Button>
          </div>
        </form>
      ) : (
        <p className="text-sm text-ink-soft">Only project leads and administrators can re-baseline the programme.</p>
      )}
      <div>
        <h3 className="mb-1 font-semibold">Baseline versions</h3>
        <Versions slug={slug} timeZone={timeZone} />
      </div>
    </div>
  );
}
