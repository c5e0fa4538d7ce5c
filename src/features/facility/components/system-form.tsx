import { zodResolver } from "@hookform/resolvers/zod";
import { useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import {
  DesignFiguresSchema,
  PlantKindSchema,
  RatingUnitSchema,
  SystemCreateInputSchema,
  type BlockAnswer,
  type DesignFigures,
  type PlantKind,
  type SystemAnswer,
  type SystemCreateInput,
  type SystemPatchInput,
} from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { useCreateSystem, useDeleteSystem, usePatchSystem } from "../api.ts";
import { KIND_WORD, RATING_UNIT_WORD } from "../words.ts";
import { milestoneChoices } from "./block-form.tsx";
import { AUDIENCE_OPTIONS, changedFields, FormDialog, IdPicksField, numberOrNull, optionsOf, pick, rowEditor } from "./form-parts.tsx";

type Values = z.input<typeof SystemCreateInputSchema>;

/** The design figures each kind of plant uses (the others stay as they are). */
const DESIGN_FIELDS: Partial<Record<PlantKind, Array<{ key: keyof DesignFigures; label: string }>>> = {
  air_movement: [
    { key: "airflowM3s", label: "Airflow per unit (m³/s)" },
    { key: "deltaTK", label: "Air temperature rise ΔT (K)" },
    { key: "supplyAirC", label: "Supply air (°C)" },
  ],
  cooling: [
    { key: "chilledWaterFlowKgS", label: "Chilled-water flow per unit (kg/s)" },
    { key: "chilledWaterSupplyC", label: "Chilled water supply (°C)" },
    { key: "chilledWaterReturnC", label: "Chilled water return (°C)" },
    { key: "supplyAirC", label: "Supply air (°C)" },
  ],
  fuel_storage: [
    { key: "usableFuelLitres", label: "Usable fuel (L)" },
    { key: "specificFuelConsumption", label: "Specific fuel consumption (L/kWh)" },
  ],
};

function valuesOf(s: SystemAnswer | null): Values {
  if (!s) return { name: "", kind: "cooling", audience: "internal", serves: [], neededPerSystem: 1, independentSystems: 1, ratingPerUnit: null, ratingUnit: null, design: DesignFiguresSchema.parse({}), linkedMilestones: [], notes: "" };
  return pick(s, ["name", "kind", "audience", "serves", "neededPerSystem", "independentSystems", "ratingPerUnit", "ratingUnit", "design", "linkedMilestones", "notes"]);
}

/** A PATCH of a system: a rating travels with its unit, so the server checks the pair as one. */
function systemPatch(s: SystemAnswer, v: SystemCreateInput): SystemPatchInput {
  const patch = changedFields(valuesOf(s), v, s.version) as SystemPatchInput;
  if ("ratingPerUnit" in patch || "ratingUnit" in patch) Object.assign(patch, { ratingPerUnit: v.ratingPerUnit, ratingUnit: v.ratingUnit });
  return patch;
}

/** Creating a plant system (`system` null) or editing one: what it is, how many units it needs, what it serves. */
export function SystemForm({ slug, system, blocks, milestones, onClose }: { slug: string; system: SystemAnswer | null; blocks: readonly BlockAnswer[]; milestones: readonly Milestone[]; onClose: () => void }) {
  const create = useCreateSystem(slug);
  const patch = usePatchSystem(slug);
  const remove = useDeleteSystem(slug);
  const form = useForm<Values, unknown, SystemCreateInput>({ resolver: zodResolver(SystemCreateInputSchema), defaultValues: valuesOf(system) });
  const { errors } = form.formState;
  const kind = useWatch({ control: form.control, name: "kind" });
  const { onSubmit, onDelete } = rowEditor(
    form,
    system,
    { create: (v) => create.mutateAsync(v), patch: (sys, v) => patch.mutateAsync({ id: sys.id, patch: systemPatch(sys, v) }), remove: (sys) => remove.mutateAsync({ id: sys.id }) },
    onClose,
  );
  const num = { valueAsNumber: true } as const;
  return (
    <FormDialog title={system ? `Edit ${system.name}` : "New plant system"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message} onDelete={onDelete} deleting={remove.isPending}>
      <TextField label="Name" hint="e.g. Chillers, Supply fans" error={errors.name?.message} {...form.register("name")} />
      <SelectField label="Kind" options={optionsOf(KIND_WORD, PlantKindSchema.options)} error={errors.kind?.message} {...form.register("kind")} />
      <TextField label="Units needed per system (N)" hint="Units that carry the design load together" type="number" inputMode="numeric" min={1} step={1} error={errors.neededPerSystem?.message} {...form.register("neededPerSystem", num)} />
      <TextField label="Independent systems" hint="1 for N+k designs, 2 for 2N" type="number" inputMode="numeric" min={1} max={4} step={1} error={errors.independentSystems?.message} {...form.register("independentSystems", num)} />
      <TextField label="Rating per unit" type="number" inputMode="decimal" min={0} step="any" error={errors.ratingPerUnit?.message} {...form.register("ratingPerUnit", { setValueAs: numberOrNull })} />
      <SelectField
        label="Unit of the rating"
        options={[{ value: "", label: "No rating" }, ...optionsOf(RATING_UNIT_WORD, RatingUnitSchema.options)]}
        error={errors.ratingUnit?.message}
        {...form.register("ratingUnit", { setValueAs: (v: string | null) => (v === "" ? null : v) })}
      />
      <SelectField label="Audience" options={AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <div className="hidden sm:block" />
      {(DESIGN_FIELDS[kind ?? "other"] ?? []).map((f) => (
        <TextField key={f.key} label={f.label} type="number" inputMode="decimal" step="any" error={errors.design?.[f.key]?.message} {...form.register(`design.${f.key}`, { setValueAs: numberOrNull })} />
      ))}
      <IdPicksField control={form.control} name="serves" legend="Serves the load of" options={blocks.map((b) => ({ id: b.id, label: b.name, hint: `${b.racks} racks · ${b.itKw} kW` }))} empty="No capacity block yet." />
      <IdPicksField control={form.control} name="linkedMilestones" legend="Linked milestones" options={milestoneChoices(milestones)} empty="The programme has no milestones yet." />
      <div className="sm:col-span-2">
        <TextAreaField label="Notes" rows={2} error={errors.notes?.message} {...form.register("notes")} />
      </div>
    </FormDialog>
  );
}
