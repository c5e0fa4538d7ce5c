import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { toast } from "sonner";
import { MilestonePatchInputSchema, type Milestone, type MilestonePatchInput } from "#shared/schemas/programme.ts";
import type { ProgrammeSettings } from "#shared/domain/programme-health.ts";
import type { SitePlan } from "#shared/schemas/site-plan.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { SitePlanDrawing } from "../../../components/ui/site-plan-drawing.tsx";
import { WalkSteps } from "../../../components/ui/walk-frame.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { applyFieldErrors, formatDate, SYSTEM_WORD } from "../../../lib/format.ts";
import { conflictCurrent, usePatchMilestone } from "../api.ts";
import { addWeeks } from "../dates.ts";
import { patchChangesSomething, patchOf, previewDrafts, type MilestoneDraft } from "../preview.ts";
import { signedDays } from "../words.ts";
import { HealthPreview } from "./health-preview.tsx";

const big = "min-h-12 px-4 text-base";

function StepForm({ slug, m, milestones, settings, at, onSaved, position }: { slug: string; m: Milestone; milestones: Milestone[]; settings: ProgrammeSettings; at: string; onSaved: () => void; position: string }) {
  const patch = usePatchMilestone(slug);
  const [conflict, setConflict] = useState<Milestone | null>(null);
  const form = useForm({
    resolver: zodResolver(MilestonePatchInputSchema),
    defaultValues: { version: m.version, percentComplete: m.percentComplete, forecastFinish: m.forecastFinish ?? m.baselineFinish, actualFinish: m.actualFinish, note: "" },
  });
  const values = useWatch({ control: form.control });
  const draft: MilestoneDraft = {
    percentComplete: values.percentComplete,
    forecastFinish: values.forecastFinish ?? null,
    actualFinish: values.actualFinish ?? null,
  };
  const changed = patchChangesSomething(patchOf(m, draft));
  const preview = useMemo(() => previewDrafts(milestones, changed ? { [m.id]: draft } : {}, settings, at), [milestones, m.id, changed, draft.percentComplete, draft.forecastFinish, draft.actualFinish, settings, at]);
  const percent = Number(values.percentComplete ?? 0);
  const finished = values.actualFinish !== null && values.actualFinish !== undefined;

  const send = async (v: MilestonePatchInput, base: Milestone) => {
    const body = patchOf(base, { percentComplete: v.percentComplete, forecastFinish: v.forecastFinish ?? null, actualFinish: v.actualFinish ?? null }, v.note);
    if (!patchChangesSomething(body) && !body.note) {
      onSaved();
      return;
    }
    try {
      await patch.mutateAsync({ id: m.id, patch: body });
      setConflict(null);
      toast.success(`${m.name} saved`);
      onSaved();
    } catch (e) {
      const current = conflictCurrent(e);
      if (current) setConflict(current);
      else if (e instanceof ApiError) applyFieldErrors(Object.keys(e.fields).length ? e.fields : { note: e.message }, form.setError);
    }
  };
  const onSubmit = form.handleSubmit((v) => send(v, m));
  const setPercent = (p: number) => form.setValue("percentComplete", Math.max(0, Math.min(100, Math.round(p))), { shouldDirty: true, shouldValidate: true });
  const forecast = values.forecastFinish ?? m.baselineFinish;
  const errors = form.formState.errors;

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5" aria-label={`Update ${m.name}`}>
      <header className="border-b-2 border-ink pb-3">
        <p className="label-caps">
          {position} · {m.phase}
        </p>
        <h2 className="text-2xl font-semibold leading-tight">{m.name}</h2>
        <p className="text-sm text-ink-soft">{[m.area, SYSTEM_WORD[m.system]].filter(Boolean).join(" · ")}</p>
        <p className="mt-2 flex flex-wrap items-center gap-x-3 text-sm">
          <StatusMark status={m.status} />
          <span className="tabular">
            Baseline {formatDate(m.baselineFinish)} · slip {signedDays(m.slipDays)}
          </span>
        </p>
      </header>

      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-semibold">Percent complete</legend>
        <p className="tabular text-4xl font-semibold" aria-live="polite">
          {Number.isFinite(percent) ? percent : 0}%
        </p>
        <label className="sr-only" htmlFor={`walk-percent-${m.id}`}>
          Percent complete
        </label>
        <input id={`walk-percent-${m.id}`} type="range" min={0} max={100} step={5} className="h-10 w-full" disabled={finished} {...form.register("percentComplete", { valueAsNumber: true })} />
        <div className="grid grid-cols-4 gap-2">
          {[-10, -5, 5, 10].map((d) => (
            <Button key={d} className={big} disabled={finished} onClick={() => setPercent(percent + d)} aria-label={`${d > 0 ? "Add" : "Take off"} ${Math.abs(d)} percent`}>
              {d > 0 ? `+${d}` : `−${Math.abs(d)}`}
            </Button>
          ))}
        </div>
        {errors.percentComplete ? <p className="text-sm text-bad">▲ {errors.percentComplete.message}</p> : null}
      </fieldset>

      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-semibold">Forecast finish</legend>
        <DateField
          id={`walk-forecast-${m.id}`}
          label="Forecast finish"
          labelHidden
          className="min-h-12 text-lg"
          disabled={finished}
          {...form.register("forecastFinish", { setValueAs: (v: string | null) => (v === "" ? null : v) })}
        />
        <div className="grid grid-cols-2 gap-2">
          <Button className={big} disabled={finished} onClick={() => form.setValue("forecastFinish", addWeeks(forecast, -1), { shouldDirty: true })}>
            − 1 week
          </Button>
          <Button className={big} disabled={finished} onClick={() => form.setValue("forecastFinish", addWeeks(forecast, 1), { shouldDirty: true })}>
            + 1 week
          </Button>
        </div>
        {errors.forecastFinish ? <p className="text-sm text-bad">▲ {errors.forecastFinish.message}</p> : null}
      </fieldset>

      <Button
        className={big}
        aria-pressed={finished}
        onClick={() => {
          if (finished) {
            form.setValue("actualFinish", m.actualFinish, { shouldDirty: true });
            form.setValue("percentComplete", m.percentComplete === 100 ? 95 : m.percentComplete, { shouldDirty: true });
          } else {
            form.setValue("actualFinish", at, { shouldDirty: true });
            form.setValue("percentComplete", 100, { shouldDirty: true });
          }
        }}
      >
        {finished ? "✓ Finished today (tap to undo)" : "Finished today"}
      </Button>
      {errors.actualFinish ? <p className="text-sm text-bad">▲ {errors.actualFinish.message}</p> : null}

      <div className="flex flex-col gap-1">
        <label htmlFor={`walk-note-${m.id}`} className="font-semibold">
          Note from the walk (optional)
        </label>
        <textarea id={`walk-note-${m.id}`} rows={2} className="w-full rounded-sm border border-rule-strong bg-sheet px-3 py-2 text-base" {...form.register("note")} />
        {errors.note ? <p className="text-sm text-bad">▲ {errors.note.message}</p> : null}
      </div>

      {changed ? <HealthPreview preview={preview} /> : <p className="text-sm text-ink-soft">No change yet: the figures stay as they are.</p>}

      {conflict ? (
        <Notice tone="caution" title="Someone else changed this milestone while you were on site">
          Now {conflict.percentComplete}% done, forecast {formatDate(conflict.forecastFinish)}
          {conflict.actualFinish ? `, finished ${formatDate(conflict.actualFinish)}` : ""}.
          <span className="mt-2 flex flex-wrap gap-2">
            <Button variant="primary" size="sm" onClick={() => void form.handleSubmit((v) => send(v, conflict))()}>
              Reapply my change
            </Button>
            <Button size="sm" onClick={() => { setConflict(null); onSaved(); }}>
              Keep theirs and go on
            </Button>
          </span>
        </Notice>
      ) : null}

      <Button type="submit" variant="primary" className={`${big} w-full text-lg`} busy={patch.isPending}>
        {changed ? "Save and next" : "Next"}
      </Button>
    </form>
  );
}

