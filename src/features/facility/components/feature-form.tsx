import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { FEATURE_STATUSES, FeatureCreateInputSchema, FeatureKindSchema, SecurityLayerSchema, type FeatureAnswer, type FeatureCreateInput } from "#shared/schemas/facility.ts";
import { SelectField, TextAreaField, TextField } from "../../../components/ui/field.tsx";
import { DateField } from "../../../components/ui/date-field.tsx";
import { useCreateFeature, useDeleteFeature, usePatchFeature } from "../api.ts";
import { FEATURE_KIND_WORD, FEATURE_STATUS_WORD, LAYER_WORD } from "../words.ts";
import { AUDIENCE_OPTIONS, changedFields, FormDialog, optionsOf, pick, rowEditor } from "./form-parts.tsx";

type Values = z.input<typeof FeatureCreateInputSchema>;

function valuesOf(f: FeatureAnswer | null, kind: FeatureAnswer["kind"]): Values {
  if (!f) return { kind, name: "", detail: "", layer: kind === "security" ? "perimeter" : null, status: "planned", statusDate: null, audience: "public" };
  return pick(f, ["kind", "name", "detail", "layer", "status", "statusDate", "audience"]);
}

/** Creating a site feature (`feature` null, of `kind`) or editing one; the statuses offered are those of its kind. */
export function FeatureForm({ slug, feature, kind, onClose }: { slug: string; feature: FeatureAnswer | null; kind: FeatureAnswer["kind"]; onClose: () => void }) {
  const create = useCreateFeature(slug);
  const patch = usePatchFeature(slug);
  const remove = useDeleteFeature(slug);
  const form = useForm<Values, unknown, FeatureCreateInput>({ resolver: zodResolver(FeatureCreateInputSchema), defaultValues: valuesOf(feature, kind) });
  const { errors } = form.formState;
  const chosen = useWatch({ control: form.control, name: "kind" }) ?? kind;
  // Only security features have a layer, and each kind has its own statuses: a new kind resets both.
  useEffect(() => {
    if (chosen !== "security") form.setValue("layer", null);
    else if (!form.getValues("layer")) form.setValue("layer", "perimeter");
    if (!FEATURE_STATUSES[chosen].includes(form.getValues("status"))) form.setValue("status", "planned");
  }, [chosen]);
  const { onSubmit, onDelete } = rowEditor(
    form,
    feature,
    {
      create: (v) => create.mutateAsync(v),
      // The kind is fixed once created: it is neither compared nor sent.
      patch: (f, { kind: _fixed, ...rest }) => {
        const { kind: _was, ...was } = valuesOf(f, f.kind);
        return patch.mutateAsync({ id: f.id, patch: changedFields(was, rest, f.version) });
      },
      remove: (f) => remove.mutateAsync({ id: f.id }),
    },
    onClose,
  );
  return (
    <FormDialog title={feature ? `Edit ${feature.name}` : `New: ${FEATURE_KIND_WORD[kind]}`} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message} onDelete={onDelete} deleting={remove.isPending}>
      {feature ? (
        <p className="text-sm">
          <span className="font-medium">Kind</span>
          <br />
          {FEATURE_KIND_WORD[feature.kind]} <span className="text-xs text-ink-faint">(fixed once created)</span>
        </p>
      ) : (
        <SelectField label="Kind" options={optionsOf(FEATURE_KIND_WORD, FeatureKindSchema.options)} error={errors.kind?.message} {...form.register("kind")} />
      )}
      <TextField label="Name" hint="e.g. Turnstiles at the gatehouse, Meet-me room A" error={errors.name?.message} {...form.register("name")} />
      {chosen === "security" ? (
        <SelectField label="Layer" options={optionsOf(LAYER_WORD, SecurityLayerSchema.options)} error={errors.layer?.message} {...form.register("layer")} />
      ) : null}
      <SelectField label="Status" options={optionsOf(FEATURE_STATUS_WORD, FEATURE_STATUSES[chosen])} error={errors.status?.message} {...form.register("status")} />
      <DateField label="Status date" hint="Certified on, expected by (optional)" error={errors.statusDate?.message} {...form.register("statusDate", { setValueAs: (v: string | null) => (v === "" ? null : v) })} />
      <SelectField label="Audience" options={AUDIENCE_OPTIONS} error={errors.audience?.message} {...form.register("audience")} />
      <div className="sm:col-span-2">
        <TextAreaField label="Detail" rows={3} error={errors.detail?.message} {...form.register("detail")} />
      </div>
    </FormDialog>
  );
}
