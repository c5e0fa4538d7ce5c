import { zodResolver } from "@hookform/resolvers/zod";
import { Controller, useForm } from "react-hook-form";
import { BudgetSettingsInputSchema, type BudgetPosition, type BudgetSettingsInput } from "#shared/schemas/budget.ts";
import { Button } from "../../../components/ui/button.tsx";
import { FieldError } from "../../../components/ui/field.tsx";
import { MoneyField } from "../../../components/ui/money-field.tsx";
import { saveForm } from "../../../lib/forms.ts";
import { useBudgetSettings } from "../api.ts";
import { fullMoney, METHOD_WORD } from "../words.ts";

function Figure({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="border border-rule bg-sheet p-3">
      <dt className="label-caps">{label}</dt>
      <dd className="tabular text-xl font-semibold">{value}</dd>
      {note ? <dd className="text-xs text-ink-soft">{note}</dd> : null}
    </div>
  );
}

/** The position in figures: budgets, contingency, cost to date and the projected final cost. */
export function PositionFigures({ p }: { p: BudgetPosition }) {
  const m = (v: number | null) => fullMoney(v, p.currency);
  const index = (v: number | null) => (v === null ? "—" : v.toFixed(2));
  return (
    <dl className="grid grid-cols-2 gap-3 lg:grid-cols-4" aria-label="Cost position" data-testid="budget-position">
      <Figure label="Original budget" value={m(p.originalBudget)} />
      <Figure label="Approved changes" value={m(p.approvedChanges)} />
      <Figure label="Current approved budget" value={m(p.currentBudget)} />
      <Figure label="Projected final cost" value={m(p.projectedFinalCost)} note={METHOD_WORD[p.projectedFinalCostMethod]} />
      <Figure label="Contingency held" value={m(p.contingencyHeld)} />
      <Figure label="Contingency drawn" value={m(p.contingencyDrawn)} />
      <Figure label="Contingency remaining" value={m(p.contingencyRemaining)} note={`open risks expect ${m(p.riskExposure.expected)} (three-point ${m(p.riskExposure.pert)})`} />
      <Figure label="Cost to date" value={m(p.actualCost)} note={`CPI ${index(p.cpi)} · SPI ${index(p.spi)}`} />
    </dl>
  );
}

/**
 * The lead's settings: the contingency held and which estimate at completion is the projected
 * final cost, each method shown with its formula, its figure today and the sentence that says
 * what it assumes, so the choice is made knowingly.
 */
export function BudgetSettingsForm({ slug, p }: { slug: string; p: BudgetPosition }) {
  const save = useBudgetSettings(slug);
  const form = useForm<BudgetSettingsInput>({ resolver: zodResolver(BudgetSettingsInputSchema), defaultValues: { contingencyHeld: p.contingencyHeld, projectedFinalCostMethod: p.projectedFinalCostMethod } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    await saveForm(form.setError, () => save.mutateAsync(v), "Budget settings saved");
  });
  return (
    <form onSubmit={onSubmit} noValidate aria-label="Budget settings" className="flex flex-col gap-4">
      <div className="max-w-xs">
        <Controller control={form.control} name="contingencyHeld" render={({ field }) => <MoneyField label="Contingency held" currency={p.currency} value={field.value} onChange={(v) => field.onChange(v ?? Number.NaN)} error={errors.contingencyHeld?.message} />} />
      </div>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Projected final cost: which estimate at completion</legend>
        {p.eac.map((v) => (
          <label key={v.method} className="flex items-start gap-3 border border-rule bg-paper p-3 has-[:checked]:border-2 has-[:checked]:border-ink" data-method={v.method}>
            <input type="radio" value={v.method} className="mt-1" {...form.register("projectedFinalCostMethod")} />
            <span className="flex flex-col gap-0.5">
              <span className="font-medium">
                {METHOD_WORD[v.method]} <span className="ml-1 font-mono text-xs text-ink-soft">{v.formula}</span>
              </span>
              <span className="tabular text-lg font-semibold">{fullMoney(v.value, p.currency)}</span>
              <span className="text-sm text-ink-soft">{v.sentence}</span>
            </span>
          </label>
        ))}
        <FieldError id="method-error" error={errors.projectedFinalCostMethod?.message} />
      </fieldset>
      <p className="text-xs text-ink-soft">Source of the formulas: PMI, PMBOK Guide, earned value calculations summary.</p>
      <FieldError id="settings-root" error={errors.root?.message} />
      <Button type="submit" className="self-start" busy={save.isPending}>
        Save the settings
      </Button>
    </form>
  );
}
