import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { DecisionOutcomeInputSchema, DecisionWithdrawInputSchema, type DecisionAnswer, type DecisionOutcomeInput } from "#shared/schemas/decisions.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { FormDialog } from "../../../components/ui/form-dialog.tsx";
import { saveForm } from "../../../lib/forms.ts";
import { useRecordOutcome, useWithdrawDecision } from "../api.ts";

/** Recording what was decided: the option chosen (or none of them), in words, by whom and on what day. */
export function OutcomeForm({ decision, today, onClose }: { decision: DecisionAnswer; today: string; onClose: () => void }) {
  const record = useRecordOutcome();
  const form = useForm<z.input<typeof DecisionOutcomeInputSchema>, unknown, DecisionOutcomeInput>({
    resolver: zodResolver(DecisionOutcomeInputSchema),
    defaultValues: { chosenOption: decision.recommendedOption, outcome: "", decidedBy: decision.decider, decidedOn: today, version: decision.version },
  });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => record.mutateAsync({ id: decision.id, input: v }), `${decision.reference} decided`)) onClose();
  });
  return (
    <FormDialog title={`Record the outcome of ${decision.reference}`} onClose={onClose} onSubmit={onSubmit} busy={record.isPending} rootError={errors.root?.message} submitLabel="Record the outcome">
      <div className="sm:col-span-2">
        <p className="text-sm text-ink-soft">{decision.question}</p>
      </div>
      <SelectField
        label="Option chosen"
        options={[...decision.options.map((o, i) => ({ value: String(i), label: o.label })), { value: "", label: "None of the options" }]}
        error={errors.chosenOption?.message}
        {...form.register("chosenOption", { setValueAs: (v: string | number | null) => (v === "" || v === null ? null : Number(v)) })}
      />
      <TextField label="Decided by" error={errors.decidedBy?.message} {...form.register("decidedBy")} />
      <DateField label="Decided on" max={today} error={errors.decidedOn?.message} {...form.register("decidedOn")} />
      <div className="sm:col-span-2">
        <TextAreaField label="Outcome" rows={3} hint="What was decided, and any condition attached to it." error={errors.outcome?.message} {...form.register("outcome")} />
      </div>
    </FormDialog>
  );
}

/** Withdrawing a request that is no longer needed, with the reason (kept in its record). */
export function WithdrawForm({ decision, onClose }: { decision: DecisionAnswer; onClose: () => void }) {
  const withdraw = useWithdrawDecision();
  const form = useForm<z.input<typeof DecisionWithdrawInputSchema>, unknown, z.output<typeof DecisionWithdrawInputSchema>>({ resolver: zodResolver(DecisionWithdrawInputSchema), defaultValues: { reason: "", version: decision.version } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => withdraw.mutateAsync({ id: decision.id, ...v }), `${decision.reference} withdrawn`)) onClose();
  });
  return (
    <FormDialog title={`Withdraw ${decision.reference}`} onClose={onClose} onSubmit={onSubmit} busy={withdraw.isPending} rootError={errors.root?.message} submitLabel="Withdraw the request">
      <div className="sm:col-span-2">
        <TextAreaField label="Why it is no longer needed" rows={3} error={errors.reason?.message} {...form.register("reason")} />
      </div>
    </FormDialog>
  );
}
