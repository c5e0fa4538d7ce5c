import { zodResolver } from "@hookform/resolvers/zod";
import { Controller, useFieldArray, useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { DecisionCreateInputSchema, type DecisionAnswer, type DecisionCreateInput } from "#shared/schemas/decisions.ts";
import type { DocumentAnswer } from "#shared/schemas/documents.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { RiskAnswer } from "#shared/schemas/risks.ts";
import { Button } from "../../../components/ui/button.tsx";
import { FieldError, SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog, IdPicksField } from "../../../components/ui/form-dialog.tsx";
import { MoneyField } from "../../../components/ui/money-field.tsx";
import { formatDate } from "../../../lib/format.ts";
import { changedFields, pick, saveForm } from "../../../lib/forms.ts";
import { RECORD_AUDIENCE_OPTIONS } from "../../../lib/record.tsx";
import { useCreateDecision, usePatchDecision } from "../api.ts";

type Values = z.input<typeof DecisionCreateInputSchema>;

const BLANK_OPTION = { label: "", consequence: "", cost: null };

function valuesOf(d: DecisionAnswer | null): Values {
  if (!d) return { title: "", question: "", background: "", options: [BLANK_OPTION, BLANK_OPTION], recommendedOption: null, recommendation: "", decider: "", neededBy: "", linkedMilestones: [], linkedRisks: [], documentIds: [], audience: "investor" };
  return {
    ...pick(d, ["title", "question", "background", "options", "recommendedOption", "recommendation", "decider", "neededBy", "audience"]),
    linkedMilestones: d.linkedMilestones.map((m) => m.id),
    linkedRisks: d.linkedRisks.map((r) => r.id),
    documentIds: d.documents.map((x) => x.id),
  };
}

/**
 * The contract's schema with the rule the server applies to a new request: needed by today
 * or later on the project's calendar (`today`). An existing request keeps its date.
 */
export function decisionFormSchema(today: string | null) {
  return DecisionCreateInputSchema.superRefine((v, ctx) => {
    if (today !== null && v.neededBy < today) ctx.addIssue({ code: "custom", path: ["neededBy"], message: `must not be in the past (today is ${formatDate(today)})` });
    if (v.recommendedOption !== null && v.recommendedOption >= v.options.length) ctx.addIssue({ code: "custom", path: ["recommendedOption"], message: "must be one of the options" });
  });
}

export interface DecisionFormProps {
  slug: string;
  decision: DecisionAnswer | null;
  today: string;
  currency: string;
  milestones: readonly Milestone[];
  risks: readonly RiskAnswer[];
  documents: readonly DocumentAnswer[];
  onClose: () => void;
}

/** The options of a request, each with its consequence and cost; added and removed in place. */
function OptionsEditor({ form, currency }: { form: ReturnType<typeof useForm<Values, unknown, DecisionCreateInput>>; currency: string }) {
  const { fields, append, remove } = useFieldArray({ control: form.control, name: "options" });
  const errors = form.formState.errors.options;
  return (
    <fieldset className="flex flex-col gap-3 border border-rule p-3 sm:col-span-2" aria-label="Options">
      <legend className="px-1 text-sm font-medium">Options</legend>
      <ol className="flex flex-col gap-3">
        {fields.map((f, i) => (
          <li key={f.id} className="grid gap-2 border-b border-rule pb-3 last:border-b-0 sm:grid-cols-[1fr_1fr_11rem_auto] sm:items-start" data-testid="decision-option">
            <TextField label={`Option ${i + 1}`} error={errors?.[i]?.label?.message} {...form.register(`options.${i}.label`)} />
            <TextAreaField label={`Consequence of option ${i + 1}`} rows={2} error={errors?.[i]?.consequence?.message} {...form.register(`options.${i}.consequence`)} />
            <Controller
              control={form.control}
              name={`options.${i}.cost`}
              render={({ field }) => <MoneyField label={`Cost of option ${i + 1}`} currency={currency} signed value={field.value ?? null} onChange={field.onChange} hint="Negative for a saving" error={errors?.[i]?.cost?.message} />}
            />
            <Button size="sm" variant="ghost" className="sm:mt-6" disabled={fields.length <= 1} onClick={() => remove(i)} aria-label={`Remove option ${i + 1}`}>
              Remove
            </Button>
          </li>
        ))}
      </ol>
      <Button size="sm" className="self-start" disabled={fields.length >= 8} onClick={() => append(BLANK_OPTION)}>
        Add an option
      </Button>
      <FieldError id="decision-options-error" error={errors?.message ?? errors?.root?.message} />
    </fieldset>
  );
}

/** Asking for a decision (`decision` null) or editing an open one. */
export function DecisionForm({ slug, decision, today, currency, milestones, risks, documents, onClose }: DecisionFormProps) {
  const create = useCreateDecision(slug);
  const patch = usePatchDecision();
  const before = valuesOf(decision);
  const form = useForm<Values, unknown, DecisionCreateInput>({ resolver: zodResolver(decisionFormSchema(decision ? null : today)), defaultValues: before });
  const { errors } = form.formState;
  const options = useWatch({ control: form.control, name: "options" });
  const onSubmit = form.handleSubmit(async (v) => {
    const write = decision ? () => patch.mutateAsync({ id: decision.id, patch: changedFields(before, v, decision.version) }) : () => create.mutateAsync(v);
    if (await saveForm(form.setError, write, `${v.title} saved`)) onClose();
  });
  return (
    <FormDialog title={decision ? `Edit ${decision.reference}` : "Ask for a decision"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message}>
      <TextField label="Title" error={errors.title?.message} {...form.register("title")} />
      <TextField label="Who decides" hint="e.g. Investors' committee, Lender, Board" error={errors.decider?.message} {...form.register("decider")} />
      <div className="sm:col-span-2">
        <TextAreaField label="The question" rows={2} error={errors.question?.message} {...form.register("question")} />
      </div>
      <div className="sm:col-span-2">
        <TextAreaField label="Background" rows={3} error={errors.background?.message} {...form.register("background")} />
      </div>
      <OptionsEditor form={form} currency={currency} />
      <SelectField
        label="Recommended option"
        options={[{ value: "", label: "No recommendation" }, ...(options ?? []).map((o, i) => ({ value: String(i), label: o.label || `Option ${i + 1}` }))]}
        error={errors.recommendedOption?.message}
        {...form.register("recommendedOption", { setValueAs: (v: string | number | null) => (v === "" || v === null ? null : Number(v)) })}
      />
      <DateField label="Needed by" min={decision ? undefined : today} hint={decision ? undefined : `Today or later (today is ${formatDate(today)})`} error={errors.neededBy?.message} {...form.register("neededBy")} />
      <div className="sm:col-span-2">
        <TextAreaField label="Recommendation" rows={2} error={errors.recommendation?.message} {...form.register("recommendation")} />
      </div>
      <SelectField label="Audience" options={RECORD_AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <div />
      <IdPicksField control={form.control} name="linkedMilestones" legend="Milestones that move if it is not decided in time" options={milestones.map((m) => ({ id: m.id, label: m.name, hint: formatDate(m.forecastFinish ?? m.baselineFinish) }))} empty="The programme has no milestones yet." />
      <IdPicksField control={form.control} name="linkedRisks" legend="Risks it answers" options={risks.map((r) => ({ id: r.id, label: `${r.reference} ${r.title}` }))} empty="The register is empty." />
      <div className="sm:col-span-2">
        <IdPicksField control={form.control} name="documentIds" legend="Documents attached" options={documents.map((d) => ({ id: d.id, label: d.title, hint: d.period }))} empty="The document library is empty." />
      </div>
    </FormDialog>
  );
}
