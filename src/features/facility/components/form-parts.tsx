import type { FieldValues, UseFormReturn } from "react-hook-form";
import { AudienceSchema } from "#shared/schemas/common.ts";
import { saveForm } from "../../../lib/forms.ts";
import { AUDIENCE_WORD } from "../words.ts";

// The editors' generic parts live in src/lib/forms.ts and src/components/ui/form-dialog.tsx
// (the investor record's office pages use them too); the facility's editors import them here.
export { changedFields, numberOrNull, optionsOf, pick, saveForm } from "../../../lib/forms.ts";
export { FormDialog, IdPicksField } from "../../../components/ui/form-dialog.tsx";

export const AUDIENCE_OPTIONS = AudienceSchema.options.map((a) => ({ value: a, label: AUDIENCE_WORD[a] }));

/**
 * Save and delete for an editor of one row (`row` null: a new one): create or patch on
 * save, delete when asked, each closing the dialog once it has worked.
 */
export function rowEditor<V extends FieldValues, Out extends { name: string }, R extends { id: number; name: string }>(
  form: UseFormReturn<V, unknown, Out>,
  row: R | null,
  writes: { create: (v: Out) => Promise<unknown>; patch: (row: R, v: Out) => Promise<unknown>; remove: (row: R) => Promise<unknown> },
  onClose: () => void,
) {
  const onSubmit = form.handleSubmit(async (v) => {
    if (await saveForm(form.setError, () => (row ? writes.patch(row, v) : writes.create(v)), `${v.name} saved`)) onClose();
  });
  const onDelete = row
    ? async () => {
        if (await saveForm(form.setError, () => writes.remove(row), `${row.name} deleted`)) onClose();
      }
    : undefined;
  return { onSubmit, onDelete };
}
