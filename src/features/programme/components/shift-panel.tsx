import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useMemo } from "react";
import { useForm, useWatch } from "react-hook-form";
import { toast } from "sonner";
import { ShiftInputSchema, type Milestone } from "#shared/schemas/programme.ts";
import type { ProgrammeSettings } from "#shared/domain/programme-health.ts";
import { Button } from "../../../components/ui/button.tsx";
import { TextField } from "../../../components/ui/field.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { applyFieldErrors } from "../../../lib/format.ts";
import { useShiftForecasts } from "../api.ts";
import { previewDrafts, shiftDrafts } from "../preview.ts";
import { HealthPreview } from "./health-preview.tsx";

/** Moves the forecasts of the selected open milestones by N working days of the project calendar, with a preview first. */
export function ShiftPanel({ slug, milestones, selected, settings, at, onDone }: { slug: string; milestones: Milestone[]; selected: number[]; settings: ProgrammeSettings; at: string; onDone: () => void }) {
  const shift = useShiftForecasts(slug);
  const form = useForm({ resolver: zodResolver(ShiftInputSchema), defaultValues: { ids: selected, workingDays: 5, note: "" } });
  useEffect(() => form.setValue("ids", selected), [form, selected]);
  const workingDays = useWatch({ control: form.control, name: "workingDays" });
  const preview = useMemo(() => {
    const n = Number(workingDays);
    if (!Number.isInteger(n) || n === 0) return null;
    return previewDrafts(milestones, shiftDrafts(milestones, selected, n, settings), settings, at);
  }, [milestones, selected, workingDays, settings, at]);
  const onSubmit = form.handleSubmit(async (v) => {
    try {
      const rows = await shift.mutateAsync({ ...v, ids: selected, note: v.note?.trim() ? v.note.trim() : undefined });
      toast.success(`${rows.length} forecast${rows.length === 1 ? "" : "s"} moved by ${v.workingDays} working days`);
      form.reset({ ids: [], workingDays: 5, note: "" });
      onDone();
    } catch (e) {
      if (e instanceof ApiError && Object.keys(e.fields).length) applyFieldErrors(e.fields, form.setError);
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3 border border-ink bg-sheet p-3" aria-label="Shift selected forecasts">
      <p className="font-semibold">
        Shift {selected.length} selected forecast{selected.length === 1 ? "" : "s"}
      </p>
      <div className="grid gap-3 sm:grid-cols-[10rem_1fr]">
        <TextField
          label="Working days (− earlier, + later)"
          type="number"
          step={1}
          inputMode="numeric"
          error={form.formState.errors.workingDays?.message ?? form.formState.errors.ids?.message}
          {...form.register("workingDays", { valueAsNumber: true })}
        />
        <TextField label="Reason, kept in each milestone's history (optional)" error={form.formState.errors.note?.message} {...form.register("note")} />
      </div>
      {preview ? <HealthPreview preview={preview} title="Effect of the shift, before it is made" /> : null}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" busy={shift.isPending} disabled={selected.length === 0}>
          Shift forecasts
        </Button>
        <Button onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
