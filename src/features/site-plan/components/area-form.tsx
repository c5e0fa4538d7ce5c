import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { AudienceSchema } from "#shared/schemas/common.ts";
import { SiteAreaCreateInputSchema, SiteAreaKindSchema, type SiteArea, type SiteAreaCreateInput } from "#shared/schemas/site-plan.ts";
import { SITE_GRID, type AreaCells } from "#shared/domain/site-plan.ts";
import { SelectField, TextField } from "../../../components/ui/field.tsx";
import { FormDialog } from "../../../components/ui/form-dialog.tsx";
import { AREA_KIND_WORD } from "../../../components/ui/site-plan-drawing.tsx";
import { changedFields, optionsOf, pick, saveForm } from "../../../lib/forms.ts";
import { useCreateArea, useDeleteArea, usePatchArea } from "../api.ts";

type Values = z.input<typeof SiteAreaCreateInputSchema>;

/** The audience words of the house's audience mark, so a screen says one word for each. */
const AUDIENCE_WORD = { public: "Public", investor: "For investors", internal: "Staff only" } as const;

function valuesOf(a: SiteArea | null, cells: AreaCells): Values {
  if (!a) return { name: "", kind: "hall", audience: "public", ...cells };
  return { ...pick(a, ["name", "kind", "x", "y", "w", "h"]), audience: a.audience ?? "public" };
}

/**
 * Naming a new area drawn on the grid (`area` null, at `cells`), or editing one: its name (the
 * words its milestones and photos are tagged with), kind and audience, and its cells — the
 * keyboard's way to place, move and resize it.
 */
export function AreaForm({ slug, area, cells, areaNames, onClose }: { slug: string; area: SiteArea | null; cells: AreaCells; areaNames: readonly string[]; onClose: () => void }) {
  const create = useCreateArea(slug);
  const patch = usePatchArea(slug);
  const remove = useDeleteArea(slug);
  const form = useForm<Values, unknown, SiteAreaCreateInput>({ resolver: zodResolver(SiteAreaCreateInputSchema), defaultValues: valuesOf(area, cells) });
  const errors = form.formState.errors as typeof form.formState.errors & { cells?: { message?: string } };
  const onSubmit = form.handleSubmit(async (v) => {
    const write = () => (area ? patch.mutateAsync({ id: area.id, patch: changedFields(valuesOf(area, area), v, area.version ?? 1) }) : create.mutateAsync(v));
    if (await saveForm(form.setError, write, `${v.name} saved`)) onClose();
  });
  const onDelete = area
    ? async () => {
        if (await saveForm(form.setError, () => remove.mutateAsync({ id: area.id }), `${area.name} deleted`)) onClose();
      }
    : undefined;
  const cell = (name: "x" | "y" | "w" | "h", label: string, hint: string) => (
    <TextField label={label} hint={hint} type="number" inputMode="numeric" error={errors[name]?.message} {...form.register(name, { valueAsNumber: true })} />
  );
  return (
    <FormDialog title={area ? `Edit ${area.name}` : "New area"} onClose={onClose} onSubmit={onSubmit} busy={create.isPending || patch.isPending} rootError={errors.root?.message ?? errors.cells?.message} onDelete={onDelete} deleting={remove.isPending}>
      <TextField label="Name" hint="The words its milestones and photos are tagged with, e.g. Hall 2A" list="site-area-names" error={errors.name?.message} {...form.register("name")} />
      <datalist id="site-area-names">
        {areaNames.map((n) => (
          <option key={n} value={n} />
        ))}
      </datalist>
      <SelectField label="Kind" options={optionsOf(AREA_KIND_WORD, SiteAreaKindSchema.options)} error={errors.kind?.message} {...form.register("kind")} />
      <SelectField label="Who sees it" options={optionsOf(AUDIENCE_WORD, AudienceSchema.options)} error={errors.audience?.message} {...form.register("audience")} />
      <fieldset className="grid grid-cols-2 gap-3">
        <legend className="mb-1 text-sm font-medium">Place on the grid ({SITE_GRID.columns} × {SITE_GRID.rows} cells, counted from the top left)</legend>
        {cell("x", "Column", `0 to ${SITE_GRID.columns - 1}`)}
        {cell("y", "Row", `0 to ${SITE_GRID.rows - 1}`)}
        {cell("w", "Width in cells", `1 to ${SITE_GRID.columns}`)}
        {cell("h", "Height in cells", `1 to ${SITE_GRID.rows}`)}
      </fieldset>
    </FormDialog>
  );
}