/**
 * The site walk: open milestones one at a time, with large controls for percent,
 * forecast and a note, for a lead with a phone in one hand.
 */
export function SiteWalk({ slug, milestones, settings, at, plan }: { slug: string; milestones: Milestone[]; settings: ProgrammeSettings; at: string; plan?: SitePlan }) {
  const [area, setArea] = useState("");
  const areas = useMemo(() => [...new Set(milestones.map((m) => m.area).filter(Boolean))].sort(), [milestones]);
  // The walk's order is fixed when it starts, so a milestone marked finished stays where it was.
  const [order, setOrder] = useState<number[] | null>(null);
  const [index, setIndex] = useState(0);
  useEffect(() => {
    setOrder(
      milestones
        .filter((m) => m.actualFinish === null && (area === "" || m.area === area))
        .sort((a, b) => (a.forecastFinish ?? a.baselineFinish).localeCompare(b.forecastFinish ?? b.baselineFinish) || a.id - b.id)
        .map((m) => m.id),
    );
    setIndex(0);
    // Only a new area restarts the walk; refreshed milestones keep it.
  }, [area, milestones.length === 0]);
  const ids = order ?? [];
  const current = milestones.find((m) => m.id === ids[index]);
  return (
    <div className="mx-auto flex w-full max-w-md flex-col gap-4">
      {/* Tapping an area of the site plan picks it, as the list below does (tapping it again walks every area). */}
      {plan && plan.areas.length > 0 ? <SitePlanDrawing plan={plan} title="Pick an area to walk through" selected={area || null} onPick={(a) => setArea((was) => (was.toLowerCase() === a.name.toLowerCase() ? "" : (areas.find((n) => n.toLowerCase() === a.name.toLowerCase()) ?? a.name)))} /> : null}
      <SelectField label="Walk through" value={area} onChange={(e) => setArea(e.target.value)} options={[{ value: "", label: "Every area" }, ...areas.map((a) => ({ value: a, label: a }))]} />
      {ids.length === 0 ? (
        <Notice title="Nothing open here">Every milestone in this part of the site is finished.</Notice>
      ) : index >= ids.length ? (
        <Notice title="Walk finished">
          You have been through all {ids.length} open milestones.{" "}
          <button type="button" className="underline underline-offset-4" onClick={() => setIndex(0)}>
            Start again
          </button>
        </Notice>
      ) : current ? (
        <StepForm key={`${current.id}`} slug={slug} m={current} milestones={milestones} settings={settings} at={at} position={`${index + 1} of ${ids.length}`} onSaved={() => setIndex((i) => i + 1)} />
      ) : null}
      <WalkSteps index={index} count={ids.length} setIndex={setIndex} />
    </div>
  );
}
