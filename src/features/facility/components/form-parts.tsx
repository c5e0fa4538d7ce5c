import { useId, useState, type FormEvent, type ReactNode } from "react";
import type { FieldValues, UseFormReturn, UseFormSetError } from "react-hook-form";
import { toast } from "sonner";
import { AudienceSchema } from "#shared/schemas/common.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { FieldError } from "../../../components/ui/field.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { applyFieldErrors } from "../../../lib/format.ts";
import { AUDIENCE_WORD } from "../words.ts";

export const AUDIENCE_OPTIONS = AudienceSchema.options.map((a) => ({ value: a, label: AUDIENCE_WORD[a] }));

/** Options of a select from a word map: `{ value, label }` in the map's order. */
export function optionsOf<K extends string>(words: Record<K, string>, only?: readonly K[]) {
  return (only ?? (Object.keys(words) as K[])).map((k) => ({ value: k, label: words[k] }));
}

/** An `<input type="number">`'s text as a number, or null when left empty (optional figures). */
export const numberOrNull = (v: unknown) => (v === "" || v === null || v === undefined ? null : Number(v));

/**
 * The fields of `values` that differ from `before`, as a PATCH body with the version read.
 * Arrays and objects compare by content, so an untouched list is not sent.
 */
export function changedFields<T extends Record<string, unknown>>(before: Record<string, unknown>, values: T, version: number): Partial<T> & { version: number } {
  const patch: Record<string, unknown> = { version };
  for (const [key, value] of Object.entries(values)) {
    if (JSON.stringify(value) !== JSON.stringify(before[key])) patch[key] = value;
  }
  return patch as Partial<T> & { version: number };
}

/**
 * Sends a form's write and shows what went wrong beside the fields: a 409 says someone else
 * saved first (the page has been read again, so reopening shows their version), field errors
 * go to their fields, anything else to the form as a whole. True when it saved.
 */
export async function saveForm<V extends FieldValues>(setError: UseFormSetError<V>, write: () => Promise<unknown>, done: string): Promise<boolean> {
  try {
    await write();
    toast.success(done);
    return true;
  } catch (e) {
    if (e instanceof ApiError && e.status === 409) {
      setError("root", { message: "Someone else saved this while you were editing. Close and open it again to see their version, then make your change." });
    } else if (e instanceof ApiError && Object.keys(e.fields).length > 0) {
      applyFieldErrors(e.fields, setError);
    } else {
      setError("root", { message: e instanceof Error ? e.message : "The change could not be saved." });
    }
    return false;
  }
}

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

/** Ticks for choosing ids (milestones a block depends on, blocks a system serves). */
export function IdPicks({ legend, options, value, onChange, error, empty }: { legend: string; options: ReadonlyArray<{ id: number; label: string; hint?: string }>; value: readonly number[]; onChange: (v: number[]) => void; error?: string; empty: string }) {
  const id = useId();
  return (
    <fieldset className="flex flex-col gap-1" aria-describedby={error ? `${id}-error` : undefined}>
      <legend className="text-sm font-medium">{legend}</legend>
      {options.length === 0 ? (
        <p className="text-sm text-ink-faint">{empty}</p>
      ) : (
        <div className="flex max-h-44 flex-col gap-1 overflow-y-auto border border-rule bg-paper p-2">
          {options.map((o) => {
            const on = value.includes(o.id);
            return (
              <label key={o.id} className="inline-flex items-start gap-2 text-sm">
                <input type="checkbox" className="mt-1 accent-[#c2410c]" checked={on} onChange={() => onChange(on ? value.filter((x) => x !== o.id) : [...value, o.id])} />
                <span>
                  {o.label}
                  {o.hint ? <span className="ml-1 text-xs text-ink-faint">{o.hint}</span> : null}
                </span>
              </label>
            );
          })}
        </div>
      )}
      <FieldError id={`${id}-error`} error={error} />
    </fieldset>
  );
}

/**
 * A facility editor in a dialog: its fields, the form's own error, save and (for an existing
 * row) delete. `after` is shown below the form, outside it (a form of its own, a history).
 */
export function FormDialog({ title, onClose, onSubmit, busy, rootError, onDelete, deleting, children, after }: { title: string; onClose: () => void; onSubmit: (e: FormEvent) => void; busy: boolean; rootError?: string; onDelete?: () => void; deleting?: boolean; children: ReactNode; after?: ReactNode }) {
  const formId = useId();
  // Deleting asks twice: the first press only arms the button.
  const [armed, setArmed] = useState(false);
  return (
    <Dialog
      open
      title={title}
      onClose={onClose}
      dismiss="Cancel"
      wide
      footer={
        <>
          {onDelete ? (
            <Button variant="danger" onClick={armed ? onDelete : () => setArmed(true)} busy={deleting}>
              {armed ? "Delete for good" : "Delete…"}
            </Button>
          ) : null}
          <Button type="submit" form={formId} variant="primary" busy={busy}>
            Save
          </Button>
        </>
      }
    >
      <form id={formId} onSubmit={onSubmit} noValidate className="grid gap-3 sm:grid-cols-2" aria-label={title}>
        {children}
        {rootError ? (
          <div className="sm:col-span-2">
            <FieldError id={`${formId}-root`} error={rootError} />
          </div>
        ) : null}
      </form>
      {after}
    </Dialog>
  );
}
