import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { FacilitySettingsInputSchema, type FacilitySettingsInput } from "#shared/schemas/facility.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { applyApiError } from "../../../lib/format.ts";
import { usePutFacilitySettings } from "../api.ts";

/** The levels a unit may carry load from, in the plant key's own words (unit-shapes.tsx). */
const LEVELS = [
  { value: "3", label: "L3 — installed and started" },
  { value: "4", label: "L4 — functional test passed" },
  { value: "5", label: "L5 — integrated systems test passed" },
];

/**
 * The one facility setting, for leads and admins: from which commissioning level a unit counts as
 * carrying its load. Every "now" label and every block's readiness follow it at once.
 */
export function CarryLoadSetting({ slug, level }: { slug: string; level: number }) {
  const put = usePutFacilitySettings(slug);
  const form = useForm<FacilitySettingsInput>({ resolver: zodResolver(FacilitySettingsInputSchema), values: { availableFromLevel: level } });
  const onSubmit = form.handleSubmit((values) => put.mutateAsync(values).catch((e: unknown) => applyApiError(e, form.setError as never, "The setting was not changed.")));
  const { errors, isDirty } = form.formState;
  return (
    <form onSubmit={(e) => void onSubmit(e)} className="mb-4 flex flex-wrap items-end gap-3" noValidate aria-label="When a unit carries its load">
      <SelectField
        label="A unit carries its load from"
        options={LEVELS}
        error={errors.availableFromLevel?.message ?? errors.root?.message}
        hint="Redundancy now and readiness count only units at this level or beyond."
        {...form.register("availableFromLevel", { valueAsNumber: true })}
      />
      <Button type="submit" size="sm" busy={put.isPending} disabled={!isDirty}>
        Save level
      </Button>
    </form>
  );
}
