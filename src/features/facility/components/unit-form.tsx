import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { UNIT_STAGES, UnitCreateInputSchema, type UnitCreateInput } from "#shared/schemas/facility.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { useCreateUnit, usePatchUnit } from "../api.ts";
import { stageWords } from "../words.ts";
import { changedFields, FormDialog, saveForm } from "./form-parts.tsx";
import { UnitStageForm, type UnitStageFormProps } from "./unit-stage-form.tsx";
import { UnitHistory } from "./unit-history.tsx";

type Values = z.input<typeof UnitCreateInputSchema>;

const STAGE_OPTIONS = UNIT_STAGES.map((s) => ({ value: s, label: stageWords(s) }));

/** A new unit of a system: its label, tag, which independent system it is in, and the stage it has reached. */
export function NewUnitForm({ slug, systemId, systemName, trains, at, onClose }: { slug: string; systemId: number; systemName: string; trains: number; at: string; onClose: () => void }) {
  const create = useCreateUnit(slug);
  const form = useForm<Values, unknown, UnitCreateInput>({ resolver: zodResolver(UnitCreateInputSchema), defaultValues: { label: "", tag: "", train: 1, stage: "ordered", on: at, note: "" } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => create.mutateAsync({ systemId, input: { ...v, note: v.note?.trim() ? v.note.trim() : undefined } }), `${v.label} added to ${systemName}`)) onClose();
  });
  return (
    <FormDialog title={`New unit of ${systemName}`} onClose={onClose} onSubmit={onSubmit} busy={create.isPending} rootError={errors.root?.message}>
      <TextField label="Label" hint="e.g. Chiller 3, Fan 5" error={errors.label?.message} {...form.register("label")} />
      <TextField label="Serial or tag" error={errors.tag?.message} {...form.register("tag")} />
      <TextField label="In independent system" type="number" min={1} max={trains} step={1} hint={trains > 1 ? `1 to ${trains}` : "This design has one system"} error={errors.train?.message} {...form.register("train", { valueAsNumber: true })} />
      <SelectField label="Stage reached" options={STAGE_OPTIONS} error={errors.stage?.message} {...form.register("stage")} />
      <DateField label="Day on site" error={errors.on?.message} {...form.register("on", { setValueAs: (v: string) => (v === "" ? undefined : v) })} />
      <div className="sm:col-span-2">
        <TextAreaField label="Note (optional)" rows={2} error={errors.note?.message} {...form.register("note")} />
      </div>
    </FormDialog>
  );
}

type PatchValues = Pick<Values, "label" | "tag" | "train">;
const UnitFieldsSchema = UnitCreateInputSchema.pick({ label: true, tag: true, train: true });

/** An existing unit: its label, tag and system number, its stage (as on the walk) and its history. */
export function EditUnitForm({ stageProps, timeZone, onClose }: { stageProps: Omit<UnitStageFormProps, "onSaved" | "thenNext" | "position">; timeZone: string; onClose: () => void }) {
  const { unit, system, slug } = stageProps;
  const patch = usePatchUnit(slug);
  const before = { label: unit.label, tag: unit.tag, train: unit.train };
  const form = useForm<PatchValues, unknown, z.output<typeof UnitFieldsSchema>>({ resolver: zodResolver(UnitFieldsSchema), defaultValues: before });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => patch.mutateAsync({ id: unit.id, patch: changedFields(before, v, unit.version) }), `${v.label} saved`)) onClose();
  });
  return (
    <FormDialog
      title={`Edit ${unit.label}`}
      onClose={onClose}
      onSubmit={onSubmit}
      busy={patch.isPending}
      rootError={errors.root?.message}
      after={
        <div className="mt-4 flex flex-col gap-4 border-t border-rule pt-3">
          <UnitStageForm key={unit.version} {...stageProps} onSaved={() => undefined} />
          <UnitHistory unitId={unit.id} timeZone={timeZone} />
        </div>
      }
    >
      <TextField label="Label" error={errors.label?.message} {...form.register("label")} />
      <TextField label="Serial or tag" error={errors.tag?.message} {...form.register("tag")} />
      <TextField label="In independent system" type="number" min={1} max={system.independentSystems} step={1} error={errors.train?.message} {...form.register("train", { valueAsNumber: true })} />
    </FormDialog>
  );
}
