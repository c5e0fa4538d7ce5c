import { zodResolver } from "@hookform/resolvers/zod";
import { Controller, useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { BudgetChangeCreateInputSchema, BudgetChangeStatusSchema, type BudgetChangeAnswer, type BudgetChangeCreateInput } from "#shared/schemas/budget.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { RiskAnswer } from "#shared/schemas/risks.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog, IdPicksField } from "../../../components/ui/form-dialog.tsx";
import { MoneyField } from "../../../components/ui/money-field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { formatDate } from "../../../lib/format.ts";
import { changedFields, optionsOf, pick, saveForm } from "../../../lib/forms.ts";
import { RECORD_AUDIENCE_OPTIONS } from "../../../lib/record.tsx";
import { useCreateChange, useDeleteChange, usePatchChange } from "../api.ts";
import { STATUS_WORD } from "../words.ts";

type Values = z.input<typeof BudgetChangeCreateInputSchema>;

function valuesOf(c: BudgetChangeAnswer | null): Values {
  if (!c) return { description: "", detail: "", amount: Number.NaN, status: "proposed", approvedBy: null, approvedOn: null, drawsOnContingency: false, linkedMilestones: [], linkedRisks: [], audience: "internal" };
  return {
    ...pick(c, ["description", "detail", "amount", "status", "approvedBy", "approvedOn", "drawsOnContingency", "audience"]),
    linkedMilestones: c.linkedMilestones.map((m) => m.id),
    linkedRisks: c.linkedRisks.map((r) => r.id),
  };
}

/** What an approved change still lacks, said while the lead fills it in (the schema refuses the same on save). */
export function approvalMissing(v: { status?: string; approvedBy?: string | null; approvedOn?: string | null }): string | null {
  if (v.status !== "approved") return null;
  const missing = [!v.approvedBy ? "who approved it" : null, !v.approvedOn ? "the date of approval" : null].filter(Boolean);
  return missing.length ? `An approved change needs ${missing.join(" and ")}.` : null;
}

const textOrNull = { setValueAs: (v: string | null) => (v === "" || v === null ? null : v) };

/** Recording a budget change (`change` null) or editing one; approval needs who and when. */
export function ChangeForm({ slug, change, currency, milestones, risks, onClose }: { slug: string; change: BudgetChangeAnswer | null; currency: string; milestones: readonly Milestone[]; risks: readonly RiskAnswer[]; onClose: () => void }) {
  const create = useCreateChange(slug);
  const patch = usePatchChange();
  const remove = useDeleteChange();
  const before = valuesOf(change);
  const form = useForm<Values, unknown, BudgetChangeCreateInput>({ resolver: zodResolver(BudgetChangeCreateInputSchema), defaultValues: before });
  const { errors } = form.formState;
  const [status, approvedBy, approvedOn] = useWatch({ control: form.control, name: ["status", "approvedBy", "approvedOn"] });
  const missing = approvalMissing({ status, approvedBy, approvedOn });
  const onSubmit = form.handleSubmit(async (v) => {
    const write = change ? () => patch.mutateAsync({ id: change.id, patch: changedFields(before, v, change.version) }) : () => create.mutateAsync(v);
    if (await saveForm(form.setError, write, `${v.description} saved`)) onClose();
  });
  const onDelete =
    change && change.status === "proposed"
      ? async () => {
          if (await saveForm(form.setError, () => remove.mutateAsync({ id: change.id }), `${change.reference} deleted`)) onClose();
        }
      : undefined;
  return (
    <FormDialog title={change ? `Edit ${change.reference}` : "Record a budget change"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message} onDelete={onDelete} deleting={remove.isPending}>
      <div className="sm:col-span-2">
        <TextField label="Description" error={errors.description?.message} {...form.register("description")} />
      </div>
      <Controller
        control={form.control}
        name="amount"
        render={({ field }) => <MoneyField label="Amount" signed currency={currency} value={Number.isFinite(field.value) ? field.value : null} onChange={(v) => field.onChange(v ?? Number.NaN)} hint="Positive adds to the budget; negative is a saving." error={errors.amount?.message} />}
      />
      <SelectField label="Status" options={optionsOf(STATUS_WORD, BudgetChangeStatusSchema.options)} error={errors.status?.message} {...form.register("status")} />
      {status === "approved" ? (
        <>
          <TextField label="Approved by" hint="A person or a body, e.g. Investors' committee" error={errors.approvedBy?.message} {...form.register("approvedBy", textOrNull)} />
          <DateField label="Approved on" error={errors.approvedOn?.message} {...form.register("approvedOn", textOrNull)} />
          {missing ? (
            <div className="sm:col-span-2" data-testid="approval-rule">
              <Notice tone="caution">{missing}</Notice>
            </div>
          ) : null}
        </>
      ) : null}
      <label className="inline-flex items-center gap-2 text-sm sm:col-span-2">
        <input type="checkbox"  {...form.register("drawsOnContingency")} />
        Draws on the contingency (moves money from the contingency into the works, leaving the approved budget as it is)
      </label>
      <SelectField label="Audience" options={RECORD_AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <div className="sm:col-span-2">
        <TextAreaField label="Detail" rows={2} error={errors.detail?.message} {...form.register("detail")} />
      </div>
      <IdPicksField control={form.control} name="linkedMilestones" legend="Milestones" options={milestones.map((m) => ({ id: m.id, label: m.name, hint: formatDate(m.forecastFinish ?? m.baselineFinish) }))} empty="The programme has no milestones yet." />
      <IdPicksField control={form.control} name="linkedRisks" legend="Risks" options={risks.map((r) => ({ id: r.id, label: `${r.reference} ${r.title}` }))} empty="The register is empty." />
    </FormDialog>
  );
}
