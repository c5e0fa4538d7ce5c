import { zodResolver } from "@hookform/resolvers/zod";
import { Controller, useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { riskBand, riskScore, validateLevels } from "#shared/domain/risks.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import { RiskCategorySchema, RiskCreateInputSchema, type RiskAnswer, type RiskCreateInput, type RiskScale } from "#shared/schemas/risks.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog, IdPicksField } from "../../../components/ui/form-dialog.tsx";
import { MoneyField } from "../../../components/ui/money-field.tsx";
import { formatDate } from "../../../lib/format.ts";
import { changedFields, numberOrNull, optionsOf, pick, saveForm } from "../../../lib/forms.ts";
import { RECORD_AUDIENCE_OPTIONS } from "../../../lib/record.tsx";
import { useCreateRisk, useDeleteRisk, usePatchRisk, type StaffMember } from "../api.ts";
import { CATEGORY_WORD, KIND_WORD } from "../words.ts";
import { BandMark } from "./marks.tsx";

type Values = z.input<typeof RiskCreateInputSchema>;

function valuesOf(r: RiskAnswer | null, ownerId: number): Values {
  if (!r) {
    return { kind: "risk", title: "", description: "", cause: "", effect: "", category: "programme", ownerId, likelihood: 3, impact: 3, costExposure: null, scheduleDays: null, linkedMilestones: [], linkedBlocks: [], linkedSystems: [], audience: "internal", impactNow: "", action: "", dueDate: null };
  }
  return {
    ...pick(r, ["kind", "title", "description", "cause", "effect", "category", "likelihood", "impact", "costExposure", "scheduleDays", "audience", "impactNow", "action", "dueDate"]),
    ownerId: r.owner.id,
    linkedMilestones: r.linkedMilestones.map((m) => m.id),
    linkedBlocks: r.linkedBlocks.map((b) => b.id),
    linkedSystems: r.linkedSystems.map((s) => s.id),
  };
}

/** The contract's schema with the project's own scale: a level beyond it is refused here first, as the server would. */
export function riskFormSchema(scale: RiskScale) {
  return RiskCreateInputSchema.superRefine((v, ctx) => {
    for (const p of validateLevels(v.likelihood, v.impact, scale)) ctx.addIssue({ code: "custom", path: [p.field], message: p.message });
  });
}

const levels = (n: number, words: string) => Array.from({ length: n }, (_, i) => ({ value: String(i + 1), label: `${i + 1}${i === 0 ? ` (least ${words})` : i === n - 1 ? ` (most ${words})` : ""}` }));

export interface RiskFormProps {
  slug: string;
  risk: RiskAnswer | null;
  scale: RiskScale;
  staff: readonly StaffMember[];
  milestones: readonly Milestone[];
  facility: FacilityAnswer | null;
  currency: string;
  meId: number;
  onClose: () => void;
}

/** Raising a risk or an issue (`risk` null) or editing one: levels on the project's scale, exposure, links, audience. */
export function RiskForm({ slug, risk, scale, staff, milestones, facility, currency, meId, onClose }: RiskFormProps) {
  const create = useCreateRisk(slug);
  const patch = usePatchRisk();
  const remove = useDeleteRisk();
  const before = valuesOf(risk, staff.some((s) => s.id === meId) ? meId : (staff[0]?.id ?? meId));
  const form = useForm<Values, unknown, RiskCreateInput>({ resolver: zodResolver(riskFormSchema(scale)), defaultValues: before });
  const { errors } = form.formState;
  const [kind, likelihood, impact, exposure] = useWatch({ control: form.control, name: ["kind", "likelihood", "impact", "costExposure"] });
  const score = riskScore(Number(likelihood), Number(impact));

  const onSubmit = form.handleSubmit(async (v) => {
    const { kind: _kind, ...fields } = v;
    const write = risk ? () => patch.mutateAsync({ id: risk.id, patch: changedFields(before, fields, risk.version) }) : () => create.mutateAsync(v);
    if (await saveForm(form.setError, write, `${v.title} saved`)) onClose();
  });
  const onDelete = risk
    ? async () => {
        if (await saveForm(form.setError, () => remove.mutateAsync({ id: risk.id }), `${risk.reference} deleted`)) onClose();
      }
    : undefined;

  const num = { valueAsNumber: true } as const;
  const exposureErrors = errors.costExposure as Record<string, { message?: string }> | undefined;
  return (
    <FormDialog title={risk ? `Edit ${risk.reference}` : kind === "issue" ? "Raise an issue" : "Raise a risk"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message} onDelete={onDelete} deleting={remove.isPending}>
      {risk ? null : <SelectField label="Kind" options={optionsOf(KIND_WORD)} hint="An issue is a problem that has already happened." error={errors.kind?.message} {...form.register("kind")} />}
      <TextField label="Title" error={errors.title?.message} {...form.register("title")} />
      <SelectField label="Category" options={optionsOf(CATEGORY_WORD, RiskCategorySchema.options)} error={errors.category?.message} {...form.register("category")} />
      <SelectField label="Owner" options={staff.map((s) => ({ value: String(s.id), label: s.name }))} error={errors.ownerId?.message} {...form.register("ownerId", num)} />
      <SelectField label={`Likelihood (1–${scale.likelihoodLevels})`} options={levels(scale.likelihoodLevels, "likely")} error={errors.likelihood?.message} {...form.register("likelihood", num)} />
      <SelectField label={`Impact (1–${scale.impactLevels})`} options={levels(scale.impactLevels, "severe")} error={errors.impact?.message} {...form.register("impact", num)} />
      <p className="self-end pb-2 text-sm" data-testid="score-preview">
        Score {Number.isFinite(score) ? <BandMark band={riskBand(score, scale)} score={score} /> : "—"}
      </p>
      <SelectField label="Audience" options={RECORD_AUDIENCE_OPTIONS} hint="Investors see only what is for them; nothing here is public." error={errors.audience?.message} {...form.register("audience")} />
      <div className="sm:col-span-2">
        <TextAreaField label="Description" rows={2} error={errors.description?.message} {...form.register("description")} />
      </div>
      <TextAreaField label="Cause" rows={2} error={errors.cause?.message} {...form.register("cause")} />
      <TextAreaField label="Effect" rows={2} error={errors.effect?.message} {...form.register("effect")} />
      {kind === "issue" ? (
        <>
          <TextAreaField label="Impact now" rows={2} error={errors.impactNow?.message} {...form.register("impactNow")} />
          <TextAreaField label="Action" rows={2} error={errors.action?.message} {...form.register("action")} />
          <DateField label="Action due" error={errors.dueDate?.message} {...form.register("dueDate", { setValueAs: (v: string) => (v === "" ? null : v) })} />
        </>
      ) : null}
      <TextField label="Schedule exposure (working days)" type="number" inputMode="numeric" min={0} step={1} hint="Leave empty when it would not move the programme." error={errors.scheduleDays?.message} {...form.register("scheduleDays", { setValueAs: numberOrNull })} />
      <fieldset className="flex flex-col gap-2 border border-rule p-3 sm:col-span-2">
        <legend className="px-1 text-sm font-medium">Cost exposure</legend>
        <label className="inline-flex items-center gap-2 text-sm">
          <input
            type="checkbox"
            checked={exposure !== null && exposure !== undefined}
            onChange={(e) => form.setValue("costExposure", e.target.checked ? { min: 0, mostLikely: 0, max: 0, probability: 0.5 } : null, { shouldDirty: true })}
          />
          This risk has a cost: a three-point estimate and the chance it happens
        </label>
        {exposure ? (
          <div className="grid gap-3 sm:grid-cols-4">
            {(["min", "mostLikely", "max"] as const).map((k) => (
              <Controller
                key={k}
                control={form.control}
                name={`costExposure.${k}`}
                render={({ field }) => <MoneyField label={{ min: "Least", mostLikely: "Most likely", max: "Most" }[k]} currency={currency} value={field.value ?? null} onChange={(v) => field.onChange(v ?? Number.NaN)} error={exposureErrors?.[k]?.message} />}
              />
            ))}
            <TextField
              label="Chance (%)"
              type="number"
              inputMode="numeric"
              min={0}
              max={100}
              step={1}
              defaultValue={Math.round((exposure.probability ?? 0) * 100)}
              error={exposureErrors?.probability?.message}
              onChange={(e) => form.setValue("costExposure.probability", e.target.valueAsNumber / 100, { shouldDirty: true })}
            />
          </div>
        ) : null}
      </fieldset>
      <IdPicksField control={form.control} name="linkedMilestones" legend="Milestones it would move" options={milestones.map((m) => ({ id: m.id, label: m.name, hint: formatDate(m.forecastFinish ?? m.baselineFinish) }))} empty="The programme has no milestones yet." />
      <div className="flex flex-col gap-3">
        <IdPicksField control={form.control} name="linkedBlocks" legend="Capacity blocks" options={(facility?.blocks ?? []).map((b) => ({ id: b.id, label: b.name }))} empty="No capacity block yet." />
        <IdPicksField control={form.control} name="linkedSystems" legend="Plant systems" options={(facility?.systems ?? []).map((s) => ({ id: s.id, label: s.name }))} empty="No plant system yet." />
      </div>
    </FormDialog>
  );
}
