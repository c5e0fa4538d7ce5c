import { zodResolver } from "@hookform/resolvers/zod";
import { useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { toast } from "sonner";
import type { z } from "zod";
import { UNIT_STAGES, UnitStageInputSchema, type FacilityAnswer, type SystemAnswer, type UnitAnswer, type UnitStage, type UnitStageInput } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { WorkingCalendar } from "#shared/domain/calendar.ts";
import { Button } from "../../../components/ui/button.tsx";
import { FieldError } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { applyApiError } from "../../../lib/format.ts";
import { conflictCurrent, useSetUnitStage } from "../api.ts";
import { previewStage } from "../preview.ts";
import { goesBackwards, KIND_WORD, nextStage, STAGE_MEANING, STAGE_SHORT, stageWords } from "../words.ts";
import { StagePreviewPanel } from "./stage-preview.tsx";
import { UnitShape } from "./unit-shapes.tsx";

const big = "min-h-12 px-3 text-base";

/**
 * The note rule, said before the server says it: a unit that goes back a stage needs a
 * note (what failed, what was found). Null when the change may be sent.
 */
export function stageNoteError(from: UnitStage, to: UnitStage, note: string | undefined): string | null {
  return goesBackwards(from, to) && (note ?? "").trim() === "" ? `is required when a unit goes back (${STAGE_SHORT[from]} → ${STAGE_SHORT[to]}): say what was found` : null;
}

function stageSchemaFor(from: UnitStage) {
  return UnitStageInputSchema.superRefine((v, ctx) => {
    const error = stageNoteError(from, v.stage, v.note);
    if (error) ctx.addIssue({ code: "custom", path: ["note"], message: error });
  });
}

type Values = z.input<typeof UnitStageInputSchema>;

export interface UnitStageFormProps {
  slug: string;
  unit: UnitAnswer;
  system: SystemAnswer;
  facility: FacilityAnswer;
  milestones: readonly Milestone[];
  calendar: WorkingCalendar;
  /** "3 of 21", shown over the unit's name in the walk. */
  position?: string;
  /** Whether saving moves on to another unit ("Save L4 and next"). */
  thenNext?: boolean;
  onSaved: () => void;
}

/**
 * A unit's stage in two taps: tap the stage (the next one is marked), then save. Going back
 * needs a note, and the form says so as soon as a stage behind the current one is picked.
 * Before saving, the system's label and its blocks' readiness are shown as they would be.
 */
export function UnitStageForm({ slug, unit, system, facility, milestones, calendar, position, thenNext = false, onSaved }: UnitStageFormProps) {
  const setStage = useSetUnitStage(slug);
  const [conflict, setConflict] = useState<UnitAnswer | null>(null);
  const schema = useMemo(() => stageSchemaFor(unit.stage), [unit.stage]);
  const form = useForm<Values, unknown, UnitStageInput>({ resolver: zodResolver(schema), defaultValues: { stage: unit.stage, on: facility.at, note: "", version: unit.version } });
  const stage = useWatch({ control: form.control, name: "stage" }) ?? unit.stage;
  const changed = stage !== unit.stage;
  const backwards = goesBackwards(unit.stage, stage);
  const next = nextStage(unit.stage);
  const preview = useMemo(() => (changed ? previewStage(facility, milestones, calendar, unit.id, stage) : null), [changed, facility, milestones, calendar, unit.id, stage]);
  const errors = form.formState.errors;
  const noteId = `unit-note-${unit.id}`;

  const send = async (v: UnitStageInput, version: number) => {
    if (v.stage === unit.stage) {
      onSaved();
      return;
    }
    const input: UnitStageInput = { stage: v.stage, version, ...(v.on ? { on: v.on } : {}), ...(v.note && v.note.trim() !== "" ? { note: v.note.trim() } : {}) };
    try {
      await setStage.mutateAsync({ id: unit.id, input });
      setConflict(null);
      toast.success(`${unit.label} now ${STAGE_SHORT[v.stage]}`);
      onSaved();
    } catch (e) {
      const current = conflictCurrent<UnitAnswer>(e);
      if (current) setConflict(current);
      else applyApiError(e, form.setError, "note");
    }
  };
  const onSubmit = form.handleSubmit((v) => send(v, unit.version));
  const pick = (s: UnitStage) => form.setValue("stage", s, { shouldDirty: true, shouldValidate: form.formState.isSubmitted });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label={`Stage of ${unit.label}`}>
      <header className="border-b-2 border-ink pb-3">
        <p className="label-caps">
          {position ? `${position} · ` : ""}
          {system.name} · {KIND_WORD[system.kind]}
        </p>
        <h2 className="text-2xl font-semibold leading-tight">{unit.label}</h2>
        {unit.tag ? <p className="text-sm text-ink-soft">Tag {unit.tag}</p> : null}
        <p className="mt-2 flex items-center gap-2 text-sm">
          <UnitShape stage={unit.stage} available={unit.available} />
          <span>
            Now <span className="font-semibold">{STAGE_SHORT[unit.stage]}</span>
            {unit.stage.startsWith("L") ? `, ${STAGE_MEANING[unit.stage]}` : ""}
            {unit.available ? "; carries load" : ""}
          </span>
        </p>
      </header>

      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-semibold">Set the stage</legend>
        <div className="grid grid-cols-4 gap-2">
          {UNIT_STAGES.map((s) => {
            const chosen = s === stage;
            const isNext = s === next;
            return (
              <button
                key={s}
                type="button"
                aria-pressed={chosen}
                aria-label={`${stageWords(s)}${s === unit.stage ? " (now)" : isNext ? " (next)" : ""}`}
                onClick={() => pick(s)}
                className={`flex min-h-14 flex-col items-center justify-center gap-0.5 rounded-sm border px-1 py-1 text-sm ${chosen ? "border-2 border-accent bg-accent-wash font-semibold" : isNext ? "border-2 border-ink bg-sheet" : "border-rule-strong bg-sheet"}`}
              >
                <UnitShape stage={s} available={false} size={18} />
                <span>{STAGE_SHORT[s]}</span>
                {s === unit.stage ? <span className="text-[0.65rem] text-ink-soft">now</span> : isNext ? <span className="text-[0.65rem] font-semibold">next</span> : null}
              </button>
            );
          })}
        </div>
        {errors.stage ? <FieldError id={`unit-stage-${unit.id}-error`} error={errors.stage.message} /> : null}
      </fieldset>

      {backwards ? (
        <Notice tone="caution" title="This takes the unit back a stage">
          Going from {STAGE_SHORT[unit.stage]} back to {STAGE_SHORT[stage]} needs a note saying why.
        </Notice>
      ) : null}

      <div className="flex flex-col gap-1">
        <label htmlFor={noteId} className="font-semibold">
          Note from the walk {backwards ? "(required)" : "(optional)"}
        </label>
        <textarea
          id={noteId}
          rows={2}
          aria-invalid={errors.note ? true : undefined}
          aria-describedby={errors.note ? `${noteId}-error` : undefined}
          aria-required={backwards || undefined}
          className="w-full rounded-sm border border-rule-strong bg-sheet px-3 py-2 text-base aria-[invalid=true]:border-bad"
          {...form.register("note")}
        />
        <FieldError id={`${noteId}-error`} error={errors.note?.message} />
      </div>

      <div className="flex flex-col gap-1">
        <DateField id={`unit-on-${unit.id}`} label="Day on site" className="min-h-12 text-base" error={errors.on?.message} {...form.register("on", { setValueAs: (v: string) => (v === "" ? undefined : v) })} />
      </div>

      {preview ? <StagePreviewPanel preview={preview} /> : <p className="text-sm text-ink-soft">Tap a stage to see what it does before saving.</p>}

      {conflict ? (
        <Notice tone="caution" title="Someone else changed this unit while you were on site">
          It is now at {STAGE_SHORT[conflict.stage]}.
          <span className="mt-2 flex flex-wrap gap-2">
            <Button variant="primary" size="sm" onClick={() => void form.handleSubmit((v) => send(v, conflict.version))()}>
              Reapply my change
            </Button>
            <Button
              size="sm"
              onClick={() => {
                setConflict(null);
                onSaved();
              }}
            >
              Keep theirs and go on
            </Button>
          </span>
        </Notice>
      ) : null}

      <Button type="submit" variant="primary" className={`${big} w-full text-lg`} busy={setStage.isPending} disabled={!changed && !thenNext}>
        {changed ? `Save ${STAGE_SHORT[stage]}${thenNext ? " and next" : ""}` : thenNext ? "Next" : "No change to save"}
      </Button>
    </form>
  );
}
