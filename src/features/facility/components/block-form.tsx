import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { BlockCreateInputSchema, ContainmentSchema, COOLING_APPROACH_SUGGESTIONS, type BlockAnswer, type BlockCreateInput } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { formatDate } from "../../../lib/format.ts";
import { useCreateBlock, useDeleteBlock, usePatchBlock } from "../api.ts";
import { CONTAINMENT_WORD } from "../words.ts";
import { AUDIENCE_OPTIONS, changedFields, FormDialog, IdPicksField, optionsOf, pick, rowEditor } from "./form-parts.tsx";

type Values = z.input<typeof BlockCreateInputSchema>;

function valuesOf(b: BlockAnswer | null): Values {
  if (!b) return { name: "", racks: 0, itKw: 0, maxKwPerRack: 10, coolingApproach: "", containment: "none", audience: "internal", stage: "", dependsOn: [], notes: "" };
  return pick(b, ["name", "racks", "itKw", "maxKwPerRack", "coolingApproach", "containment", "audience", "stage", "dependsOn", "notes"]);
}

/** Milestones as choices, each with its finish, so the lead picks the ones that make the block ready. */
export function milestoneChoices(milestones: readonly Milestone[]) {
  return milestones.map((m) => ({ id: m.id, label: m.name, hint: `${m.phase} · ${formatDate(m.forecastFinish ?? m.baselineFinish)}` }));
}

/** Creating a capacity block (`block` null) or editing one; the milestones it depends on are picked from the programme. */
export function BlockForm({ slug, block, milestones, onClose }: { slug: string; block: BlockAnswer | null; milestones: readonly Milestone[]; onClose: () => void }) {
  const create = useCreateBlock(slug);
  const patch = usePatchBlock(slug);
  const remove = useDeleteBlock(slug);
  const form = useForm<Values, unknown, BlockCreateInput>({ resolver: zodResolver(BlockCreateInputSchema), defaultValues: valuesOf(block) });
  const { errors } = form.formState;
  const { onSubmit, onDelete } = rowEditor(
    form,
    block,
    { create: (v) => create.mutateAsync(v), patch: (b, v) => patch.mutateAsync({ id: b.id, patch: changedFields(valuesOf(b), v, b.version) }), remove: (b) => remove.mutateAsync({ id: b.id }) },
    onClose,
  );
  const num = { valueAsNumber: true } as const;
  return (
    <FormDialog title={block ? `Edit ${block.name}` : "New capacity block"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message} onDelete={onDelete} deleting={remove.isPending}>
      <TextField label="Name" hint="e.g. Hall 2A, HD-1" error={errors.name?.message} {...form.register("name")} />
      <TextField label="Build stage" hint="e.g. Stage 1, Stage 2 (later)" error={errors.stage?.message} {...form.register("stage")} />
      <TextField label="Racks" type="number" inputMode="numeric" min={0} step={1} error={errors.racks?.message} {...form.register("racks", num)} />
      <TextField label="IT load (kW)" type="number" inputMode="decimal" min={0} step="any" error={errors.itKw?.message} {...form.register("itKw", num)} />
      <TextField label="Maximum kW per rack" type="number" inputMode="decimal" min={0} step="any" error={errors.maxKwPerRack?.message} {...form.register("maxKwPerRack", num)} />
      <SelectField label="Audience" options={AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <TextField label="Cooling approach" list="cooling-approaches" error={errors.coolingApproach?.message} {...form.register("coolingApproach")} />
      <datalist id="cooling-approaches">
        {COOLING_APPROACH_SUGGESTIONS.map((s) => (
          <option key={s} value={s} />
        ))}
      </datalist>
      <SelectField label="Containment" options={optionsOf(CONTAINMENT_WORD, ContainmentSchema.options)} error={errors.containment?.message} {...form.register("containment")} />
      <div className="sm:col-span-2">
        <IdPicksField control={form.control} name="dependsOn" legend="Ready for service when these milestones are complete" options={milestoneChoices(milestones)} empty="The programme has no milestones yet." />
      </div>
      <div className="sm:col-span-2">
        <TextAreaField label="Notes for prospects" rows={3} error={errors.notes?.message} {...form.register("notes")} />
      </div>
    </FormDialog>
  );
}
